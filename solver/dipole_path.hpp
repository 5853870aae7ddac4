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

// Lead fields by reciprocity, for readings that are linear in the unknowns
// (r = R x, R = `readout`, one row per sensor): L = R A_FF^-1, found by one
// transposed solve per sensor. The change of the readings caused by a dipole is
// then L b(dipole), which needs the dipole's potential at the water rows and one
// dot product per sensor instead of a solve: cheaper per point when the
// sensors are few (a robot's electrodes), not for a fish's thousands of skin panels.
template <class S>
class LeadFields {
public:
    LeadFields(const FixedPart<S>& fixed, const MatrixX<S>& readout);
    // Change of every reading caused by each dipole (sensors x dipoles).
    MatrixX<S> readings_change(const std::vector<PointDipole<S>>& dipoles) const;
    Eigen::Index sensors() const { return water_.rows(); }
    const FixedPart<S>& fixed() const { return *fixed_; }
    // L restricted to the water rows (sensors x fixed.water_row_points() columns):
    // the reading change of any water-row potential vector phi is water_rows_lead() * phi.
    const MatrixX<S>& water_rows_lead() const { return water_; }

private:
    const FixedPart<S>* fixed_;
    MatrixX<S> water_;  // L restricted to the water rows (sensors x water rows), the only rows b has
};

extern template Eigen::Matrix<double, 3, Eigen::Dynamic> baseline_field(const FixedPart<double>&,
                                                                       const Eigen::Matrix3Xd&,
                                                                       const QuadratureOptions&);
extern template Eigen::Matrix<Complex, 3, Eigen::Dynamic> baseline_field(const FixedPart<Complex>&,
                                                                        const Eigen::Matrix3Xd&,
                                                                        const QuadratureOptions&);
extern template class LeadFields<double>;
extern template class LeadFields<Complex>;
extern template MatrixX<double> unknowns_with_dipoles(const FixedPart<double>&,
                                                      const std::vector<PointDipole<double>>&);
extern template MatrixX<Complex> unknowns_with_dipoles(const FixedPart<Complex>&,
                                                       const std::vector<PointDipole<Complex>>&);

}  // namespace murk
