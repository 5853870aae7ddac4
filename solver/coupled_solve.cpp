#include "solver/coupled_solve.hpp"

#include "geometry/internal_check.hpp"
#include "solver/compressed_system.hpp"
#include <Eigen/QR>
#include <exception>
#include <memory>
#include <optional>
#include <stdexcept>

namespace murk {

namespace {

template <class S>
std::vector<Eigen::Index> complement(Eigen::Index size, const std::vector<Eigen::Index>& part) {
    std::vector<char> in(size, 0);
    for (Eigen::Index i : part) in[i] = 1;
    std::vector<Eigen::Index> out;
    for (Eigen::Index i = 0; i < size; ++i)
        if (!in[i]) out.push_back(i);
    return out;
}

// The water rows among a part's unknowns: their global indices, and their
// positions in the part's own (sorted) list.
struct WaterRows {
    std::vector<Eigen::Index> rows, at;
};

WaterRows water_rows_of(const SystemLayout& layout, const std::vector<Eigen::Index>& part) {
    WaterRows w;
    for (std::size_t i = 0; i < part.size(); ++i)
        for (const auto& b : layout.surfaces)
            if (part[i] >= b.offset && part[i] < b.offset + b.panels) {
                w.rows.push_back(part[i]);
                w.at.push_back(static_cast<Eigen::Index>(i));
                break;
            }
    return w;
}

// The fixed part's answer A_FF^-1 C_FM M^-1 z to the GMRES solution z, as the
// same combination of the answers to the applied vectors that z is of them
// (z lies in their span: GMRES builds it from them). The coefficients come from
// a least-squares fit; should z not be reproduced to 1e-13, the answer is
// solved for directly instead (no case in the tests or examples needed that).
template <class S, class Direct>
VectorX<S> fixed_answer(const VectorX<S>& z, const std::vector<VectorX<S>>& applied,
                        const std::vector<VectorX<S>>& answers, Direct direct) {
    if (applied.empty()) return direct();
    MatrixX<S> v(z.size(), static_cast<Eigen::Index>(applied.size()));
    for (std::size_t j = 0; j < applied.size(); ++j) v.col(static_cast<Eigen::Index>(j)) = applied[j];
    const VectorX<S> c = v.colPivHouseholderQr().solve(z);
    if ((v * c - z).norm() > 1e-13 * z.norm()) return direct();
    VectorX<S> out = VectorX<S>::Zero(answers.front().size());
    for (std::size_t j = 0; j < answers.size(); ++j) out += c(static_cast<Eigen::Index>(j)) * answers[j];
    return out;
}

}  // namespace

template <class S>
MovingBlock<S> factor_moving_block(const Scene<S>& scene, const std::vector<std::size_t>& moving,
                                   const QuadratureOptions& options) {
    const SystemLayout layout = system_layout(scene);
    const std::vector<Eigen::Index> m = part_unknowns(scene, layout, moving);
    MovingBlock<S> block;
    block.size = static_cast<Eigen::Index>(m.size());
    block.lu.compute(assemble_block(scene, layout, options, m, m).matrix);
    return block;
}

namespace {

// One point's coupling system: its blocks, its GMRES run, and the vectors GMRES
// applied the operator to with the fixed part's answers to them.
template <class S>
struct CouplingSystem {
    const CoupledProblem<S>* problem = nullptr;
    SystemLayout layout;
    std::vector<Eigen::Index> m, f;
    WaterRows fw, mw;
    // Water rows of one part against the other part's unknowns (fm: fixed rows,
    // moving columns), in storage kept per thread: every point of a sweep has
    // blocks of the same size, and reusing it saves the page faults of fresh
    // allocations of tens of megabytes.
    SystemBlock<S>* fm = nullptr;
    SystemBlock<S>* mf = nullptr;
    std::vector<VectorX<S>> applied, answers;
    std::optional<GmresRun<S>> run;
    VectorX<S> pending;  // the moving part's answer to the vector being applied
    VectorX<S> x_m, x_f;  // the answer, each part's unknowns in its own order

    // v - C_MF t, with C_MF acting on the moving water rows only.
    VectorX<S> minus_coupling(VectorX<S> v, const VectorX<S>& t) const {
        const VectorX<S> c = mf->matrix * t;
        for (std::size_t i = 0; i < mw.at.size(); ++i) v(mw.at[i]) -= c(static_cast<Eigen::Index>(i));
        return v;
    }
    // C_FM w spread over the fixed part's unknowns (zero off its water rows).
    VectorX<S> coupled_into_fixed(const VectorX<S>& w, Eigen::Index fixed_size) const {
        VectorX<S> u = VectorX<S>::Zero(fixed_size);
        const VectorX<S> c = fm->matrix * w;
        for (std::size_t i = 0; i < fw.at.size(); ++i) u(fw.at[i]) = c(static_cast<Eigen::Index>(i));
        return u;
    }
};

// Sets up one point's coupling system: its blocks and the moving right-hand
// side b_M - C_MF x0 (what both ways of solving below start from).
template <class S>
VectorX<S> set_up_coupling(const CoupledProblem<S>& p, const FixedPart<S>& fixed, const QuadratureOptions& options,
                           SystemBlock<S>* fm, SystemBlock<S>* mf, CouplingSystem<S>& sys) {
    sys.problem = &p;
    sys.layout = system_layout(*p.scene);
    sys.m = part_unknowns(*p.scene, sys.layout, p.moving);
    sys.f = complement<S>(sys.layout.size, sys.m);
    MURK_CHECK(static_cast<Eigen::Index>(sys.m.size()) == p.block->size,
               "the moving block was factored for surfaces of this scene's size");
    MURK_CHECK(static_cast<Eigen::Index>(sys.f.size()) == fixed.size(),
               "the scene is the fixed part's scene with only the moving surfaces added");
    // Only the water rows of one part see the other part's panels (interior rows
    // see their own surface, electrode rows their own panels), so the coupling
    // blocks keep just those rows: half the memory of the full-height blocks.
    sys.fw = water_rows_of(sys.layout, sys.f);
    sys.mw = water_rows_of(sys.layout, sys.m);
    sys.fm = fm;
    sys.mf = mf;
    assemble_block_into(*p.scene, sys.layout, options, sys.fw.rows, sys.m, *sys.fm);
    assemble_block_into(*p.scene, sys.layout, options, sys.mw.rows, sys.f, *sys.mf);
    const VectorX<S> b_m = assemble_block(*p.scene, sys.layout, options, sys.m, {}).rhs;
    return sys.f.empty() ? b_m : sys.minus_coupling(b_m, fixed.unknowns());
}

// The Schur-complement GMRES (the header's method), for a fixed part with a
// dense LU: each iteration of each system applies the operator once, which is
// one solve against the body's factors; the systems still running share that
// solve as the columns of one blocked solve, which reads the factors once for
// all of them instead of once each (the solve is bound by memory bandwidth, not
// by arithmetic). Every vector GMRES applies the operator to is kept with the
// fixed part's answer to it: the answer to the solution is a combination of
// these, which saves the last solve against the factors. Sets x_m and x_f.
template <class S>
void solve_schur(std::vector<CouplingSystem<S>>& systems, const FixedPart<S>& fixed) {
    for (;;) {
        std::vector<std::size_t> active;
        for (std::size_t j = 0; j < systems.size(); ++j)
            if (!systems[j].run->done()) active.push_back(j);
        if (active.empty()) break;
        std::vector<std::size_t> need_fixed;
        for (std::size_t j : active) {
            CouplingSystem<S>& sys = systems[j];
            if (sys.f.empty()) {
                sys.run->answer(sys.run->request());
                continue;
            }
            sys.applied.push_back(sys.run->request());
            sys.pending = sys.problem->block->lu.solve(sys.applied.back());
            need_fixed.push_back(j);
        }
        if (need_fixed.empty()) continue;
        MatrixX<S> u(fixed.size(), static_cast<Eigen::Index>(need_fixed.size()));
        for (std::size_t c = 0; c < need_fixed.size(); ++c)
            u.col(static_cast<Eigen::Index>(c)) = systems[need_fixed[c]].coupled_into_fixed(
                systems[need_fixed[c]].pending, fixed.size());
        // One column alone goes through the matrix-vector solve, which Eigen's
        // blocked triangular solve is about twice as slow as for a single column.
        const MatrixX<S> answers = u.cols() == 1 ? MatrixX<S>(fixed.solve(VectorX<S>(u.col(0)))) : fixed.solve(u);
        for (std::size_t c = 0; c < need_fixed.size(); ++c) {
            CouplingSystem<S>& sys = systems[need_fixed[c]];
            sys.answers.push_back(answers.col(static_cast<Eigen::Index>(c)));
            sys.run->answer(sys.minus_coupling(sys.applied.back(), sys.answers.back()));
        }
    }
    for (CouplingSystem<S>& sys : systems) {
        const VectorX<S>& z = sys.run->solution();
        sys.x_m = sys.problem->block->lu.solve(z);
        if (sys.f.empty()) continue;
        sys.x_f = fixed.unknowns() - fixed_answer(z, sys.applied, sys.answers, [&] {
                      return fixed.solve(sys.coupled_into_fixed(sys.x_m, fixed.size()));
                  });
    }
}

// One whole-system step of one point: the image of its GMRES request y, given
// A_FF P^-1 y_F (a_d) and P^-1 y_F (d) from the batch's blocked products.
template <class S>
void answer_whole(CouplingSystem<S>& sys, Eigen::Index nf, const VectorX<S>& a_d, const VectorX<S>& d) {
    const Eigen::Index nm = static_cast<Eigen::Index>(sys.m.size());
    const VectorX<S>& y = sys.run->request();
    const VectorX<S> x_m = sys.problem->block->lu.solve(VectorX<S>(y.tail(nm)));
    VectorX<S> image(nf + nm);
    image.head(nf) = a_d + sys.coupled_into_fixed(x_m, nf);
    // A_MM A_MM^-1 y_M = y_M, plus C_MF d on the moving water rows: y_M - (-C_MF d).
    image.tail(nm) = sys.minus_coupling(VectorX<S>(y.tail(nm)), -d);
    sys.run->answer(image);
}

// The whole perturbation system, for a compressed fixed part, whose solves are
// themselves GMRES runs: with x_F = x0 + d,
//   [ A_FF  C_FM ] [ d   ]   [ 0              ]
//   [ C_MF  A_MM ] [ x_M ] = [ b_M - C_MF x0  ],
// right-preconditioned by diag(P^-1, A_MM^-1), P^-1 the body's own approximate
// inverse (compressed_system.hpp). Nesting the Schur GMRES around the body's
// GMRES would pay the body's 4-5 iterations for each of the outer 2-4; one
// GMRES on the whole system converges in about as many iterations as the body
// alone (the coupling adds a few), each one product with the body's operator
// and one with its preconditioner, shared by the batch as a blocked product.
// Sets each system's run (on the whole system), x_m and x_f.
template <class S>
void solve_whole(std::vector<CouplingSystem<S>>& systems, const FixedPart<S>& fixed,
                 const std::vector<VectorX<S>>& moving_rhs, const CouplingOptions& coupling) {
    const CompressedSystem<S>& body = *fixed.compressed_system();
    const Eigen::Index nf = fixed.size();
    // Both tolerances bound the answer: the coupling's, and the body's own solves'.
    const double tolerance = std::min(coupling.tolerance, fixed.report().iteration_tolerance);
    for (std::size_t j = 0; j < systems.size(); ++j) {
        CouplingSystem<S>& sys = systems[j];
        const Eigen::Index nm = static_cast<Eigen::Index>(sys.m.size());
        VectorX<S> b = VectorX<S>::Zero(nf + nm);
        b.tail(nm) = moving_rhs[j];
        sys.run.emplace(b, tolerance, coupling.max_iterations);
    }
    for (;;) {
        std::vector<std::size_t> active;
        for (std::size_t j = 0; j < systems.size(); ++j)
            if (!systems[j].run->done()) active.push_back(j);
        if (active.empty()) break;
        MatrixX<S> y_f(nf, static_cast<Eigen::Index>(active.size()));
        for (std::size_t c = 0; c < active.size(); ++c)
            y_f.col(static_cast<Eigen::Index>(c)) = systems[active[c]].run->request().head(nf);
        const MatrixX<S> d = body.precondition(y_f, false);
        const MatrixX<S> a_d = body.apply(d);
        // Each system's coupling products read its two blocks (hundreds of
        // megabytes at 50,000 panels) once: the systems run side by side.
        std::exception_ptr failure;
#pragma omp parallel for schedule(dynamic, 1)
        for (std::size_t c = 0; c < active.size(); ++c) {
            try {
                answer_whole<S>(systems[active[c]], nf, a_d.col(static_cast<Eigen::Index>(c)),
                                d.col(static_cast<Eigen::Index>(c)));
            } catch (...) {
#pragma omp critical(murk_coupled_failure)
                if (!failure) failure = std::current_exception();
            }
        }
        if (failure) std::rethrow_exception(failure);
    }
    MatrixX<S> y_f(nf, static_cast<Eigen::Index>(systems.size()));
    for (std::size_t j = 0; j < systems.size(); ++j)
        y_f.col(static_cast<Eigen::Index>(j)) = systems[j].run->solution().head(nf);
    const MatrixX<S> d = body.precondition(y_f, false);
    for (std::size_t j = 0; j < systems.size(); ++j) {
        CouplingSystem<S>& sys = systems[j];
        const Eigen::Index nm = static_cast<Eigen::Index>(sys.m.size());
        sys.x_m = sys.problem->block->lu.solve(VectorX<S>(sys.run->solution().tail(nm)));
        sys.x_f = fixed.unknowns() + d.col(static_cast<Eigen::Index>(j));
    }
}

}  // namespace

template <class S>
std::vector<CoupledSolution<S>> solve_coupled_together(const std::vector<CoupledProblem<S>>& problems,
                                                       const FixedPart<S>& fixed, const QuadratureOptions& options,
                                                       const CouplingOptions& coupling) {
    std::vector<CouplingSystem<S>> systems(problems.size());
    thread_local std::vector<std::unique_ptr<SystemBlock<S>>> storage;
    while (storage.size() < 2 * problems.size()) storage.push_back(std::make_unique<SystemBlock<S>>());
    std::vector<VectorX<S>> moving_rhs(problems.size());
    for (std::size_t j = 0; j < problems.size(); ++j)
        moving_rhs[j] = set_up_coupling(problems[j], fixed, options, storage[2 * j].get(), storage[2 * j + 1].get(),
                                        systems[j]);

    if (fixed.compressed() && fixed.size() > 0) {
        solve_whole(systems, fixed, moving_rhs, coupling);
    } else {
        for (std::size_t j = 0; j < systems.size(); ++j)
            systems[j].run.emplace(moving_rhs[j], coupling.tolerance, coupling.max_iterations);
        solve_schur(systems, fixed);
    }

    std::vector<CoupledSolution<S>> out(systems.size());
    for (std::size_t j = 0; j < systems.size(); ++j) {
        const CouplingSystem<S>& sys = systems[j];
        VectorX<S> x(sys.layout.size);
        for (std::size_t i = 0; i < sys.m.size(); ++i) x(sys.m[i]) = sys.x_m(static_cast<Eigen::Index>(i));
        for (std::size_t i = 0; i < sys.f.size(); ++i) x(sys.f[i]) = sys.x_f(static_cast<Eigen::Index>(i));
        out[j].solution = unpack_solution(*sys.problem->scene, sys.layout, x);
        out[j].gmres = sys.run->result();
    }
    return out;
}

template <class S>
CoupledSolution<S> solve_coupled(const Scene<S>& scene, const std::vector<std::size_t>& moving,
                                 const FixedPart<S>& fixed, const MovingBlock<S>& block,
                                 const QuadratureOptions& options, const CouplingOptions& coupling) {
    return solve_coupled_together<S>({CoupledProblem<S>{&scene, moving, &block}}, fixed, options, coupling).front();
}

template MovingBlock<double> factor_moving_block(const Scene<double>&, const std::vector<std::size_t>&,
                                                 const QuadratureOptions&);
template MovingBlock<Complex> factor_moving_block(const Scene<Complex>&, const std::vector<std::size_t>&,
                                                  const QuadratureOptions&);
template CoupledSolution<double> solve_coupled(const Scene<double>&, const std::vector<std::size_t>&,
                                               const FixedPart<double>&, const MovingBlock<double>&,
                                               const QuadratureOptions&, const CouplingOptions&);
template std::vector<CoupledSolution<double>> solve_coupled_together(const std::vector<CoupledProblem<double>>&,
                                                                     const FixedPart<double>&, const QuadratureOptions&,
                                                                     const CouplingOptions&);
template std::vector<CoupledSolution<Complex>> solve_coupled_together(const std::vector<CoupledProblem<Complex>>&,
                                                                      const FixedPart<Complex>&,
                                                                      const QuadratureOptions&, const CouplingOptions&);
template CoupledSolution<Complex> solve_coupled(const Scene<Complex>&, const std::vector<std::size_t>&,
                                                const FixedPart<Complex>&, const MovingBlock<Complex>&,
                                                const QuadratureOptions&, const CouplingOptions&);

}  // namespace murk
