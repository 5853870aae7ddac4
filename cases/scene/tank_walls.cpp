#include "cases/scene/tank_walls.hpp"

#include "cases/scene/scene_builder.hpp"
#include "cases/scene/scene_rules.hpp"
#include "geometry/cylinder_mesh.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"

#include <cmath>
#include <sstream>

namespace murk {

namespace {

std::string length_text(double metres) {
    std::ostringstream out;
    out.precision(4);
    out << metres << " m";
    return out.str();
}

std::string point_text(const Vec3& p) {
    std::ostringstream out;
    out.precision(4);
    out << "(" << p.x() << ", " << p.y() << ", " << p.z() << ") m";
    return out.str();
}

}  // namespace

TriangleMesh tank_walls_mesh(const TankSpec& tank) {
    TriangleMesh m;
    try {
        switch (tank.shape) {
            case TankShape::box:
                m = make_box(Vec3(tank.size_m[0], tank.size_m[1], tank.size_m[2]), tank.panel_size_m);
                break;
            case TankShape::cylinder: m = make_cylinder(tank.radius_m, tank.height_m, tank.panel_size_m); break;
            case TankShape::mesh: m = read_mesh(tank.mesh_file, tank.file_unit_m); break;
        }
    } catch (const InputError& e) {
        throw InputError(tank.source.where() + ": " + e.what());
    }
    if (tank.shape != TankShape::mesh) translate(m, Vec3(tank.centre_m[0], tank.centre_m[1], tank.centre_m[2]));
    m.name = "tank";
    require_valid_mesh(m, tank.source.where());
    if (!(mesh_volume(m) > 0.0))
        throw InputError(tank.source.where() + ": the tank's mesh is oriented inward or encloses nothing; its "
                                               "triangles must face out of the water, like every other mesh's");
    return m;
}

TankWalls::TankWalls(const TankSpec&, TriangleMesh outward_walls)
    : index_(std::move(outward_walls)), point_gap_(kMinSourceDepthInPanels * typical_edge(index_.mesh())) {}

std::string TankWalls::breaks(const TriangleMesh& surface) const {
    const double gap = min_surface_gap(index_.mesh(), surface);
    if (index_.closer_than(surface, gap))
        return "crosses the tank's walls or comes within " + length_text(gap) + " of them";
    if (!index_.contains(surface.corner(0, 0))) return "lies outside the tank";
    return "";
}

std::string TankWalls::breaks(const Vec3& x) const {
    if (!index_.contains(x)) return "lies outside the tank";
    const double d = index_.distance_to(x);
    if (d < point_gap_)
        return "is " + length_text(d) + " from the tank's walls, less than a quarter of their mean panel edge (" +
               length_text(point_gap_ / kMinSourceDepthInPanels) + ")";
    return "";
}

void require_inside_tank(const TankWalls& walls, const TankSpec& tank, const TriangleMesh& surface,
                         const std::string& label) {
    const std::string why = walls.breaks(surface);
    if (!why.empty())
        throw InputError(tank.source.where() + ": " + label + " " + why +
                         "; the tank must hold every surface, source and probe");
}

void require_inside_tank(const TankWalls& walls, const TankSpec& tank, const Vec3& x, const std::string& label) {
    const std::string why = walls.breaks(x);
    if (!why.empty())
        throw InputError(tank.source.where() + ": " + label + " at " + point_text(x) + " " + why +
                         "; the tank must hold every surface, source and probe");
}

void require_zero_net_current(const CaseSpec& spec, const std::vector<std::pair<std::string, double>>& electrodes) {
    std::vector<std::pair<std::string, double>> parts;  // what injects, and how much (A)
    double scale = 0.0;  // the sum of every point's |current|: what rounding is relative to
    if (spec.fish) {
        double organ = 0.0;
        for (double c : organ_currents(spec.fish->organ)) organ += c, scale += std::abs(c);
        parts.emplace_back("the fish's organ", organ);
    }
    for (const SourceSpec& src : spec.sources) {
        double total = 0.0;
        for (const auto& p : source_points(src)) total += p.current, scale += std::abs(p.current);
        parts.emplace_back(src.source.key, total);
    }
    for (const auto& e : electrodes) parts.emplace_back("electrode '" + e.first + "'", e.second), scale += std::abs(e.second);
    double net = 0.0;
    for (const auto& p : parts) net += p.second;
    if (std::abs(net) <= 1e-9 * scale) return;
    std::ostringstream out;
    out.precision(4);
    out << (spec.tank ? spec.tank->source.file : spec.path) << ": the sources inject a net current of " << net << " A into the closed [tank] (";
    for (std::size_t i = 0; i < parts.size(); ++i) out << (i ? ", " : "") << parts[i].first << " " << parts[i].second << " A";
    out << "); inside insulating walls the currents must sum to zero";
    throw InputError(out.str());
}

}  // namespace murk
