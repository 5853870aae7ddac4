#include "geometry/spatial_index.hpp"

#include <vector>

namespace murk {

BgBox panel_box(const TriangleMesh& mesh, std::size_t t) {
    const Vec3 lo = mesh.corner(t, 0).cwiseMin(mesh.corner(t, 1)).cwiseMin(mesh.corner(t, 2));
    const Vec3 hi = mesh.corner(t, 0).cwiseMax(mesh.corner(t, 1)).cwiseMax(mesh.corner(t, 2));
    return BgBox(to_bg(lo), to_bg(hi));
}

BgBox mesh_box(const TriangleMesh& mesh) {
    if (mesh.triangles.empty()) return BgBox(to_bg(Vec3::Zero()), to_bg(Vec3::Zero()));
    Vec3 lo = mesh.corner(0, 0), hi = lo;
    for (std::size_t t = 0; t < mesh.size(); ++t)
        for (int k = 0; k < 3; ++k) {
            lo = lo.cwiseMin(mesh.corner(t, k));
            hi = hi.cwiseMax(mesh.corner(t, k));
        }
    return BgBox(to_bg(lo), to_bg(hi));
}

PanelTree build_panel_tree(const TriangleMesh& mesh) {
    std::vector<PanelBox> boxes;
    boxes.reserve(mesh.size());
    for (std::size_t t = 0; t < mesh.size(); ++t) boxes.emplace_back(panel_box(mesh, t), t);
    return PanelTree(boxes.begin(), boxes.end());
}

}  // namespace murk
