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

// Maxwell-Wagner relaxation of a sphere's dipole factor. A sphere of conductivity
// sigma_in and permittivity eps_in (F/m, absolute) in a medium sigma_out, eps_out,
// at angular frequency omega (time factor exp(i omega t), complex conductivities
// sigma + i omega eps): K(omega) = K_inf + (K_0 - K_inf) / (1 + i omega tau), with the
// low-frequency (conductive) factor K_0 = (s_in - s_out) / (s_in + 2 s_out), the
// high-frequency (dielectric) factor K_inf = (e_in - e_out) / (e_in + 2 e_out) and the
// Maxwell-Wagner relaxation time tau = (e_in + 2 e_out) / (s_in + 2 s_out).
// Morgan & Green 2003, "AC Electrokinetics: Colloids and Nanoparticles" (Research
// Studies Press), ch. 3, the Clausius-Mossotti factor and its relaxation time; the same
// single-pole form follows from sphere_dipole_factor with complex conductivities,
// whose one pole is at 1 + i omega tau = 0.
double maxwell_wagner_relaxation_time(double sigma_in, double eps_in, double sigma_out, double eps_out);
Complex maxwell_wagner_dipole_factor(double sigma_in, double eps_in, double sigma_out, double eps_out, double omega);

// Induced transmembrane voltage (inside minus outside, at theta = 0) of a
// membrane-covered sphere of radius R in a uniform field E at angular frequency
// omega, membrane conductance g_m (S/m^2) and capacitance C_m (F/m^2), interior and
// exterior conductivities s_in, s_out: the first-order (thin membrane) form of
// Schwan's equation,
//   dV = dV_0 / (1 + i omega tau_m),
//   dV_0  = 1.5 E R / (1 + R g_m (1/s_in + 1/(2 s_out)))   (the direct-current value),
//   tau_m = R C_m (1/s_in + 1/(2 s_out)) / (1 + R g_m (1/s_in + 1/(2 s_out))).
// Grosse & Schwan 1992, "Cellular membrane potentials induced by alternating fields",
// Biophys. J. 63:1632-1642 (the thin-membrane relaxation with membrane conductance);
// equal to membrane_voltage_amplitude with rho_m = 1 / (g_m + i omega C_m).
double membrane_charging_time(double R, double g_m, double C_m, double sigma_in, double sigma_out);
Complex membrane_voltage_at_frequency(double E, double R, double g_m, double C_m, double sigma_in,
                                      double sigma_out, double omega);

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
