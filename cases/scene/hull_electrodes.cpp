#include "cases/scene/hull_electrodes.hpp"

#include "geometry/electrode_areas.hpp"
#include "geometry/electrode_cut.hpp"
#include "geometry/electrode_hulls.hpp"
#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

#include <algorithm>
#include <cmath>

namespace murk {
namespace {

Vec3 to_vec(const Point3& p) { return Vec3(p[0], p[1], p[2]); }

std::string electrode_name(const ElectrodeSpec& e) {
    return std::string(e.form == ElectrodeForm::ring ? "ring" : "patch") + " electrode " + in_quotes(e.name);
}

std::vector<ElectrodeSide> electrode_sides(const ElectrodeSpec& e) {
    if (e.form == ElectrodeForm::patch) return {ball_side(to_vec(e.at_m), e.radius_m)};
    return {plane_side(Vec3(e.from_m, 0.0, 0.0), -Vec3::UnitX()), plane_side(Vec3(e.to_m, 0.0, 0.0), Vec3::UnitX())};
}

// Onto the surface the generator's vertices lie on: the true surface scaled as its
// volume rule scaled the mesh (shapes.hpp), so that new vertices sit among the old
// ones. Flat hulls, hulls meshed on stations and imported meshes keep their flat
// panels (identity).
SurfaceProjection hull_projection(const RobotSpec& robot, const TriangleMesh& hull) {
    const ShapeSpec& s = robot.hull;
    auto identity = [](const Vec3& p) { return p; };
    if (hull_conforms_to_rings(robot) || hull.vertices.empty()) return identity;
    switch (s.kind) {
        case ShapeKind::sphere: {
            const double radius = hull.vertices.front().norm();
            return [radius](const Vec3& p) { return Vec3(radius * p.normalized()); };
        }
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid: {
            const Vec3 semi(s.semi_axes_m[0], s.semi_axes_m[1], s.semi_axes_m[2]);
            const Vec3 scaled = hull.vertices.front().cwiseQuotient(semi).norm() * semi;
            return [scaled](const Vec3& p) { return Vec3(p / p.cwiseQuotient(scaled).norm()); };
        }
        case ShapeKind::capsule: {
            const double r = s.radius_m, h = 0.5 * s.overall_length_m - r;
            double k = 0.0;  // the cross-section scale of the volume rule: the cylinder's vertices at k r
            for (const Vec3& v : hull.vertices) k = std::max(k, std::hypot(v.y(), v.z()) / r);
            return [r, h, k](const Vec3& p) {
                const Vec3 q(p.x(), p.y() / k, p.z() / k);
                const Vec3 axis(std::clamp(q.x(), -h, h), 0.0, 0.0);
                const Vec3 out = q - axis;
                if (!(out.norm() > 0.0)) return p;
                const Vec3 on = axis + r * out.normalized();
                return Vec3(on.x(), k * on.y(), k * on.z());
            };
        }
        case ShapeKind::box:
        case ShapeKind::mesh: break;
    }
    return identity;
}

}  // namespace

bool hull_conforms_to_rings(const RobotSpec& robot) {
    const ShapeKind k = robot.hull.kind;
    const bool rings = std::any_of(robot.electrodes.begin(), robot.electrodes.end(),
                                   [](const ElectrodeSpec& e) { return e.form == ElectrodeForm::ring; });
    return rings && (k == ShapeKind::capsule || k == ShapeKind::sphere || k == ShapeKind::box);
}

bool electrode_is_cut(const RobotSpec& robot, const ElectrodeSpec& e) {
    if (e.form == ElectrodeForm::patch) return true;
    return e.form == ElectrodeForm::ring && !hull_conforms_to_rings(robot);
}

std::optional<double> cut_electrode_area(const RobotSpec& robot, const ElectrodeSpec& e) {
    const ShapeSpec& s = robot.hull;
    const std::vector<ElectrodeSide> sides = electrode_sides(e);
    switch (s.kind) {
        case ShapeKind::sphere:
            if (e.form == ElectrodeForm::patch) return sphere_area_within(s.radius_m, to_vec(e.at_m), e.radius_m);
            return capsule_area_where(s.radius_m, 0.0, sides);
        case ShapeKind::capsule: return capsule_area_where(s.radius_m, s.overall_length_m - 2.0 * s.radius_m, sides);
        case ShapeKind::spheroid:
        case ShapeKind::ellipsoid:
            return ellipsoid_area_where(Vec3(s.semi_axes_m[0], s.semi_axes_m[1], s.semi_axes_m[2]), sides);
        case ShapeKind::box: {
            if (e.form != ElectrodeForm::patch) return std::nullopt;  // rings on boxes are meshed on stations
            const std::optional<double> a = box_area_within(to_vec(s.size_m), to_vec(e.at_m), e.radius_m);
            if (!a)
                throw InputError(e.source.where() + ": " + electrode_name(e) + " does not lie on a single face of the box hull (a patch that "
                                                      "crosses a face edge is not supported); move it or make it smaller");
            return a;
        }
        case ShapeKind::mesh: return std::nullopt;
    }
    return std::nullopt;
}

std::vector<std::optional<std::vector<std::size_t>>> cut_hull_electrodes(TriangleMesh& hull, const CaseSpec& spec,
                                                                        double panel) {
    const RobotSpec& robot = *spec.robot;
    std::vector<std::optional<std::vector<std::size_t>>> out(robot.electrodes.size());
    std::vector<CutElectrode> cuts;
    std::vector<std::size_t> index;
    for (std::size_t k = 0; k < robot.electrodes.size(); ++k) {
        const ElectrodeSpec& e = robot.electrodes[k];
        if (!electrode_is_cut(robot, e)) continue;
        cuts.push_back({e.source.where(), electrode_name(e), electrode_sides(e), cut_electrode_area(robot, e)});
        index.push_back(k);
    }
    if (cuts.empty()) return out;
    CutOptions options;
    options.edge_size = std::min(spec.mesh.electrode_edge_m.value_or(kElectrodeEdgeFraction * panel), panel);
    options.project = hull_projection(robot, hull);
    options.refine_label = robot.source.where() + ": electrode edges";
    if (hull_conforms_to_rings(robot))
        for (const ElectrodeSpec& e : robot.electrodes)
            if (e.form == ElectrodeForm::ring)
                for (const ElectrodeSide& side : electrode_sides(e)) options.keep.push_back(side);
    CutResult cut = cut_electrodes(hull, cuts, options);
    for (std::size_t i = 0; i < index.size(); ++i) out[index[i]] = std::move(cut.panels[i]);
    return out;
}

}  // namespace murk
