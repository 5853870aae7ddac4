// The axisymmetric reference for ring electrodes (verify/axisymmetric_electrodes):
// its kernels against direct quadrature, Gauss's law, exact and published
// resistances, its convergence, and the symmetries of a two-ring capsule.
#include "verify/axisymmetric_electrodes.hpp"

#include "geometry/input_error.hpp"

#include <Eigen/LU>
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>

using namespace murk::axisym;

namespace {

// Conductance matrix of `body` at one refinement level.
Eigen::MatrixXd conductance_at(const AxisymmetricBody& body, double base, int level, double sigma = 1.0) {
    return conductance_matrix(body, sigma, mesh_generatrix(body, base, level));
}

// The two-ring capsule of the report: radius 2 cm, cylinder 26 cm (30 cm long),
// rings at x in [11, 12] cm and [-12, -11] cm.
AxisymmetricBody two_ring_capsule(double from2 = -0.12, double to2 = -0.11) {
    AxisymmetricBody body;
    body.shape = capsule_generatrix(0.02, 0.26);
    const double s0 = 0.5 * M_PI * 0.02 + 0.13;  // arclength at x = 0
    body.electrodes = {{s0 + 0.11, s0 + 0.12}, {s0 + from2, s0 + to2}};
    return body;
}

}  // namespace

TEST_CASE("ring kernels equal the azimuthal integrals of G and dG/dn done by quadrature") {
    // Definition: G = 1 / (4 pi |x - y|) integrated over the ring through y (common
    // practice); the periodic trapezoid rule converges geometrically here.
    const MeridianPoint sources[] = {{0.01, 0.02, 0.6, 0.8}, {-0.03, 0.001, -1.0, 0.0}, {0.0, 0.015, 0.0, 1.0}};
    const double fields[][2] = {{0.013, 0.017}, {-0.02, 0.004}, {0.001, 0.0151}};
    for (const MeridianPoint& y : sources)
        for (const auto& f : fields) {
            const double x = f[0], rho = f[1];
            const int m = 20000;
            double single = 0, dbl = 0;
            for (int i = 0; i < m; ++i) {
                const double t = 2 * M_PI * (i + 0.5) / m;
                const double dx = rho - y.rho * std::cos(t), dy = -y.rho * std::sin(t), dz = x - y.x;
                const double r = std::sqrt(dx * dx + dy * dy + dz * dz);
                const double along_n = dx * y.n_rho * std::cos(t) + dy * y.n_rho * std::sin(t) + dz * y.n_x;
                single += y.rho / (4 * M_PI * r) * 2 * M_PI / m;
                dbl += y.rho * along_n / (4 * M_PI * r * r * r) * 2 * M_PI / m;
            }
            const RingKernels k = ring_kernels(x, rho, y);
            CHECK(k.single == doctest::Approx(single).epsilon(1e-9).scale(1e-12));
            CHECK(k.double_layer == doctest::Approx(dbl).epsilon(1e-9).scale(1e-9));
        }
}

TEST_CASE("the double layer of a closed capsule is -1 inside and 0 outside (Gauss's law)") {
    // int_S dG/dn_y dS_y = -1 for x inside S, 0 outside (Gauss's theorem; Kellogg 1929,
    // "Foundations of Potential Theory", from memory).
    AxisymmetricBody body;
    body.shape = capsule_generatrix(0.02, 0.26);
    const std::vector<Element> elements = mesh_generatrix(body, 0.005, 1);
    const double points[][3] = {{0.05, 0.01, -1.0}, {0.14, 0.0, -1.0}, {0.0, 0.019, -1.0}, {0.0, 0.05, 0.0},
                                {0.16, 0.0, 0.0}, {0.1, 0.021, 0.0}};
    for (const auto& p : points) {
        double sum = 0;
        for (const Element& e : elements) {
            // composite midpoint rule, 64 parts per element: plenty at 1 mm and more
            const int parts = 64;
            for (int k = 0; k < parts; ++k) {
                const double s = e.s0 + (k + 0.5) / parts * (e.s1 - e.s0);
                sum += (e.s1 - e.s0) / parts * ring_kernels(p[0], p[1], body.shape.at(s)).double_layer;
            }
        }
        CHECK(std::abs(sum - p[2]) < 1e-6);
    }
}

TEST_CASE("a sphere that is one electrode has R = 1 / (4 pi sigma a) to infinity") {
    // Elementary: phi = V a / r outside, I = 4 pi sigma a V.
    const double a = 0.01, sigma = 0.05;
    AxisymmetricBody body;
    body.shape = sphere_generatrix(a);
    body.electrodes = {{0.0, body.shape.length()}};
    for (int level = 0; level < 3; ++level) {
        const Eigen::MatrixXd g = conductance_at(body, body.shape.length() / 16, level, sigma);
        CHECK(1 / g(0, 0) == doctest::Approx(1 / (4 * M_PI * sigma * a)).epsilon(1e-6));
    }
}

TEST_CASE("a small cap electrode on an insulating sphere tends to Newman's disc resistance 1/(4 sigma a)") {
    // Newman 1966, "Resistance for flow of current to a disk", J. Electrochem. Soc.:
    // a disc of radius a in an insulating plane, R = 1 / (4 sigma a). A cap of rim
    // radius a = b sin(alpha) on a sphere of radius b differs by the curvature of the
    // insulator. Expected size (estimate made here, no published source): the surface
    // leaves the plane by r^2 / 2b, which changes 1/R by a relative amount of order
    // (a/b) ln(b/a) (the field energy a^2/r^4 over that layer, integrated from a to b),
    // so 4 sigma a R = 1 + (a/b) (c0 + c1 ln(a/b)) + o(a/b).
    double x[3], v[3];
    const double alphas[3] = {0.05, 0.025, 0.0125};
    for (int i = 0; i < 3; ++i) {
        AxisymmetricBody body;
        body.shape = sphere_generatrix(1.0);
        body.electrodes = {{0.0, alphas[i]}};
        std::vector<double> raw;
        for (int level = 0; level < 4; ++level) raw.push_back(1 / conductance_at(body, 0.25, level)(0, 0));
        const Extrapolated r = richardson(raw);
        x[i] = std::sin(alphas[i]);
        v[i] = 4 * x[i] * r.value;
        CHECK(r.error < 1e-5 * r.value);
        // The correction has the expected sign (the sphere gives the current more room
        // than the plane) and size: below twice (a/b) ln(b/a), above a tenth of it.
        CHECK(v[i] < 1);
        CHECK(1 - v[i] < 2 * x[i] * std::log(1 / x[i]));
        CHECK(1 - v[i] > 0.1 * x[i] * std::log(1 / x[i]));
    }
    // Fit 1 + ... : v = L + c0 x + c1 x ln x through the three caps; the limit L is
    // Newman's 1 up to the next terms, O((a/b)^2 ln^2) ~ 1e-3 at a/b = 0.05.
    Eigen::Matrix3d m;
    for (int i = 0; i < 3; ++i) m.row(i) << 1, x[i], x[i] * std::log(x[i]);
    const Eigen::Vector3d fit = m.partialPivLu().solve(Eigen::Vector3d(v[0], v[1], v[2]));
    CHECK(fit(0) == doctest::Approx(1.0).epsilon(1e-3));
}

TEST_CASE("the capsule ring-pair resistance converges with a positive order and its extrapolation is stable to 1e-4") {
    const Extrapolated four = capsule_ring_pair_study(0.02, 0.26, 0.11, 0.12, -0.12, -0.11, 1.0, 4);
    const Extrapolated five = capsule_ring_pair_study(0.02, 0.26, 0.11, 0.12, -0.12, -0.11, 1.0, 5);
    char line[200];
    std::snprintf(line, sizeof line, "R (sigma = 1 S/m): four levels %.8f +- %.1e (order %.2f, %.1f s), five %.8f +- %.1e (%.1f s)",
                  four.value, four.error, four.order, four.seconds, five.value, five.error, five.seconds);
    MESSAGE(line);
    // the raw sequence: differences shrink level by level, observed order positive
    for (std::size_t i = 2; i < five.raw.size(); ++i)
        CHECK(std::abs(five.raw[i] - five.raw[i - 1]) < 0.5 * std::abs(five.raw[i - 1] - five.raw[i - 2]));
    CHECK(four.order > 1.5);
    CHECK(five.order > 1.5);
    // the claimed accuracy
    // the claimed accuracy (1e-4 relative): five levels estimate far below it, and four
    // levels, whose own estimate is near it, agree with five to within it
    CHECK(five.error < 1e-5 * five.value);
    CHECK(four.error < 1e-4 * four.value);
    CHECK(std::abs(four.value - five.value) < 1e-4 * five.value);
    // R scales as 1 / sigma
    CHECK(capsule_ring_pair_resistance(0.02, 0.26, 0.11, 0.12, -0.12, -0.11, 0.01) ==
          doctest::Approx(five.value / 0.01).epsilon(1e-12));
}

TEST_CASE("two rings on a symmetric capsule: +-V/2 draws opposite currents, swapping flips them") {
    // By the mirror symmetry x -> -x the rings at +V/2 and -V/2 draw equal and
    // opposite currents, so no net current leaves to infinity (current conservation);
    // swapping the potentials reverses both. One ring at V and the other at 0 is not
    // balanced: the net current G11 + G21 flows to infinity and must be positive.
    const Eigen::MatrixXd g = conductance_at(two_ring_capsule(), 0.01, 1);
    const Eigen::Vector2d i = g * Eigen::Vector2d(0.5, -0.5), swapped = g * Eigen::Vector2d(-0.5, 0.5);
    CHECK(i(0) > 0);
    CHECK(std::abs(i(0) + i(1)) < 1e-9 * std::abs(i(0)));
    CHECK(swapped(0) == doctest::Approx(-i(0)).epsilon(1e-12));
    CHECK(swapped(1) == doctest::Approx(-i(1)).epsilon(1e-12));
    const Eigen::Vector2d one = g * Eigen::Vector2d(1.0, 0.0);
    CHECK(one(0) > 0);
    CHECK(one(1) < 0);
    CHECK(one(0) + one(1) > 0);
    // The floating-pair resistance of a symmetric pair is V / I at +-V/2.
    CHECK(floating_pair_resistance(g) == doctest::Approx(1.0 / i(0)).epsilon(1e-9));
}

TEST_CASE("two unequal rings: the mutual conductances agree (Green's reciprocity) and converge together") {
    // Green's reciprocity theorem (exact): G12 = G21 for any two electrodes. The
    // collocation matrix is not symmetric, so the discrete values differ by the
    // discretization error, which must shrink with refinement.
    const AxisymmetricBody body = two_ring_capsule(-0.1, -0.085);
    double previous = 1;
    for (int level = 0; level < 3; ++level) {
        const Eigen::MatrixXd g = conductance_at(body, 0.01, level);
        const double mismatch = std::abs(g(0, 1) - g(1, 0)) / std::abs(g(0, 1));
        MESSAGE("level ", level, ": G12 ", g(0, 1), " G21 ", g(1, 0), " mismatch ", mismatch);
        CHECK(mismatch < 1e-2);
        CHECK(mismatch < previous);
        previous = mismatch;
    }
    CHECK(previous < 1e-4);
}

TEST_CASE("Richardson extrapolation recovers a known power series and refuses what does not converge") {
    // v(h) = 2 + 3 h^2 + h^3 at h = 1, 1/2, 1/4, 1/8, 1/16 (common practice: the leading
    // order is 2, the remainder shrinks the error estimate level by level).
    std::vector<double> raw;
    for (int l = 0; l < 5; ++l) {
        const double h = std::ldexp(1.0, -l);
        raw.push_back(2 + 3 * h * h + h * h * h);
    }
    const Extrapolated r = richardson(raw);
    CHECK(r.order == doctest::Approx(2.0).epsilon(0.05));
    CHECK(std::abs(r.value - 2) < 0.05 * std::abs(raw.back() - 2));  // 3.9e-4 against 1.2e-2 raw
    CHECK(std::abs(r.value - 2) <= r.error);
    const Extrapolated flat = richardson({1.0, 1.1, 1.0, 1.1});
    CHECK(flat.order == 0);
    CHECK(flat.value == 1.1);
    CHECK(flat.error == doctest::Approx(0.1));
}

TEST_CASE("capsule ring pair: rings off the cylinder or overlapping are refused") {
    CHECK_THROWS_AS(capsule_ring_pair_study(0.02, 0.26, 0.12, 0.14, -0.12, -0.11, 1.0), murk::InputError);
    CHECK_THROWS_AS(capsule_ring_pair_study(0.02, 0.26, -0.115, -0.10, -0.12, -0.11, 1.0), murk::InputError);
    CHECK_THROWS_AS(capsule_ring_pair_study(0.02, 0.26, 0.12, 0.11, -0.12, -0.11, 1.0), murk::InputError);
}
