#pragma once
// The induced-dipole path of a sweep: a small object is replaced by the point
// dipole p = M E_b(c) it would carry in the baseline field E_b at its centre c
// (M its polarization tensor), and the fixed part answers that dipole as it
// would any water source: x = x0 + A_FF^-1 b(p), where b(p) holds the dipole's
// potential at the water-row collocation points (and its image in an
// insulating plane). Many dipoles are answered by one blocked solve.
//
// What is left out, and so the size of the error (relative, for an object of
// radius a whose centre is r from the nearest body surface): the field's
// variation across the object (quadrupole and higher moments, ~ (a/r)^2 when
// the baseline field varies on the scale r) and the object's own field
// reflected back by the body (~ (a/2r)^3). tests/test_dipole_path.cpp measures it.
#include "solver/fixed_part.hpp"

#include <vector>

namespace murk {

// Baseline field (V/m) of the fixed part at points in the water.
template <class S>
Eigen::Matrix<S, 3, Eigen::Dynamic> baseline_field(const FixedPart<S>& fixed, const Eigen::Matrix3Xd& points,
                                                   const QuadratureOptions& options);

// The fixed part's unknown vector with each dipole added alone, one column per
// dipole: x0 + A_FF^-1 b(dipole). Unpack a column with
// unpack_solution(fixed.scene(), fixed.layout(), column).
template <class S>
MatrixX<S> unknowns_with_dipoles(const FixedPart<S>& fixed, const std::vector<PointDipole<S>>& dipoles);

// The right-hand side b(dipole) alone (zero except on the water rows).
template <class S>
VectorX<S> dipole_rhs(const FixedPart<S>& fixed, const PointDipole<S>& dipole);

extern template Eigen::Matrix<double, 3, Eigen::Dynamic> baseline_field(const FixedPart<double>&,
                                                                       const Eigen::Matrix3Xd&,
                                                                       const QuadratureOptions&);
extern template Eigen::Matrix<Complex, 3, Eigen::Dynamic> baseline_field(const FixedPart<Complex>&,
                                                                        const Eigen::Matrix3Xd&,
                                                                        const QuadratureOptions&);
extern template MatrixX<double> unknowns_with_dipoles(const FixedPart<double>&,
                                                      const std::vector<PointDipole<double>>&);
extern template MatrixX<Complex> unknowns_with_dipoles(const FixedPart<Complex>&,
                                                       const std::vector<PointDipole<Complex>>&);

}  // namespace murk
