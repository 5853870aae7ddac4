#include "cases/layout/target_placement.hpp"

#include "cases/scene/scene_builder.hpp"
#include "cases/scene/scene_rules.hpp"
#include "geometry/clearance.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

namespace {

// A surface's index with its mesh oriented outward (a tank's walls face the
// water in the scene: solver/tank.hpp), and whether x lies where no target can:
// inside a surface, or outside a tank.
SurfaceIndex outward_index(const Surface<double>& s) {
    TriangleMesh m = s.mesh;
    if (s.encloses_water)
        for (auto& t : m.triangles) std::swap(t[1], t[2]);
    return SurfaceIndex(std::move(m));
}

bool out_of_water(const SurfaceIndex& index, const Surface<double>& s, const Vec3& x) {
    return s.encloses_water ? !index.contains(x) : index.contains(x);
}

}  // namespace

TargetPlacement place_targets(const CaseSpec& spec, const TargetGrid& grid) {
    // Every site on the hull at once (all floating): the scene builder checks on the mesh
    // that no two sites share a panel and that each covers one, whichever layouts use them.
    CaseSpec sites = spec;
    sites.layouts.clear();
    std::vector<ObjectSpec> still;
    for (const ObjectSpec& o : spec.objects)
        if (o.name != grid.object) still.push_back(o);
    sites.objects = still;
    const Scene<double> scene = build_scene<double>(sites, true);
    TargetPlacement p;
    p.clearance_m = clearance_of_points(grid, scene);
    for (double reach : grid.reach_m) p.blocked.push_back(blocked_points(grid, scene, reach));
    return p;
}

std::vector<double> clearance_of_points(const TargetGrid& grid, const Scene<double>& scene) {
    std::vector<double> d(grid.size(), INFINITY);
    for (const Surface<double>& s : scene.surfaces) {
        const SurfaceIndex index = outward_index(s);
#pragma omp parallel for schedule(dynamic, 256)
        for (Eigen::Index k = 0; k < grid.points.cols(); ++k) {
            const Vec3 x = grid.points.col(k);
            const double dk = out_of_water(index, s, x) ? 0.0 : index.distance_to(x);
            d[static_cast<std::size_t>(k)] = std::min(d[static_cast<std::size_t>(k)], dk);
        }
    }
    return d;
}

std::vector<std::uint8_t> blocked_points(const TargetGrid& grid, const Scene<double>& scene, double reach) {
    std::vector<std::uint8_t> blocked(grid.size(), 0);
    for (const Surface<double>& s : scene.surfaces) {
        const SurfaceIndex index = outward_index(s);
        const double gap = reach + kMinGapInPanels * typical_edge(s.mesh);
#pragma omp parallel for schedule(dynamic, 256)
        for (Eigen::Index k = 0; k < grid.points.cols(); ++k) {
            const Vec3 x = grid.points.col(k);
            if (out_of_water(index, s, x) || index.distance_to(x) < gap) blocked[static_cast<std::size_t>(k)] = 1;
        }
    }
    for (const BoundingPlane& plane : scene.images.bounds)
        for (Eigen::Index k = 0; k < grid.points.cols(); ++k)
            if (-(grid.points.col(k) - plane.point).dot(plane.normal) < reach)
                blocked[static_cast<std::size_t>(k)] = 1;
    return blocked;
}

}  // namespace murk
