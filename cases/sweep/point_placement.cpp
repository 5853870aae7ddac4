#include "cases/sweep/point_placement.hpp"

#include "geometry/internal_check.hpp"

#include "cases/scene/scene_builder.hpp"
#include "cases/scene/scene_rules.hpp"
#include "cases/sweep/moved_boundary.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/message_text.hpp"
#include "geometry/transform.hpp"
#include "geometry/triangle_distance.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

namespace {

Vec3 to_vec(const std::array<double, 3>& p) { return Vec3(p[0], p[1], p[2]); }

// The box of a mesh, for the quick test that one surface cannot hold another.
bool box_inside(const TriangleMesh& inner, const BgBox& outer) { return bg::covered_by(mesh_box(inner), outer); }

// Moves the object along `direction` from where it is until its clearance equals
// `distance`, within 1e-6 of it where it can, else 1e-3; false when the clearance
// cannot be reached. Clearance changes at most as fast as the object moves (it is
// 1-Lipschitz in the displacement), so stepping by the remaining difference never
// overshoots from above; from below the object first steps outward.
template <class Clearance>
bool move_to_clearance(const Clearance& clearance, TriangleMesh& object, const Vec3& direction, double distance,
                       double& t) {
    t = 0.0;
    double moved = 0.0;  // how far `object` has been translated so far
    auto at = [&](double s) {
        translate(object, (s - moved) * direction);
        moved = s;
        return clearance(object);
    };
    double c = at(t);
    for (int i = 0; c < distance && i < 100; ++i) {
        const double step = std::max(distance - c, 1e-3 * distance);
        t += step;
        const double next = at(t);
        if (next <= c && c > 0) return false;  // moving the wrong way
        c = next;
    }
    if (c < distance) return false;
    for (int i = 0; c - distance > 1e-6 * distance && i < 200; ++i) {
        t -= c - distance;
        c = at(t);
    }
    return std::abs(c - distance) <= 1e-3 * distance;
}

// Refuses a point that takes the object so far from the origin that its
// coordinates cannot hold its shape (the rule of geometry/mesh_quality.hpp, which
// a rigidly moved mesh does not pass through again).
void require_resolvable(const TriangleMesh& object, const Vec3& at, const std::string& key) {
    if (const std::string far = too_far_from_origin(object, at); !far.empty())
        throw InputError(key + ": object " + in_quotes(object.name) + " " + far);
}

}  // namespace

PointPlacement::PointPlacement(const CaseSpec& spec, const SweepPlan& plan, std::vector<TriangleMesh> fixed)
    : plan_(&plan), has_body_(spec.fish || spec.robot) {
    if (spec.tank) {
        // The walls stay but hold the water: they are checked as walls, not as a surface to keep away from.
        const std::size_t at = has_body_ ? 1 : 0;
        MURK_CHECK(fixed.size() > at && fixed[at].name == "tank", "the tank follows the body among the fixed surfaces");
        fixed.erase(fixed.begin() + std::ptrdiff_t(at));
    }
    for (TriangleMesh& m : fixed) fixed_.emplace_back(std::move(m));
    if (spec.tank) {  // the boundary index is the innermost of a fixed part's
        const std::size_t tanks = plan.sweep.moved == MovedBoundary::wall ? plan.boundary_count() : 1;
        for (std::size_t k = 0; k < tanks; ++k) {
            const TankSpec tank = *fixed_tank(spec, plan, k, has_body_ ? fixed_.front().mesh() : TriangleMesh{});
            tanks_.emplace_back(tank, tank_walls_mesh(tank));
        }
    }
    // Each fixed part's planes: a plane-distance axis moves one of them per fixed part.
    const TriangleMesh no_body;
    for (std::size_t k = 0; k < plan.fixed_count(); ++k)
        planes_.push_back(fixed_water_bounds(spec, plan, k, has_body_ ? fixed_.front().mesh() : no_body).planes());
    for (const SourceSpec& src : spec.sources)
        for (const auto& p : source_points(src)) free_points_.push_back(p.position);
    for (const ProbePoint& p : spec.probe_points) free_points_.push_back(to_vec(p.position_m));
    if (!has_body_ && !spec.sources.empty()) reference_point_ = source_points(spec.sources.front()).front().position;

    const bool by_distance = plan.axis(AxisKind::distance) >= 0;
    for (std::size_t m : plan.moving) {
        const ObjectSpec& o = spec.objects[m];
        const Vec3 start = to_vec(o.position_m);
        start_.push_back(start);
        if (!by_distance) {
            direction_.push_back(Vec3::Zero());
            continue;
        }
        // Away from the reference point nearest to the object's position, unless given.
        Vec3 nearest = reference_point_;
        if (has_body_) {
            const TriangleMesh& body = fixed_.front().mesh();
            nearest = body.vertices.front();
            for (const Vec3& v : body.vertices)
                if ((v - start).squaredNorm() < (nearest - start).squaredNorm()) nearest = v;
        }
        if (!plan.sweep.direction) {
            if (!((start - nearest).norm() > 0.0))
                throw InputError(o.source.where() + ".position: lies on the body's surface, so there is no way away from "
                                 "it; give " + plan.where + ".direction");
            direction_.push_back((start - nearest).normalized());
            continue;
        }
        const Vec3 d = to_vec(*plan.sweep.direction).normalized();
        if (has_body_ && (start - nearest).dot(d) <= 0.0)
            throw InputError(plan.where + ".direction: points into the body from object '" + o.name +
                             "'; the object moves along it away from the body");
        direction_.push_back(d);
    }
}

double PointPlacement::clearance(const TriangleMesh& object) const {
    if (has_body_) return fixed_.front().distance_to(object);
    if (contains_point(object, reference_point_)) return 0.0;
    double d = INFINITY;
    for (std::size_t t = 0; t < object.size(); ++t)
        d = std::min(d, point_triangle_distance(reference_point_, object.corner(t, 0), object.corner(t, 1),
                                                object.corner(t, 2)));
    return d;
}

double PointPlacement::distance_to_fixed(const Vec3& x, std::size_t fixed) const {
    double d = INFINITY;
    for (const SurfaceIndex& f : fixed_) d = std::min(d, f.distance_to(x));
    if (const TankWalls* tank = tank_of(fixed)) d = std::min(d, tank->distance_to(x));
    for (const Vec3& p : free_points_) d = std::min(d, (p - x).norm());
    return d;
}

MaskReason PointPlacement::check(const TriangleMesh& object, std::size_t fixed) const {
    for (std::size_t k = 0; k < fixed_.size(); ++k) {
        const SurfaceIndex& f = fixed_[k];
        const MaskReason reason = k == 0 && has_body_ ? MaskReason::touches_body : MaskReason::touches_object;
        if (f.closer_than(object, min_surface_gap(f.mesh(), object))) return reason;
        // Apart, so one holds the other only if it holds any one point of it.
        if (box_inside(object, f.box()) && f.contains(object.corner(0, 0))) return reason;
        if (box_inside(f.mesh(), mesh_box(object)) && contains_point(object, f.mesh().corner(0, 0))) return reason;
    }
    for (const PlaneSpec& plane : planes_[fixed])
        if (reach_beyond_plane(object, plane) > -kMinGapInPanels * typical_edge(object)) return MaskReason::beyond_plane;
    if (const TankWalls* tank = tank_of(fixed); tank && !tank->breaks(object).empty()) return MaskReason::beyond_plane;
    if (!free_points_.empty()) {
        const double depth = kMinSourceDepthInPanels * typical_edge(object);
        const SurfaceIndex index(object);
        for (const Vec3& p : free_points_)
            if (index.contains(p) || index.distance_to(p) < depth) return MaskReason::near_source;
    }
    return MaskReason::none;
}

Placement PointPlacement::place(const std::vector<std::size_t>& index, const TriangleMesh& object) const {
    const SweepPlan& plan = *plan_;
    const std::size_t m = plan.moving_of(index);
    Vec3 at = start_[m];
    const int u = plan.axis(AxisKind::grid_u), v = plan.axis(AxisKind::grid_v);
    if (u >= 0) {
        const SweepGridSpec& grid = *plan.sweep.grid;
        at = to_vec(grid.origin_m) + plan.axes[u].values[index[u]] * to_vec(grid.u_direction) +
             plan.axes[v].values[index[v]] * to_vec(grid.v_direction);
    }
    const int d = plan.axis(AxisKind::distance);
    require_resolvable(object, d >= 0 ? Vec3(at + plan.axes[d].values[index[d]] * direction_[m]) : at,
                       plan.where + (d >= 0 ? ".distance" : ".grid"));
    Placement p;
    TriangleMesh moved = object;
    translate(moved, at);
    if (d >= 0) {
        double t = 0.0;
        if (!move_to_clearance([this](const TriangleMesh& o) { return clearance(o); }, moved, direction_[m],
                               plan.axes[d].values[index[d]], t)) {
            p.mask = MaskReason::unreachable;
            return p;
        }
        at += t * direction_[m];
    }
    p.offset = at;
    p.mask = check(moved, plan.water_of(index));
    return p;
}

}  // namespace murk
