#include "cases/sweep/sweep_point.hpp"

#include "cases/scene/scene_builder.hpp"
#include "geometry/clearance.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/transform.hpp"
#include "geometry/triangle_distance.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

namespace {

Vec3 to_vec(const std::array<double, 3>& p) { return Vec3(p[0], p[1], p[2]); }

// Largest half-extent of a shape, the length the size axis sets.
double half_extent(const ShapeSpec& s) {
    switch (s.kind) {
        case ShapeKind::sphere: return s.radius_m;
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return *std::max_element(s.semi_axes_m.begin(), s.semi_axes_m.end());
        case ShapeKind::capsule: return 0.5 * s.length_m;
        case ShapeKind::box: return 0.5 * *std::max_element(s.size_m.begin(), s.size_m.end());
        case ShapeKind::mesh: {
            const TriangleMesh m = read_mesh(s.mesh_file, s.mesh_scale_m);
            Vec3 lo = Vec3::Constant(INFINITY), hi = -lo;
            for (const Vec3& v : m.vertices) lo = lo.cwiseMin(v), hi = hi.cwiseMax(v);
            return 0.5 * (hi - lo).maxCoeff();
        }
    }
    return 0.0;
}

void scale_shape(ShapeSpec& s, double factor) {
    s.radius_m *= factor;
    s.length_m *= factor;
    for (double& v : s.semi_axes_m) v *= factor;
    for (double& v : s.size_m) v *= factor;
    s.mesh_scale_m *= factor;
}

void set_material(ObjectSpec& o, double sigma) {
    if (sigma == kInsulatorConductivity) o.material = Material::insulator;
    else if (std::isinf(sigma)) o.material = Material::conductor;
    else o.material = Material::conducting, o.conductivity_S_per_m = sigma;
}

// The object's surface as the scene builder makes it, at the spec's position.
TriangleMesh object_mesh(const CaseSpec& spec, std::size_t k) {
    CaseSpec alone = spec;
    alone.objects = {spec.objects[k]};
    return build_scene<Complex>(alone, true).surfaces.back().mesh;
}

// Moves the object along `direction` until its clearance from the body equals
// `distance`. Clearance changes at most as fast as the object moves (it is
// 1-Lipschitz in the displacement), so stepping by the remaining difference
// never overshoots from above; from below the object first steps outward.
bool place_at_distance(const DistanceReference& reference, const TriangleMesh& object, const Vec3& direction,
                       double distance, double& t) {
    auto clearance = [&](double s) {
        TriangleMesh moved = object;
        translate(moved, s * direction);
        return reference.clearance(moved);
    };
    t = 0.0;
    double c = clearance(t);
    for (int i = 0; c < distance && i < 100; ++i) {
        const double step = std::max(distance - c, 1e-3 * distance);
        t += step;
        const double next = clearance(t);
        if (next <= c && c > 0) return false;  // moving the wrong way
        c = next;
    }
    if (c < distance) return false;
    for (int i = 0; c - distance > 1e-6 * distance && i < 200; ++i) {
        t -= c - distance;
        c = clearance(t);
    }
    return std::abs(c - distance) <= 1e-3 * distance;
}

}  // namespace

double DistanceReference::clearance(const TriangleMesh& object) const {
    if (body) return min_distance(*body, object);
    if (contains_point(object, point)) return 0.0;
    double d = INFINITY;
    for (std::size_t t = 0; t < object.size(); ++t)
        d = std::min(d, point_triangle_distance(point, object.corner(t, 0), object.corner(t, 1), object.corner(t, 2)));
    return d;
}

Vec3 DistanceReference::nearest_to(const Vec3& x) const {
    if (!body) return point;
    Vec3 nearest = body->vertices.front();
    for (const Vec3& v : body->vertices)
        if ((v - x).squaredNorm() < (nearest - x).squaredNorm()) nearest = v;
    return nearest;
}

std::size_t swept_object_index(const CaseSpec& spec, const SweepSpec& sweep) {
    if (spec.objects.empty())
        throw InputError(spec.path + ":" + std::to_string(sweep.line) + ": sweep: the case has no [[object]] to sweep");
    if (sweep.object.empty()) return 0;
    for (std::size_t k = 0; k < spec.objects.size(); ++k)
        if (spec.objects[k].name == sweep.object) return k;
    throw InputError(spec.path + ":" + std::to_string(sweep.line) + ": sweep.object: no object named '" +
                     sweep.object + "'");
}

PointSetup configure_point(const CaseSpec& spec, const SweepSpec& sweep, const std::vector<SweepAxis>& axes,
                           const std::vector<std::size_t>& index, const DistanceReference& reference) {
    PointSetup p;
    p.spec = spec;
    // An object axis picks one of several alternative objects; the others it
    // lists leave the water.
    const int object_axis = find_axis(axes, AxisKind::object);
    if (object_axis >= 0) {
        const std::string chosen = sweep.objects[index[object_axis]];
        std::vector<ObjectSpec> kept;
        for (const ObjectSpec& o : spec.objects)
            if (o.name == chosen || std::find(sweep.objects.begin(), sweep.objects.end(), o.name) == sweep.objects.end())
                kept.push_back(o);
        p.spec.objects = kept;
        p.spec.sweep->object = chosen;
    }
    const std::size_t k = swept_object_index(p.spec, *p.spec.sweep);
    ObjectSpec& object = p.spec.objects[k];
    Vec3 centre = to_vec(object.position_m);
    bool has_distance = false;
    double distance = 0.0;
    for (std::size_t a = 0; a < axes.size(); ++a) {
        const double v = axes[a].values[index[a]];
        switch (axes[a].kind) {
            case AxisKind::water_conductivity: p.spec.water.conductivity_S_per_m = v; break;
            case AxisKind::object: break;  // chosen above
            case AxisKind::conductivity: set_material(object, v); break;
            case AxisKind::size: {
                const double factor = v / half_extent(object.shape);
                scale_shape(object.shape, factor);
                if (object.panel_size_m) *object.panel_size_m *= factor;
                break;
            }
            case AxisKind::distance: has_distance = true, distance = v; break;
            case AxisKind::grid_u: centre = to_vec(sweep.grid->origin_m) + v * to_vec(sweep.grid->u_direction); break;
            case AxisKind::grid_v: centre += v * to_vec(sweep.grid->v_direction); break;
        }
    }
    object.position_m = {centre.x(), centre.y(), centre.z()};

    if (has_distance) {
        TriangleMesh mesh;
        try {
            mesh = object_mesh(p.spec, k);
        } catch (const InputError& e) {
            p.masked = true, p.mask_reason = e.what();
            return p;
        }
        Vec3 direction;
        if (sweep.direction) {
            direction = to_vec(*sweep.direction).normalized();
        } else {  // away from the reference point nearest to the object's centre
            direction = (centre - reference.nearest_to(centre)).normalized();
        }
        double t = 0.0;
        if (!place_at_distance(reference, mesh, direction, distance, t)) {
            p.masked = true, p.mask_reason = "cannot reach the clearance along the sweep direction";
            return p;
        }
        centre += t * direction;
        object.position_m = {centre.x(), centre.y(), centre.z()};
    }
    p.object_centre = centre;
    // The builder refuses an object that touches, enters or encloses the body, or
    // leaves the water; at a sweep point that means the point is masked. (Other
    // objects are checked when the runner builds the whole scene.)
    try {
        (void)object_mesh(p.spec, k);
    } catch (const InputError& e) {
        p.masked = true, p.mask_reason = e.what();
    }
    return p;
}

}  // namespace murk
