// The reference formulas of murk verify, checked against independent values:
// limits, sums rules and tabulated numbers.
#include "verify/exact_solutions.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk::exact;

TEST_CASE("depolarization factors: sphere limit, sum rule and tabulated values") {
    // Sphere: 1/3 each (Osborn 1945). Sum rule L_axial + 2 L_transverse = 1 holds by construction.
    CHECK(spheroid_axial_depolarization(1.0, 1.0) == doctest::Approx(1.0 / 3));
    CHECK(spheroid_axial_depolarization(1.0 + 1e-6, 1.0) == doctest::Approx(1.0 / 3).epsilon(1e-5));
    CHECK(spheroid_axial_depolarization(1.0 - 1e-6, 1.0) == doctest::Approx(1.0 / 3).epsilon(1e-5));
    // Prolate, aspect ratio 2: L = 0.1736; oblate, aspect ratio 2 (polar half): L = 0.5272
    // (from memory; Osborn 1945 tabulates the same functions).
    CHECK(spheroid_axial_depolarization(2.0, 1.0) == doctest::Approx(0.1736).epsilon(1e-3));
    CHECK(spheroid_axial_depolarization(1.0, 2.0) == doctest::Approx(0.5272).epsilon(1e-3));
    // Needle and disc limits: L -> 0 and L -> 1.
    CHECK(spheroid_axial_depolarization(1000.0, 1.0) < 1e-4);
    CHECK(spheroid_axial_depolarization(1.0, 1000.0) > 0.998);
}

TEST_CASE("ellipsoid polarizability of a sphere equals the Clausius-Mossotti form") {
    // L = 1/3: V (s_in - s_out) / (s_out + (s_in - s_out)/3) = 4 pi a^3 K.
    const double a = 0.01, V = 4.0 / 3 * M_PI * a * a * a;
    CHECK(ellipsoid_polarizability(V, 1.0 / 3, 3.0, 1.0) ==
          doctest::Approx(4 * M_PI * a * a * a * sphere_dipole_factor(3.0, 1.0)));
    CHECK(sphere_dipole_factor(1e12, 1.0) == doctest::Approx(1.0).epsilon(1e-9));
    CHECK(sphere_dipole_factor(0.0, 1.0) == doctest::Approx(-0.5));
}

TEST_CASE("the point-source series tends to its dipole term far away and falls as d^-4") {
    // Leading term n = 1: (s_out - s_in)/(s_in + 2 s_out) a^3 / d^4 times I / (4 pi s_out).
    const double a = 0.01, s_in = 0.1, s_out = 0.01, I = 1e-3;
    const double d = 100 * a;
    const double dipole = I / (4 * M_PI * s_out) * (s_out - s_in) / (s_in + 2 * s_out) * std::pow(a, 3) / std::pow(d, 4);
    CHECK(sphere_point_source_perturbation(a, d, s_in, s_out, I) == doctest::Approx(dipole).epsilon(1e-3));
    const double slope = std::log(sphere_point_source_perturbation(a, 64 * a, s_in, s_out, I) /
                                  sphere_point_source_perturbation(a, 32 * a, s_in, s_out, I)) / std::log(2.0);
    CHECK(slope == doctest::Approx(-4.0).epsilon(1e-3));
    // An insulating sphere deflects current the other way.
    CHECK(sphere_point_source_perturbation(a, 3 * a, 0.0, s_out, I) > 0);
}

TEST_CASE("Schwan's equation: impermeable-membrane limit 1.5 E R") {
    // Schwan's classic result for a non-conducting membrane (Kotnik et al. 1997, eq. for G_m -> 0).
    CHECK(membrane_voltage_amplitude(100.0, 1e-5, 1e12, 0.3, 1.0) == doctest::Approx(1.5 * 100.0 * 1e-5).epsilon(1e-9));
    // Leaky membrane: lower than the limit.
    CHECK(membrane_voltage_amplitude(100.0, 1e-2, 0.1, 0.3, 1.0) < 1.5 * 100.0 * 1e-2);
}

TEST_CASE("Maxwell-Wagner dipole factor: conductive and dielectric limits and the relaxation") {
    // Low frequency: the conductivities alone; high frequency: the permittivities alone
    // (Morgan & Green 2003, the Clausius-Mossotti factor's two limits).
    const double eps0 = 8.8541878128e-12;  // F/m, CODATA 2018
    const double s_in = 1e-3, s_out = 1e-2, e_in = 2e5 * eps0, e_out = 80 * eps0;
    const double tau = maxwell_wagner_relaxation_time(s_in, e_in, s_out, e_out);
    const Complex low = maxwell_wagner_dipole_factor(s_in, e_in, s_out, e_out, 1e-6 / tau);
    const Complex high = maxwell_wagner_dipole_factor(s_in, e_in, s_out, e_out, 1e6 / tau);
    CHECK(low.real() == doctest::Approx((s_in - s_out) / (s_in + 2 * s_out)).epsilon(1e-5));
    CHECK(std::abs(low.imag()) < 1e-5);
    CHECK(high.real() == doctest::Approx((2e5 - 80) / (2e5 + 160)).epsilon(1e-5));
    CHECK(std::abs(high.imag()) < 1e-5);
    // A hand value: insulator (s_in = 0) of permittivity 4 in a medium s = 1, e = 1:
    // K_0 = -1/2, K_inf = 1/2, tau = 3, and at omega = 1/3: 1/2 - 1/(1 + i) = i/2.
    const Complex hand = maxwell_wagner_dipole_factor(0.0, 4.0, 1.0, 1.0, 1.0 / 3);
    CHECK(hand.real() == doctest::Approx(0.0).epsilon(1e-15));
    CHECK(hand.imag() == doctest::Approx(0.5).epsilon(1e-15));
    // The relaxation form equals the Jackson form with complex conductivities.
    for (double w_tau : {0.01, 0.3, 1.0, 3.0, 100.0}) {
        const double w = w_tau / tau;
        const Complex jackson = sphere_dipole_factor(Complex(s_in, w * e_in), Complex(s_out, w * e_out));
        CHECK(std::abs(maxwell_wagner_dipole_factor(s_in, e_in, s_out, e_out, w) - jackson) < 1e-14);
    }
}

TEST_CASE("membrane voltage at a frequency: direct-current value, capacitive roll-off and its corner") {
    // Grosse & Schwan 1992: below the corner the DC Schwan value, above it the membrane
    // capacitance shorts the membrane: omega |dV| -> 1.5 E / (C_m (1/s_in + 1/(2 s_out))),
    // with the phase -> -pi/2; at omega tau_m = 1 the amplitude is 1/sqrt(2) of DC at -pi/4.
    const double E = 1.0, R = 0.01, g = 1.0, C = 1e-2, s_in = 0.5, s_out = 0.01;
    const double access = 1 / s_in + 1 / (2 * s_out);
    const double direct = 1.5 * E * R / (1 + R * g * access);
    const double tau = membrane_charging_time(R, g, C, s_in, s_out);
    const Complex low = membrane_voltage_at_frequency(E, R, g, C, s_in, s_out, 1e-6 / tau);
    CHECK(std::abs(low) == doctest::Approx(direct).epsilon(1e-9));
    CHECK(std::abs(std::arg(low)) < 1e-5);
    // The same DC value from Schwan's equation with a purely resistive membrane.
    CHECK(std::abs(low) == doctest::Approx(membrane_voltage_amplitude(E, R, 1 / g, s_in, s_out)).epsilon(1e-9));
    const double w_high = 1e6 / tau;
    const Complex high = membrane_voltage_at_frequency(E, R, g, C, s_in, s_out, w_high);
    CHECK(w_high * std::abs(high) == doctest::Approx(1.5 * E / (C * access)).epsilon(1e-5));
    CHECK(std::arg(high) == doctest::Approx(-M_PI / 2).epsilon(1e-5));
    const Complex corner = membrane_voltage_at_frequency(E, R, g, C, s_in, s_out, 1 / tau);
    CHECK(std::abs(corner) == doctest::Approx(direct / std::sqrt(2.0)).epsilon(1e-12));
    CHECK(std::arg(corner) == doctest::Approx(-M_PI / 4).epsilon(1e-12));
    // An impermeable membrane (g_m = 0): Schwan's 1.5 E R at DC.
    CHECK(std::abs(membrane_voltage_at_frequency(E, R, 0.0, C, s_in, s_out, 1e-9)) ==
          doctest::Approx(1.5 * E * R).epsilon(1e-6));
    // The relaxation form equals Schwan's equation with the complex membrane impedance.
    for (double w_tau : {0.01, 1.0, 100.0}) {
        const double w = w_tau / tau;
        const Complex rho_m = 1.0 / Complex(g, w * C);
        const Complex schwan = membrane_voltage_amplitude(E, R, rho_m, Complex(s_in), Complex(s_out));
        CHECK(std::abs(membrane_voltage_at_frequency(E, R, g, C, s_in, s_out, w) - schwan) < 1e-12 * std::abs(schwan));
    }
}

TEST_CASE("the slab's Bessel-function series: symmetric, 1/r near the source, two-dimensional far away") {
    const double h = 0.1;
    // Reciprocity: the same for source and field point exchanged.
    CHECK(insulating_slab_kernel(h, 0.03, 0.02, 0.07) == doctest::Approx(insulating_slab_kernel(h, 0.03, 0.07, 0.02)));
    // Near the source it is 1/r plus a smooth part: K - 1/rho settles as rho falls
    // (the images' potential at the source, finite).
    const double z = 0.04;
    const double a = insulating_slab_kernel(h, 1e-3 * h, z, z) - 1.0 / (1e-3 * h);
    const double b = insulating_slab_kernel(h, 1e-4 * h, z, z) - 1.0 / (1e-4 * h);
    CHECK(std::abs(a - b) < 1e-4 * std::abs(b));
    // Far away (rho >> h) the current spreads in two dimensions: the difference
    // between two distances is (2/h) ln(rho2/rho1) (the potential of a line source,
    // any electrostatics text), the K0 modes having died out as exp(-pi rho/h).
    const double far = insulating_slab_kernel(h, 2.0, 0.01, 0.09) - insulating_slab_kernel(h, 4.0, 0.03, 0.05);
    CHECK(far == doctest::Approx(2.0 / h * std::log(2.0)).epsilon(1e-12));
    // The method of images for one plane in the limit: near the lower plane and far
    // from the upper, K tends to 1/r + 1/r' (Jackson 1999 §2.1) up to a constant
    // and the distant plane's slowly varying part; compare differences at close range.
    const double big = 10.0;
    auto two_images = [](double rho, double z1, double z2) {
        return 1.0 / std::hypot(rho, z1 - z2) + 1.0 / std::hypot(rho, z1 + z2);
    };
    const double slab = insulating_slab_kernel(big, 0.01, 0.01, 0.02) - insulating_slab_kernel(big, 0.02, 0.01, 0.02);
    CHECK(slab == doctest::Approx(two_images(0.01, 0.01, 0.02) - two_images(0.02, 0.01, 0.02)).epsilon(1e-4));
}
