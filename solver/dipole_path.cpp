#include "solver/dipole_path.hpp"

#include "solver/incident_field.hpp"

namespace murk {

template <class S>
Eigen::Matrix<S, 3, Eigen::Dynamic> baseline_field(const FixedPart<S>& fixed, const Eigen::Matrix3Xd& points,
                                                   const QuadratureOptions& options) {
    return field_at(fixed.scene(), fixed.solution(), points, options);
}

template <class S>
VectorX<S> dipole_rhs(const FixedPart<S>& fixed, const PointDipole<S>& dipole) {
    Scene<S> alone;  // only what IncidentField reads: the water, its plane, the dipole
    alone.water_conductivity = fixed.scene().water_conductivity;
    alone.plane = fixed.scene().plane;
    alone.dipoles = {dipole};
    const IncidentField<S> incident(alone, {});
    VectorX<S> b = VectorX<S>::Zero(fixed.size());
    const Eigen::Matrix3Xd& x = fixed.water_row_points();
    for (Eigen::Index i = 0; i < x.cols(); ++i) b(fixed.water_rows()[i]) = incident.potential(x.col(i));
    return b;
}

template <class S>
MatrixX<S> unknowns_with_dipoles(const FixedPart<S>& fixed, const std::vector<PointDipole<S>>& dipoles) {
    const Eigen::Index m = static_cast<Eigen::Index>(dipoles.size());
    MatrixX<S> b(fixed.size(), m);
    for (Eigen::Index j = 0; j < m; ++j) b.col(j) = dipole_rhs(fixed, dipoles[j]);
    MatrixX<S> x = fixed.solve(b);
    x.colwise() += fixed.unknowns();
    return x;
}

template Eigen::Matrix<double, 3, Eigen::Dynamic> baseline_field(const FixedPart<double>&, const Eigen::Matrix3Xd&,
                                                                const QuadratureOptions&);
template Eigen::Matrix<Complex, 3, Eigen::Dynamic> baseline_field(const FixedPart<Complex>&, const Eigen::Matrix3Xd&,
                                                                 const QuadratureOptions&);
template VectorX<double> dipole_rhs(const FixedPart<double>&, const PointDipole<double>&);
template VectorX<Complex> dipole_rhs(const FixedPart<Complex>&, const PointDipole<Complex>&);
template MatrixX<double> unknowns_with_dipoles(const FixedPart<double>&, const std::vector<PointDipole<double>>&);
template MatrixX<Complex> unknowns_with_dipoles(const FixedPart<Complex>&, const std::vector<PointDipole<Complex>>&);

}  // namespace murk
