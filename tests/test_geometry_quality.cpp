// Tests of geometry/mesh_quality: each problem found on a hand-broken mesh.
#include "geometry/input_error.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <set>
#include <string>

using namespace murk;

namespace {

TriangleMesh tetrahedron(const Vec3& at = Vec3::Zero(), double size = 1.0) {
    TriangleMesh t;
    t.name = "tet";
    t.vertices = {at, at + Vec3(size, 0, 0), at + Vec3(0, size, 0), at + Vec3(0, 0, size)};
    t.triangles = {{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}};
    t.region.assign(4, 0);
    return t;
}

// Both meshes in one, vertices not shared.
TriangleMesh merged(const TriangleMesh& a, const TriangleMesh& b) {
    TriangleMesh m = a;
    const int off = static_cast<int>(a.vertices.size());
    m.vertices.insert(m.vertices.end(), b.vertices.begin(), b.vertices.end());
    for (Triangle t : b.triangles) m.triangles.push_back({t[0] + off, t[1] + off, t[2] + off});
    m.region.insert(m.region.end(), b.region.begin(), b.region.end());
    return m;
}

bool has_problem(const MeshReport& r, const std::string& start) {
    for (const std::string& p : r.problems)
        if (p.rfind(start, 0) == 0) return true;
    return false;
}

}  // namespace

TEST_CASE("geometry: valid meshes pass with correct statistics") {
    const TriangleMesh s = make_icosphere(1.0, 2);
    const MeshReport r = inspect_mesh(s);
    INFO(format_report(r));
    CHECK(r.problems.empty());
    CHECK(r.panel_count == 320);
    CHECK(r.vertex_count == 162);
    CHECK(r.component_count == 1);
    CHECK(r.closed);
    CHECK(r.manifold);
    CHECK(r.oriented_consistently);
    CHECK(r.oriented_outward);
    CHECK_FALSE(r.self_intersecting);
    // Brute-force statistics over distinct edges and panels.
    std::set<std::pair<int, int>> edges;
    for (const Triangle& t : s.triangles)
        for (int k = 0; k < 3; ++k) edges.emplace(std::min(t[k], t[(k + 1) % 3]), std::max(t[k], t[(k + 1) % 3]));
    CHECK(edges.size() == 480);  // E = 3F/2
    double lo = 1e9, hi = 0, sum = 0;
    for (const auto& e : edges) {
        const double l = (s.vertices[e.first] - s.vertices[e.second]).norm();
        lo = std::min(lo, l);
        hi = std::max(hi, l);
        sum += l;
    }
    CHECK(r.min_edge == doctest::Approx(lo).epsilon(1e-14));
    CHECK(r.max_edge == doctest::Approx(hi).epsilon(1e-14));
    CHECK(r.mean_edge == doctest::Approx(sum / 480).epsilon(1e-12));
    CHECK(r.volume == doctest::Approx(4.0 / 3.0 * 3.14159265358979323846).epsilon(1e-9));
    require_valid_mesh(s, "test");
    const std::string text = format_report(r);
    CHECK(text.find("320 panels") != std::string::npos);
    CHECK(text.find("no problems found") != std::string::npos);

    const MeshReport two = inspect_mesh(merged(tetrahedron(), tetrahedron(Vec3(3, 0, 0))));
    CHECK(two.problems.empty());
    CHECK(two.component_count == 2);
}

TEST_CASE("geometry: aspect ratio and areas of known triangles") {
    const MeshReport r = inspect_mesh(tetrahedron());
    // Faces: three right isosceles triangles with legs 1 (area 1/2, longest edge sqrt 2,
    // shortest altitude 1/sqrt 2, so ratio 2 * sqrt(3)/2 = sqrt 3) and one equilateral
    // triangle of side sqrt 2 (area sqrt(3)/2, ratio 1).
    CHECK(r.worst_aspect == doctest::Approx(std::sqrt(3.0)).epsilon(1e-14));
    CHECK(r.min_area == doctest::Approx(0.5).epsilon(1e-14));
    CHECK(r.max_area == doctest::Approx(std::sqrt(3.0) / 2.0).epsilon(1e-14));
    CHECK(r.min_edge == doctest::Approx(1.0));
    CHECK(r.max_edge == doctest::Approx(std::sqrt(2.0)));
}

TEST_CASE("geometry: open mesh") {
    TriangleMesh m = tetrahedron();
    m.triangles.pop_back();
    m.region.pop_back();
    const MeshReport r = inspect_mesh(m);
    CHECK_FALSE(r.closed);
    CHECK_FALSE(r.oriented_outward);
    CHECK(has_problem(r, "not closed: 3 boundary edges"));
    CHECK(r.problems.size() == 1);
    try {
        require_valid_mesh(m, "cases/fish.toml: body.mesh");
        FAIL("no exception");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()).rfind("cases/fish.toml: body.mesh: mesh 'tet' is not usable: not closed", 0) == 0);
    }
}

TEST_CASE("geometry: one flipped panel") {
    TriangleMesh m = tetrahedron();
    std::swap(m.triangles[2][1], m.triangles[2][2]);
    const MeshReport r = inspect_mesh(m);
    CHECK(r.closed);
    CHECK_FALSE(r.oriented_consistently);
    CHECK_FALSE(r.oriented_outward);
    CHECK(has_problem(r, "inconsistently oriented: 3 edges"));
}

TEST_CASE("geometry: inward mesh") {
    TriangleMesh m = make_icosphere(1.0, 1);
    flip_orientation(m);
    MeshReport r = inspect_mesh(m);
    CHECK(r.oriented_consistently);
    CHECK_FALSE(r.oriented_outward);
    CHECK(r.volume < 0.0);
    CHECK(has_problem(r, "oriented inward"));
    // One of two pieces inward: the total volume is positive, the check still fails.
    TriangleMesh small = tetrahedron(Vec3(5, 0, 0));
    flip_orientation(small);
    r = inspect_mesh(merged(make_icosphere(1.0, 1), small));
    CHECK(r.volume > 0.0);
    CHECK(has_problem(r, "oriented inward: 1 of 2 pieces"));
}

TEST_CASE("geometry: degenerate panels") {
    TriangleMesh m = tetrahedron();
    m.triangles.push_back({0, 1, 1});  // repeated vertex
    m.region.push_back(0);
    MeshReport r = inspect_mesh(m);
    CHECK(r.problems.front().rfind("degenerate panels: 1 (e.g. panel 4", 0) == 0);
    // A zero-area sliver: three collinear vertices closing a flat slit.
    TriangleMesh s;
    s.vertices = {Vec3(0, 0, 0), Vec3(1, 0, 0), Vec3(2, 0, 0), Vec3(1, 1, 0)};
    s.triangles = {{0, 1, 3}, {1, 2, 3}, {0, 2, 1}, {0, 3, 2}};
    s.region.assign(4, 0);
    r = inspect_mesh(s);
    CHECK(has_problem(r, "degenerate panels: 1 (e.g. panel 2"));
    CHECK(std::isinf(r.worst_aspect));
}

TEST_CASE("geometry: duplicate panels and crowded edges") {
    TriangleMesh m = tetrahedron();
    m.triangles.push_back({2, 1, 0});  // the same face again, reversed
    m.region.push_back(0);
    const MeshReport r = inspect_mesh(m);
    CHECK(has_problem(r, "duplicate panels: 1 pair (e.g. panels 0 and 4"));
    CHECK(has_problem(r, "not 2-manifold: 3 edges shared by more than two panels"));
    CHECK_FALSE(r.manifold);
}

TEST_CASE("geometry: pinched vertex") {
    // Two tetrahedra sharing only vertex 0: every edge is fine, the vertex is not.
    TriangleMesh a = tetrahedron(), b = tetrahedron();
    for (Vec3& v : b.vertices) v = -v;  // point reflection: orientation kept (det -1, so flip)
    flip_orientation(b);
    TriangleMesh m = merged(a, b);
    for (Triangle& t : m.triangles)
        for (int& v : t)
            if (v == 4) v = 0;
    const MeshReport r = inspect_mesh(m);
    CHECK(r.closed);
    CHECK_FALSE(r.manifold);
    CHECK(has_problem(r, "not 2-manifold: 1 vertex where separate sheets of panels touch (e.g. vertex 0)"));
}

TEST_CASE("geometry: self-intersection of two merged tetrahedra") {
    const MeshReport r = inspect_mesh(merged(tetrahedron(), tetrahedron(Vec3(0.2, 0.2, 0.2))));
    CHECK(r.closed);
    CHECK(r.manifold);
    CHECK(r.self_intersecting);
    CHECK(has_problem(r, "self-intersecting"));
    // Just touching (a vertex of one on a face of the other) also counts.
    TriangleMesh apart = tetrahedron(Vec3(0, 0, 0));
    const MeshReport t = inspect_mesh(merged(apart, tetrahedron(Vec3(1.0 / 3, 1.0 / 3, 1.0 / 3 + 1e-9))));
    CHECK_FALSE(t.self_intersecting);
    const MeshReport u = inspect_mesh(merged(apart, tetrahedron(Vec3(0.25, 0.25, 0.5))));  // corner on the slanted face
    CHECK(u.self_intersecting);
}

TEST_CASE("geometry: broken indices and tags are reported, not crashed on") {
    TriangleMesh m = tetrahedron();
    m.triangles[1][2] = 7;
    CHECK(inspect_mesh(m).problems.front() == "panel 1 refers to vertex 7, but there are only 4 vertices");
    m = tetrahedron();
    m.vertices[2].x() = NAN;
    CHECK(inspect_mesh(m).problems.front() == "vertex 2 has a non-finite coordinate");
    m = tetrahedron();
    m.region.clear();
    CHECK(has_problem(inspect_mesh(m), "has 0 region tags for 4 panels"));
    CHECK(inspect_mesh(TriangleMesh{}).problems.front() == "has no panels");
}

TEST_CASE("geometry: inspecting a 20k-panel mesh is fast") {
    const TriangleMesh s = make_icosphere(1.0, 5);  // 20480 panels
    const MeshReport r = inspect_mesh(s);
    CHECK(r.panel_count == 20480);
    CHECK(r.problems.empty());
    const TriangleMesh b = make_box(Vec3(1, 1, 1), 0.012);  // flat faces: many coplanar neighbours
    CHECK(b.size() > 20000);
    CHECK(inspect_mesh(b).problems.empty());
}

TEST_CASE("a large valid mesh passes, and a single panel turned or vertex moved through is caught") {
    TriangleMesh m = make_icosphere(0.1, 4);  // 5120 panels
    REQUIRE(m.size() >= 1000);
    CHECK_NOTHROW(require_valid_mesh(m, "first"));
    CHECK_NOTHROW(require_valid_mesh(m, "again"));
    TriangleMesh turned = m;
    std::swap(turned.triangles[17][1], turned.triangles[17][2]);  // one panel turned inward
    CHECK_THROWS_AS(require_valid_mesh(turned, "turned"), InputError);
    TriangleMesh dented = m;
    dented.vertices[5] *= -1.5;  // pulled through to the far side: the surface crosses itself
    CHECK_THROWS_AS(require_valid_mesh(dented, "dented"), InputError);
    CHECK_NOTHROW(require_valid_mesh(m, "the original still"));
}

TEST_CASE("geometry: a mesh far from the origin for its size is refused for that reason") {
    // A 2 mm tetrahedron at 1e15 m: double precision (2.2e-16 relative, IEEE 754
    // binary64: common practice) spaces representable coordinates 0.125 m apart
    // there, so its corners merge. The report names the distance, not the symptom.
    const MeshReport far = inspect_mesh(tetrahedron(Vec3(1e15, 0, 0), 2e-3));
    CHECK(has_problem(far, "lies 1e+15 m from the origin"));
    CHECK(far.problems.size() == 1);
    // A thousand sizes away is an ordinary scene: no problem.
    CHECK(inspect_mesh(tetrahedron(Vec3(2.0, 0, 0), 2e-3)).problems.empty());
    // A million sizes is the limit: just inside passes, just outside is refused.
    CHECK(inspect_mesh(tetrahedron(Vec3(0.999e6, 0, 0), 1.0)).problems.empty());
    CHECK(has_problem(inspect_mesh(tetrahedron(Vec3(1.01e6, 0, 0), 1.0)), "lies "));
}
