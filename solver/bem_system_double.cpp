// Explicit instantiation of the BEM system for double (kept apart: dense LU is slow to compile).
#include "solver/bem_system_impl.hpp"

namespace murk {
template LinearSystem<double> assemble_system(const Scene<double>&, const QuadratureOptions&);
template SystemLayout system_layout(const Scene<double>&);
template std::vector<Eigen::Index> part_unknowns(const Scene<double>&, const SystemLayout&, const std::vector<std::size_t>&);
template SystemBlock<double> assemble_block(const Scene<double>&, const SystemLayout&, const QuadratureOptions&,
                                        const std::vector<Eigen::Index>&, const std::vector<Eigen::Index>&);
template void assemble_block_into(const Scene<double>&, const SystemLayout&, const QuadratureOptions&,
                                  const std::vector<Eigen::Index>&, const std::vector<Eigen::Index>&,
                                  SystemBlock<double>&);
template VectorX<double> solve_dense(LinearSystem<double>&);
template Solution<double> unpack_solution(const Scene<double>&, const SystemLayout&, const VectorX<double>&);
template Solution<double> solve_scene(const Scene<double>&, const QuadratureOptions&);
template int enclosing_surface(const Scene<double>&, const Vec3&);
template VectorX<double> potential_at(const Scene<double>&, const Solution<double>&, const Eigen::Matrix3Xd&,
                                  const QuadratureOptions&, bool);
template Eigen::Matrix<double, 3, Eigen::Dynamic> field_at(const Scene<double>&, const Solution<double>&,
                                                      const Eigen::Matrix3Xd&, const QuadratureOptions&);
}  // namespace murk
