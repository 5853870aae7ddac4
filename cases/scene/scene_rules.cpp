#include "cases/scene/scene_rules.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace murk {

double typical_edge(const TriangleMesh& mesh) {
    if (mesh.size() == 0) return 0.0;
    double area = 0.0;
    for (std::size_t t = 0; t < mesh.size(); ++t) area += mesh.area(t);
    return std::sqrt(4.0 / std::sqrt(3.0) * area / static_cast<double>(mesh.size()));
}

double min_surface_gap(const TriangleMesh& a, const TriangleMesh& b) {
    return kMinGapInPanels * std::min(typical_edge(a), typical_edge(b));
}

double reach_beyond_plane(const TriangleMesh& mesh, const PlaneSpec& plane) {
    const double sign = plane.water_below ? 1.0 : -1.0;  // out of the water
    double reach = -std::numeric_limits<double>::infinity();
    for (const Vec3& v : mesh.vertices) reach = std::max(reach, sign * (v.z() - plane.height_m));
    return reach;
}

}  // namespace murk
