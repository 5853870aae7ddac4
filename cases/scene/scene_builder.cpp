#include "cases/scene/scene_builder.hpp"

#include "cases/scene/hull_electrodes.hpp"
#include "cases/scene/scene_rules.hpp"
#include "cases/scene/tank_walls.hpp"
#include "solver/tank.hpp"

#include "geometry/clearance.hpp"
#include "geometry/electrode_hulls.hpp"
#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/regions.hpp"
#include "geometry/shapes.hpp"
#include "geometry/spatial_index.hpp"
#include "geometry/transform.hpp"
#include "geometry/triangle_distance.hpp"
#include "geometry/zone_refinement.hpp"
#include "solver/image_series.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
#include <map>
#include <optional>
#include <sstream>

namespace murk {

namespace {

// Vacuum permittivity (F/m), CODATA 2018 recommended value.
constexpr double kVacuumPermittivity = 8.8541878128e-12;

std::string format_length(double metres) {
    std::ostringstream out;
    out.precision(3);
    if (std::abs(metres) >= 0.1) out << metres << " m";
    else if (std::abs(metres) >= 1e-3) out << metres * 1e3 << " mm";
    else out << metres * 1e6 << " um";
    return out.str();
}

double angular_frequency(const CaseSpec& spec) {
    return spec.frequency_Hz ? 2.0 * M_PI * *spec.frequency_Hz : 0.0;
}

// sigma + i omega eps0 eps_r (S/m): a lossy dielectric at angular frequency omega.
Complex admittivity(double sigma, const std::optional<double>& eps_r, double omega) {
    return {sigma, eps_r ? omega * kVacuumPermittivity * *eps_r : 0.0};
}

// Specific impedance (ohm m^2) of a membrane: resistance rho in parallel with
// capacitance C per area, 1 / (1/rho + i omega C).
Complex membrane_impedance(double rho, const std::optional<double>& capacitance, double omega) {
    if (!capacitance || omega == 0.0) return {rho, 0.0};
    return 1.0 / Complex(1.0 / rho, omega * *capacitance);
}

template <class S>
S to_scalar(const Complex& c);
template <>
double to_scalar<double>(const Complex& c) {
    assert(c.imag() == 0.0);  // build_scene<double> refuses cases that need complex numbers
    return c.real();
}
template <>
Complex to_scalar<Complex>(const Complex& c) {
    return c;
}

Vec3 to_vec(const Point3& p) { return Vec3(p[0], p[1], p[2]); }

// Re-throws a geometry-layer InputError with the case part in front.
template <class F>
auto with_place(const std::string& where, F&& f) -> decltype(f()) {
    try {
        return f();
    } catch (const InputError& e) {
        throw InputError(where + ": " + e.what());
    }
}

// Overall length (m) of a solid, the scale from which the default panel size follows.
double shape_length(const ShapeSpec& s, const TriangleMesh* mesh) {
    switch (s.kind) {
        case ShapeKind::sphere: return 2.0 * s.radius_m;
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return 2.0 * *std::max_element(s.semi_axes_m.begin(), s.semi_axes_m.end());
        case ShapeKind::capsule: return s.overall_length_m;
        case ShapeKind::box: return *std::max_element(s.size_m.begin(), s.size_m.end());
        case ShapeKind::mesh: {
            assert(mesh);
            Vec3 lo = Vec3::Constant(std::numeric_limits<double>::infinity()), hi = -lo;
            for (const Vec3& v : mesh->vertices) lo = lo.cwiseMin(v), hi = hi.cwiseMax(v);
            return mesh->vertices.empty() ? 0.0 : (hi - lo).maxCoeff();
        }
    }
    return 0.0;
}

// Mesh of a solid in its own frame (centred, long axis along x); an imported
// mesh keeps its file coordinates, scaled to metres. Zones (in the same frame)
// apply to generated shapes only; the reader refuses them for an imported hull.
TriangleMesh make_shape_mesh(const ShapeSpec& s, double target_edge, const std::vector<RefinementZone>& zones = {}) {
    switch (s.kind) {
        case ShapeKind::sphere: return make_sphere(s.radius_m, target_edge, zones);
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return make_ellipsoid(to_vec(s.semi_axes_m), target_edge, zones);
        case ShapeKind::capsule: return make_capsule(s.radius_m, s.overall_length_m - 2.0 * s.radius_m, target_edge, zones);
        case ShapeKind::box: return make_box(to_vec(s.size_m), target_edge, zones);
        case ShapeKind::mesh: assert(zones.empty()); return read_mesh(s.mesh_file, s.file_unit_m);
    }
    return {};
}

// The robot's ring electrodes as bands along the hull axis, in case order.
std::vector<AxialBand> ring_bands(const RobotSpec& robot) {
    std::vector<AxialBand> rings;
    for (const ElectrodeSpec& e : robot.electrodes)
        if (e.form == ElectrodeForm::ring) rings.push_back({e.from_m, e.to_m});
    return rings;
}

// Extent [lo, hi] (m) of the hull along its own x axis.
std::pair<double, double> hull_x_extent(const ShapeSpec& s, const TriangleMesh& hull) {
    switch (s.kind) {
        case ShapeKind::sphere: return {-s.radius_m, s.radius_m};
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: return {-s.semi_axes_m[0], s.semi_axes_m[0]};
        case ShapeKind::capsule: return {-0.5 * s.overall_length_m, 0.5 * s.overall_length_m};
        case ShapeKind::box: return {-0.5 * s.size_m[0], 0.5 * s.size_m[0]};
        case ShapeKind::mesh: break;
    }
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    for (const Vec3& v : hull.vertices) lo = std::min(lo, v.x()), hi = std::max(hi, v.x());
    return {lo, hi};
}

// Refuses a ring electrode that reaches beyond the hull along its axis, naming it.
void require_rings_on_hull(const RobotSpec& robot, const TriangleMesh& hull) {
    const auto [lo, hi] = hull_x_extent(robot.hull, hull);
    for (const ElectrodeSpec& e : robot.electrodes) {
        const double tol = 1e-9 * (hi - lo);
        if (e.form == ElectrodeForm::ring && (e.from_m < lo - tol || e.to_m > hi + tol))
            throw InputError(e.source.where() + ": ring electrode " + in_quotes(e.name) + " from " +
                             format_length(e.from_m) + " to " + format_length(e.to_m) +
                             " falls (partly) off the hull, which spans " + format_length(lo) + " to " +
                             format_length(hi) + " along its axis");
    }
}

// The generated robot hull in its own frame. With rings on a capsule, sphere or
// box, its panel edges lie on the ring edges, graded toward them; zones then
// refine its flat panels where they are (identity projection), which keeps every
// electrode's area exact.
TriangleMesh robot_hull_mesh(const CaseSpec& spec, double panel, const std::vector<RefinementZone>& zones) {
    const RobotSpec& robot = *spec.robot;
    const ShapeSpec& s = robot.hull;
    if (!hull_conforms_to_rings(robot)) return make_shape_mesh(s, panel, zones);
    TriangleMesh m =
        s.kind == ShapeKind::box
            ? make_box_with_rings(to_vec(s.size_m), panel, ring_bands(robot), spec.mesh.electrode_edge_m)
            : make_capsule_with_rings(s.radius_m, s.kind == ShapeKind::capsule ? s.overall_length_m - 2.0 * s.radius_m : 0.0,
                                      panel, ring_bands(robot), spec.mesh.electrode_edge_m);
    refine_in_zones(m, zones, [](const Vec3& p) { return p; });
    return m;
}

double default_panel_size(const CaseSpec& spec, const TriangleMesh* hull_mesh) {
    if (spec.mesh.panel_size_m) return *spec.mesh.panel_size_m;
    // No body, no panel size: nothing but each object's own size limits its panels.
    if (!spec.fish && !spec.robot) return std::numeric_limits<double>::infinity();
    const double length = spec.fish ? spec.fish->length_m : shape_length(spec.robot->hull, hull_mesh);
    return length / 30.0;
}

// ---- refinement zones of the sensing body -------------------------------------

// The case's [[mesh.zone]] tables in the body's own frame, where the body's own
// frame maps to the world by x -> R x + offset. A zone may only make panels
// smaller than the body's `panel_size`.
std::vector<RefinementZone> body_zones(const CaseSpec& spec, double panel_size, const Eigen::Matrix3d& R,
                                       const Vec3& offset) {
    std::vector<RefinementZone> zones;
    for (const MeshZoneSpec& z : spec.mesh.zones) {
        if (z.panel_size_m > panel_size)
            throw InputError(z.panel_size_source.where() + ": " + format_length(z.panel_size_m) +
                             " is larger than the body's panel size (" + format_length(panel_size) +
                             (spec.mesh.panel_size_m ? ", mesh.panel_size" : ", the default: body length / 30") +
                             "); a zone can only make panels smaller");
        zones.push_back(RefinementZone{R.transpose() * (to_vec(z.centre_m) - offset), z.radius_m, z.panel_size_m});
    }
    return zones;
}

// Refuses a zone whose ball does not reach the placed body's surface: it would
// refine nothing, which is surely a mistyped centre or unit.
void require_zones_reach(const CaseSpec& spec, const TriangleMesh& body, const std::string& body_label) {
    for (const MeshZoneSpec& z : spec.mesh.zones) {
        const double d = distance_to_surface(body, to_vec(z.centre_m));
        if (d > z.radius_m)
            throw InputError(z.centre_source.where() + ": the zone does not reach " + body_label + ": its centre is " +
                             format_length(d) + " from the surface, more than its radius (" +
                             format_length(z.radius_m) + ")");
    }
}

// A surface placed in the scene, with what messages need to name it.
struct Part {
    const TriangleMesh* mesh;
    SourceLine source;
    std::string label;          // "the fish", "the robot", "object 'prey'"
    bool may_enclose = false;   // sources and probes may lie inside it (the fish)
};

// ---- sensing bodies -----------------------------------------------------------

// Body profile of the fish in its own frame: axis along x with the tail tip at
// x = 0 and the nose at x = length, so that the fish faces +x.
BodyProfile fish_profile(const FishSpec& f) {
    BodyProfile p;
    for (auto it = f.profile.rbegin(); it != f.profile.rend(); ++it) {
        p.x.push_back((1.0 - it->x_fraction) * f.length_m);
        p.half_width.push_back(it->half_width_fraction * f.length_m);
        p.half_height.push_back(it->half_height_fraction * f.length_m);
    }
    return p;
}

// Point of the fish frame that the case's position refers to.
Vec3 fish_anchor(const FishSpec& f) {
    return Vec3(f.anchored_at_nose ? f.length_m : 0.5 * f.length_m, 0.0, 0.0);
}

// The fish frame mapped to the world: x -> R (x - anchor) + position.
void place_fish(TriangleMesh& mesh, const FishSpec& f, const Eigen::Matrix3d& R) {
    transform(mesh, R, to_vec(f.position_m) - R * fish_anchor(f));
}

template <class S>
void add_fish(Scene<S>& scene, const CaseSpec& spec, double omega, double panel_size) {
    const FishSpec& f = *spec.fish;
    const std::string where = f.source.where();
    const Eigen::Matrix3d R = orientation_matrix(f.orientation);
    const std::vector<RefinementZone> zones = body_zones(spec, panel_size, R, to_vec(f.position_m) - R * fish_anchor(f));
    Surface<S> body;
    body.mesh = with_place(where, [&] { return make_body(fish_profile(f), panel_size, zones); });
    body.mesh.name = "fish";
    place_fish(body.mesh, f, R);
    require_zones_reach(spec, body.mesh, "the fish's skin");
    require_valid_mesh(body.mesh, where);
    body.kind = InterfaceKind::membrane;
    body.inner_conductivity =
        to_scalar<S>(admittivity(f.interior_conductivity_S_per_m, f.interior_permittivity_relative, omega));
    body.membrane_resistance =
        to_scalar<S>(membrane_impedance(f.skin_resistance_ohm_m2, f.skin_capacitance_F_per_m2, omega));

    const std::vector<double> currents = organ_currents(f.organ);
    const std::vector<double> fractions = organ_fractions(f.organ);
    const double min_depth = kMinSourceDepthInPanels * typical_edge(body.mesh);
    for (std::size_t k = 0; k < currents.size(); ++k) {
        const Vec3 local((1.0 - fractions[k]) * f.length_m, 0.0, 0.0);
        const Vec3 p = R * (local - fish_anchor(f)) + to_vec(f.position_m);
        std::ostringstream point;
        point << "organ point " << k + 1 << " of " << currents.size() << " (at " << fractions[k]
              << " of the length from the nose)";
        if (!contains_point(body.mesh, p))
            throw InputError(f.organ.source.where() + ": " + point.str() +
                             " lies outside the body surface; move from/to away from the tips");
        double depth = std::numeric_limits<double>::infinity();
        for (std::size_t t = 0; t < body.mesh.size(); ++t)
            depth = std::min(depth, point_triangle_distance(p, body.mesh.corner(t, 0), body.mesh.corner(t, 1),
                                                            body.mesh.corner(t, 2)));
        if (depth < min_depth)
            throw InputError(f.organ.source.where() + ": " + point.str() + " is only " + format_length(depth) +
                             " under the skin, less than a quarter of the panel size (" +
                             format_length(typical_edge(body.mesh)) +
                             "); move from/to away from the tips or set a smaller mesh.panel_size");
        scene.sources.push_back(PointSource<S>{p, S(currents[k])});
    }
    scene.surfaces.push_back(std::move(body));
}

// The panels of each electrode cut into the hull (hull_electrodes.hpp), by index in
// robot.electrodes; nullopt for an electrode that is not cut.
using CutPanels = std::vector<std::optional<std::vector<std::size_t>>>;

// Tags the robot's electrodes on its hull (hull frame) and returns, per panel,
// the index of its electrode in robot.electrodes or -1. Cut electrodes get the
// panels of the cut; rings meshed on stations, the panels their band selects.
std::vector<int> tag_electrodes(TriangleMesh& hull, const RobotSpec& robot, const CutPanels& cut) {
    std::map<int, int> electrode_of_tag;
    // Region electrodes first: their tags come from the mesh file.
    for (std::size_t k = 0; k < robot.electrodes.size(); ++k) {
        const ElectrodeSpec& e = robot.electrodes[k];
        if (e.form != ElectrodeForm::region) continue;
        const auto it = std::find(hull.region_names.begin(), hull.region_names.end(), e.region);
        if (e.region.empty() || it == hull.region_names.end()) {
            std::string known;
            for (const auto& name : hull.region_names)
                if (!name.empty()) known += (known.empty() ? "" : ", ") + name;
            throw InputError(e.source.where() + ".region: no region " + in_quotes(e.region) + " in the hull mesh (it has: " +
                             (known.empty() ? "no named regions" : printable(known)) + ")");
        }
        const int tag = static_cast<int>(it - hull.region_names.begin());
        if (region_size(hull, tag) == 0)
            throw InputError(e.source.where() + ".region: region " + in_quotes(e.region) + " of the hull mesh has no panel");
        electrode_of_tag[tag] = static_cast<int>(k);
    }
    require_rings_on_hull(robot, hull);
    for (std::size_t k = 0; k < robot.electrodes.size(); ++k) {
        const ElectrodeSpec& e = robot.electrodes[k];
        if (e.form == ElectrodeForm::region) continue;
        const std::vector<int> before = hull.region;
        with_place(e.source.where(), [&] {
            const int tag = add_region(hull, e.name);
            if (k < cut.size() && cut[k]) {
                hull.region.resize(hull.size(), 0);
                for (std::size_t t : *cut[k]) hull.region[t] = tag;
            } else if (e.form == ElectrodeForm::ring) {
                tag_band(hull, tag, Vec3::Zero(), Vec3::UnitX(), e.from_m, e.to_m);
            } else {
                tag_disc(hull, tag, to_vec(e.at_m), e.radius_m);
            }
            electrode_of_tag[tag] = static_cast<int>(k);
            for (std::size_t t = 0; t < hull.size(); ++t) {
                if (hull.region[t] != tag) continue;
                const auto other = electrode_of_tag.find(before[t]);
                if (other != electrode_of_tag.end())
                    throw InputError("electrode " + in_quotes(e.name) + " overlaps electrode " +
                                     in_quotes(robot.electrodes[other->second].name) + " (they share panel " +
                                     std::to_string(t) + ")");
            }
            return 0;
        });
    }
    std::vector<int> panel_electrode(hull.size(), -1);
    for (std::size_t t = 0; t < hull.size(); ++t) {
        const auto it = electrode_of_tag.find(hull.region[t]);
        if (it != electrode_of_tag.end()) panel_electrode[t] = it->second;
    }
    return panel_electrode;
}

template <class S>
void add_robot(Scene<S>& scene, const CaseSpec& spec, TriangleMesh hull, const CutPanels& cut) {
    const RobotSpec& r = *spec.robot;
    Surface<S> surface;
    surface.kind = InterfaceKind::sealed;
    hull.name = "robot";
    surface.panel_electrode = tag_electrodes(hull, r, cut);
    surface.mesh = std::move(hull);
    transform(surface.mesh, orientation_matrix(r.orientation), to_vec(r.position_m));
    require_zones_reach(spec, surface.mesh, "the robot's hull");
    require_valid_mesh(surface.mesh, r.source.where());
    for (const ElectrodeSpec& e : r.electrodes) scene.electrodes.push_back(Electrode<S>{e.name, e.drive, S(e.value)});
    scene.surfaces.push_back(std::move(surface));
}

// ---- objects --------------------------------------------------------------------

}  // namespace

TriangleMesh object_mesh(const CaseSpec& spec, const ObjectSpec& o) {
    const std::string where = o.source.where();
    TriangleMesh mesh = with_place(where, [&] { return make_shape_mesh(o.shape, object_panel_size(spec, o)); });
    mesh.name = o.name;
    transform(mesh, orientation_matrix(o.orientation), to_vec(o.position_m));
    require_valid_mesh(mesh, where);
    return mesh;
}

template <class S>
void add_object_surface(Scene<S>& scene, const CaseSpec& spec, const ObjectSpec& o, TriangleMesh mesh) {
    const double omega = angular_frequency(spec);
    Surface<S> surface;
    surface.mesh = std::move(mesh);
    switch (o.material) {
        case Material::conducting:
            surface.inner_conductivity = to_scalar<S>(admittivity(o.conductivity_S_per_m, o.permittivity_relative, omega));
            if (!o.membrane) {
                // Beyond these contrasts the object is solved as the limit it tends to
                // (cases/scene/scene_rules.hpp).
                const double contrast = std::abs(surface.inner_conductivity) / std::abs(scene.water_conductivity);
                if (contrast >= kLimitContrast) {
                    ObjectSpec limit = o;
                    limit.material = Material::conductor;
                    return add_object_surface(scene, spec, limit, std::move(surface.mesh));
                }
                if (contrast <= 1.0 / kLimitContrast) {
                    ObjectSpec limit = o;
                    limit.material = Material::insulator;
                    return add_object_surface(scene, spec, limit, std::move(surface.mesh));
                }
            }
            if (o.membrane) {
                surface.kind = InterfaceKind::membrane;
                surface.membrane_resistance = to_scalar<S>(
                    membrane_impedance(o.membrane->resistance_ohm_m2, o.membrane->capacitance_F_per_m2, omega));
            } else {
                surface.kind = InterfaceKind::contact;
            }
            break;
        case Material::insulator:
            surface.kind = InterfaceKind::sealed;
            surface.panel_electrode.assign(surface.mesh.size(), -1);
            break;
        case Material::conductor:
            surface.kind = InterfaceKind::sealed;
            surface.panel_electrode.assign(surface.mesh.size(), static_cast<int>(scene.electrodes.size()));
            scene.electrodes.push_back(Electrode<S>{object_electrode_name(o.name), ElectrodeDrive::floating, S(0.0)});
            break;
    }
    scene.surfaces.push_back(std::move(surface));
}

template <class S>
S water_admittivity(const CaseSpec& spec, double conductivity_S_per_m) {
    return to_scalar<S>(admittivity(conductivity_S_per_m, spec.water.permittivity_relative, angular_frequency(spec)));
}

template double water_admittivity(const CaseSpec&, double);
template Complex water_admittivity(const CaseSpec&, double);
template void add_object_surface(Scene<double>&, const CaseSpec&, const ObjectSpec&, TriangleMesh);
template void add_object_surface(Scene<Complex>&, const CaseSpec&, const ObjectSpec&, TriangleMesh);

namespace {

// ---- whole-scene checks ---------------------------------------------------------------

void require_in_water(const Part& part, const PlaneSpec& plane) {
    const double sign = plane.water_below ? 1.0 : -1.0;  // out of the water
    const double reach = reach_beyond_plane(*part.mesh, plane);
    const double gap = kMinGapInPanels * typical_edge(*part.mesh);
    if (reach > -gap) {
        const std::string name = plane.water_below ? "water surface" : "bottom";
        const std::string side = plane.water_below ? "above" : "below";
        throw InputError(part.source.where() + ": " + part.label + " reaches z = " +
                         format_length(plane.height_m + sign * reach) + ", " +
                         (reach > 0.0 ? side + " the " : "at or within " + format_length(gap) + " of the ") + name +
                         " at z = " + format_length(plane.height_m) + " (" + plane.source.key +
                         "); everything must lie in the water");
    }
}

void require_apart(const std::vector<Part>& parts) {
    for (std::size_t j = 1; j < parts.size(); ++j)
        for (std::size_t i = 0; i < j; ++i) {
            const double gap = min_surface_gap(*parts[i].mesh, *parts[j].mesh);
            with_place(parts[j].source.where(), [&] {
                require_clearance({parts[i].mesh, parts[j].mesh}, gap);
                return 0;
            });
        }
}

// ---- sources and probes ------------------------------------------------------------

// Two points closer than this (m) are taken to coincide: far below any length a
// case can resolve, far above the rounding of coordinates of a few metres.
constexpr double kCoincidentDistance = 1e-9;

std::string format_point(const Vec3& p) {
    std::ostringstream out;
    out.precision(4);
    out << "(" << p.x() << ", " << p.y() << ", " << p.z() << ") m";
    return out.str();
}

// A part prepared for many point queries: points far outside its box skip the
// winding number, and the distance is taken only to panels whose boxes come
// within the clearance.
struct PointClearance {
    const Part* part;
    double panel_size;  // typical edge (m)
    double min_gap;     // kMinSourceDepthInPanels panel sizes (m)
    BgBox box;          // the mesh's box grown by min_gap
    PanelTree tree;

    explicit PointClearance(const Part& p)
        : part(&p), panel_size(typical_edge(*p.mesh)), min_gap(kMinSourceDepthInPanels * panel_size),
          box(grown(mesh_box(*p.mesh), min_gap)), tree(build_panel_tree(*p.mesh)) {}

    static BgBox grown(const BgBox& b, double by) {
        const BgPoint& lo = b.min_corner();
        const BgPoint& hi = b.max_corner();
        return BgBox(BgPoint(lo.get<0>() - by, lo.get<1>() - by, lo.get<2>() - by),
                     BgPoint(hi.get<0>() + by, hi.get<1>() + by, hi.get<2>() + by));
    }

    // Least distance (m) from x to the surface, or +infinity when it is above min_gap.
    double near_distance(const Vec3& x) const {
        BgBox around(to_bg(x - Vec3::Constant(min_gap)), to_bg(x + Vec3::Constant(min_gap)));
        double d = std::numeric_limits<double>::infinity();
        const TriangleMesh& m = *part->mesh;
        for (auto it = tree.qbegin(bgi::intersects(around)); it != tree.qend(); ++it)
            d = std::min(d, point_triangle_distance(x, m.corner(it->second, 0), m.corner(it->second, 1),
                                                    m.corner(it->second, 2)));
        return d < min_gap ? d : std::numeric_limits<double>::infinity();
    }
};

// Refuses a source or probe point that lies beyond the insulating plane, inside
// a surface other than the fish, or closer to a surface than a quarter of its
// panel size (where piecewise-constant panel values are not accurate).
// `where` is "file:line: key", `what` names the point in words.
void require_free_point(const std::vector<PointClearance>& parts, const std::vector<PlaneSpec>& planes,
                        const Vec3& x, const std::string& where, const std::string& what, const std::string& allowed) {
    const std::string head = where + ": " + what + " at " + format_point(x);
    for (const PlaneSpec& plane : planes)
        if (plane.water_below ? x.z() > plane.height_m : x.z() < plane.height_m)
            throw InputError(head + " lies " + (plane.water_below ? "above the water surface" : "below the bottom") +
                             " at z = " + format_length(plane.height_m) + " (" + plane.source.key + "); " + allowed);
    for (const PointClearance& c : parts) {
        if (!bg::covered_by(to_bg(x), c.box)) continue;
        if (!c.part->may_enclose && contains_point(*c.part->mesh, x))
            throw InputError(head + " lies inside " + c.part->label + "; " + allowed);
        const double d = c.near_distance(x);
        if (d < c.min_gap)
            throw InputError(head + " is " + format_length(d) + " from the surface of " + c.part->label +
                             ", less than a quarter of its mean panel edge (" + format_length(c.panel_size) +
                             "); move it at least " + format_length(c.min_gap) + " away or make the panels smaller");
    }
}

std::vector<PointClearance> prepare_clearance(const std::vector<Part>& parts) {
    std::vector<PointClearance> out;
    for (const Part& p : parts) out.emplace_back(p);
    return out;
}

// Adds the points of every [[source]] to the scene after checking each.
template <class S>
void add_free_sources(Scene<S>& scene, const CaseSpec& spec, const std::vector<PointClearance>& parts) {
    for (const SourceSpec& src : spec.sources) {
        const std::vector<PointSource<double>> points = source_points(src);
        for (std::size_t k = 0; k < points.size(); ++k) {
            const std::string what = src.form == SourceForm::point
                                         ? std::string("the source")
                                         : "source point " + std::to_string(k + 1) + " of " + std::to_string(points.size());
            require_free_point(parts, spec.water.planes(), points[k].position, src.source.where(), what,
                               "a source may lie in the water or inside the fish");
            scene.sources.push_back(PointSource<S>{points[k].position, S(points[k].current)});
        }
    }
}

// Checks every probe point: free like a source, and not on a source point, where
// the potential is infinite.
template <class S>
void check_probes(const Scene<S>& scene, const CaseSpec& spec, const std::vector<PointClearance>& parts) {
    for (const ProbePoint& pt : spec.probe_points) {
        const ProbeSpec& probe = spec.probes[pt.probe];
        const std::string what =
            "probe " + in_quotes(probe.name) + (probe.form == ProbeForm::point ? "" : " point " + pt.label);
        const Vec3 x = to_vec(pt.position_m);
        require_free_point(parts, spec.water.planes(), x, probe.source.where(), what,
                           "a probe may lie in the water or inside the fish");
        for (const PointSource<S>& src : scene.sources)
            if ((src.position - x).norm() < kCoincidentDistance)
                throw InputError(probe.source.where() + ": " + what + " at " + format_point(x) +
                                 " is on a source point, where the potential is infinite; put it beside the source");
    }
}

// The tank holds every surface, source and probe point, and the currents it
// holds sum to zero (tank_walls.hpp).
template <class S>
void check_tank_holds(const Scene<S>& scene, const CaseSpec& spec, const TankWalls& tank,
                      const std::vector<Part>& parts) {
    for (const Part& p : parts) require_inside_tank(tank, *spec.tank, *p.mesh, p.label);
    for (const PointSource<S>& src : scene.sources) require_inside_tank(tank, *spec.tank, src.position, "a source point");
    for (const ProbePoint& pt : spec.probe_points)
        require_inside_tank(tank, *spec.tank, to_vec(pt.position_m),
                            "probe " + in_quotes(spec.probes[pt.probe].name) +
                                (spec.probes[pt.probe].form == ProbeForm::point ? "" : " point " + pt.label));
    std::vector<std::pair<std::string, double>> driven;
    for (const Electrode<S>& e : scene.electrodes)
        if (e.drive == ElectrodeDrive::current) driven.emplace_back(e.name, std::real(e.value));
    require_zero_net_current(spec, driven);
}

// "file:line: key" of the first part of the case that makes conductivities
// complex (the line of its table), or "".
std::string complex_reason(const CaseSpec& spec) {
    if (!spec.frequency_Hz) return "";
    if (spec.water.permittivity_relative) return spec.water.source.where() + ".permittivity";
    if (spec.fish && spec.fish->interior_permittivity_relative)
        return spec.fish->source.where() + ".interior_permittivity";
    if (spec.fish && spec.fish->skin_capacitance_F_per_m2) return spec.fish->source.where() + ".skin_capacitance";
    for (const ObjectSpec& o : spec.objects) {
        if (o.permittivity_relative) return o.source.where() + ".permittivity";
        if (o.membrane && o.membrane->capacitance_F_per_m2) return o.source.where() + ".membrane_capacitance";
    }
    return "";
}

}  // namespace

// ---- public ------------------------------------------------------------------------

bool case_needs_complex(const CaseSpec& spec) { return !complex_reason(spec).empty(); }

std::string object_electrode_name(const std::string& object_name) { return kObjectElectrodePrefix + object_name; }

bool is_object_electrode(const std::string& electrode_name) {
    return electrode_name.rfind(kObjectElectrodePrefix, 0) == 0;
}

std::vector<double> organ_currents(const OrganSpec& organ) {
    std::vector<double> w;
    const int n = organ.points;
    switch (organ.profile) {
        case OrganProfile::dipole: w = {1.0, -1.0}; break;
        case OrganProfile::weights: w = organ.weights; break;
        case OrganProfile::linear:
        case OrganProfile::cosine:
            for (int k = 0; k < n; ++k) {
                const double s = static_cast<double>(k) / (n - 1);
                w.push_back(organ.profile == OrganProfile::linear ? 1.0 - 2.0 * s : std::cos(M_PI * s));
            }
            // Symmetric about the middle: cancel rounding so the sum is zero.
            for (int k = 0; k < n / 2; ++k) w[n - 1 - k] = -w[k];
            if (n % 2 == 1) w[n / 2] = 0.0;
            break;
    }
    double peak = 0.0;
    for (double x : w) peak = std::max(peak, std::abs(x));
    assert(peak > 0.0);
    for (double& x : w) x *= organ.peak_current_A / peak;
    return w;
}

std::vector<double> organ_fractions(const OrganSpec& organ) {
    const std::size_t n = organ.profile == OrganProfile::dipole    ? 2
                          : organ.profile == OrganProfile::weights ? organ.weights.size()
                                                                   : static_cast<std::size_t>(organ.points);
    std::vector<double> f(n);
    for (std::size_t k = 0; k < n; ++k)
        f[k] = organ.from_fraction + (organ.to_fraction - organ.from_fraction) * static_cast<double>(k) / (n - 1);
    return f;
}

std::vector<PointSource<double>> source_points(const SourceSpec& src) {
    if (src.form == SourceForm::point) return {PointSource<double>{to_vec(src.position_m), src.current_A}};
    std::vector<double> currents;
    if (src.share == LineShare::equal) {
        currents.assign(static_cast<std::size_t>(src.points), src.total_current_A / src.points);
    } else {
        double peak = 0.0;
        for (double w : src.weights) peak = std::max(peak, std::abs(w));
        assert(peak > 0.0);  // the reader refuses weights that are all zero
        for (double w : src.weights) currents.push_back(w * src.peak_current_A / peak);
    }
    std::vector<PointSource<double>> out;
    const std::size_t n = currents.size();
    for (std::size_t k = 0; k < n; ++k) {
        const double t = static_cast<double>(k) / static_cast<double>(n - 1);
        out.push_back({(1.0 - t) * to_vec(src.from_m) + t * to_vec(src.to_m), currents[k]});
    }
    return out;
}

Eigen::Matrix3d orientation_matrix(const Orientation& o) {
    // A positive right-handed rotation about y turns +x toward -z, so nose-up pitch
    // is its negative.
    return rotation_from_yaw_pitch_roll(o.heading_rad, -o.pitch_rad, o.roll_rad);
}

double body_panel_size(const CaseSpec& spec) {
    if (spec.robot && spec.robot->hull.kind == ShapeKind::mesh && !spec.mesh.panel_size_m) {
        const TriangleMesh hull = with_place(spec.robot->source.where(), [&] { return make_shape_mesh(spec.robot->hull, 0.0); });
        return default_panel_size(spec, &hull);
    }
    return default_panel_size(spec, nullptr);
}

double object_panel_size(const CaseSpec& spec, const ObjectSpec& o) {
    if (o.panel_size_m) return *o.panel_size_m;
    const double body = body_panel_size(spec);
    const ShapeSpec& s = o.shape;
    switch (s.kind) {
        case ShapeKind::sphere:
        case ShapeKind::capsule: return std::min(body, 0.5 * s.radius_m);
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid:
            return std::min(body, 0.5 * *std::min_element(s.semi_axes_m.begin(), s.semi_axes_m.end()));
        case ShapeKind::box: return std::min(body, 0.25 * *std::min_element(s.size_m.begin(), s.size_m.end()));
        case ShapeKind::mesh:
            if (std::isfinite(body)) return body;
            // No body and no mesh.panel_size: the file's own panels are all there is.
            return typical_edge(with_place(o.source.where(), [&] { return make_shape_mesh(s, 0.0); }));
    }
    return body;
}

template <class S>
std::vector<ElectrodeArea> electrode_areas(const CaseSpec& spec, const Scene<S>& scene) {
    std::vector<ElectrodeArea> areas(scene.electrodes.size());
    for (const Surface<S>& surface : scene.surfaces)
        for (std::size_t t = 0; t < surface.panel_electrode.size(); ++t)
            if (const int e = surface.panel_electrode[t]; e >= 0) areas.at(e).mesh_m2 += surface.mesh.area(t);
    if (!spec.robot) return areas;
    const ShapeSpec& s = spec.robot->hull;
    for (std::size_t k = 0; k < spec.robot->electrodes.size() && k < areas.size(); ++k) {
        const ElectrodeSpec& e = spec.robot->electrodes[k];
        if (electrode_is_cut(*spec.robot, e)) {
            if (const std::optional<double> exact = cut_electrode_area(*spec.robot, e)) areas[k].exact_m2 = *exact;
            continue;
        }
        if (e.form != ElectrodeForm::ring || !hull_conforms_to_rings(*spec.robot)) continue;
        const AxialBand band{e.from_m, e.to_m};
        areas[k].exact_m2 = s.kind == ShapeKind::box ? box_band_area(to_vec(s.size_m), band)
                            : s.kind == ShapeKind::capsule
                                ? capsule_band_area(s.radius_m, s.overall_length_m - 2.0 * s.radius_m, band)
                                : capsule_band_area(s.radius_m, 0.0, band);
    }
    return areas;
}

template std::vector<ElectrodeArea> electrode_areas(const CaseSpec&, const Scene<double>&);
template std::vector<ElectrodeArea> electrode_areas(const CaseSpec&, const Scene<Complex>&);

QuadratureOptions quadrature_options(const CaseSpec& spec) {
    QuadratureOptions q;
    q.near_ratio = spec.mesh.near_ratio;
    q.far_ratio = spec.mesh.far_ratio;
    return q;
}

SolverOptions solver_options(const CaseSpec& spec) { return spec.mesh.solver; }

double horizontal_reach(const CaseSpec& spec, const TriangleMesh* body) {
    double lo[2] = {std::numeric_limits<double>::infinity(), std::numeric_limits<double>::infinity()};
    double hi[2] = {-lo[0], -lo[1]};
    auto extend = [&](double x, double y, double by) {
        lo[0] = std::min(lo[0], x - by), lo[1] = std::min(lo[1], y - by);
        hi[0] = std::max(hi[0], x + by), hi[1] = std::max(hi[1], y + by);
    };
    if (body)
        for (const Vec3& v : body->vertices) extend(v.x(), v.y(), 0.0);
    for (const ObjectSpec& o : spec.objects) {
        const ShapeSpec& s = o.shape;
        const double size = std::max({s.radius_m, 0.5 * s.overall_length_m, s.semi_axes_m[0], s.semi_axes_m[1],
                                      s.semi_axes_m[2], 0.5 * std::hypot(s.size_m[0], s.size_m[1], s.size_m[2])});
        extend(o.position_m[0], o.position_m[1], size);
    }
    for (const SourceSpec& src : spec.sources)
        for (const PointSource<double>& p : source_points(src)) extend(p.position.x(), p.position.y(), 0.0);
    for (const ProbePoint& p : spec.probe_points) extend(p.position_m[0], p.position_m[1], 0.0);
    return lo[0] > hi[0] ? 0.0 : std::hypot(hi[0] - lo[0], hi[1] - lo[1]);
}

template <class S>
ImageSeries<S> water_images(const CaseSpec& spec, const Scene<S>& scene) {
    const WaterSpec& w = spec.water;
    const bool body = spec.fish || spec.robot;
    WaterLayer layer;
    if (w.surface) layer.surface_z = w.surface->height_m;
    if (w.bottom) layer.bottom_z = w.bottom->height_m;
    layer.tolerance = w.image_tolerance;
    layer.reach = horizontal_reach(spec, body && !scene.surfaces.empty() ? &scene.surfaces[0].mesh : nullptr);
    const S r = w.bottom_conductivity_S_per_m
                    ? reflection_coefficient(scene.water_conductivity, S(*w.bottom_conductivity_S_per_m))
                    : S(1);
    const SourceLine& at = w.bottom_conductivity_S_per_m ? w.bottom_conductivity_source
                           : w.image_tolerance_source.line > 0 ? w.image_tolerance_source
                           : w.bottom ? w.bottom->source
                                      : w.surface->source;
    return with_place(at.where(), [&] { return layer_images(layer, r); });
}

template ImageSeries<double> water_images(const CaseSpec&, const Scene<double>&);
template ImageSeries<Complex> water_images(const CaseSpec&, const Scene<Complex>&);

template <class S>
Scene<S> build_scene(const CaseSpec& spec, bool include_objects) {
    if constexpr (std::is_same_v<S, double>) {
        const std::string reason = complex_reason(spec);
        if (!reason.empty())
            throw InputError(reason + ": with a frequency this makes conductivities complex; the case must be "
                                      "solved in complex arithmetic");
    }
    assert(!(spec.fish && spec.robot));
    const double omega = angular_frequency(spec);
    Scene<S> scene;
    scene.water_conductivity = water_admittivity<S>(spec, spec.water.conductivity_S_per_m);

    if (spec.fish) {
        add_fish(scene, spec, omega, default_panel_size(spec, nullptr));
    } else if (spec.robot) {
        // Imported hulls have no zones (the reader refuses them), so the panel size
        // the zones are checked against is the generated hull's.
        const std::vector<RefinementZone> zones =
            spec.robot->hull.kind == ShapeKind::mesh
                ? std::vector<RefinementZone>{}
                : body_zones(spec, default_panel_size(spec, nullptr), orientation_matrix(spec.robot->orientation),
                             to_vec(spec.robot->position_m));
        TriangleMesh hull;
        double panel = 0.0;
        // Generated hulls: rings are checked before the hull is meshed on them.
        if (spec.robot->hull.kind != ShapeKind::mesh) require_rings_on_hull(*spec.robot, hull);
        with_place(spec.robot->source.where(), [&] {
            if (spec.robot->hull.kind == ShapeKind::mesh) {
                hull = make_shape_mesh(spec.robot->hull, 0.0);
                panel = default_panel_size(spec, &hull);
            } else {
                panel = default_panel_size(spec, nullptr);
                hull = robot_hull_mesh(spec, panel, zones);
            }
            return 0;
        });
        // Rings on an imported hull are checked on its extent before they are cut.
        if (spec.robot->hull.kind == ShapeKind::mesh) require_rings_on_hull(*spec.robot, hull);
        const CutPanels cut = cut_hull_electrodes(hull, spec, panel);
        add_robot(scene, spec, std::move(hull), cut);
    }
    // The tank right after the body, before the objects: the baseline scene is
    // then a prefix of the full one, as without a tank.
    std::optional<TankWalls> tank;
    if (spec.tank) {
        tank.emplace(*spec.tank, tank_walls_mesh(*spec.tank));
        scene.surfaces.push_back(make_tank_surface<S>(tank->mesh()));
    }
    const std::size_t bodies = scene.surfaces.size();  // the sensing body and the tank, when there are
    if (include_objects)
        for (const ObjectSpec& o : spec.objects) add_object_surface(scene, spec, o, object_mesh(spec, o));

    std::vector<Part> parts;
    if (spec.fish) parts.push_back({&scene.surfaces[0].mesh, spec.fish->source, "the fish", true});
    if (spec.robot) parts.push_back({&scene.surfaces[0].mesh, spec.robot->source, "the robot", false});
    for (std::size_t i = bodies; i < scene.surfaces.size(); ++i)
        parts.push_back({&scene.surfaces[i].mesh, spec.objects[i - bodies].source,
                         "object " + in_quotes(spec.objects[i - bodies].name), false});
    for (const PlaneSpec& plane : spec.water.planes())
        for (const Part& p : parts) require_in_water(p, plane);
    require_apart(parts);

    const std::vector<PointClearance> clearance = prepare_clearance(parts);
    add_free_sources(scene, spec, clearance);
    check_probes(scene, spec, clearance);
    if (!spec.water.planes().empty()) scene.images = water_images<S>(spec, scene);
    if (tank) check_tank_holds(scene, spec, *tank, parts);
    return scene;
}

template Scene<double> build_scene<double>(const CaseSpec&, bool);
template Scene<Complex> build_scene<Complex>(const CaseSpec&, bool);

}  // namespace murk
