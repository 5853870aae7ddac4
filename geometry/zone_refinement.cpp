#include "geometry/zone_refinement.hpp"

#include "geometry/input_error.hpp"
#include "geometry/shapes.hpp"
#include "geometry/triangle_distance.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <unordered_map>

namespace murk {
namespace {

std::uint64_t edge_key(int a, int b) {
    return (static_cast<std::uint64_t>(std::min(a, b)) << 32) | static_cast<std::uint32_t>(std::max(a, b));
}

double point_segment_distance(const Vec3& p, const Vec3& a, const Vec3& b) {
    const Vec3 ab = b - a;
    const double len2 = ab.squaredNorm();
    const double t = len2 > 0.0 ? std::clamp((p - a).dot(ab) / len2, 0.0, 1.0) : 0.0;
    return (p - (a + t * ab)).norm();
}

// Largest edge length (m) the panel (a, b, c) may have: the smallest over the
// zones of the zone's size, grown by kZoneGrading per metre outside its ball.
double allowed_edge(const std::vector<RefinementZone>& zones, const Vec3& a, const Vec3& b, const Vec3& c) {
    double allowed = std::numeric_limits<double>::infinity();
    for (const RefinementZone& z : zones) {
        const double outside = std::max(0.0, point_triangle_distance(z.centre, a, b, c) - z.radius);
        allowed = std::min(allowed, z.panel_size + kZoneGrading * outside);
    }
    return allowed;
}

// Side k of a panel runs from corner k to corner k + 1. Its longest side; ties
// go to the side with the smaller edge key, so that the choice depends on the
// mesh alone.
int longest_side(const TriangleMesh& m, const Triangle& t) {
    int best = 0;
    double best_len = -1.0;
    std::uint64_t best_key = 0;
    for (int k = 0; k < 3; ++k) {
        const int a = t[k], b = t[(k + 1) % 3];
        const double len = (m.vertices[a] - m.vertices[b]).squaredNorm();
        const std::uint64_t key = edge_key(a, b);
        if (len > best_len || (len == best_len && key < best_key)) best = k, best_len = len, best_key = key;
    }
    return best;
}

// One round of bisection: the panels whose longest side exceeds what they are
// allowed are cut through it, and the cut edges are closed over (a panel with
// any cut side is cut through its longest side as well) so that every cut edge
// is split on both sides. Returns false when no panel needed a cut.
bool bisect_once(TriangleMesh& m, const AllowedEdge& allowed, const SurfaceProjection& project, const std::string& what,
                 const std::string& hint) {
    const std::size_t n = m.size();
    std::vector<int> longest(n);
    std::unordered_map<std::uint64_t, int> cut;  // edge -> its midpoint vertex (-1 until made)
    for (std::size_t t = 0; t < n; ++t) {
        const Triangle& tri = m.triangles[t];
        const int k = longest_side(m, tri);
        longest[t] = k;
        const Vec3& a = m.vertices[tri[k]];
        const Vec3& b = m.vertices[tri[(k + 1) % 3]];
        if ((a - b).norm() > allowed(m.corner(t, 0), m.corner(t, 1), m.corner(t, 2)))
            cut.emplace(edge_key(tri[k], tri[(k + 1) % 3]), -1);
    }
    if (cut.empty()) return false;
    for (bool grew = true; grew;) {
        grew = false;
        for (std::size_t t = 0; t < n; ++t) {
            const Triangle& tri = m.triangles[t];
            const std::uint64_t own = edge_key(tri[longest[t]], tri[(longest[t] + 1) % 3]);
            if (cut.count(own)) continue;
            for (int k = 0; k < 3; ++k)
                if (cut.count(edge_key(tri[k], tri[(k + 1) % 3]))) {
                    cut.emplace(own, -1);
                    grew = true;
                    break;
                }
        }
    }
    // Each cut edge adds two panels, one on each side.
    if (static_cast<double>(n) + 2.0 * static_cast<double>(cut.size()) > static_cast<double>(kMaxGeneratedPanels))
        throw InputError(what + ": the mesh would need more than " + std::to_string(kMaxGeneratedPanels) + " panels; " + hint);

    // Midpoints in panel order, so that vertex numbers depend on the mesh alone.
    auto midpoint = [&](int a, int b) {
        int& v = cut.at(edge_key(a, b));
        if (v < 0) {
            m.vertices.push_back(project(0.5 * (m.vertices[a] + m.vertices[b])));
            v = static_cast<int>(m.vertices.size()) - 1;
        }
        return v;
    };
    auto is_cut = [&](int a, int b) {
        const auto it = cut.find(edge_key(a, b));
        return it != cut.end();
    };
    std::vector<Triangle> out;
    std::vector<int> region;
    out.reserve(n + 2 * cut.size());
    region.reserve(n + 2 * cut.size());
    for (std::size_t t = 0; t < n; ++t) {
        const Triangle& tri = m.triangles[t];
        const int k = longest[t];
        // Corners renamed so that the longest side is v0 -> v1; orientation kept.
        const int v0 = tri[k], v1 = tri[(k + 1) % 3], v2 = tri[(k + 2) % 3];
        if (!is_cut(v0, v1)) {
            out.push_back(tri);
            region.push_back(m.region[t]);
            continue;
        }
        const int mid = midpoint(v0, v1);
        const std::size_t before = out.size();
        if (is_cut(v2, v0)) {
            const int p = midpoint(v2, v0);
            out.push_back({v0, mid, p});
            out.push_back({p, mid, v2});
        } else {
            out.push_back({v0, mid, v2});
        }
        if (is_cut(v1, v2)) {
            const int q = midpoint(v1, v2);
            out.push_back({mid, v1, q});
            out.push_back({mid, q, v2});
        } else {
            out.push_back({mid, v1, v2});
        }
        region.insert(region.end(), out.size() - before, m.region[t]);
    }
    m.triangles.swap(out);
    m.region.swap(region);
    return true;
}

}  // namespace

void refine_in_zones(TriangleMesh& mesh, const std::vector<RefinementZone>& zones, const SurfaceProjection& project) {
    for (const RefinementZone& z : zones) {
        if (!(std::isfinite(z.panel_size) && z.panel_size > 0.0))
            throw InputError("refinement zone: the panel size must be a positive length");
        if (!(std::isfinite(z.radius) && z.radius > 0.0))
            throw InputError("refinement zone: the radius must be a positive length");
        if (!z.centre.allFinite()) throw InputError("refinement zone: the centre must be finite");
    }
    if (zones.empty()) return;
    refine_to_allowed(
        mesh, [&](const Vec3& a, const Vec3& b, const Vec3& c) { return allowed_edge(zones, a, b, c); }, project,
        "refinement zones", "give the zones a larger panel size or a smaller radius");
}

void refine_to_allowed(TriangleMesh& mesh, const AllowedEdge& allowed, const SurfaceProjection& project,
                       const std::string& what, const std::string& hint) {
    mesh.region.resize(mesh.size(), 0);
    while (bisect_once(mesh, allowed, project, what, hint)) {
    }
}

double zone_edge_excess(const TriangleMesh& mesh, const std::vector<RefinementZone>& zones) {
    double worst = 0.0;
    for (const Triangle& t : mesh.triangles)
        for (int k = 0; k < 3; ++k) {
            const Vec3& a = mesh.vertices[t[k]];
            const Vec3& b = mesh.vertices[t[(k + 1) % 3]];
            for (const RefinementZone& z : zones)
                if (point_segment_distance(z.centre, a, b) <= z.radius)
                    worst = std::max(worst, (a - b).norm() / z.panel_size);
        }
    return worst;
}

double distance_to_surface(const TriangleMesh& mesh, const Vec3& point) {
    double d = std::numeric_limits<double>::infinity();
    for (std::size_t t = 0; t < mesh.size(); ++t)
        d = std::min(d, point_triangle_distance(point, mesh.corner(t, 0), mesh.corner(t, 1), mesh.corner(t, 2)));
    return d;
}

}  // namespace murk
