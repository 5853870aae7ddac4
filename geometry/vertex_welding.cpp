#include "geometry/vertex_welding.hpp"

#include "geometry/internal_check.hpp"

#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <map>
#include <unordered_map>
#include <vector>

namespace murk {

double default_weld_tolerance(const TriangleMesh& mesh) {
    if (mesh.triangles.empty()) return 0.0;
    Vec3 lo = mesh.corner(0, 0), hi = lo;
    for (std::size_t t = 0; t < mesh.size(); ++t)
        for (int k = 0; k < 3; ++k) {
            lo = lo.cwiseMin(mesh.corner(t, k));
            hi = hi.cwiseMax(mesh.corner(t, k));
        }
    return 1e-6 * (hi - lo).norm();
}

void weld_vertices(TriangleMesh& mesh, double tolerance) {
    const std::size_t nv = mesh.vertices.size();
    std::vector<char> used(nv, 0);
    for (const Triangle& t : mesh.triangles)
        for (int v : t) {
            // The readers that weld build their triangles from the vertices they read.
            MURK_CHECK(v >= 0 && static_cast<std::size_t>(v) < nv, "a triangle refers to a vertex of its mesh");
            used[v] = 1;
        }
    std::vector<int> target(nv, -1);
    std::vector<Vec3> kept;
    if (tolerance > 0.0) {
        using Cell = std::array<std::int64_t, 3>;
        struct CellHash {
            std::size_t operator()(const Cell& c) const {
                return static_cast<std::size_t>(c[0] * 73856093LL ^ c[1] * 19349663LL ^ c[2] * 83492791LL);
            }
        };
        std::unordered_map<Cell, std::vector<int>, CellHash> grid;
        // Cells count from the lowest corner, so that a small mesh far from the origin
        // does not need cell numbers beyond 64 bits; a mesh spanning more than 2^52
        // cells shares its outermost ones, which costs time but not correctness (the
        // distance test decides, and clamping never separates neighbouring cells).
        Vec3 lo = Vec3::Constant(std::numeric_limits<double>::infinity());
        for (std::size_t v = 0; v < nv; ++v)
            if (used[v]) lo = lo.cwiseMin(mesh.vertices[v]);
        constexpr double kMaxCell = 4503599627370496.0;  // 2^52
        auto cell_of = [&](const Vec3& p) {
            Cell c;
            for (int d = 0; d < 3; ++d) {
                const double x = std::floor((p[d] - lo[d]) / tolerance);
                c[d] = static_cast<std::int64_t>(x >= 0.0 ? (x < kMaxCell ? x : kMaxCell) : 0.0);
            }
            return c;
        };
        for (std::size_t v = 0; v < nv; ++v) {
            if (!used[v]) continue;
            const Vec3& p = mesh.vertices[v];
            const Cell c = cell_of(p);
            int found = -1;
            for (int dx = -1; dx <= 1 && found < 0; ++dx)
                for (int dy = -1; dy <= 1 && found < 0; ++dy)
                    for (int dz = -1; dz <= 1 && found < 0; ++dz) {
                        auto it = grid.find(Cell{c[0] + dx, c[1] + dy, c[2] + dz});
                        if (it == grid.end()) continue;
                        for (int k : it->second)
                            if ((kept[k] - p).norm() <= tolerance) {
                                found = k;
                                break;
                            }
                    }
            if (found < 0) {
                found = static_cast<int>(kept.size());
                kept.push_back(p);
                grid[c].push_back(found);
            }
            target[v] = found;
        }
    } else {
        std::map<std::array<double, 3>, int> exact;
        for (std::size_t v = 0; v < nv; ++v) {
            if (!used[v]) continue;
            const Vec3& p = mesh.vertices[v];
            auto ins = exact.emplace(std::array<double, 3>{p.x(), p.y(), p.z()}, static_cast<int>(kept.size()));
            if (ins.second) kept.push_back(p);
            target[v] = ins.first->second;
        }
    }
    for (Triangle& t : mesh.triangles)
        for (int& v : t) v = target[v];
    mesh.vertices.swap(kept);
}

}  // namespace murk
