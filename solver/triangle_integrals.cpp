#include "solver/triangle_integrals.hpp"

#include <cmath>

namespace murk {

namespace {
constexpr double kFourPi = 4.0 * M_PI;

// R + s computed without cancellation when s < 0: (R + s)(R - s) = R0^2.
double r_plus_s(double R, double s, double R0sq) { return s >= 0 ? R + s : R0sq / (R - s); }
}  // namespace

double single_layer_triangle(const Vec3& x, const Vec3& p0, const Vec3& p1, const Vec3& p2) {
    const Vec3 nraw = (p1 - p0).cross(p2 - p0);
    const Vec3 n = nraw.normalized();
    const double h = n.dot(x - p0);
    const double abs_h = std::abs(h);
    const Vec3 rho = x - h * n;  // foot of the perpendicular in the triangle's plane
    const Vec3* p[3] = {&p0, &p1, &p2};
    const double scale = std::sqrt(nraw.norm());

    double log_sum = 0.0, angle_sum = 0.0;
    for (int i = 0; i < 3; ++i) {
        const Vec3& a = *p[i];
        const Vec3& b = *p[(i + 1) % 3];
        const Vec3 edge = b - a;
        const double length = edge.norm();
        const Vec3 s_hat = edge / length;
        const Vec3 m = s_hat.cross(n);  // in-plane, pointing out of the triangle
        const double s_minus = (a - rho).dot(s_hat);
        const double s_plus = (b - rho).dot(s_hat);
        const double t0 = (a - rho).dot(m);  // > 0 when rho is on the inner side
        const double R0sq = t0 * t0 + h * h;
        const double R_minus = (a - x).norm();
        const double R_plus = (b - x).norm();
        if (std::abs(t0) > 1e-14 * scale) {
            log_sum += t0 * std::log(r_plus_s(R_plus, s_plus, R0sq) / r_plus_s(R_minus, s_minus, R0sq));
            if (abs_h > 0.0)
                angle_sum += std::atan(t0 * s_plus / (R0sq + abs_h * R_plus)) -
                             std::atan(t0 * s_minus / (R0sq + abs_h * R_minus));
        }
    }
    return (log_sum - abs_h * angle_sum) / kFourPi;
}

double double_layer_triangle(const Vec3& x, const Vec3& p0, const Vec3& p1, const Vec3& p2) {
    const Vec3 r1 = p0 - x, r2 = p1 - x, r3 = p2 - x;
    const double l1 = r1.norm(), l2 = r2.norm(), l3 = r3.norm();
    const double numerator = r1.dot(r2.cross(r3));
    const double denominator = l1 * l2 * l3 + r1.dot(r2) * l3 + r1.dot(r3) * l2 + r2.dot(r3) * l1;
    const double omega = 2.0 * std::atan2(numerator, denominator);
    return -omega / kFourPi;
}

}  // namespace murk
