#include "solver/dipole_path.hpp"

#include "geometry/internal_check.hpp"
#include "solver/incident_field.hpp"

namespace murk {

template <class S>
Eigen::Matrix<S, 3, Eigen::Dynamic> baseline_field(const FixedPart<S>& fixed, const Eigen::Matrix3Xd& points,
                                                   const QuadratureOptions& options) {
    return field_at(fixed.scene(), fixed.solution(), points, options);
}

namespace {
// The dipole's potential (with its image) at every water-row point, in water-row order.
template <class S>
VectorX<S> dipole_potential_at_rows(const FixedPart<S>& fixed, const PointDipole<S>& dipole) {
    Scene<S> alone;  // only what IncidentField reads: the water, its bounds' images, the dipole
    alone.water_conductivity = fixed.scene().water_conductivity;
    alone.images = fixed.scene().images;
    alone.dipoles = {dipole};
    const IncidentField<S> incident(alone, {});
    const Eigen::Matrix3Xd& x = fixed.water_row_points();
    VectorX<S> phi(x.cols());
    for (Eigen::Index i = 0; i < x.cols(); ++i) phi(i) = incident.potential(x.col(i));
    return phi;
}
}  // namespace

template <class S>
VectorX<S> dipole_rhs(const FixedPart<S>& fixed, const PointDipole<S>& dipole) {
    const VectorX<S> phi = dipole_potential_at_rows(fixed, dipole);
    VectorX<S> b = VectorX<S>::Zero(fixed.size());
    for (Eigen::Index i = 0; i < phi.size(); ++i) b(fixed.water_rows()[i]) = phi(i);
    return b;
}

template <class S>
LeadFields<S>::LeadFields(const FixedPart<S>& fixed, const MatrixX<S>& readout) : fixed_(&fixed) {
    MURK_CHECK(readout.cols() == fixed.size(), "a readout row acts on the fixed part's unknowns");
    const MatrixX<S> lt = fixed.solve_transposed(readout.transpose());  // n x sensors: A^-T R^T
    water_.resize(readout.rows(), static_cast<Eigen::Index>(fixed.water_rows().size()));
    for (std::size_t i = 0; i < fixed.water_rows().size(); ++i)
        water_.col(static_cast<Eigen::Index>(i)) = lt.row(fixed.water_rows()[i]).transpose();
}

template <class S>
MatrixX<S> LeadFields<S>::readings_change(const std::vector<PointDipole<S>>& dipoles) const {
    MatrixX<S> phi(water_.cols(), static_cast<Eigen::Index>(dipoles.size()));
    for (std::size_t j = 0; j < dipoles.size(); ++j)
        phi.col(static_cast<Eigen::Index>(j)) = dipole_potential_at_rows(*fixed_, dipoles[j]);
    return water_ * phi;
}

template class LeadFields<double>;
template class LeadFields<Complex>;

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
