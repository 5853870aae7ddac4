#include "geometry/electrode_cut.hpp"

#include "geometry/electrode_hulls.hpp"
#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <unordered_map>

namespace murk {
namespace {

constexpr double kPi = 3.14159265358979323846;

std::uint64_t edge_key(int a, int b) {
    return (static_cast<std::uint64_t>(std::min(a, b)) << 32) | static_cast<std::uint32_t>(std::max(a, b));
}

// A lower bound (m) on the distance from the panel (a, b, c) to the side's zero
// level: 0 when the level changes sign at the corners, else |level| at the
// centroid less the centroid's farthest corner (the level is 1-Lipschitz).
double distance_below(const ElectrodeSide& side, const Vec3& a, const Vec3& b, const Vec3& c) {
    const double la = side.level(a), lb = side.level(b), lc = side.level(c);
    if (std::min({la, lb, lc}) <= 0.0 && std::max({la, lb, lc}) >= 0.0) return 0.0;
    const Vec3 g = (a + b + c) / 3.0;
    const double reach = std::sqrt(std::max({(a - g).squaredNorm(), (b - g).squaredNorm(), (c - g).squaredNorm()}));
    return std::max(0.0, std::abs(side.level(g)) - reach);
}

// Area-weighted vertex normals (unit).
std::vector<Vec3> vertex_normals(const TriangleMesh& m) {
    std::vector<Vec3> n(m.vertices.size(), Vec3::Zero());
    for (std::size_t t = 0; t < m.size(); ++t)
        for (int k = 0; k < 3; ++k) n[m.triangles[t][k]] += m.area_vector2(t);
    for (Vec3& v : n) v = v.norm() > 0.0 ? Vec3(v.normalized()) : Vec3::Zero();
    return n;
}

// The side's gradient with the part along `normal` removed: its direction along
// the surface (zero when the zero level grazes the surface).
Vec3 along_surface(const ElectrodeSide& side, const Vec3& x, const Vec3& normal) {
    const Vec3 g = side.gradient(x);
    return g - g.dot(normal) * normal;
}

double triangle_min_angle(const Vec3& a, const Vec3& b, const Vec3& c) {
    auto angle = [](const Vec3& p, const Vec3& q, const Vec3& r) {
        return std::atan2((q - p).cross(r - p).norm(), (q - p).dot(r - p));
    };
    return std::min({angle(a, b, c), angle(b, c, a), angle(c, a, b)});
}

// One side's cut of the mesh: snap, then split. `locked` vertices (on an earlier
// cut or a kept level) are never moved; new vertices are locked.
class SideCut {
public:
    SideCut(TriangleMesh& m, std::vector<char>& locked, const ElectrodeSide& side, const CutOptions& o)
        : m_(m), locked_(locked), side_(side), o_(o), tol_(1e-9 * o.edge_size) {}

    void run() {
        level_.resize(m_.vertices.size());
        for (std::size_t v = 0; v < m_.vertices.size(); ++v) level_[v] = side_.level(m_.vertices[v]);
        snap();
        split();
    }

private:
    int sign(int v) const { return level_[v] > tol_ ? 1 : level_[v] < -tol_ ? -1 : 0; }

    // Moves onto the zero level the corners that a crossing edge would cut within
    // kCutSnapFraction of its length, unless the move would fold a panel.
    void snap() {
        std::vector<char> candidate(m_.vertices.size(), 0);
        for (const Triangle& t : m_.triangles)
            for (int k = 0; k < 3; ++k) {
                const int a = t[k], b = t[(k + 1) % 3];
                if (sign(a) * sign(b) >= 0) continue;
                const double s = level_[a] / (level_[a] - level_[b]);  // linear estimate of the root
                if (s < kCutSnapFraction && !locked_[a]) candidate[a] = 1;
                if (s > 1.0 - kCutSnapFraction && !locked_[b]) candidate[b] = 1;
            }
        std::vector<std::vector<std::size_t>> panels_of(m_.vertices.size());
        for (std::size_t t = 0; t < m_.size(); ++t)
            for (int k = 0; k < 3; ++k)
                if (candidate[m_.triangles[t][k]]) panels_of[m_.triangles[t][k]].push_back(t);
        const std::vector<Vec3> normals = vertex_normals(m_);
        for (std::size_t v = 0; v < m_.vertices.size(); ++v) {
            if (!candidate[v]) continue;
            Vec3 x = m_.vertices[v];
            bool reached = false;
            for (int it = 0; it < 8 && !reached; ++it) {
                const double l = side_.level(x);
                if (std::abs(l) <= 0.1 * tol_) {
                    reached = true;
                    break;
                }
                const Vec3 d = along_surface(side_, x, normals[v]);
                if (d.squaredNorm() < 0.01) break;  // grazing: leave it to the split
                x = o_.project(x - l * d / d.squaredNorm());
            }
            if (!reached && std::abs(side_.level(x)) > 0.1 * tol_) continue;
            // The move must not fold or flatten a panel around v.
            const Vec3 old = m_.vertices[v];
            std::vector<Vec3> before;
            for (std::size_t t : panels_of[v]) before.push_back(m_.area_vector2(t));
            m_.vertices[v] = x;
            bool fine = true;
            for (std::size_t i = 0; i < panels_of[v].size() && fine; ++i) {
                const Vec3 after = m_.area_vector2(panels_of[v][i]);
                fine = after.dot(before[i]) > 0.5 * after.norm() * before[i].norm() &&
                       after.norm() > 0.05 * before[i].norm();
            }
            if (!fine) {
                m_.vertices[v] = old;
                continue;
            }
            level_[v] = 0.0;
            locked_[v] = 1;
        }
    }

    // The vertex where the zero level crosses the edge a-b (signs opposite), made once.
    int crossing(int a, int b) {
        const auto it = made_.find(edge_key(a, b));
        if (it != made_.end()) return it->second;
        const Vec3 pa = m_.vertices[a], pb = m_.vertices[b];
        double lo = 0.0, hi = 1.0;  // level(lo) has a's sign
        const bool a_negative = level_[a] < 0.0;
        Vec3 x = o_.project(0.5 * (pa + pb));
        for (int it = 0; it < 60; ++it) {
            const double mid = 0.5 * (lo + hi);
            x = o_.project((1.0 - mid) * pa + mid * pb);
            const double l = side_.level(x);
            if (std::abs(l) <= 0.01 * tol_) break;
            ((l < 0.0) == a_negative ? lo : hi) = mid;
        }
        m_.vertices.push_back(x);
        level_.push_back(0.0);
        locked_.push_back(1);
        const int v = static_cast<int>(m_.vertices.size()) - 1;
        made_.emplace(edge_key(a, b), v);
        return v;
    }

    void split() {
        std::vector<Triangle> out;
        std::vector<int> region;
        out.reserve(m_.size() + m_.size() / 4);
        region.reserve(out.capacity());
        const std::size_t n = m_.size();
        for (std::size_t t = 0; t < n; ++t) {
            const Triangle tri = m_.triangles[t];
            const int tag = m_.region[t];
            int crossings = 0;
            for (int k = 0; k < 3; ++k) crossings += sign(tri[k]) * sign(tri[(k + 1) % 3]) < 0 ? 1 : 0;
            auto emit = [&](int a, int b, int c) {
                out.push_back({a, b, c});
                region.push_back(tag);
            };
            if (crossings == 0) {
                emit(tri[0], tri[1], tri[2]);
            } else if (crossings == 1) {
                // Corners renamed so that v0 -> v1 crosses; v2 is on the zero level.
                int k = 0;
                while (sign(tri[k]) * sign(tri[(k + 1) % 3]) >= 0) ++k;
                const int v0 = tri[k], v1 = tri[(k + 1) % 3], v2 = tri[(k + 2) % 3];
                const int c = crossing(v0, v1);
                emit(v0, c, v2);
                emit(c, v1, v2);
            } else {
                // v0 alone on its side: v0 -> v1 and v2 -> v0 cross.
                int k = 0;
                while (!(sign(tri[k]) * sign(tri[(k + 1) % 3]) < 0 && sign(tri[k]) * sign(tri[(k + 2) % 3]) < 0)) ++k;
                const int v0 = tri[k], v1 = tri[(k + 1) % 3], v2 = tri[(k + 2) % 3];
                const int c01 = crossing(v0, v1), c20 = crossing(v2, v0);
                emit(v0, c01, c20);
                // The quad c01, v1, v2, c20 split along the diagonal that keeps the larger smallest angle.
                const std::vector<Vec3>& x = m_.vertices;
                const double through_v2 =
                    std::min(triangle_min_angle(x[c01], x[v1], x[v2]), triangle_min_angle(x[c01], x[v2], x[c20]));
                const double through_v1 =
                    std::min(triangle_min_angle(x[c01], x[v1], x[c20]), triangle_min_angle(x[v1], x[v2], x[c20]));
                if (through_v2 >= through_v1) {
                    emit(c01, v1, v2);
                    emit(c01, v2, c20);
                } else {
                    emit(c01, v1, c20);
                    emit(v1, v2, c20);
                }
            }
        }
        m_.triangles.swap(out);
        m_.region.swap(region);
    }

    TriangleMesh& m_;
    std::vector<char>& locked_;
    const ElectrodeSide& side_;
    const CutOptions& o_;
    const double tol_;
    std::vector<double> level_;
    std::unordered_map<std::uint64_t, int> made_;
};

// Step 1: bisection until panels near every side's zero level are graded from edge_size.
void refine_toward_edges(TriangleMesh& mesh, const std::vector<CutElectrode>& electrodes, const CutOptions& o) {
    const double growth = kElectrodeEdgeGrowth - 1.0;
    refine_to_allowed(
        mesh,
        [&](const Vec3& a, const Vec3& b, const Vec3& c) {
            double allowed = std::numeric_limits<double>::infinity();
            for (const CutElectrode& e : electrodes)
                for (const ElectrodeSide& s : e.sides)
                    allowed = std::min(allowed, o.edge_size + growth * distance_below(s, a, b, c));
            return allowed;
        },
        o.project, o.refine_label, "give mesh.electrode_edge a larger size");
}

// Step 4: the panels all of whose corners lie in the electrode.
std::vector<std::size_t> panels_inside(const TriangleMesh& mesh, const CutElectrode& e, double tol) {
    std::vector<std::size_t> inside;
    for (std::size_t t = 0; t < mesh.size(); ++t) {
        bool in = true;
        for (const ElectrodeSide& s : e.sides)
            for (int k = 0; k < 3 && in; ++k) in = s.level(mesh.corner(t, k)) <= tol;
        if (in) inside.push_back(t);
    }
    return inside;
}

// Step 5: the electrode's boundary vertices moved out along the surface by one
// distance, found by the secant method, until its panels have the exact area.
void apply_area_rule(TriangleMesh& mesh, const CutElectrode& e, const std::vector<std::size_t>& panels,
                     const std::vector<char>& kept, const CutOptions& o) {
    std::vector<char> in_panel(mesh.size(), 0);
    for (std::size_t t : panels) in_panel[t] = 1;
    std::vector<char> inner(mesh.vertices.size(), 0), outer(mesh.vertices.size(), 0);
    for (std::size_t t = 0; t < mesh.size(); ++t)
        for (int k = 0; k < 3; ++k) (in_panel[t] ? inner : outer)[mesh.triangles[t][k]] = 1;
    const std::vector<Vec3> normals = vertex_normals(mesh);
    std::vector<int> moved;
    std::vector<Vec3> start, direction;
    for (std::size_t v = 0; v < mesh.vertices.size(); ++v) {
        if (!(inner[v] && outer[v]) || kept[v]) continue;
        const Vec3& x = mesh.vertices[v];
        const ElectrodeSide* on = &e.sides.front();
        for (const ElectrodeSide& s : e.sides)
            if (std::abs(s.level(x)) < std::abs(on->level(x))) on = &s;
        const Vec3 d = along_surface(*on, x, normals[v]);
        if (d.norm() < 1e-3) continue;
        moved.push_back(static_cast<int>(v));
        start.push_back(x);
        direction.push_back(d.normalized());
    }
    auto area_at = [&](double s) {
        for (std::size_t i = 0; i < moved.size(); ++i) mesh.vertices[moved[i]] = o.project(start[i] + s * direction[i]);
        double a = 0.0;
        for (std::size_t t : panels) a += mesh.area(t);
        return a;
    };
    const double want = *e.exact_area_m2;
    double perimeter = 0.0;  // edges between the electrode and the rest: the rate of change of the area
    for (std::size_t t : panels)
        for (int k = 0; k < 3; ++k) {
            const int a = mesh.triangles[t][k], b = mesh.triangles[t][(k + 1) % 3];
            if (inner[a] && outer[a] && inner[b] && outer[b]) perimeter += (mesh.vertices[a] - mesh.vertices[b]).norm();
        }
    MURK_CHECK(perimeter > 0.0 && !moved.empty(), "an electrode that covers part of the hull has a boundary");
    double s0 = 0.0, a0 = area_at(0.0);
    double s1 = (want - a0) / perimeter, a1 = area_at(s1);
    for (int it = 0; it < 30 && std::abs(a1 - want) > 1e-12 * want && a1 != a0; ++it) {
        const double s2 = s1 - (a1 - want) * (s1 - s0) / (a1 - a0);
        s0 = s1, a0 = a1;
        s1 = s2, a1 = area_at(s1);
    }
    MURK_CHECK(std::abs(a1 - want) <= 1e-9 * want, "the area rule converges");
    MURK_CHECK(std::abs(s1) <= 0.5 * o.edge_size, "the area rule moves the boundary by a fraction of the edge size");
}

}  // namespace

Vec3 ElectrodeSide::gradient(const Vec3& x) const {
    if (!ball) return normal;
    const Vec3 r = x - point;
    return r.norm() > 0.0 ? Vec3(r.normalized()) : Vec3::Zero();
}

ElectrodeSide ball_side(const Vec3& centre, double radius) {
    ElectrodeSide s;
    s.ball = true;
    s.point = centre;
    s.radius = radius;
    return s;
}

ElectrodeSide plane_side(const Vec3& point, const Vec3& outward) {
    ElectrodeSide s;
    s.point = point;
    s.normal = outward.normalized();
    return s;
}

CutResult cut_electrodes(TriangleMesh& mesh, const std::vector<CutElectrode>& electrodes, const CutOptions& options) {
    MURK_CHECK(options.edge_size > 0.0 && options.project, "callers pass an edge size and a projection");
    CutResult result;
    if (electrodes.empty()) return result;
    mesh.region.resize(mesh.size(), 0);
    refine_toward_edges(mesh, electrodes, options);

    const double tol = 1e-9 * options.edge_size;
    std::vector<char> locked(mesh.vertices.size(), 0);
    for (std::size_t v = 0; v < mesh.vertices.size(); ++v)
        for (const ElectrodeSide& s : options.keep)
            if (std::abs(s.level(mesh.vertices[v])) <= tol) locked[v] = 1;
    const std::vector<char> kept = locked;
    for (const CutElectrode& e : electrodes)
        for (const ElectrodeSide& s : e.sides) SideCut(mesh, locked, s, options).run();
    std::vector<char> kept_all = kept;
    kept_all.resize(mesh.vertices.size(), 0);

    std::vector<int> owner(mesh.size(), -1);
    for (std::size_t k = 0; k < electrodes.size(); ++k) {
        const CutElectrode& e = electrodes[k];
        std::vector<std::size_t> panels = panels_inside(mesh, e, 1e3 * tol);
        const std::string head = e.where + ": " + e.name;
        if (panels.empty()) throw InputError(head + " covers no part of the hull (it lies off it)");
        if (panels.size() == mesh.size()) throw InputError(head + " covers the whole hull");
        for (std::size_t t : panels) {
            if (owner[t] >= 0)
                throw InputError(head + " overlaps " + electrodes[owner[t]].name + " (they share panel " +
                                 std::to_string(t) + " of the cut hull)");
            owner[t] = static_cast<int>(k);
        }
        double area = 0.0;
        for (std::size_t t : panels) area += mesh.area(t);
        result.area_before_rule.push_back(area);
        result.panels.push_back(std::move(panels));
    }
    for (std::size_t k = 0; k < electrodes.size(); ++k)
        if (electrodes[k].exact_area_m2) apply_area_rule(mesh, electrodes[k], result.panels[k], kept_all, options);
    return result;
}

double min_panel_angle_deg(const TriangleMesh& mesh) {
    double worst = kPi;
    for (std::size_t t = 0; t < mesh.size(); ++t)
        worst = std::min(worst, triangle_min_angle(mesh.corner(t, 0), mesh.corner(t, 1), mesh.corner(t, 2)));
    return worst * 180.0 / kPi;
}

}  // namespace murk
