#include "geometry/clearance.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"
#include "geometry/spatial_index.hpp"
#include "geometry/triangle_distance.hpp"
#include "geometry/triangle_intersection.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace murk {
namespace {

constexpr double kPi = 3.14159265358979323846;

using VertexTree = bgi::rtree<std::pair<BgPoint, std::size_t>, bgi::rstar<16>>;

double box_distance(const BgBox& x, const BgBox& y) {
    double d2 = 0.0;
    auto axis = [&](double xlo, double xhi, double ylo, double yhi) {
        const double gap = std::max({0.0, ylo - xhi, xlo - yhi});
        d2 += gap * gap;
    };
    axis(x.min_corner().get<0>(), x.max_corner().get<0>(), y.min_corner().get<0>(), y.max_corner().get<0>());
    axis(x.min_corner().get<1>(), x.max_corner().get<1>(), y.min_corner().get<1>(), y.max_corner().get<1>());
    axis(x.min_corner().get<2>(), x.max_corner().get<2>(), y.min_corner().get<2>(), y.max_corner().get<2>());
    return std::sqrt(d2);
}

// Upper bound on the mesh distance: the nearest pair of vertices used by panels.
double nearest_vertex_pair(const TriangleMesh& a, const TriangleMesh& b) {
    std::vector<char> used(b.vertices.size(), 0);
    for (const Triangle& t : b.triangles)
        for (int v : t) used[v] = 1;
    std::vector<std::pair<BgPoint, std::size_t>> pts;
    for (std::size_t v = 0; v < b.vertices.size(); ++v)
        if (used[v]) pts.emplace_back(to_bg(b.vertices[v]), v);
    const VertexTree tree(pts.begin(), pts.end());
    double best = INFINITY;
    std::vector<std::pair<BgPoint, std::size_t>> hit;
    for (const Triangle& t : a.triangles)
        for (int v : t) {
            hit.clear();
            tree.query(bgi::nearest(to_bg(a.vertices[v]), 1), std::back_inserter(hit));
            if (!hit.empty()) best = std::min(best, (a.vertices[v] - b.vertices[hit[0].second]).norm());
        }
    return best;
}

std::string label(const TriangleMesh& m, std::size_t i) { return m.name.empty() ? "#" + std::to_string(i) : m.name; }

std::string num(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3g", v);
    return buf;
}

}  // namespace

SurfaceIndex::SurfaceIndex(TriangleMesh mesh)
    : mesh_(std::move(mesh)), tree_(build_panel_tree(mesh_)), box_(mesh_box(mesh_)) {}

double SurfaceIndex::distance_to(const TriangleMesh& other) const {
    const TriangleMesh& a = other;
    const TriangleMesh& b = mesh_;
    if (a.triangles.empty() || b.triangles.empty()) return INFINITY;
    double best = nearest_vertex_pair(a, b);
    std::vector<PanelBox> near;
    std::vector<std::size_t> done(b.size(), 0);  // done[u] == t + 1: pair (t, u) measured
    for (std::size_t t = 0; t < a.size() && best > 0.0; ++t) {
        const BgBox box = panel_box(a, t);
        // The k panels of b nearest by box distance (a lower bound of the panel
        // distance), k growing until the farthest of them is no nearer than the best
        // distance so far: every panel that could improve it has then been measured.
        for (std::size_t k = 4;; k *= 4) {
            near.clear();
            tree_.query(bgi::nearest(box, static_cast<unsigned>(std::min(k, b.size()))), std::back_inserter(near));
            double farthest = 0.0;
            for (const PanelBox& h : near) {
                const double lower = box_distance(box, h.first);
                farthest = std::max(farthest, lower);
                if (lower >= best || done[h.second] == t + 1) continue;
                done[h.second] = t + 1;
                const std::size_t u = h.second;
                best = std::min(best, triangle_triangle_distance(a.corner(t, 0), a.corner(t, 1), a.corner(t, 2), b.corner(u, 0),
                                                                 b.corner(u, 1), b.corner(u, 2)));
            }
            if (near.size() < k || farthest >= best || best == 0.0) break;
        }
    }
    return best;
}

bool SurfaceIndex::closer_than(const TriangleMesh& other, double gap) const {
    if (mesh_.triangles.empty() || other.triangles.empty()) return false;
    const auto grown = [gap](const BgBox& b) {
        const BgPoint& lo = b.min_corner();
        const BgPoint& hi = b.max_corner();
        return BgBox(BgPoint(lo.get<0>() - gap, lo.get<1>() - gap, lo.get<2>() - gap),
                     BgPoint(hi.get<0>() + gap, hi.get<1>() + gap, hi.get<2>() + gap));
    };
    if (!bg::intersects(grown(mesh_box(other)), box_)) return false;
    std::vector<PanelBox> hits;
    for (std::size_t t = 0; t < other.size(); ++t) {
        hits.clear();
        tree_.query(bgi::intersects(grown(panel_box(other, t))), std::back_inserter(hits));
        for (const PanelBox& h : hits) {
            const std::size_t u = h.second;
            if (triangle_triangle_distance(other.corner(t, 0), other.corner(t, 1), other.corner(t, 2), mesh_.corner(u, 0),
                                           mesh_.corner(u, 1), mesh_.corner(u, 2)) < gap)
                return true;
        }
    }
    return false;
}

double SurfaceIndex::distance_to(const Vec3& x) const {
    if (mesh_.triangles.empty()) return INFINITY;
    double best = INFINITY;
    std::vector<PanelBox> near;
    const BgBox point(to_bg(x), to_bg(x));
    for (std::size_t k = 4;; k *= 4) {
        near.clear();
        tree_.query(bgi::nearest(point, static_cast<unsigned>(std::min(k, mesh_.size()))), std::back_inserter(near));
        double farthest = 0.0;
        for (const PanelBox& h : near) {
            const double lower = box_distance(point, h.first);
            farthest = std::max(farthest, lower);
            if (lower >= best) continue;
            const std::size_t u = h.second;
            best = std::min(best, point_triangle_distance(x, mesh_.corner(u, 0), mesh_.corner(u, 1), mesh_.corner(u, 2)));
        }
        if (near.size() < k || farthest >= best) break;
    }
    return best;
}

bool SurfaceIndex::contains(const Vec3& x) const {
    return !mesh_.triangles.empty() && bg::covered_by(to_bg(x), box_) && contains_point(mesh_, x);
}

double min_distance(const TriangleMesh& a, const TriangleMesh& b) { return SurfaceIndex(b).distance_to(a); }

bool meshes_intersect(const TriangleMesh& a, const TriangleMesh& b) {
    if (a.triangles.empty() || b.triangles.empty()) return false;
    const PanelTree tree = build_panel_tree(b);
    std::vector<PanelBox> hits;
    for (std::size_t t = 0; t < a.size(); ++t) {
        hits.clear();
        tree.query(bgi::intersects(panel_box(a, t)), std::back_inserter(hits));
        for (const PanelBox& h : hits) {
            const std::size_t u = h.second;
            // Degenerate panels have no plane: fall back on the distance of their edges.
            const bool hit = triangle_is_degenerate(a.corner(t, 0), a.corner(t, 1), a.corner(t, 2)) ||
                                     triangle_is_degenerate(b.corner(u, 0), b.corner(u, 1), b.corner(u, 2))
                                 ? triangle_triangle_distance(a.corner(t, 0), a.corner(t, 1), a.corner(t, 2), b.corner(u, 0),
                                                              b.corner(u, 1), b.corner(u, 2)) == 0.0
                                 : triangles_intersect(a.corner(t, 0), a.corner(t, 1), a.corner(t, 2), b.corner(u, 0),
                                                       b.corner(u, 1), b.corner(u, 2));
            if (hit) return true;
        }
    }
    return false;
}

bool contains_point(const TriangleMesh& mesh, const Vec3& p) {
    double omega = 0.0;
    for (std::size_t t = 0; t < mesh.size(); ++t) {
        const Vec3 a = mesh.corner(t, 0) - p, b = mesh.corner(t, 1) - p, c = mesh.corner(t, 2) - p;
        const double la = a.norm(), lb = b.norm(), lc = c.norm();
        const double num = a.dot(b.cross(c));
        const double den = la * lb * lc + a.dot(b) * lc + a.dot(c) * lb + b.dot(c) * la;
        omega += 2.0 * std::atan2(num, den);
    }
    return omega / (4.0 * kPi) > 0.5;
}

void require_clearance(const std::vector<const TriangleMesh*>& meshes, double min_gap) {
    if (!(std::isfinite(min_gap) && min_gap >= 0.0))
        throw InputError("minimum clearance must be zero or a positive length, got " + num(min_gap));
    for (std::size_t i = 0; i < meshes.size(); ++i)
        for (std::size_t j = i + 1; j < meshes.size(); ++j) {
            const TriangleMesh &a = *meshes[i], &b = *meshes[j];
            if (a.triangles.empty() || b.triangles.empty()) continue;
            const std::string pair = "surfaces " + in_quotes(label(a, i)) + " and " + in_quotes(label(b, j));
            const BgBox ba = mesh_box(a), bb = mesh_box(b);
            const double d = box_distance(ba, bb) > min_gap ? box_distance(ba, bb) : min_distance(a, b);
            if (d == 0.0) throw InputError(pair + " touch or intersect (clearance 0 m)");
            if (d < min_gap)
                throw InputError(pair + " are closer than " + num(min_gap) + " m (clearance " + num(d) + " m)");
            // Disjoint surfaces: one is inside the other iff any of its vertices is.
            if (bg::covered_by(ba, bb) && contains_point(b, a.corner(0, 0)))
                throw InputError("surface " + in_quotes(label(a, i)) + " lies inside surface " + in_quotes(label(b, j)));
            if (bg::covered_by(bb, ba) && contains_point(a, b.corner(0, 0)))
                throw InputError("surface " + in_quotes(label(b, j)) + " lies inside surface " + in_quotes(label(a, i)));
        }
}

}  // namespace murk
