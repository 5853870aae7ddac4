#include "cases/layout/target_placement.hpp"

#include "cases/scene/scene_builder.hpp"
#include "cases/scene/scene_rules.hpp"
#include "geometry/clearance.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

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
        const SurfaceIndex index(s.mesh);
#pragma omp parallel for schedule(dynamic, 256)
        for (Eigen::Index k = 0; k < grid.points.cols(); ++k) {
            const Vec3 x = grid.points.col(k);
            const double dk = index.contains(x) ? 0.0 : index.distance_to(x);
            d[static_cast<std::size_t>(k)] = std::min(d[static_cast<std::size_t>(k)], dk);
        }
    }
    return d;
}

std::vector<std::uint8_t> blocked_points(const TargetGrid& grid, const Scene<double>& scene, double reach) {
    std::vector<std::uint8_t> blocked(grid.size(), 0);
    for (const Surface<double>& s : scene.surfaces) {
        const SurfaceIndex index(s.mesh);
        const double gap = reach + kMinGapInPanels * typical_edge(s.mesh);
#pragma omp parallel for schedule(dynamic, 256)
        for (Eigen::Index k = 0; k < grid.points.cols(); ++k) {
            const Vec3 x = grid.points.col(k);
            if (index.contains(x) || index.distance_to(x) < gap) blocked[static_cast<std::size_t>(k)] = 1;
        }
    }
    for (const BoundingPlane& plane : scene.images.bounds)
        for (Eigen::Index k = 0; k < grid.points.cols(); ++k)
            if (-(grid.points.col(k) - plane.point).dot(plane.normal) < reach)
                blocked[static_cast<std::size_t>(k)] = 1;
    return blocked;
}

}  // namespace murk
