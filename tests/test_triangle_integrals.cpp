// Closed-form panel integrals against an independent semi-analytic calculation:
// split the triangle at the foot of the perpendicular into three signed
// sub-triangles, map each with the Duffy transform y = rho + u (a - rho) + u v (b - a),
// integrate in u exactly and in v by adaptive Simpson quadrature.
#include "solver/triangle_integrals.hpp"
#include "solver/triangle_rules.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <functional>

using murk::Vec3;

namespace {

double adaptive_simpson(const std::function<double(double)>& f, double a, double b, double fa, double fm,
                        double fb, double whole, double tol, int depth) {
    const double m = 0.5 * (a + b), lm = 0.5 * (a + m), rm = 0.5 * (m + b);
    const double flm = f(lm), frm = f(rm);
    const double left = (m - a) / 6 * (fa + 4 * flm + fm), right = (b - m) / 6 * (fm + 4 * frm + fb);
    if (depth <= 0 || std::abs(left + right - whole) < 15 * tol) return left + right + (left + right - whole) / 15;
    return adaptive_simpson(f, a, m, fa, flm, fm, left, tol / 2, depth - 1) +
           adaptive_simpson(f, m, b, fm, frm, fb, right, tol / 2, depth - 1);
}

// Adaptive Simpson on [0, 1] to a relative tolerance.
double integrate(const std::function<double(double)>& f, double rel_tol) {
    const double fa = f(0), fm = f(0.5), fb = f(1);
    const double whole = (fa + 4 * fm + fb) / 6;
    return adaptive_simpson(f, 0, 1, fa, fm, fb, whole, rel_tol * std::max(std::abs(whole), 1e-300), 30);
}

// Returns {single layer, double layer} with the 1/(4 pi) factor, by Duffy splitting.
std::pair<double, double> duffy_reference(const Vec3& x, const Vec3& p0, const Vec3& p1, const Vec3& p2) {
    const Vec3 n = (p1 - p0).cross(p2 - p0).normalized();
    const double h = n.dot(x - p0);
    const Vec3 rho = x - h * n;
    const Vec3* p[3] = {&p0, &p1, &p2};
    double single = 0, dbl = 0;
    for (int i = 0; i < 3; ++i) {
        const Vec3 a = *p[i] - rho, e = *p[(i + 1) % 3] - *p[i];
        const double jac = n.dot(a.cross(e));  // signed: sub-triangles outside cancel
        if (std::abs(jac) < 1e-30) continue;
        auto w2 = [&](double v) { return (a + v * e).squaredNorm(); };
        // Exact u-integrals; where w -> 0 (foot at a vertex) their limits 1/(2|h|) and 1/(2 h^2).
        single += jac * integrate([&](double v) {
                      const double w = w2(v);
                      return w < 1e-12 * h * h ? 0.5 / std::abs(h) : (std::sqrt(h * h + w) - std::abs(h)) / w;
                  }, 1e-12);
        if (h != 0)
            dbl += jac * integrate([&](double v) {
                       const double w = w2(v);
                       return (h > 0 ? 1 : -1) *
                              (w < 1e-12 * h * h ? 0.5 / (h * h) : (1 - std::abs(h) / std::sqrt(h * h + w)) / w);
                   }, 1e-12);
    }
    return {single / (4 * M_PI), dbl / (4 * M_PI)};
}

const Vec3 P0(0.0, 0.0, 0.0), P1(1.0, 0.1, 0.0), P2(0.3, 0.8, 0.0);

}  // namespace

TEST_CASE("single and double layer match the Duffy reference at far, near and in-plane points") {
    const Vec3 c = (P0 + P1 + P2) / 3.0;
    const Vec3 points[] = {
        c,                                  // own centroid (in plane, inside)
        c + Vec3(0, 0, 1e-6),               // just above the centroid
        c + Vec3(0, 0, 0.05),               // near
        c + Vec3(0.2, -0.3, -0.4),          // below, off-centre
        Vec3(3.0, 2.0, 1.5),                // far
        Vec3(1.5, 1.2, 0.0),                // in plane, outside
        0.5 * (P0 + P1),                    // on an edge
        0.5 * (P0 + P1) + Vec3(0, 0, 1e-4), // just above an edge
        P2 + Vec3(0.0, 0.0, 0.01),          // above a vertex
        Vec3(-0.5, 0.05, 0.0),              // in plane on the line of an edge, beyond its end
    };
    for (const Vec3& x : points) {
        CAPTURE(x.transpose());
        const auto [s_ref, d_ref] = duffy_reference(x, P0, P1, P2);
        CHECK(murk::single_layer_triangle(x, P0, P1, P2) == doctest::Approx(s_ref).epsilon(1e-9));
        if (std::abs(x.z()) > 0)
            CHECK(murk::double_layer_triangle(x, P0, P1, P2) == doctest::Approx(d_ref).epsilon(1e-9));
    }
}

TEST_CASE("double layer sums to Gauss's solid-angle values over a closed tetrahedron") {
    // Gauss's law for the solid angle (any potential-theory text, e.g. Kellogg 1929,
    // "Foundations of Potential Theory"): the outward-oriented closed surface
    // subtends 4 pi from inside, 2 pi from a smooth boundary point, 0 from outside.
    const Vec3 v[4] = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
    const int f[4][3] = {{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}};  // outward
    auto sum = [&](const Vec3& x, int skip) {
        double s = 0;
        for (int i = 0; i < 4; ++i)
            if (i != skip) s += murk::double_layer_triangle(x, v[f[i][0]], v[f[i][1]], v[f[i][2]]);
        return s;
    };
    CHECK(sum(Vec3(0.1, 0.2, 0.3), -1) == doctest::Approx(-1.0).epsilon(1e-12));
    CHECK(sum(Vec3(1.0, 1.0, 1.0), -1) == doctest::Approx(0.0).epsilon(1e-12));
    // centroid of face 3, its own panel contributing its principal value 0
    const Vec3 face_centroid = (v[1] + v[2] + v[3]) / 3.0;
    CHECK(sum(face_centroid, 3) == doctest::Approx(-0.5).epsilon(1e-12));
}

TEST_CASE("Radon's 7-point rule integrates monomials up to degree 5 exactly") {
    // Exact moments of the unit right triangle: integral of x^a y^b = a! b! / (a + b + 2)!
    // (Dirichlet's integral, any calculus text).
    auto fact = [](int k) { double r = 1; for (int i = 2; i <= k; ++i) r *= i; return r; };
    const auto& rule = murk::radon7_rule();
    for (int a = 0; a <= 5; ++a)
        for (int b = 0; a + b <= 5; ++b) {
            double q = 0;
            for (std::size_t i = 0; i < rule.weight.size(); ++i)
                q += 0.5 * rule.weight[i] * std::pow(rule.point[i][1], a) * std::pow(rule.point[i][2], b);
            CHECK(q == doctest::Approx(fact(a) * fact(b) / fact(a + b + 2)).epsilon(1e-13));
        }
}
