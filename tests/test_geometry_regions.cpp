// Tests of geometry/regions: electrode tagging against direct counts.
#include "geometry/input_error.hpp"
#include "geometry/regions.hpp"
#include "geometry/shapes.hpp"

#include <doctest/doctest.h>

#include <string>

using namespace murk;

TEST_CASE("geometry: add_region hands out fresh tags") {
    TriangleMesh m = make_capsule(0.05, 0.2, 0.02);
    m.name = "fish";
    const int a = add_region(m, "E1");
    const int b = add_region(m, "E2");
    CHECK(a == 1);
    CHECK(b == 2);
    CHECK(m.region_names[1] == "E1");
    CHECK(m.region_names[2] == "E2");
    CHECK_THROWS_AS(add_region(m, "E1"), InputError);
    CHECK_THROWS_AS(add_region(m, ""), InputError);
    m.region[0] = 7;  // a tag from a file, above the names
    CHECK(add_region(m, "E3") == 8);
}

TEST_CASE("geometry: ring and patch electrodes") {
    TriangleMesh m = make_capsule(0.05, 0.2, 0.01);
    m.name = "fish";
    const int ring = add_region(m, "ring");
    const int patch = add_region(m, "patch");
    const Vec3 axis_point(0.1, 0, 0), axis(-2, 0, 0);  // axial coordinate s = 0.1 - x
    const std::size_t n_ring = tag_band(m, ring, axis_point, axis, 0.02, 0.05);
    const Vec3 centre(0, 0, 0.05);
    const std::size_t n_patch = tag_disc(m, patch, centre, 0.03);
    std::size_t want_ring = 0, want_patch = 0;
    for (std::size_t t = 0; t < m.size(); ++t) {
        const Vec3 c = m.centroid(t);
        const bool in_patch = (c - centre).norm() <= 0.03;
        const bool in_ring = 0.1 - c.x() >= 0.02 && 0.1 - c.x() <= 0.05;
        want_patch += in_patch;
        want_ring += in_ring;
        CHECK(m.region[t] == (in_patch ? patch : in_ring ? ring : 0));  // the later patch wins
    }
    CHECK(n_ring == want_ring);
    CHECK(n_patch == want_patch);
    CHECK(n_ring > 0);
    CHECK(n_patch > 0);
    CHECK(region_size(m, patch) == want_patch);
    CHECK_NOTHROW(require_regions_nonempty(m));

    // A patch off the body selects nothing: the error names the region and the mesh.
    const int lost = add_region(m, "lost");
    try {
        tag_disc(m, lost, Vec3(1, 1, 1), 0.01);
        FAIL("no exception");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()) == "region 'lost' on mesh 'fish' selects no panel");
    }
    CHECK_THROWS_AS(tag_band(m, lost, Vec3::Zero(), Vec3::Zero(), 0, 1), InputError);
    CHECK_THROWS_AS(tag_band(m, lost, Vec3::Zero(), Vec3::UnitX(), 1, 0), InputError);
    CHECK_THROWS_AS(tag_disc(m, lost, Vec3::Zero(), -1.0), InputError);
    // A later region covering all of an earlier one leaves it empty.
    TriangleMesh s = make_sphere(1.0, 0.5);
    const int first = add_region(s, "first");
    tag_disc(s, first, Vec3(0, 0, 1), 0.5);
    const int second = add_region(s, "second");
    tag_disc(s, second, Vec3(0, 0, 1), 1.0);
    try {
        require_regions_nonempty(s);
        FAIL("no exception");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()).find("region 'first'") != std::string::npos);
    }
}
