#include "solver/coupled_solve.hpp"

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
    if (static_cast<Eigen::Index>(m.size()) != block.size || static_cast<Eigen::Index>(f.size()) != fixed.size())
        throw std::logic_error("solve_coupled: the scene does not match its fixed part and moving block");

    const MatrixX<S> c_fm = assemble_block(scene, layout, options, f, m).matrix;
    SystemBlock<S> moving_rows = assemble_block(scene, layout, options, m, f);
    const MatrixX<S>& c_mf = moving_rows.matrix;
    const VectorX<S>& x0 = fixed.unknowns();

    const VectorX<S> rhs = f.empty() ? moving_rows.rhs : VectorX<S>(moving_rows.rhs - c_mf * x0);
    auto apply = [&](const VectorX<S>& v) -> VectorX<S> {
        if (f.empty()) return v;
        const VectorX<S> w = block.lu.solve(v);
        return v - c_mf * fixed.solve(VectorX<S>(c_fm * w));
    };
    CoupledSolution<S> out;
    VectorX<S> z;
    out.gmres = gmres<S>(apply, rhs, z, coupling.tolerance, coupling.max_iterations);
    const VectorX<S> x_m = block.lu.solve(z);

    VectorX<S> x(layout.size);
    for (std::size_t i = 0; i < m.size(); ++i) x(m[i]) = x_m(static_cast<Eigen::Index>(i));
    if (!f.empty()) {
        const VectorX<S> x_f = x0 - fixed.solve(VectorX<S>(c_fm * x_m));
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
