// Tests of geometry/zone_refinement and of the zones the generators take: the
// refined mesh stays a valid closed surface, meets the zone's panel size, keeps
// the true volume and leaves the panels far from the zone alone. Volumes are the
// closed forms of elementary solids (sphere, ellipsoid, cylinder: common
// practice) or a Simpson sum of the body's cross-section areas, written here.
#include "geometry/input_error.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/shapes.hpp"
#include "geometry/zone_refinement.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <utility>

using namespace murk;

namespace {

constexpr double kPi = 3.14159265358979323846;

// A fish-like outline 15 cm long in metres (tail tip at x = 0, nose at x = 0.15).
BodyProfile fish_like() {
    const double L = 0.15;
    BodyProfile p;
    const double f[][3] = {{0.00, 0.000, 0.000}, {0.15, 0.015, 0.022}, {0.30, 0.028, 0.042}, {0.50, 0.042, 0.065},
                           {0.70, 0.050, 0.078}, {0.84, 0.048, 0.072}, {0.92, 0.038, 0.055}, {0.97, 0.022, 0.030},
                           {1.00, 0.000, 0.000}};
    for (const auto& s : f) {
        p.x.push_back(s[0] * L);
        p.half_width.push_back(s[1] * L);
        p.half_height.push_back(s[2] * L);
    }
    return p;
}

// Volume of the elliptic body: Simpson's rule on pi a(x) b(x), exact for the
// quadratic integrand of each linear segment.
double simpson_body_volume(const BodyProfile& p) {
    double v = 0.0;
    for (std::size_t i = 0; i + 1 < p.x.size(); ++i) {
        const double h = p.x[i + 1] - p.x[i];
        auto area = [&](double t) {
            return kPi * ((1 - t) * p.half_width[i] + t * p.half_width[i + 1]) *
                   ((1 - t) * p.half_height[i] + t * p.half_height[i + 1]);
        };
        v += h / 6.0 * (area(0.0) + 4.0 * area(0.5) + area(1.0));
    }
    return v;
}

// Signed volume by the divergence theorem about the origin (written here, not mesh_volume).
double volume_about_origin(const TriangleMesh& m) {
    double v = 0.0;
    for (const Triangle& t : m.triangles) v += m.vertices[t[0]].dot(m.vertices[t[1]].cross(m.vertices[t[2]])) / 6.0;
    return v;
}

// Longest edge among the edges that pass within `radius` of `centre`, found by
// sampling each edge at 201 points (an independent way to the closed form of
// zone_edge_excess); 0 when none does.
double longest_edge_near(const TriangleMesh& m, const Vec3& centre, double radius) {
    double longest = 0.0;
    for (const Triangle& t : m.triangles)
        for (int k = 0; k < 3; ++k) {
            const Vec3& a = m.vertices[t[k]];
            const Vec3& b = m.vertices[t[(k + 1) % 3]];
            bool near = false;
            for (int s = 0; s <= 200 && !near; ++s) near = (a + (b - a) * (s / 200.0) - centre).norm() <= radius;
            if (near) longest = std::max(longest, (b - a).norm());
        }
    return longest;
}

void check_valid(const TriangleMesh& m) {
    const MeshReport r = inspect_mesh(m);
    INFO(format_report(r));
    CHECK(r.problems.empty());
    CHECK(r.closed);
    CHECK(r.manifold);
    CHECK(r.oriented_outward);
    CHECK_FALSE(r.self_intersecting);
    CHECK(m.region.size() == m.size());
}

// Panels with a centroid x below `x_max`, as sorted vertex triples, for comparing
// the part of two meshes that should be the same.
std::vector<std::array<double, 9>> panels_below(const TriangleMesh& m, double x_max) {
    std::vector<std::array<double, 9>> out;
    for (std::size_t t = 0; t < m.size(); ++t) {
        if (!(m.centroid(t).x() < x_max)) continue;
        std::array<double, 9> p{};
        for (int k = 0; k < 3; ++k)
            for (int d = 0; d < 3; ++d) p[3 * k + d] = m.corner(t, k)[d];
        out.push_back(p);
    }
    std::sort(out.begin(), out.end());
    return out;
}

}  // namespace

TEST_CASE("zone refinement: a fish-like body refined on its flank") {
    const BodyProfile p = fish_like();
    const double panel = 0.007;
    // On the flank at 0.3 of the length from the nose, where it is 7.5 mm wide.
    const RefinementZone zone{Vec3(0.105, 0.0075, 0.0), 0.008, 0.0015};
    const TriangleMesh plain = make_body(p, panel);
    const TriangleMesh fine = make_body(p, panel, {zone});
    check_valid(fine);
    CHECK(fine.size() > 2 * plain.size());

    const double longest = longest_edge_near(fine, zone.centre, zone.radius);
    CHECK(longest > 0.5 * zone.panel_size);  // the zone does hold panels
    CHECK(longest <= zone.panel_size);
    CHECK(longest_edge_near(plain, zone.centre, zone.radius) > 3.0 * zone.panel_size);

    const double v = simpson_body_volume(p);
    CHECK(std::abs(volume_about_origin(fine) / v - 1.0) < 1e-9);
    CHECK(std::abs(volume_about_origin(plain) / v - 1.0) < 1e-9);

    // Grading: the panels grow back to the plain ones. Beyond the zone's radius
    // plus (7 - 1.5) mm / kZoneGrading = 11 mm, plus two plain panels for the
    // bisections that keep the mesh conforming, the mesh is the plain one except
    // for its volume scale, which only moves y and z: compare x and y/z ratios.
    const double reach = zone.radius + (panel - zone.panel_size) / kZoneGrading + 2.0 * panel;
    const auto far_plain = panels_below(plain, zone.centre.x() - reach);
    const auto far_fine = panels_below(fine, zone.centre.x() - reach);
    REQUIRE(far_plain.size() > 100);
    REQUIRE(far_plain.size() == far_fine.size());
    for (std::size_t i = 0; i < far_plain.size(); ++i)
        for (int k = 0; k < 3; ++k) CHECK(far_fine[i][3 * k] == doctest::Approx(far_plain[i][3 * k]).epsilon(1e-12));

    // Smooth grading: panels sharing an edge differ in longest edge by at most 3x.
    std::map<std::pair<int, int>, std::vector<double>> longest_by_edge;
    for (std::size_t t = 0; t < fine.size(); ++t) {
        double l = 0.0;
        for (int k = 0; k < 3; ++k) l = std::max(l, (fine.corner(t, k) - fine.corner(t, (k + 1) % 3)).norm());
        for (int k = 0; k < 3; ++k) {
            const int a = fine.triangles[t][k], b = fine.triangles[t][(k + 1) % 3];
            longest_by_edge[{std::min(a, b), std::max(a, b)}].push_back(l);
        }
    }
    double worst_jump = 0.0;
    for (const auto& [edge, l] : longest_by_edge) {
        REQUIRE(l.size() == 2);
        worst_jump = std::max(worst_jump, std::max(l[0], l[1]) / std::min(l[0], l[1]));
    }
    CHECK(worst_jump <= 3.0);
}

TEST_CASE("zone refinement: zones at the tips, overlapping, and the whole body") {
    const BodyProfile p = fish_like();
    const std::vector<std::vector<RefinementZone>> cases = {
        {{Vec3(0.15, 0.0, 0.0), 0.006, 0.001}},                                        // the nose tip
        {{Vec3(0.0, 0.0, 0.0), 0.01, 0.0015}},                                         // the tail tip
        {{Vec3(0.09, 0.0, 0.012), 0.01, 0.002}, {Vec3(0.1, 0.0, 0.01), 0.004, 0.001}},  // dorsal, nested
        {{Vec3(0.075, 0.0, 0.0), 0.2, 0.004}},                                         // everything
    };
    for (const auto& zones : cases) {
        const TriangleMesh m = make_body(p, 0.007, zones);
        check_valid(m);
        CHECK(std::abs(volume_about_origin(m) / simpson_body_volume(p) - 1.0) < 1e-9);
        for (const RefinementZone& z : zones) {
            CAPTURE(z.centre.transpose());
            CHECK(longest_edge_near(m, z.centre, z.radius) <= z.panel_size);
        }
    }
}

TEST_CASE("zone refinement: generated hulls keep their true volume and shape") {
    const double r = 0.02, cyl = 0.1;
    const Vec3 axes(0.05, 0.02, 0.015);
    const Vec3 box(0.1, 0.04, 0.03);
    struct Case {
        const char* name;
        TriangleMesh mesh;
        RefinementZone zone;
        double volume;
    };
    const RefinementZone side{Vec3(0.0, 0.02, 0.0), 0.01, 0.002};
    const RefinementZone cap{Vec3(0.07, 0.0, 0.0), 0.012, 0.002};  // a capsule's hemispherical end
    const Case cases[] = {
        {"sphere", make_sphere(r, 0.008, {side}), side, 4.0 / 3.0 * kPi * r * r * r},
        {"ellipsoid", make_ellipsoid(axes, 0.008, {side}), side, 4.0 / 3.0 * kPi * axes.prod()},
        {"capsule side", make_capsule(r, cyl, 0.008, {side}), side, kPi * r * r * cyl + 4.0 / 3.0 * kPi * r * r * r},
        {"capsule end", make_capsule(r, cyl, 0.008, {cap}), cap, kPi * r * r * cyl + 4.0 / 3.0 * kPi * r * r * r},
        {"box", make_box(box, 0.01, {side}), side, box.prod()},
    };
    for (const Case& c : cases) {
        CAPTURE(c.name);
        check_valid(c.mesh);
        CHECK(std::abs(volume_about_origin(c.mesh) / c.volume - 1.0) < 1e-9);
        const double longest = longest_edge_near(c.mesh, c.zone.centre, c.zone.radius);
        CHECK(longest <= c.zone.panel_size);
        CHECK(longest > 0.4 * c.zone.panel_size);
    }
    // The new vertices lie on the true surface: on the sphere, all at one radius
    // (the volume rule scales them together).
    const TriangleMesh s = make_sphere(r, 0.008, {side});
    double lo = 1e9, hi = 0.0;
    for (const Vec3& v : s.vertices) lo = std::min(lo, v.norm()), hi = std::max(hi, v.norm());
    CHECK(hi / lo - 1.0 < 1e-12);
}

TEST_CASE("zone refinement: bad zones are refused") {
    const BodyProfile p = fish_like();
    CHECK_THROWS_AS(make_body(p, 0.007, {{Vec3(0.1, 0.0, 0.0), 0.01, 0.0}}), InputError);
    CHECK_THROWS_AS(make_body(p, 0.007, {{Vec3(0.1, 0.0, 0.0), -0.01, 0.001}}), InputError);
    CHECK_THROWS_AS(make_body(p, 0.007, {{Vec3(0.1, NAN, 0.0), 0.01, 0.001}}), InputError);
    // A micrometre over the whole body would need billions of panels.
    CHECK_THROWS_AS(make_body(p, 0.007, {{Vec3(0.075, 0.0, 0.0), 0.2, 1e-6}}), InputError);
}

TEST_CASE("zone refinement: a zone that misses the surface changes nothing") {
    const BodyProfile p = fish_like();
    const TriangleMesh plain = make_body(p, 0.007);
    const TriangleMesh missed = make_body(p, 0.007, {{Vec3(0.1, 0.05, 0.0), 0.01, 0.001}});
    CHECK(missed.size() == plain.size());
    CHECK(distance_to_surface(plain, Vec3(0.1, 0.05, 0.0)) > 0.04);
    CHECK(distance_to_surface(plain, Vec3(0.1, 0.05, 0.0)) < 0.045);  // the flank is 7.5 mm wide at most
}
