#include "geometry/shapes.hpp"

#include "geometry/input_error.hpp"
#include "geometry/zone_refinement.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <string>
#include <unordered_map>

namespace murk {

std::string shape_number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", v);
    return buf;
}

void require_positive_length(double v, const std::string& what) {
    if (!(std::isfinite(v) && v > 0.0)) throw InputError(what + " must be a positive length, got " + shape_number(v));
}

namespace {

constexpr double kPi = 3.14159265358979323846;




void require_panel_budget(double panels, const std::string& what) {
    if (!(panels <= static_cast<double>(kMaxGeneratedPanels)))
        throw InputError(what + ": target edge too small, the mesh would need about " + shape_number(panels) +
                         " panels (limit " + std::to_string(kMaxGeneratedPanels) + ")");
}

double mean_edge(const TriangleMesh& m) {
    // In a closed manifold mesh every edge borders exactly two panels, so the mean over
    // panel sides equals the mean over distinct edges.
    double sum = 0.0;
    for (std::size_t t = 0; t < m.size(); ++t)
        for (int k = 0; k < 3; ++k) sum += (m.corner(t, (k + 1) % 3) - m.corner(t, k)).norm();
    return sum / (3.0 * static_cast<double>(m.size()));
}

void finish(TriangleMesh& m, const char* name) {
    m.name = name;
    m.region.assign(m.triangles.size(), 0);
}

// Regular icosahedron on the unit sphere. Faces are found as the vertex triples at
// mutual edge distance (2 for the (0, +-1, +-phi) construction) and then oriented
// outward, so no face table has to be trusted.
TriangleMesh unit_icosahedron() {
    const double phi = (1.0 + std::sqrt(5.0)) / 2.0;
    TriangleMesh m;
    for (double s1 : {-1.0, 1.0})
        for (double s2 : {-1.0, 1.0}) {
            m.vertices.emplace_back(0.0, s1, s2 * phi);
            m.vertices.emplace_back(s1, s2 * phi, 0.0);
            m.vertices.emplace_back(s2 * phi, 0.0, s1);
        }
    auto is_edge = [&](int i, int j) { return std::abs((m.vertices[i] - m.vertices[j]).norm() - 2.0) < 1e-9; };
    for (int i = 0; i < 12; ++i)
        for (int j = i + 1; j < 12; ++j)
            for (int k = j + 1; k < 12; ++k)
                if (is_edge(i, j) && is_edge(j, k) && is_edge(i, k)) {
                    Triangle t{i, j, k};
                    const Vec3 n = (m.vertices[j] - m.vertices[i]).cross(m.vertices[k] - m.vertices[i]);
                    if (n.dot(m.vertices[i]) < 0.0) std::swap(t[1], t[2]);
                    m.triangles.push_back(t);
                }
    for (Vec3& v : m.vertices) v.normalize();
    return m;
}

// Splits each panel into four; new vertices are edge midpoints pushed onto the unit
// sphere. Orientation is inherited.
void subdivide_on_unit_sphere(TriangleMesh& m) {
    std::unordered_map<std::uint64_t, int> midpoint;
    midpoint.reserve(m.triangles.size() * 2);
    auto mid = [&](int a, int b) {
        const std::uint64_t key = (static_cast<std::uint64_t>(std::min(a, b)) << 32) | static_cast<std::uint32_t>(std::max(a, b));
        auto it = midpoint.find(key);
        if (it != midpoint.end()) return it->second;
        m.vertices.push_back((m.vertices[a] + m.vertices[b]).normalized());
        const int id = static_cast<int>(m.vertices.size()) - 1;
        midpoint.emplace(key, id);
        return id;
    };
    std::vector<Triangle> out;
    out.reserve(m.triangles.size() * 4);
    for (const Triangle& t : m.triangles) {
        const int ab = mid(t[0], t[1]), bc = mid(t[1], t[2]), ca = mid(t[2], t[0]);
        out.push_back({t[0], ab, ca});
        out.push_back({t[1], bc, ab});
        out.push_back({t[2], ca, bc});
        out.push_back({ab, bc, ca});
    }
    m.triangles.swap(out);
}

void scale_all(TriangleMesh& m, const Vec3& s) {
    for (Vec3& v : m.vertices) v = v.cwiseProduct(s);
}

// Uniform scale making the mesh volume equal v_true.
void keep_volume_uniform(TriangleMesh& m, double v_true) {
    const double f = std::cbrt(v_true / mesh_volume(m));
    for (Vec3& v : m.vertices) v *= f;
}

// Scale of y and z making the mesh volume equal v_true (volume goes with f^2).
void keep_volume_cross_section(TriangleMesh& m, double v_true) {
    const double f = std::sqrt(v_true / mesh_volume(m));
    for (Vec3& v : m.vertices) {
        v.y() *= f;
        v.z() *= f;
    }
}

// Refines `m` toward `zones` (new vertices projected onto the true surface), then
// keeps the true volume with `keep`. Keeping the volume moves the vertices a
// little (a scale of a few per cent), which can stretch a zone's edges just past
// its size or carry an edge from just outside its ball to just inside. The
// refinement is then redone from `m` with the sizes divided by the largest
// stretch of an edge and the radii grown by the largest move of a vertex, until
// every zone holds on the final mesh.
template <class Keep>
TriangleMesh refine_keeping_volume(const TriangleMesh& m, const std::vector<RefinementZone>& zones,
                                   const SurfaceProjection& project, Keep keep) {
    std::vector<RefinementZone> aimed = zones;
    double stretch = 1.0, moved = 0.0;  // the largest seen so far
    for (int attempt = 0;; ++attempt) {
        TriangleMesh refined = m;
        refine_in_zones(refined, aimed, project);
        TriangleMesh out = refined;
        keep(out);
        if (zones.empty() || zone_edge_excess(out, zones) <= 1.0) return out;
        // The scale differs little between attempts: two or three are the rule.
        if (attempt == 8) throw InputError("refinement zones: could not meet the zones' panel sizes");
        for (const Triangle& t : out.triangles)
            for (int k = 0; k < 3; ++k) {
                const int a = t[k], b = t[(k + 1) % 3];
                stretch = std::max(stretch, (out.vertices[a] - out.vertices[b]).norm() /
                                                (refined.vertices[a] - refined.vertices[b]).norm());
            }
        for (std::size_t v = 0; v < out.vertices.size(); ++v)
            moved = std::max(moved, (out.vertices[v] - refined.vertices[v]).norm());
        for (std::size_t k = 0; k < aimed.size(); ++k) {
            aimed[k].panel_size = zones[k].panel_size / (stretch * (1.0 + 1e-6));  // 1e-6: beyond rounding
            aimed[k].radius = zones[k].radius + moved;
        }
    }
}

int check_level(int subdivisions, const char* what) {
    if (subdivisions < 0 || subdivisions > 8)
        throw InputError(std::string(what) + ": subdivision level must be 0..8, got " + std::to_string(subdivisions));
    return subdivisions;
}

// Lowest icosphere level whose volume-kept sphere of `radius` has mean edge <= target.
int sphere_level_for(double radius, double target_edge, const char* what) {
    // Edges at least halve per level (a chord of half the arc is more than half the
    // chord), from 1.05 on the unit icosahedron: refuse hopeless targets at once.
    const double levels_needed = std::ceil(std::log2(1.05 * radius / target_edge));
    if (levels_needed > 8) require_panel_budget(20.0 * std::pow(4.0, levels_needed), what);
    TriangleMesh m = unit_icosahedron();
    for (int level = 0;; ++level) {
        const double f = std::cbrt(4.0 / 3.0 * kPi / mesh_volume(m));
        if (mean_edge(m) * radius * f <= target_edge) return level;
        require_panel_budget(20.0 * std::pow(4.0, level + 1), what);
        subdivide_on_unit_sphere(m);
    }
}

TriangleMesh unit_icosphere(int level) {
    TriangleMesh m = unit_icosahedron();
    for (int i = 0; i < level; ++i) subdivide_on_unit_sphere(m);
    return m;
}

// Ramanujan's approximation of the ellipse perimeter (Ramanujan 1914, "Modular
// equations and approximations to pi"); only used to choose a vertex count.
double ellipse_perimeter(double a, double b) {
    return kPi * (3.0 * (a + b) - std::sqrt((3.0 * a + b) * (a + 3.0 * b)));
}

// Onto the body: a point keeps its x and moves within its cross-section along
// the ray from the axis, scaled to the ellipse of the profile at that x.
SurfaceProjection body_projection(const BodyProfile& p) {
    return [p](const Vec3& q) {
        const std::size_t n = p.x.size();
        const double x = std::clamp(q.x(), p.x.front(), p.x.back());
        std::size_t i = std::upper_bound(p.x.begin(), p.x.end(), x) - p.x.begin();
        i = std::clamp<std::size_t>(i, 1, n - 1) - 1;  // segment [i, i + 1] holds x
        const double t = (x - p.x[i]) / (p.x[i + 1] - p.x[i]);
        const double a = (1.0 - t) * p.half_width[i] + t * p.half_width[i + 1];
        const double b = (1.0 - t) * p.half_height[i] + t * p.half_height[i + 1];
        if (!(a > 0.0 && b > 0.0)) return Vec3(x, 0.0, 0.0);  // a tip
        const double s = std::hypot(q.y() / a, q.z() / b);
        return s > 0.0 ? Vec3(x, q.y() / s, q.z() / s) : q;
    };
}

void validate_profile(const BodyProfile& p) {
    const std::size_t n = p.x.size();
    if (p.half_width.size() != n || p.half_height.size() != n)
        throw InputError("body profile: x, half_width and half_height must have the same number of stations, got " +
                         std::to_string(n) + ", " + std::to_string(p.half_width.size()) + ", " +
                         std::to_string(p.half_height.size()));
    if (n < 3) throw InputError("body profile: need at least 3 stations (two tips and one cross-section), got " + std::to_string(n));
    for (std::size_t i = 0; i < n; ++i) {
        const std::string at = "body profile station " + std::to_string(i) + ": ";
        if (!std::isfinite(p.x[i]) || !std::isfinite(p.half_width[i]) || !std::isfinite(p.half_height[i]))
            throw InputError(at + "values must be finite");
        if (i > 0 && !(p.x[i] > p.x[i - 1]))
            throw InputError(at + "x must increase strictly, but x = " + shape_number(p.x[i]) + " follows x = " + shape_number(p.x[i - 1]));
        if (p.half_width[i] < 0.0 || p.half_height[i] < 0.0)
            throw InputError(at + "radii must not be negative, got half_width " + shape_number(p.half_width[i]) + ", half_height " +
                             shape_number(p.half_height[i]));
        const bool tip = i == 0 || i + 1 == n;
        if (tip && (p.half_width[i] != 0.0 || p.half_height[i] != 0.0))
            throw InputError(at + "the first and last stations are the tips and must have zero radii, got half_width " +
                             shape_number(p.half_width[i]) + ", half_height " + shape_number(p.half_height[i]));
        if (!tip && (p.half_width[i] == 0.0 || p.half_height[i] == 0.0))
            throw InputError(at + "interior stations must have positive radii (only the tips may be zero)");
    }
}

}  // namespace

TriangleMesh make_icosphere(double radius, int subdivisions) {
    require_positive_length(radius, "sphere radius");
    TriangleMesh m = unit_icosphere(check_level(subdivisions, "sphere"));
    scale_all(m, Vec3::Constant(radius));
    keep_volume_uniform(m, 4.0 / 3.0 * kPi * radius * radius * radius);
    finish(m, "sphere");
    return m;
}

TriangleMesh make_sphere(double radius, double target_edge, const std::vector<RefinementZone>& zones) {
    require_positive_length(radius, "sphere radius");
    require_positive_length(target_edge, "sphere target edge");
    if (zones.empty()) return make_icosphere(radius, sphere_level_for(radius, target_edge, "sphere"));
    TriangleMesh m = unit_icosphere(sphere_level_for(radius, target_edge, "sphere"));
    scale_all(m, Vec3::Constant(radius));
    m = refine_keeping_volume(
        m, zones, [radius](const Vec3& p) { return Vec3(radius * p.normalized()); },
        [radius](TriangleMesh& x) { keep_volume_uniform(x, 4.0 / 3.0 * kPi * radius * radius * radius); });
    finish(m, "sphere");
    return m;
}

TriangleMesh make_ellipsoid(const Vec3& semi_axes, double target_edge, const std::vector<RefinementZone>& zones) {
    require_positive_length(semi_axes.x(), "ellipsoid semi-axis x");
    require_positive_length(semi_axes.y(), "ellipsoid semi-axis y");
    require_positive_length(semi_axes.z(), "ellipsoid semi-axis z");
    require_positive_length(target_edge, "ellipsoid target edge");
    TriangleMesh m = unit_icosphere(sphere_level_for(semi_axes.maxCoeff(), target_edge, "ellipsoid"));
    scale_all(m, semi_axes);
    // Onto the ellipsoid along the ray from its centre.
    auto project = [semi_axes](const Vec3& p) { return Vec3(p / p.cwiseQuotient(semi_axes).norm()); };
    m = refine_keeping_volume(m, zones, project,
                              [&](TriangleMesh& x) { keep_volume_uniform(x, 4.0 / 3.0 * kPi * semi_axes.prod()); });
    finish(m, "ellipsoid");
    return m;
}

TriangleMesh make_capsule(double radius, double cylinder_length, double target_edge,
                          const std::vector<RefinementZone>& zones) {
    require_positive_length(radius, "capsule radius");
    require_positive_length(target_edge, "capsule target edge");
    if (!(std::isfinite(cylinder_length) && cylinder_length >= 0.0))
        throw InputError("capsule cylinder length must be zero or a positive length, got " + shape_number(cylinder_length));
    const double s = kGridSpacingFactor * target_edge;
    const double n_lat_d = std::max(2.0, std::ceil(0.5 * kPi * radius / s));
    const double n_cyl_d = std::ceil(cylinder_length / s);
    const double n_theta_d = std::max(8.0, std::ceil(2.0 * kPi * radius / s));
    require_panel_budget(2.0 * n_theta_d * (2.0 * n_lat_d + n_cyl_d), "capsule");
    const int n_lat = static_cast<int>(n_lat_d), n_cyl = static_cast<int>(n_cyl_d), n_theta = static_cast<int>(n_theta_d);
    const double h = 0.5 * cylinder_length;
    std::vector<double> x, r;
    for (int k = 0; k <= n_lat; ++k) {  // left cap, pole to equator
        const double ph = 0.5 * kPi * k / n_lat;
        x.push_back(-h - radius * std::cos(ph));
        r.push_back(k == n_lat ? radius : radius * std::sin(ph));
    }
    for (int j = 1; j <= n_cyl; ++j) {  // cylinder, ends at the right equator
        x.push_back(j == n_cyl ? h : -h + cylinder_length * j / n_cyl);
        r.push_back(radius);
    }
    for (int k = n_lat - 1; k >= 0; --k) {  // right cap, equator to pole
        const double ph = 0.5 * kPi * k / n_lat;
        x.push_back(h + radius * std::cos(ph));
        r.push_back(k == 0 ? 0.0 : radius * std::sin(ph));
    }
    r.front() = 0.0;
    // Onto the capsule: away from the nearest point of its axis segment.
    auto project = [radius, h](const Vec3& p) {
        const Vec3 axis(std::clamp(p.x(), -h, h), 0.0, 0.0);
        const Vec3 out = p - axis;
        return out.norm() > 0.0 ? Vec3(axis + radius * out.normalized()) : p;
    };
    const double v_true = kPi * radius * radius * cylinder_length + 4.0 / 3.0 * kPi * radius * radius * radius;
    TriangleMesh m = refine_keeping_volume(make_loft(x, r, r, n_theta), zones, project,
                                           [v_true](TriangleMesh& y) { keep_volume_cross_section(y, v_true); });
    finish(m, "capsule");
    return m;
}

// Station i at x[i] with semi-axes a[i] (y),
// b[i] (z); the first and last stations are tips (one vertex each), all others rings
// of n_theta vertices at the same angles, so quads between rings are well shaped.
TriangleMesh make_loft(const std::vector<double>& x, const std::vector<double>& a, const std::vector<double>& b, int n_theta) {
    TriangleMesh m;
    const int n = static_cast<int>(x.size());
    m.vertices.emplace_back(x[0], 0.0, 0.0);
    for (int i = 1; i + 1 < n; ++i)
        for (int j = 0; j < n_theta; ++j) {
            const double th = 2.0 * kPi * j / n_theta;
            m.vertices.emplace_back(x[i], a[i] * std::cos(th), b[i] * std::sin(th));
        }
    m.vertices.emplace_back(x[n - 1], 0.0, 0.0);
    const int tail = static_cast<int>(m.vertices.size()) - 1;
    auto ring = [&](int i, int j) { return 1 + (i - 1) * n_theta + (j % n_theta); };
    for (int j = 0; j < n_theta; ++j) m.triangles.push_back({0, ring(1, j + 1), ring(1, j)});
    for (int i = 1; i + 2 < n; ++i)
        for (int j = 0; j < n_theta; ++j) {
            const int p = ring(i, j), q = ring(i, j + 1), r = ring(i + 1, j + 1), s = ring(i + 1, j);
            m.triangles.push_back({p, q, r});
            m.triangles.push_back({p, r, s});
        }
    for (int j = 0; j < n_theta; ++j) m.triangles.push_back({tail, ring(n - 2, j), ring(n - 2, j + 1)});
    return m;
}

double body_profile_volume(const BodyProfile& p) {
    validate_profile(p);
    double v = 0.0;
    for (std::size_t i = 0; i + 1 < p.x.size(); ++i) {
        const double a0 = p.half_width[i], a1 = p.half_width[i + 1];
        const double b0 = p.half_height[i], b1 = p.half_height[i + 1];
        v += (p.x[i + 1] - p.x[i]) / 6.0 * (2.0 * a0 * b0 + a0 * b1 + a1 * b0 + 2.0 * a1 * b1);
    }
    return kPi * v;
}

TriangleMesh make_body(const BodyProfile& p, double target_edge, const std::vector<RefinementZone>& zones) {
    require_positive_length(target_edge, "body target edge");
    const double v_true = body_profile_volume(p);
    const double s = kGridSpacingFactor * target_edge;
    std::vector<double> x, a, b;
    double widest = 0.0;
    for (std::size_t i = 0; i + 1 < p.x.size(); ++i) {
        const double dx = p.x[i + 1] - p.x[i];
        const double dr = std::max(std::abs(p.half_width[i + 1] - p.half_width[i]), std::abs(p.half_height[i + 1] - p.half_height[i]));
        const double pieces = std::max(1.0, std::ceil(std::hypot(dx, dr) / s));
        require_panel_budget(pieces, "body");
        const int n = static_cast<int>(pieces);
        for (int k = 0; k < n; ++k) {
            const double t = static_cast<double>(k) / n;
            x.push_back(k == 0 ? p.x[i] : p.x[i] + t * dx);
            a.push_back((1.0 - t) * p.half_width[i] + t * p.half_width[i + 1]);
            b.push_back((1.0 - t) * p.half_height[i] + t * p.half_height[i + 1]);
        }
        widest = std::max(widest, ellipse_perimeter(p.half_width[i], p.half_height[i]));
    }
    x.push_back(p.x.back());
    a.push_back(0.0);
    b.push_back(0.0);
    const double n_theta_d = std::max(8.0, std::ceil(widest / s));
    require_panel_budget(2.0 * n_theta_d * static_cast<double>(x.size()), "body");
    TriangleMesh m = refine_keeping_volume(make_loft(x, a, b, static_cast<int>(n_theta_d)), zones, body_projection(p),
                                           [v_true](TriangleMesh& y) { keep_volume_cross_section(y, v_true); });
    finish(m, "body");
    return m;
}

TriangleMesh make_box(const Vec3& size, double target_edge, const std::vector<RefinementZone>& zones) {
    require_positive_length(size.x(), "box size x");
    require_positive_length(size.y(), "box size y");
    require_positive_length(size.z(), "box size z");
    require_positive_length(target_edge, "box target edge");
    const double s = kGridSpacingFactor * target_edge;
    double nd[3];
    for (int d = 0; d < 3; ++d) nd[d] = std::max(1.0, std::ceil(size[d] / s));
    require_panel_budget(4.0 * (nd[0] * nd[1] + nd[1] * nd[2] + nd[2] * nd[0]), "box");
    std::array<std::vector<double>, 3> lines;
    for (int d = 0; d < 3; ++d) {
        const int n = static_cast<int>(nd[d]);
        for (int g = 0; g <= n; ++g) lines[d].push_back(g == n ? 0.5 * size[d] : -0.5 * size[d] + size[d] * g / n);
    }
    TriangleMesh m = make_box_on_lines(lines);
    // Flat faces: an edge's midpoint is already on the surface, and the volume stays exact.
    refine_in_zones(m, zones, [](const Vec3& p) { return p; });
    finish(m, "box");
    return m;
}

TriangleMesh make_box_on_lines(const std::array<std::vector<double>, 3>& lines) {
    int n[3];
    for (int d = 0; d < 3; ++d) {
        if (lines[d].size() < 2) throw InputError("box grid: need at least two lines along each axis");
        for (std::size_t g = 1; g < lines[d].size(); ++g)
            if (!(lines[d][g] > lines[d][g - 1])) throw InputError("box grid: lines must increase strictly");
        n[d] = static_cast<int>(lines[d].size()) - 1;
    }
    require_panel_budget(4.0 * (double(n[0]) * n[1] + double(n[1]) * n[2] + double(n[2]) * n[0]), "box");
    TriangleMesh m;
    std::unordered_map<std::int64_t, int> id;  // boundary grid point -> vertex, shared by faces
    auto vertex = [&](const int g[3]) {
        const std::int64_t key = (static_cast<std::int64_t>(g[0]) * (n[1] + 1) + g[1]) * (n[2] + 1) + g[2];
        auto it = id.find(key);
        if (it != id.end()) return it->second;
        m.vertices.emplace_back(lines[0][g[0]], lines[1][g[1]], lines[2][g[2]]);
        const int v = static_cast<int>(m.vertices.size()) - 1;
        id.emplace(key, v);
        return v;
    };
    for (int a = 0; a < 3; ++a) {
        const int b = (a + 1) % 3, c = (a + 2) % 3;  // e_b x e_c = e_a
        for (int side = 0; side < 2; ++side)
            for (int u = 0; u < n[b]; ++u)
                for (int w = 0; w < n[c]; ++w) {
                    int g[3];
                    g[a] = side ? n[a] : 0;
                    auto at = [&](int du, int dw) {
                        g[b] = u + du;
                        g[c] = w + dw;
                        return vertex(g);
                    };
                    const int p00 = at(0, 0), p10 = at(1, 0), p11 = at(1, 1), p01 = at(0, 1);
                    if (side) {  // outward normal +e_a
                        m.triangles.push_back({p00, p10, p11});
                        m.triangles.push_back({p00, p11, p01});
                    } else {
                        m.triangles.push_back({p00, p11, p10});
                        m.triangles.push_back({p00, p01, p11});
                    }
                }
    }
    finish(m, "box");
    return m;
}

double mesh_volume(const TriangleMesh& mesh) {
    if (mesh.vertices.empty()) return 0.0;
    Vec3 lo = mesh.vertices[0], hi = lo;
    for (const Vec3& v : mesh.vertices) {
        lo = lo.cwiseMin(v);
        hi = hi.cwiseMax(v);
    }
    const Vec3 o = 0.5 * (lo + hi);
    double six_v = 0.0;
    for (std::size_t t = 0; t < mesh.size(); ++t)
        six_v += (mesh.corner(t, 0) - o).dot((mesh.corner(t, 1) - o).cross(mesh.corner(t, 2) - o));
    return six_v / 6.0;
}

double mesh_area(const TriangleMesh& mesh) {
    double a = 0.0;
    for (std::size_t t = 0; t < mesh.size(); ++t) a += mesh.area(t);
    return a;
}

}  // namespace murk
