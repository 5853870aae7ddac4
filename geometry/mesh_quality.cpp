#include "geometry/mesh_quality.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"
#include "geometry/shapes.hpp"
#include "geometry/spatial_index.hpp"
#include "geometry/triangle_intersection.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <numeric>

namespace murk {
namespace {

std::string num(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4g", v);
    return buf;
}

std::string sz(std::size_t v) { return std::to_string(v); }

std::string plural(std::size_t n, const char* one, const char* many) { return sz(n) + " " + (n == 1 ? one : many); }

struct DisjointSets {
    std::vector<std::size_t> parent;
    explicit DisjointSets(std::size_t n) : parent(n) { std::iota(parent.begin(), parent.end(), std::size_t{0}); }
    std::size_t find(std::size_t i) {
        while (parent[i] != i) i = parent[i] = parent[parent[i]];
        return i;
    }
    void unite(std::size_t a, std::size_t b) { parent[find(a)] = find(b); }
};

struct EdgeUse {
    std::uint64_t key;  // (smaller vertex << 32) | larger vertex
    std::size_t panel;
    int corner;    // the edge runs from corner `corner` to corner `corner + 1`
    bool forward;  // runs from the smaller to the larger vertex index
};

// Structural checks: those the geometric ones rely on. Returns false when the mesh
// cannot be examined further (indices out of range, non-finite coordinates).
bool check_indices(const TriangleMesh& m, std::vector<std::string>& problems) {
    if (m.triangles.empty()) {
        problems.push_back("has no panels");
        return false;
    }
    const long long nv = static_cast<long long>(m.vertices.size());
    for (std::size_t t = 0; t < m.size(); ++t)
        for (int k = 0; k < 3; ++k)
            if (m.triangles[t][k] < 0 || m.triangles[t][k] >= nv) {
                problems.push_back("panel " + sz(t) + " refers to vertex " + std::to_string(m.triangles[t][k]) +
                                   ", but there are only " + sz(m.vertices.size()) + " vertices");
                return false;
            }
    for (std::size_t v = 0; v < m.vertices.size(); ++v)
        if (!m.vertices[v].allFinite()) {
            problems.push_back("vertex " + sz(v) + " has a non-finite coordinate");
            return false;
        }
    if (std::string far = too_far_from_origin(m); !far.empty()) {
        problems.push_back(std::move(far));
        return false;
    }
    return true;
}

}  // namespace

std::string too_far_from_origin(const TriangleMesh& m, const Vec3& offset) {
    if (m.vertices.empty()) return {};
    // A surface far from the origin for its size loses its shape to rounding: at a
    // million sizes away the coordinates keep only about ten digits of its panels.
    Vec3 low = m.vertices.front(), high = low;
    for (const Vec3& v : m.vertices) {
        low = low.cwiseMin(v);
        high = high.cwiseMax(v);
    }
    const double size = (high - low).maxCoeff();
    const double away = (0.5 * (low + high) + offset).norm();
    if (!(away > kMaxDistanceInSizes * size)) return {};
    return "lies " + num(away) + " m from the origin, over " + num(kMaxDistanceInSizes) + " times its size (" +
           num(size) + " m): too far for double precision; move the scene nearer";
}

MeshReport inspect_mesh(const TriangleMesh& m) {
    MeshReport r;
    r.name = m.name;
    r.panel_count = m.size();
    r.vertex_count = m.vertices.size();
    if (!check_indices(m, r.problems)) return r;
    const std::size_t n = m.size();

    // Per panel: area, shape, degeneracy.
    std::vector<char> degenerate(n, 0);
    std::size_t n_degenerate = 0, first_degenerate = 0;
    r.min_area = INFINITY;
    for (std::size_t t = 0; t < n; ++t) {
        const Triangle& tri = m.triangles[t];
        const double a = m.area(t);
        double lmax2 = 0.0;
        for (int k = 0; k < 3; ++k) lmax2 = std::max(lmax2, (m.corner(t, (k + 1) % 3) - m.corner(t, k)).squaredNorm());
        r.area += a;
        r.min_area = std::min(r.min_area, a);
        r.max_area = std::max(r.max_area, a);
        r.worst_aspect = std::max(r.worst_aspect, a > 0.0 ? std::sqrt(3.0) * lmax2 / (4.0 * a) : INFINITY);
        if (tri[0] == tri[1] || tri[1] == tri[2] || tri[2] == tri[0] ||
            triangle_is_degenerate(m.corner(t, 0), m.corner(t, 1), m.corner(t, 2))) {
            if (n_degenerate++ == 0) first_degenerate = t;
            degenerate[t] = 1;
        }
    }
    if (n_degenerate)
        r.problems.push_back("degenerate panels: " + sz(n_degenerate) + " (e.g. panel " + sz(first_degenerate) +
                             " has zero area or a repeated vertex)");

    // Duplicates: the same three vertices in any order.
    {
        std::vector<std::pair<Triangle, std::size_t>> sorted(n);
        for (std::size_t t = 0; t < n; ++t) {
            Triangle s = m.triangles[t];
            std::sort(s.begin(), s.end());
            sorted[t] = {s, t};
        }
        std::sort(sorted.begin(), sorted.end());
        std::size_t pairs = 0, ex_a = 0, ex_b = 0;
        for (std::size_t i = 1; i < n; ++i)
            if (sorted[i].first == sorted[i - 1].first && pairs++ == 0) {
                ex_a = std::min(sorted[i - 1].second, sorted[i].second);
                ex_b = std::max(sorted[i - 1].second, sorted[i].second);
            }
        if (pairs)
            r.problems.push_back("duplicate panels: " + plural(pairs, "pair", "pairs") + " (e.g. panels " + sz(ex_a) +
                                 " and " + sz(ex_b) + " use the same three vertices)");
    }

    // Edges: closedness, manifoldness, orientation, edge lengths, pieces.
    std::vector<EdgeUse> uses;
    uses.reserve(3 * n);
    for (std::size_t t = 0; t < n; ++t)
        for (int k = 0; k < 3; ++k) {
            const auto a = static_cast<std::uint32_t>(m.triangles[t][k]), b = static_cast<std::uint32_t>(m.triangles[t][(k + 1) % 3]);
            const std::uint64_t key = (static_cast<std::uint64_t>(std::min(a, b)) << 32) | std::max(a, b);
            uses.push_back({key, t, k, a < b});
        }
    std::sort(uses.begin(), uses.end(), [](const EdgeUse& x, const EdgeUse& y) { return x.key < y.key || (x.key == y.key && x.panel < y.panel); });
    DisjointSets pieces(n), corners(3 * n);  // corners: panels fanned around a vertex
    std::size_t boundary = 0, crowded = 0, disagree = 0, n_edges = 0;
    std::uint64_t ex_boundary = 0, ex_crowded = 0;
    std::size_t ex_boundary_panel = 0, ex_crowded_count = 0, ex_disagree_a = 0, ex_disagree_b = 0;
    double edge_sum = 0.0;
    r.min_edge = INFINITY;
    for (std::size_t i = 0; i < uses.size();) {
        std::size_t j = i;
        while (j < uses.size() && uses[j].key == uses[i].key) ++j;
        const std::size_t count = j - i;
        const int va = static_cast<int>(uses[i].key >> 32), vb = static_cast<int>(uses[i].key & 0xffffffffu);
        const double len = (m.vertices[va] - m.vertices[vb]).norm();
        ++n_edges;
        edge_sum += len;
        r.min_edge = std::min(r.min_edge, len);
        r.max_edge = std::max(r.max_edge, len);
        for (std::size_t k = i + 1; k < j; ++k) pieces.unite(uses[i].panel, uses[k].panel);
        if (count == 1) {
            if (boundary++ == 0) {
                ex_boundary = uses[i].key;
                ex_boundary_panel = uses[i].panel;
            }
        } else if (count > 2) {
            if (crowded++ == 0) {
                ex_crowded = uses[i].key;
                ex_crowded_count = count;
            }
        } else {
            const EdgeUse &x = uses[i], &y = uses[i + 1];
            if (x.forward == y.forward && disagree++ == 0) {
                ex_disagree_a = x.panel;
                ex_disagree_b = y.panel;
            }
            // Join the two panels' corners at each end of the edge.
            for (int end = 0; end < 2; ++end) {
                const int v = end ? vb : va;
                auto corner_of = [&](const EdgeUse& e) {
                    const Triangle& tri = m.triangles[e.panel];
                    return 3 * e.panel + (tri[e.corner] == v ? e.corner : (e.corner + 1) % 3);
                };
                corners.unite(corner_of(x), corner_of(y));
            }
        }
        i = j;
    }
    r.mean_edge = edge_sum / static_cast<double>(n_edges);
    auto edge_text = [](std::uint64_t key) { return sz(key >> 32) + " and " + sz(key & 0xffffffffu); };
    r.closed = boundary == 0;
    if (!r.closed)
        r.problems.push_back("not closed: " + plural(boundary, "boundary edge", "boundary edges") +
                             " (e.g. the edge between vertices " + edge_text(ex_boundary) + " borders only panel " +
                             sz(ex_boundary_panel) + ")");
    if (crowded)
        r.problems.push_back("not 2-manifold: " + plural(crowded, "edge", "edges") +
                             " shared by more than two panels (e.g. the edge between vertices " + edge_text(ex_crowded) +
                             " borders " + sz(ex_crowded_count) + " panels)");
    std::size_t pinched = 0, ex_pinched = 0;
    {
        std::vector<long long> root(m.vertices.size(), -1);
        std::vector<char> seen(m.vertices.size(), 0);
        for (std::size_t c = 0; c < 3 * n; ++c) {
            const int v = m.triangles[c / 3][c % 3];
            const auto rc = static_cast<long long>(corners.find(c));
            if (root[v] < 0)
                root[v] = rc;
            else if (root[v] != rc && !seen[v]) {
                seen[v] = 1;
                if (pinched++ == 0) ex_pinched = static_cast<std::size_t>(v);
            }
        }
    }
    if (pinched)
        r.problems.push_back("not 2-manifold: " + plural(pinched, "vertex", "vertices") +
                             " where separate sheets of panels touch (e.g. vertex " + sz(ex_pinched) + ")");
    r.manifold = crowded == 0 && pinched == 0;
    r.oriented_consistently = disagree == 0 && crowded == 0;
    if (disagree)
        r.problems.push_back("inconsistently oriented: " + plural(disagree, "edge", "edges") +
                             " where neighbouring panels disagree (e.g. panels " + sz(ex_disagree_a) + " and " +
                             sz(ex_disagree_b) + " run along their common edge in the same direction)");

    // Volume per piece: each closed piece must enclose positive volume.
    r.volume = mesh_volume(m);
    {
        const BgBox box = mesh_box(m);
        const Vec3 o(0.5 * (box.min_corner().get<0>() + box.max_corner().get<0>()),
                     0.5 * (box.min_corner().get<1>() + box.max_corner().get<1>()),
                     0.5 * (box.min_corner().get<2>() + box.max_corner().get<2>()));
        std::vector<double> piece_volume(n, 0.0);
        for (std::size_t t = 0; t < n; ++t)
            piece_volume[pieces.find(t)] += (m.corner(t, 0) - o).dot((m.corner(t, 1) - o).cross(m.corner(t, 2) - o)) / 6.0;
        std::size_t inward = 0;
        double ex_volume = 0.0;
        for (std::size_t t = 0; t < n; ++t)
            if (pieces.find(t) == t) {
                ++r.component_count;
                if (!(piece_volume[t] > 0.0) && inward++ == 0) ex_volume = piece_volume[t];
            }
        const bool orientable = r.closed && r.oriented_consistently;
        r.oriented_outward = orientable && inward == 0;
        if (orientable && inward)
            r.problems.push_back(r.component_count == 1
                                     ? "oriented inward: the enclosed volume is " + num(ex_volume) +
                                           " m^3; panel normals must point out of the body"
                                     : "oriented inward: " + sz(inward) + " of " + sz(r.component_count) +
                                           " pieces enclose non-positive volume (e.g. " + num(ex_volume) +
                                           " m^3); panel normals must point out of the body");
    }

    // Self-intersection between panels that share no vertex.
    {
        const PanelTree tree = build_panel_tree(m);
        std::vector<PanelBox> hits;
        std::size_t pairs = 0, ex_a = 0, ex_b = 0;
        for (std::size_t t = 0; t < n; ++t) {
            if (degenerate[t]) continue;
            hits.clear();
            tree.query(bgi::intersects(panel_box(m, t)), std::back_inserter(hits));
            const Triangle& a = m.triangles[t];
            for (const PanelBox& h : hits) {
                const std::size_t u = h.second;
                if (u <= t || degenerate[u]) continue;
                const Triangle& b = m.triangles[u];
                bool neighbour = false;
                for (int i = 0; i < 3; ++i)
                    for (int j = 0; j < 3; ++j) neighbour = neighbour || a[i] == b[j];
                if (neighbour) continue;
                if (triangles_intersect(m.corner(t, 0), m.corner(t, 1), m.corner(t, 2), m.corner(u, 0), m.corner(u, 1),
                                        m.corner(u, 2)) &&
                    pairs++ == 0) {
                    ex_a = t;
                    ex_b = u;
                }
            }
        }
        r.self_intersecting = pairs > 0;
        if (pairs)
            r.problems.push_back("self-intersecting: " + plural(pairs, "pair", "pairs") +
                                 " of panels without a common vertex intersect (e.g. panels " + sz(ex_a) + " and " +
                                 sz(ex_b) + ")");
    }

    if (m.region.size() != n)
        r.problems.push_back("has " + sz(m.region.size()) + " region tags for " + sz(n) + " panels");
    return r;
}

void require_valid_mesh(const TriangleMesh& mesh, const std::string& where) {
    const MeshReport r = inspect_mesh(mesh);
    if (r.problems.empty()) return;
    std::string msg = where + ": mesh " + (mesh.name.empty() ? std::string() : in_quotes(mesh.name) + " ") + "is not usable: " +
                      r.problems.front();
    if (r.problems.size() > 1) msg += " (and " + plural(r.problems.size() - 1, "more problem", "more problems") + ")";
    throw InputError(msg);
}

std::string format_report(const MeshReport& r) {
    auto yes = [](bool b) { return b ? "yes" : "no"; };
    std::string s = "mesh" + (r.name.empty() ? std::string() : " " + in_quotes(r.name)) + ": " + sz(r.panel_count) + " panels, " +
                    sz(r.vertex_count) + " vertices, " + plural(r.component_count, "piece", "pieces") + "\n";
    s += "edge length: min " + num(r.min_edge) + " m, mean " + num(r.mean_edge) + " m, max " + num(r.max_edge) + " m\n";
    s += "panel area: min " + num(r.min_area) + " m^2, max " + num(r.max_area) + " m^2; worst aspect ratio " +
         num(r.worst_aspect) + " (1 = equilateral)\n";
    s += "volume " + num(r.volume) + " m^3, surface area " + num(r.area) + " m^2\n";
    s += std::string("closed: ") + yes(r.closed) + ", 2-manifold: " + yes(r.manifold) + ", oriented outward: " +
         yes(r.oriented_outward) + ", self-intersecting: " + yes(r.self_intersecting) + "\n";
    if (r.problems.empty()) {
        s += "no problems found\n";
    } else {
        s += plural(r.problems.size(), "problem:", "problems:") + "\n";
        for (const std::string& p : r.problems) s += "  - " + p + "\n";
    }
    return s;
}

}  // namespace murk
