#pragma once
// The sensitivity map of a set of readings by reciprocity: the change of each reading
// per unit induced dipole at a target position c, along x, y and z.
//
// A dipole p at c enters the fixed part's system only through its potential at the
// water-row collocation points, b_i = p . g(x_i; c) with g(x; c) = (x - c) / (4 pi
// |x - c|^3) (and the image across an insulating plane). The readings are r = R x, so
// the change is R A^-1 b = L b with L = R A^-1, the lead fields: one transposed solve
// per reading, once. Then per target point only L times the dipole's potential at the
// rows is left, a field evaluation, so that a map over 10^5 points costs no solve. That
// L b equals the reading change of a direct dipole solve is Green's (Helmholtz's)
// reciprocity theorem in its discrete form, R A^-1 b = (A^-T R^T)^T b; the lead-field
// form of it is Plonsey 1963, "Reciprocity applied to volume conductors and the ECG",
// IEEE Trans. Bio-Medical Electronics 10:9-12 (tests/test_layout_sensitivity.cpp
// checks it against unknowns_with_dipoles).
#include "solver/fixed_part.hpp"

#include <optional>

namespace murk {

class SensitivityMap {
public:
    // readout: readings x unknowns of `fixed`.
    SensitivityMap(const FixedPart<double>& fixed, const Eigen::MatrixXd& readout);

    // Reading change per unit dipole moment: readings x (3 * points), column 3 j + k for
    // a unit moment (1 V m^2) along axis k at point j. Units: reading units per V m^2.
    // Parallel over blocks of points (OpenMP).
    Eigen::MatrixXd at(const Eigen::Matrix3Xd& points) const;

    // The lead fields on the water rows (readings x water rows), and those rows' points.
    const Eigen::MatrixXd& water_leads() const { return leads_; }
    const Eigen::Matrix3Xd& row_points() const { return rows_; }

private:
    Eigen::MatrixXd leads_;
    Eigen::Matrix3Xd rows_;
    ImageSeries<double> images_;
};

}  // namespace murk
