#include "geometry/electrode_areas.hpp"

#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>

namespace murk {
namespace {

constexpr double kPi = 3.14159265358979323846;

// Points of the grid in the curve parameter on which inside intervals are sought;
// an interval shorter than a grid step can be missed only where the electrode's
// edge runs along the grid direction, where its width is that small anyway.
constexpr int kGridPoints = 2000;

double worst_level(const std::vector<ElectrodeSide>& sides, const Vec3& x) {
    double l = -std::numeric_limits<double>::infinity();
    for (const ElectrodeSide& s : sides) l = std::max(l, s.level(x));
    return l;
}

// Intervals of t in [lo, hi] where every side of point(t) is <= 0.
std::vector<std::pair<double, double>> inside_intervals(const std::function<Vec3(double)>& point,
                                                        const std::vector<ElectrodeSide>& sides, double lo, double hi) {
    auto inside = [&](double t) { return worst_level(sides, point(t)) <= 0.0; };
    auto edge = [&](double a, double b) {  // inside(a) != inside(b)
        const bool at_a = inside(a);
        for (int it = 0; it < 60; ++it) {
            const double mid = 0.5 * (a + b);
            (inside(mid) == at_a ? a : b) = mid;
        }
        return 0.5 * (a + b);
    };
    std::vector<std::pair<double, double>> out;
    bool was = inside(lo);
    double start = lo, prev = lo;
    for (int i = 1; i <= kGridPoints; ++i) {
        const double t = lo + (hi - lo) * i / kGridPoints;
        const bool now = inside(t);
        if (now != was) {
            const double e = edge(prev, t);
            if (now) start = e;
            else out.emplace_back(start, e);
            was = now;
        }
        prev = t;
    }
    if (was) out.emplace_back(start, hi);
    return out;
}

double over_theta(const std::function<double(double)>& f) {
    return boost::math::quadrature::gauss_kronrod<double, 31>::integrate(f, 0.0, 2.0 * kPi, 12, 1e-10);
}

}  // namespace

double sphere_area_within(double radius, const Vec3& centre, double ball_radius) {
    const double R = radius, r = ball_radius, D = centre.norm();
    const double whole = 4.0 * kPi * R * R;
    if (D + R <= r) return whole;
    if (D >= R + r || D + r <= R) return 0.0;
    const double x0 = (R * R + D * D - r * r) / (2.0 * D);  // the plane of the circle, from the centre
    return 2.0 * kPi * R * (R - std::clamp(x0, -R, R));
}

std::optional<double> box_area_within(const Vec3& size, const Vec3& centre, double ball_radius) {
    const Vec3 half = 0.5 * size;
    std::optional<double> area;
    int faces = 0;
    for (int axis = 0; axis < 3; ++axis)
        for (double side : {-1.0, 1.0}) {
            const double d = std::abs(centre[axis] - side * half[axis]);
            if (d >= ball_radius) continue;
            const double rho = std::sqrt(ball_radius * ball_radius - d * d);
            bool meets = true, within = true;
            for (int j = 0; j < 3; ++j) {
                if (j == axis) continue;
                const double gap = std::abs(centre[j]) - half[j];  // > 0: the disc's centre is beyond the face
                meets = meets && gap < rho;
                within = within && gap + rho <= 0.0;
            }
            if (!meets) continue;
            ++faces;
            if (within) area = kPi * rho * rho;
        }
    if (faces != 1) return std::nullopt;
    return area;
}

double capsule_area_where(double radius, double cylinder_length, const std::vector<ElectrodeSide>& sides) {
    const double R = radius, h = 0.5 * cylinder_length;
    auto rho = [&](double x) {
        const double beyond = std::max(0.0, std::abs(x) - h);
        return std::sqrt(std::max(0.0, R * R - beyond * beyond));
    };
    return R * over_theta([&](double theta) {
        const double c = std::cos(theta), s = std::sin(theta);
        double length = 0.0;
        for (const auto& [a, b] : inside_intervals([&](double x) { return Vec3(x, rho(x) * c, rho(x) * s); }, sides,
                                                   -h - R, h + R))
            length += b - a;
        return length;
    });
}

double ellipsoid_area_where(const Vec3& semi_axes, const std::vector<ElectrodeSide>& sides) {
    const double a = semi_axes.x(), b = semi_axes.y(), c = semi_axes.z();
    return over_theta([&](double theta) {
        const double ct = std::cos(theta), st = std::sin(theta);
        auto element = [&](double u) {
            const Vec3 pu(-a * std::sin(u), b * std::cos(u) * ct, c * std::cos(u) * st);
            const Vec3 pt(0.0, -b * std::sin(u) * st, c * std::sin(u) * ct);
            return pu.cross(pt).norm();
        };
        double sum = 0.0;
        for (const auto& [lo, hi] : inside_intervals(
                 [&](double u) { return Vec3(a * std::cos(u), b * std::sin(u) * ct, c * std::sin(u) * st); }, sides, 0.0,
                 kPi))
            sum += boost::math::quadrature::gauss<double, 20>::integrate(element, lo, hi);
        return sum;
    });
}

}  // namespace murk
