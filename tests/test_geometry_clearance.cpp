// Tests of geometry/clearance: distances between meshes, containment, scene checks.
#include "geometry/clearance.hpp"
#include "geometry/input_error.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "geometry/triangle_distance.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <functional>
#include <string>

using namespace murk;

namespace {

// Radii between which the faceted sphere centred at the origin lies: the least
// distance of a panel plane from the centre and the largest vertex radius.
std::pair<double, double> radius_band(const TriangleMesh& m) {
    double lo = INFINITY, hi = 0.0;
    for (std::size_t t = 0; t < m.size(); ++t) {
        lo = std::min(lo, m.normal(t).dot(m.corner(t, 0)));
        for (int k = 0; k < 3; ++k) hi = std::max(hi, m.corner(t, k).norm());
    }
    return {lo, hi};
}

std::string error_of(const std::function<void()>& f) {
    try {
        f();
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

}  // namespace

TEST_CASE("geometry: min_distance between two spheres") {
    const TriangleMesh a = make_icosphere(1.0, 3);
    const auto [lo, hi] = radius_band(a);
    const Vec3 c(1.7, 2.1, -0.9);  // centre distance 2.88..., radii 1
    TriangleMesh b = make_icosphere(1.0, 3);
    translate(b, c);
    const double d = min_distance(a, b);
    // The facets lie between radii lo and hi, so the gap lies between |c| - 2 hi and
    // |c| - 2 lo (known geometry).
    CHECK(d >= c.norm() - 2.0 * hi - 1e-12);
    CHECK(d <= c.norm() - 2.0 * lo + 1e-12);
    CHECK(min_distance(b, a) == doctest::Approx(d).epsilon(1e-12));
    CHECK_FALSE(meshes_intersect(a, b));
}

TEST_CASE("geometry: min_distance agrees with brute force over all panel pairs") {
    TriangleMesh a = make_ellipsoid(Vec3(0.3, 0.2, 0.1), 0.1);
    TriangleMesh b = make_capsule(0.1, 0.2, 0.05);
    transform(b, rotation_from_axis_angle(Vec3(1, 2, 3), 0.7), Vec3(0.25, 0.3, 0.12));
    double brute = INFINITY;
    for (std::size_t t = 0; t < a.size(); ++t)
        for (std::size_t u = 0; u < b.size(); ++u)
            brute = std::min(brute, triangle_triangle_distance(a.corner(t, 0), a.corner(t, 1), a.corner(t, 2), b.corner(u, 0),
                                                               b.corner(u, 1), b.corner(u, 2)));
    REQUIRE(brute > 0.0);
    CHECK(min_distance(a, b) == brute);
    CHECK(min_distance(b, a) == doctest::Approx(brute).epsilon(1e-12));  // same pairs, arguments swapped
}

TEST_CASE("geometry: intersecting and touching meshes") {
    const TriangleMesh a = make_box(Vec3(1, 1, 1), 0.3);
    TriangleMesh b = make_box(Vec3(1, 1, 1), 0.3);
    translate(b, Vec3(0.9, 0.2, 0.1));
    CHECK(meshes_intersect(a, b));
    CHECK(min_distance(a, b) == 0.0);
    translate(b, Vec3(0.1, 0, 0));  // faces x = 0.5 touch exactly
    CHECK(meshes_intersect(a, b));
    CHECK(min_distance(a, b) == 0.0);
    translate(b, Vec3(0.25, 0, 0));
    CHECK_FALSE(meshes_intersect(a, b));
    CHECK(min_distance(a, b) == doctest::Approx(0.25).epsilon(1e-12));  // parallel faces 0.25 apart
}

TEST_CASE("geometry: contains_point") {
    const TriangleMesh s = make_icosphere(1.0, 2);
    CHECK(contains_point(s, Vec3(0, 0, 0)));
    CHECK(contains_point(s, Vec3(0.5, -0.5, 0.5)));
    CHECK_FALSE(contains_point(s, Vec3(1.2, 0, 0)));
    CHECK_FALSE(contains_point(s, Vec3(0.8, 0.8, 0.8)));  // inside the bounding box, outside the ball
    const TriangleMesh b = make_box(Vec3(2, 1, 1), 0.25);
    CHECK(contains_point(b, Vec3(0.999, 0.49, -0.49)));
    CHECK_FALSE(contains_point(b, Vec3(1.001, 0, 0)));
    CHECK_FALSE(contains_point(b, Vec3(0, 100, 0)));
}

TEST_CASE("geometry: require_clearance names both surfaces") {
    TriangleMesh fish = make_capsule(0.05, 0.3, 0.02);
    fish.name = "fish";
    TriangleMesh stone = make_sphere(0.04, 0.01);
    stone.name = "stone";
    translate(stone, Vec3(0, 0.085, 0));  // overlaps the 0.05 body radius + 0.04
    std::string e = error_of([&] { require_clearance({&fish, &stone}, 0.001); });
    CHECK(e == "surfaces 'fish' and 'stone' touch or intersect (clearance 0 m)");
    translate(stone, Vec3(0, 0.02, 0));  // gap 0.105 - 0.09 = 0.015 m, give or take the faceting
    e = error_of([&] { require_clearance({&fish, &stone}, 0.02); });
    CHECK(e.rfind("surfaces 'fish' and 'stone' are closer than 0.02 m (clearance 0.01", 0) == 0);
    CHECK_NOTHROW(require_clearance({&fish, &stone}, 0.005));
    TriangleMesh pebble = make_sphere(0.01, 0.005);  // inside the fish
    pebble.name.clear();                              // unnamed: called by its index
    e = error_of([&] { require_clearance({&fish, &stone, &pebble}, 0.001); });
    CHECK(e == "surface '#2' lies inside surface 'fish'");
    CHECK_THROWS_AS(require_clearance({&fish}, -1.0), InputError);
}

TEST_CASE("geometry: min_distance and meshes_intersect on 20k-panel meshes are fast") {
    const TriangleMesh a = make_icosphere(1.0, 5);
    TriangleMesh b = make_icosphere(1.0, 5);
    translate(b, Vec3(2.5, 0.3, 0.0));
    const auto [lo, hi] = radius_band(a);
    const double d = min_distance(a, b);
    const double c = Vec3(2.5, 0.3, 0.0).norm();
    CHECK(d >= c - 2 * hi - 1e-12);
    CHECK(d <= c - 2 * lo + 1e-12);
    translate(b, Vec3(-1.0, 0.0, 0.0));
    CHECK(meshes_intersect(a, b));
    CHECK(min_distance(a, b) == 0.0);
}
