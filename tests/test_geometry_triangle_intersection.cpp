// Tests of geometry/triangle_intersection on configurations of known geometry.
#include "geometry/triangle_intersection.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

namespace {

const Vec3 A(0, 0, 0), B(1, 0, 0), C(0, 1, 0);  // unit right triangle in z = 0

bool hits(const Vec3& p, const Vec3& q, const Vec3& r) {
    const bool one = triangles_intersect(A, B, C, p, q, r);
    CHECK(one == triangles_intersect(p, q, r, A, B, C));  // symmetric
    return one;
}

}  // namespace

TEST_CASE("geometry: segment against triangle") {
    CHECK(segment_intersects_triangle(Vec3(0.2, 0.2, -1), Vec3(0.2, 0.2, 1), A, B, C));        // pierces
    CHECK_FALSE(segment_intersects_triangle(Vec3(0.6, 0.6, -1), Vec3(0.6, 0.6, 1), A, B, C));  // beyond the hypotenuse
    CHECK(segment_intersects_triangle(Vec3(0.5, 0.5, -1), Vec3(0.5, 0.5, 1), A, B, C));        // through the hypotenuse
    CHECK(segment_intersects_triangle(Vec3(0.2, 0.2, 0), Vec3(0.2, 0.2, 1), A, B, C));         // ends on the face
    CHECK_FALSE(segment_intersects_triangle(Vec3(0.2, 0.2, 1e-300), Vec3(0.2, 0.2, 1), A, B, C));
    CHECK(segment_intersects_triangle(Vec3(-1, 0.5, 0), Vec3(2, 0.5, 0), A, B, C));       // coplanar crossing
    CHECK(segment_intersects_triangle(Vec3(0.1, 0.1, 0), Vec3(0.2, 0.1, 0), A, B, C));    // coplanar inside
    CHECK_FALSE(segment_intersects_triangle(Vec3(1, 1, 0), Vec3(2, 0.5, 0), A, B, C));    // coplanar outside
    CHECK(segment_intersects_triangle(Vec3(-1, 0, 0), Vec3(-0.0, 0, 0), A, B, C));        // coplanar, meets vertex A
}

TEST_CASE("geometry: triangle against triangle") {
    CHECK(hits(Vec3(0.2, 0.2, -1), Vec3(0.3, 0.2, 1), Vec3(0.2, 0.3, 1)));                // piercing
    CHECK_FALSE(hits(Vec3(0.2, 0.2, 0.1), Vec3(0.3, 0.2, 1), Vec3(0.2, 0.3, 1)));         // above
    CHECK(hits(Vec3(0.2, 0.2, 0.0), Vec3(0.3, 0.2, 1), Vec3(0.2, 0.3, 1)));               // vertex on the face
    CHECK_FALSE(hits(Vec3(0.2, 0.2, 1e-300), Vec3(0.3, 0.2, 1), Vec3(0.2, 0.3, 1)));      // a hair above
    CHECK(hits(Vec3(-1, 0.5, -1), Vec3(-1, 0.5, 1), Vec3(2, 0.5, 0)));                    // crossing through the middle
    CHECK(hits(Vec3(0.5, 0.5, -1), Vec3(0.5, 0.5, 1), Vec3(3, 3, 0)));                    // edge along the hypotenuse point
    CHECK(hits(Vec3(0.1, 0.1, 0), Vec3(0.2, 0.1, 0), Vec3(0.1, 0.2, 0)));                 // coplanar, nested
    CHECK(hits(Vec3(-1, -1, 0), Vec3(3, -1, 0), Vec3(-1, 3, 0)));                         // coplanar, containing
    CHECK(hits(Vec3(0.5, -0.5, 0), Vec3(0.5, 0.5, 0), Vec3(1.5, 0, 0)));                  // coplanar, edges cross
    CHECK_FALSE(hits(Vec3(0.6, 0.6, 0), Vec3(1.6, 0.6, 0), Vec3(0.6, 1.6, 0)));           // coplanar, apart
    CHECK(hits(Vec3(0.5, 0.5, 0), Vec3(1.5, 0.5, 0), Vec3(0.5, 1.5, 0)));                 // coplanar, vertex on edge
    CHECK_FALSE(hits(Vec3(0.5, 0.5 + 1e-15, 0), Vec3(1.5, 0.5 + 1e-15, 0), Vec3(0.5, 1.5, 0)));  // just past the hypotenuse
}

TEST_CASE("geometry: degenerate triangle detection") {
    CHECK(triangle_is_degenerate(A, B, Vec3(2, 0, 0)));
    CHECK(triangle_is_degenerate(A, A, B));
    CHECK(triangle_is_degenerate(A, B, Vec3(0.5, 1e-13, 0)));
    CHECK_FALSE(triangle_is_degenerate(A, B, C));
    CHECK_FALSE(triangle_is_degenerate(A * 1e-6, B * 1e-6, C * 1e-6));  // small but well shaped
}
