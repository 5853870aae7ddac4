#include "cases/input/electrode_sites.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace murk {

namespace {

std::string metres(double v) {
    std::ostringstream out;
    out << v << " m";
    return out.str();
}

// Half the hull's extent along its own x axis (m); 0 for an imported mesh (unknown here).
double half_length(const ShapeSpec& hull) {
    switch (hull.kind) {
        case ShapeKind::sphere: return hull.radius_m;
        case ShapeKind::capsule: return 0.5 * hull.overall_length_m;
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return hull.semi_axes_m[0];
        case ShapeKind::box: return 0.5 * hull.size_m[0];
        case ShapeKind::mesh: return 0.0;
    }
    return 0.0;
}

// Distance (m) from p (hull frame) to the hull's surface; see the header for spheroids.
double distance_to_hull(const ShapeSpec& hull, const Point3& p) {
    const double x = p[0], y = p[1], z = p[2];
    switch (hull.kind) {
        case ShapeKind::sphere: return std::abs(std::sqrt(x * x + y * y + z * z) - hull.radius_m);
        case ShapeKind::capsule: {
            const double half_axis = 0.5 * hull.overall_length_m - hull.radius_m;  // the segment's half length
            const double ax = std::clamp(x, -half_axis, half_axis);
            return std::abs(std::sqrt((x - ax) * (x - ax) + y * y + z * z) - hull.radius_m);
        }
        case ShapeKind::box: {
            const double h[3] = {0.5 * hull.size_m[0], 0.5 * hull.size_m[1], 0.5 * hull.size_m[2]};
            double outside = 0, inside = -INFINITY;
            for (int k = 0; k < 3; ++k) {
                const double d = std::abs(p[k]) - h[k];
                outside += d > 0 ? d * d : 0;
                inside = std::max(inside, d);
            }
            return outside > 0 ? std::sqrt(outside) : -inside;
        }
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: {
            const double a = hull.semi_axes_m[0], b = hull.semi_axes_m[1], c = hull.semi_axes_m[2];
            const double r = std::sqrt(x * x + y * y + z * z);
            const double s = std::sqrt(x * x / (a * a) + y * y / (b * b) + z * z / (c * c));  // 1 on the surface
            if (s == 0) return std::min({a, b, c});
            return std::abs(r - r / s);  // along the ray from the centre
        }
        case ShapeKind::mesh: return 0.0;
    }
    return 0.0;
}

// The interval along x that a site covers.
std::pair<double, double> x_extent(const ElectrodeSpec& e) {
    if (e.form == ElectrodeForm::ring) return {e.from_m, e.to_m};
    return {e.at_m[0] - e.radius_m, e.at_m[0] + e.radius_m};
}

bool overlap(const ElectrodeSpec& a, const ElectrodeSpec& b) {
    if (a.form == ElectrodeForm::region || b.form == ElectrodeForm::region)
        return a.form == b.form && a.region == b.region;
    if (a.form == ElectrodeForm::patch && b.form == ElectrodeForm::patch) {
        const double dx = a.at_m[0] - b.at_m[0], dy = a.at_m[1] - b.at_m[1], dz = a.at_m[2] - b.at_m[2];
        return std::sqrt(dx * dx + dy * dy + dz * dz) < a.radius_m + b.radius_m;
    }
    const auto [a0, a1] = x_extent(a);
    const auto [b0, b1] = x_extent(b);
    return a0 < b1 && b0 < a1;
}

}  // namespace

void check_electrode_sites(const RobotSpec& robot) {
    const ShapeSpec& hull = robot.hull;
    for (std::size_t i = 0; i < robot.electrodes.size(); ++i) {
        const ElectrodeSpec& e = robot.electrodes[i];
        if (hull.kind != ShapeKind::mesh && e.form == ElectrodeForm::ring) {
            const double h = half_length(hull);
            if (e.to_m <= -h || e.from_m >= h)
                throw InputError(e.source.where() + ": electrode " + in_quotes(e.name) +
                                 " falls off the hull: its band lies outside the hull's extent along x, from " +
                                 metres(-h) + " to " + metres(h));
        }
        if (hull.kind != ShapeKind::mesh && e.form == ElectrodeForm::patch) {
            const double d = distance_to_hull(hull, e.at_m);
            if (d > e.radius_m)
                throw InputError(e.source.where() + ": electrode " + in_quotes(e.name) +
                                 " falls off the hull: its centre 'at' is " + metres(d) +
                                 " from the hull's surface, more than its radius");
        }
        for (std::size_t j = 0; j < i; ++j)
            if ((hull.kind != ShapeKind::mesh || e.form == ElectrodeForm::region) && overlap(robot.electrodes[j], e))
                throw InputError(e.source.where() + ": electrode " + in_quotes(e.name) + " overlaps electrode " +
                                 in_quotes(robot.electrodes[j].name) + " (" + robot.electrodes[j].source.key + ")");
    }
}

}  // namespace murk
