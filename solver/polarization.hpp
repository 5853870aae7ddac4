#pragma once
// Polarization tensor of an object in water: the induced dipole moment per unit
// uniform field, p = M E (M in m^3; p in V m^2 as induced_dipole_moment gives it,
// perturbation potential p.r / (4 pi r^3)). It is what the induced-dipole path
// needs to stand in for a small object.
//
// Exact for a homogeneous ellipsoid (Stoner 1945, "The demagnetizing factors for
// the general ellipsoid", Phil. Mag. 36:803; Osborn 1945, Phys. Rev. 67:351):
//   along principal axis i,  M_i = V (s_in - s_w) / (s_w + N_i (s_in - s_w)),
// with the depolarization factors N_i = (a1 a2 a3 / 3) R_D(a_j^2, a_k^2, a_i^2)
// in Carlson's symmetric elliptic integral R_D (Carlson 1995, Numer. Algorithms
// 10:13; Boost.Math's ellint_rd). An insulator is s_in = 0 (M_i = -V / (1 - N_i)),
// a perfect conductor the limit M_i = V / N_i. Complex conductivities give the
// Maxwell-Wagner form.
// Any other object (capsule, box, imported mesh, membrane-covered) is solved
// for once by boundary elements: the isolated object in three uniform fields.
#include "geometry/eigen_core.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/scene.hpp"

namespace murk {

template <class S>
using Matrix3 = Eigen::Matrix<S, 3, 3>;

// Depolarization factors of an ellipsoid with semi-axes a (any order); they sum to 1.
Eigen::Vector3d depolarization_factors(const Eigen::Vector3d& semi_axes);

// axes: columns are the world directions of the semi-axes (a rotation matrix).
template <class S>
Matrix3<S> ellipsoid_polarization(const Eigen::Vector3d& semi_axes, const Eigen::Matrix3d& axes, S inner_conductivity,
                                  S water_conductivity);
Eigen::Matrix3d conducting_ellipsoid_polarization(const Eigen::Vector3d& semi_axes, const Eigen::Matrix3d& axes);

// By boundary elements: surface `surface` of `scene` alone in unbounded water of
// the scene's conductivity (other surfaces, sources and any plane left out), in
// the uniform fields e_x, e_y, e_z; column k is induced_dipole_moment for e_k.
template <class S>
Matrix3<S> computed_polarization(const Scene<S>& scene, std::size_t surface, const QuadratureOptions& options);

extern template Matrix3<double> ellipsoid_polarization(const Eigen::Vector3d&, const Eigen::Matrix3d&, double, double);
extern template Matrix3<Complex> ellipsoid_polarization(const Eigen::Vector3d&, const Eigen::Matrix3d&, Complex,
                                                        Complex);
extern template Matrix3<double> computed_polarization(const Scene<double>&, std::size_t, const QuadratureOptions&);
extern template Matrix3<Complex> computed_polarization(const Scene<Complex>&, std::size_t, const QuadratureOptions&);

}  // namespace murk
