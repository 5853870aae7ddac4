// Explicit instantiation of the BEM system for Complex (kept apart: dense LU is slow to compile).
#include "solver/bem_system_impl.hpp"

namespace murk {
template LinearSystem<Complex> assemble_system(const Scene<Complex>&, const QuadratureOptions&);
template SystemLayout system_layout(const Scene<Complex>&);
template std::vector<Eigen::Index> part_unknowns(const Scene<Complex>&, const SystemLayout&, const std::vector<std::size_t>&);
template SystemBlock<Complex> assemble_block(const Scene<Complex>&, const SystemLayout&, const QuadratureOptions&,
                                        const std::vector<Eigen::Index>&, const std::vector<Eigen::Index>&);
template void assemble_block_into(const Scene<Complex>&, const SystemLayout&, const QuadratureOptions&,
                                  const std::vector<Eigen::Index>&, const std::vector<Eigen::Index>&,
                                  SystemBlock<Complex>&);
template VectorX<Complex> solve_dense(LinearSystem<Complex>&);
template Solution<Complex> unpack_solution(const Scene<Complex>&, const SystemLayout&, const VectorX<Complex>&);
template Solution<Complex> solve_scene(const Scene<Complex>&, const QuadratureOptions&);
template int enclosing_surface(const Scene<Complex>&, const Vec3&);
template VectorX<Complex> potential_at(const Scene<Complex>&, const Solution<Complex>&, const Eigen::Matrix3Xd&,
                                  const QuadratureOptions&, bool);
template Eigen::Matrix<Complex, 3, Eigen::Dynamic> field_at(const Scene<Complex>&, const Solution<Complex>&,
                                                      const Eigen::Matrix3Xd&, const QuadratureOptions&);
}  // namespace murk
