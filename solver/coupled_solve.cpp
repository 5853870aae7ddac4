#include "solver/coupled_solve.hpp"

#include "geometry/internal_check.hpp"
#include <Eigen/QR>
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

template <class S>
CoupledSolution<S> solve_coupled(const Scene<S>& scene, const std::vector<std::size_t>& moving,
                                 const FixedPart<S>& fixed, const MovingBlock<S>& block,
                                 const QuadratureOptions& options, const CouplingOptions& coupling) {
    const SystemLayout layout = system_layout(scene);
    const std::vector<Eigen::Index> m = part_unknowns(scene, layout, moving);
    const std::vector<Eigen::Index> f = complement<S>(layout.size, m);
    MURK_CHECK(static_cast<Eigen::Index>(m.size()) == block.size,
               "the moving block was factored for surfaces of this scene's size");
    MURK_CHECK(static_cast<Eigen::Index>(f.size()) == fixed.size(),
               "the scene is the fixed part's scene with only the moving surfaces added");

    // Only the water rows of one part see the other part's panels (interior rows
    // see their own surface, electrode rows their own panels), so the coupling
    // blocks keep just those rows: half the memory of the full-height blocks.
    const WaterRows fw = water_rows_of(layout, f), mw = water_rows_of(layout, m);
    // Kept per thread: every point of a sweep has blocks of the same size, and
    // reusing their storage saves the page faults of fresh allocations.
    thread_local SystemBlock<S> fm, mf;
    assemble_block_into(scene, layout, options, fw.rows, m, fm);
    assemble_block_into(scene, layout, options, mw.rows, f, mf);
    const MatrixX<S>& c_fm = fm.matrix;
    const MatrixX<S>& c_mf = mf.matrix;
    const VectorX<S> b_m = assemble_block(scene, layout, options, m, {}).rhs;
    const VectorX<S>& x0 = fixed.unknowns();

    // The fixed part's answer to the moving unknowns w: A_FF^-1 C_FM w.
    auto fixed_response = [&](const VectorX<S>& w) -> VectorX<S> {
        VectorX<S> u = VectorX<S>::Zero(fixed.size());
        const VectorX<S> c = c_fm * w;
        for (std::size_t i = 0; i < fw.at.size(); ++i) u(fw.at[i]) = c(static_cast<Eigen::Index>(i));
        return fixed.solve(u);
    };
    // v - C_MF t, with C_MF acting on the moving water rows only.
    auto minus_coupling = [&](VectorX<S> v, const VectorX<S>& t) -> VectorX<S> {
        const VectorX<S> c = c_mf * t;
        for (std::size_t i = 0; i < mw.at.size(); ++i) v(mw.at[i]) -= c(static_cast<Eigen::Index>(i));
        return v;
    };

    const VectorX<S> rhs = f.empty() ? b_m : minus_coupling(b_m, x0);
    // Every vector GMRES applies the operator to, with the fixed part's answer to
    // it: the answer to the solution is a combination of these, which saves the
    // last solve against the body's factors (one of three or four per point).
    std::vector<VectorX<S>> applied, answers;
    auto apply = [&](const VectorX<S>& v) -> VectorX<S> {
        if (f.empty()) return v;
        applied.push_back(v);
        answers.push_back(fixed_response(block.lu.solve(v)));
        return minus_coupling(v, answers.back());
    };
    CoupledSolution<S> out;
    VectorX<S> z;
    out.gmres = gmres<S>(apply, rhs, z, coupling.tolerance, coupling.max_iterations);
    const VectorX<S> x_m = block.lu.solve(z);

    VectorX<S> x(layout.size);
    for (std::size_t i = 0; i < m.size(); ++i) x(m[i]) = x_m(static_cast<Eigen::Index>(i));
    if (!f.empty()) {
        const VectorX<S> x_f = x0 - fixed_answer(z, applied, answers, [&] { return fixed_response(x_m); });
        for (std::size_t i = 0; i < f.size(); ++i) x(f[i]) = x_f(static_cast<Eigen::Index>(i));
    }
    out.solution = unpack_solution(scene, layout, x);
    return out;
}

template MovingBlock<double> factor_moving_block(const Scene<double>&, const std::vector<std::size_t>&,
                                                 const QuadratureOptions&);
template MovingBlock<Complex> factor_moving_block(const Scene<Complex>&, const std::vector<std::size_t>&,
                                                  const QuadratureOptions&);
template CoupledSolution<double> solve_coupled(const Scene<double>&, const std::vector<std::size_t>&,
                                               const FixedPart<double>&, const MovingBlock<double>&,
                                               const QuadratureOptions&, const CouplingOptions&);
template CoupledSolution<Complex> solve_coupled(const Scene<Complex>&, const std::vector<std::size_t>&,
                                                const FixedPart<Complex>&, const MovingBlock<Complex>&,
                                                const QuadratureOptions&, const CouplingOptions&);

}  // namespace murk
