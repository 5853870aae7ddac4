#pragma once
// Derivatives of the induced-dipole model's readings with respect to the target
// (its position, and optionally its size and contrast), for Fisher information and
// localization bounds (cases/design/localization_bound.hpp).
//
// Model (dipole_path.hpp): a target at x carries the dipole p(x) = M E_b(x), and
// reading k changes by dV_k(x) = L_k b(p(x), x), where b(p, x) is the potential of
// the dipole p at x (with its image in an insulating plane) at the water-row
// collocation points and L the lead fields. Its gradient has two parts,
//   d dV_k / d x_j = L_k [d b / d x_j at fixed p]  +  L_k b(M dE_b/dx_j, x),
// the dipole moving, and the moment changing with the field it sits in. Both are
// in closed form: the first is the derivative of p.r/(4 pi r^3) with respect to
// the source point; the second needs the gradient of the baseline field, that is
// the Hessian of the baseline potential: closed form for the incident part
// (IncidentField::hessian) and, for the part the fixed surfaces add, the Hessian
// of the single- and double-layer kernels summed over the points of the 7-point
// Radon rule (triangle_rules.hpp) on every panel.
//
// What is approximate. The dipole model itself (dipole_path.hpp states its error,
// ~(a/r)^2 for an object of radius a at r from the body). Besides, E_b and dE_b
// here come from that one point rule on every panel, not from the closed-form
// near-panel integrals that baseline_field (field_at) uses: the same smooth
// function is differentiated everywhere, so these derivatives are the exact
// derivatives of the model with this E_b (finite differences agree to rounding),
// but near the surface the rule itself errs. Its error falls like
// (panel diameter / distance)^6; measured in tests/test_target_derivatives.cpp:
// at 3.2 to 4.3 panel diameters from the nearest panel centroid E_b agrees with
// field_at to 0.3-1.5e-4 and dE_b with differences of field_at to 1-2.6e-4.
// Closer than about 3 diameters the error grows quickly, and within one diameter
// the rule is not to be trusted (nor are the piecewise-constant densities smooth
// there). `clearance` reports the ratio per point so a caller can mask those.
#include "solver/dipole_path.hpp"
#include "solver/polarization.hpp"

#include <vector>

namespace murk {

template <class S>
struct BaselineFieldGradient {
    Eigen::Matrix<S, 3, Eigen::Dynamic> field;     // E_b (V/m), one column per point
    Eigen::Matrix<S, 9, Eigen::Dynamic> gradient;  // dE_i/dx_j (V/m^2) at row i + 3 j
    Eigen::VectorXd clearance;  // min over panels of (distance to centroid / panel diameter)
};

// E_b and its gradient at points in the water (not inside or on a surface of the
// fixed part: the caller places target points; sweep placement masks the others).
template <class S>
BaselineFieldGradient<S> baseline_field_gradient(const FixedPart<S>& fixed, const Eigen::Matrix3Xd& points);

template <class S>
struct TargetResponse {
    MatrixX<S> change;                 // dV: readings x points
    std::vector<MatrixX<S>> gradient;  // per parameter, readings x points: d dV / d x, y, z
                                       // (per metre), then one per polarization derivative
    Eigen::VectorXd clearance;         // as in BaselineFieldGradient
};

// Reading changes and their derivatives for a target of polarization tensor M
// (polarization.hpp) at each point. polarization_derivatives: dM/d theta for
// any extra parameters theta (size, conductivity; see the helpers below); their
// gradient rows are L b(dM/dtheta E_b(x), x). Cost: one pass over the body's
// quadrature points per point, and a (readings x water rows) product per point.
template <class S>
TargetResponse<S> target_response(const LeadFields<S>& lead, const Eigen::Matrix3Xd& points,
                                  const Matrix3<S>& polarization,
                                  const std::vector<Matrix3<S>>& polarization_derivatives = {});

// dM/da for an object scaled uniformly by its size a (any shape: M is
// proportional to the volume, so dM/da = 3 M / a).
template <class S>
Matrix3<S> polarization_size_derivative(const Matrix3<S>& polarization, double size);

// dM/d sigma_in of a homogeneous ellipsoid (derivative of the formula in
// polarization.hpp): along axis i, V s_w / (s_w + N_i (s_in - s_w))^2.
template <class S>
Matrix3<S> ellipsoid_polarization_conductivity_derivative(const Eigen::Vector3d& semi_axes,
                                                          const Eigen::Matrix3d& axes, S inner_conductivity,
                                                          S water_conductivity);

extern template struct BaselineFieldGradient<double>;
extern template struct BaselineFieldGradient<Complex>;
extern template BaselineFieldGradient<double> baseline_field_gradient(const FixedPart<double>&,
                                                                      const Eigen::Matrix3Xd&);
extern template BaselineFieldGradient<Complex> baseline_field_gradient(const FixedPart<Complex>&,
                                                                       const Eigen::Matrix3Xd&);
extern template TargetResponse<double> target_response(const LeadFields<double>&, const Eigen::Matrix3Xd&,
                                                       const Matrix3<double>&, const std::vector<Matrix3<double>>&);
extern template TargetResponse<Complex> target_response(const LeadFields<Complex>&, const Eigen::Matrix3Xd&,
                                                        const Matrix3<Complex>&,
                                                        const std::vector<Matrix3<Complex>>&);

}  // namespace murk
