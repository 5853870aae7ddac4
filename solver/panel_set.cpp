#include "solver/panel_set.hpp"

#include "geometry/internal_check.hpp"

#include <algorithm>

namespace murk {

PanelSet::PanelSet(const TriangleMesh& mesh) {
    const Eigen::Index n = static_cast<Eigen::Index>(mesh.size());
    p0.resize(3, n), p1.resize(3, n), p2.resize(3, n), centroid.resize(3, n), normal.resize(3, n);
    area.resize(n), diameter.resize(n);
    for (Eigen::Index t = 0; t < n; ++t) {
        const Vec3 &a = mesh.corner(t, 0), &b = mesh.corner(t, 1), &c = mesh.corner(t, 2);
        p0.col(t) = a, p1.col(t) = b, p2.col(t) = c;
        centroid.col(t) = (a + b + c) / 3.0;
        const Vec3 twice_area = (b - a).cross(c - a);
        area(t) = 0.5 * twice_area.norm();
        // Meshes are checked (geometry/mesh_quality.hpp) before the solver sees them; a
        // panel without area would have no normal and turn every integral over it to NaN.
        MURK_CHECK(area(t) > 0.0, "panels reaching the solver have positive area");
        normal.col(t) = twice_area.normalized();
        diameter(t) = std::max({(b - a).norm(), (c - b).norm(), (a - c).norm()});
    }
}

}  // namespace murk
