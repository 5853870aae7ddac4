#include "cases/sweep/moved_boundary.hpp"

#include "geometry/input_error.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace murk {

namespace {

// Largest horizontal distance from (cx, cy) to the body's vertices: the body keeps a
// gap g from a cylinder's curved wall of radius R exactly when this is R - g.
double widest_reach(const TriangleMesh& body, double cx, double cy) {
    double r2 = 0.0;
    for (const Vec3& v : body.vertices) r2 = std::max(r2, (v.x() - cx) * (v.x() - cx) + (v.y() - cy) * (v.y() - cy));
    return std::sqrt(r2);
}

// The centre coordinate along the wall's axis that puts a cylinder's wall `gap` from
// the body on the named side. The reach is a convex function of the centre's
// coordinate t (a maximum of distances, each convex in t): its least value is found by
// golden-section search, and the wanted centre is the root on the side away from the
// wall (the wall on +x lies beyond the body when the centre is behind it), found by
// bisection. Nothing when even the best-placed tank cannot keep the gap.
std::optional<double> cylinder_centre(const TriangleMesh& body, const TankSpec& tank, int axis, int sign, double gap) {
    const double other = tank.centre_m[1 - axis];
    auto reach = [&](double t) { return axis == 0 ? widest_reach(body, t, other) : widest_reach(body, other, t); };
    double lo = INFINITY, hi = -INFINITY;
    for (const Vec3& v : body.vertices) lo = std::min(lo, v[axis]), hi = std::max(hi, v[axis]);
    const double target = tank.radius_m - gap;
    // The reach's minimum lies between the body's extremes along the axis.
    const double golden = 0.5 * (std::sqrt(5.0) - 1.0);
    double a = lo, b = hi;
    for (int i = 0; i < 200 && b - a > 1e-12 * (1.0 + std::abs(a) + std::abs(b)); ++i) {
        const double c = b - golden * (b - a), d = a + golden * (b - a);
        if (reach(c) < reach(d))
            b = d;  // the least reach lies left of d
        else
            a = c;
    }
    const double best = 0.5 * (a + b);
    if (!(reach(best) < target)) return std::nullopt;
    // From the best centre, step away from the wall until the reach passes the target.
    double inside = best, step = std::max(hi - lo, tank.radius_m), outside = best - sign * step;
    while (reach(outside) < target) outside -= sign * step;
    for (int i = 0; i < 200 && std::abs(outside - inside) > 1e-13 * (1.0 + std::abs(inside)); ++i) {
        const double mid = 0.5 * (inside + outside);
        (reach(mid) < target ? inside : outside) = mid;
    }
    return inside;
}

}  // namespace

WaterSpec fixed_water_bounds(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed, const TriangleMesh& body) {
    WaterSpec water = spec.water;
    const std::optional<double> gap = plan.fixed_boundary_distance(fixed);
    if (!gap || body.vertices.empty() || plan.sweep.moved == MovedBoundary::wall) return water;
    double lowest = body.vertices.front().z(), highest = lowest;
    for (const Vec3& v : body.vertices) lowest = std::min(lowest, v.z()), highest = std::max(highest, v.z());
    const bool bottom = plan.sweep.moved == MovedBoundary::bottom;
    PlaneSpec plane = bottom ? *water.bottom : *water.surface;  // the reader requires the case to give it
    plane.height_m = bottom ? lowest - *gap : highest + *gap;
    plane.source = SourceLine{spec.path, plan.sweep.line, std::string("sweep.") + boundary_axis_key(plan.sweep.moved)};
    (bottom ? water.bottom : water.surface) = plane;
    return water;
}

std::optional<TankSpec> fixed_tank(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed,
                                   const TriangleMesh& body) {
    std::optional<TankSpec> tank = spec.tank;
    const std::optional<double> gap = plan.fixed_boundary_distance(fixed);
    if (!gap || body.vertices.empty() || plan.sweep.moved != MovedBoundary::wall) return tank;
    const int axis = plan.sweep.wall_axis, sign = plan.sweep.wall_sign;
    if (tank->shape == TankShape::box) {  // the reader allows boxes and cylinders only
        double far = -INFINITY;           // the body's farthest point towards the wall, along the axis
        for (const Vec3& v : body.vertices) far = std::max(far, sign * v[axis]);
        tank->centre_m[axis] = sign * (far + *gap - 0.5 * tank->size_m[axis]);
    } else {
        const std::optional<double> centre = cylinder_centre(body, *tank, axis, sign, *gap);
        if (!centre) {
            std::ostringstream radius;
            radius.precision(4);
            radius << tank->radius_m;
            throw InputError(boundary_value_where(plan, fixed) + ": the tank of radius " + radius.str() +
                             " m cannot hold the body this far from its wall");
        }
        tank->centre_m[axis] = *centre;
    }
    tank->source = SourceLine{spec.path, plan.sweep.line, std::string("sweep.") + boundary_axis_key(MovedBoundary::wall)};
    return tank;
}

std::optional<double> moved_boundary_position(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed,
                                              const TriangleMesh& body) {
    if (!plan.fixed_boundary_distance(fixed)) return std::nullopt;
    switch (plan.sweep.moved) {
        case MovedBoundary::surface: return fixed_water_bounds(spec, plan, fixed, body).surface->height_m;
        case MovedBoundary::bottom: return fixed_water_bounds(spec, plan, fixed, body).bottom->height_m;
        case MovedBoundary::wall: break;
    }
    const TankSpec tank = *fixed_tank(spec, plan, fixed, body);
    const int axis = plan.sweep.wall_axis;
    const double half = tank.shape == TankShape::box ? 0.5 * tank.size_m[axis] : tank.radius_m;
    return tank.centre_m[axis] + plan.sweep.wall_sign * half;
}

std::string boundary_value_where(const SweepPlan& plan, std::size_t fixed) {
    std::ostringstream value;
    value.precision(6);
    value << plan.fixed_boundary_distance(fixed).value_or(0.0) << " m";
    return plan.where + "." + boundary_axis_key(plan.sweep.moved) + " = " + value.str();
}

}  // namespace murk
