#pragma once
// Closed-form solutions that murk's boundary elements are checked against.
// Each function states its source. Conductivities may be complex
// (sigma + i omega epsilon): the formulas hold unchanged for lossy dielectrics
// in the quasi-static regime (Maxwell-Wagner form).
#include <complex>

namespace murk::exact {

using Complex = std::complex<double>;

// Dipole factor K = (s_in - s_out) / (s_in + 2 s_out) of a sphere in a uniform
// field: outside it adds K a^3 E cos(theta) / r^2 to the potential.
// Jackson, "Classical Electrodynamics" (3rd ed. 1999), §4.4, eq. 4.54, with the
// permittivities replaced by conductivities (same boundary-value problem).
template <class S>
S sphere_dipole_factor(S sigma_in, S sigma_out) {
    return (sigma_in - sigma_out) / (sigma_in + S(2) * sigma_out);
}

// Perturbation of the potential at the source point by a sphere of radius a whose
// centre lies at distance d from a point current source I, all in conductivity
// sigma_out: the Legendre series of the image problem (expansion of 1/|x - x'| in
// Legendre polynomials, Jackson §3.3; boundary conditions of continuity of
// potential and normal current at r = a, term by term):
//   phi = I / (4 pi sigma_out) sum_n n (s_out - s_in) / (n s_in + (n+1) s_out) a^(2n+1) / d^(2n+2)
// Summed until the terms fall below 1e-16 of the sum.
template <class S>
S sphere_point_source_perturbation(double a, double d, S sigma_in, S sigma_out, S current);

// Induced transmembrane voltage (inside minus outside) at angle theta = 0 of a
// sphere of radius R with a thin membrane of specific resistance rho_m (ohm m^2)
// in a uniform field E: Schwan's equation with membrane conductance,
//   dV = 1.5 E R / (1 + R (1/rho_m) (1/s_in + 1/(2 s_out))),
// the thin-membrane limit of Kotnik, Bobanovic & Miklavcic (1997, "Sensitivity of
// transmembrane voltage induced by applied electric fields - a theoretical
// analysis", Bioelectrochem. Bioenerg. 43:285-291).
template <class S>
S membrane_voltage_amplitude(double E, double R, S rho_m, S sigma_in, S sigma_out) {
    return S(1.5 * E * R) / (S(1) + S(R) / rho_m * (S(1) / sigma_in + S(1) / (S(2) * sigma_out)));
}

// Depolarization factors of a spheroid (Osborn 1945, "Demagnetizing factors of the
// general ellipsoid", Phys. Rev. 67:351; Stoner 1945, Phil. Mag. 36:803).
// polar = semi-axis along the symmetry axis, equatorial = the other two.
// Returns the factor along the symmetry axis; the transverse one is (1 - L) / 2.
double spheroid_axial_depolarization(double polar, double equatorial);

// Polarizability of an ellipsoid of volume V along a principal axis with
// depolarization factor L: the far perturbation is that of a dipole
// p = V (s_in - s_out) / (s_out + L (s_in - s_out)) E, potential p.r / (4 pi r^3).
// (Stoner 1945; for a sphere L = 1/3 it reduces to 4 pi a^3 K E.)
template <class S>
S ellipsoid_polarizability(double volume, double L, S sigma_in, S sigma_out) {
    return S(volume) * (sigma_in - sigma_out) / (sigma_out + S(L) * (sigma_in - sigma_out));
}

}  // namespace murk::exact

namespace murk::exact {

// 4 pi times the Green's function of a point source between two insulating
// planes a depth h apart (a slab), at horizontal distance rho > 0, heights z and
// z0 above the lower plane: (2/h) [-ln(rho) + 2 sum_n cos(n pi z/h) cos(n pi z0/h)
// K0(n pi rho/h)], defined up to a constant. The eigenfunction expansion of the
// Neumann problem across the layer (cosine modes) with each mode's
// two-dimensional Green's function radially (Morse & Feshbach 1953, Methods of
// Theoretical Physics, ch. 7; written here from memory). Converges like
// exp(-pi rho / h) per term.
double insulating_slab_kernel(double h, double rho, double z, double z0);

}  // namespace murk::exact
