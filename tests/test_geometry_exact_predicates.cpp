// Tests of geometry/exact_predicates: signs on exactly degenerate double inputs.
#include "geometry/exact_predicates.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

TEST_CASE("geometry: orient2d is exact on nearly collinear points") {
    // (0.1,0.1), (0.2,0.2), (0.3,0.3): each point has equal coordinates, so all lie
    // exactly on y = x whatever the rounding of 0.1, 0.2, 0.3 (known geometry).
    const Vec2 a(0.1, 0.1), b(0.2, 0.2);
    CHECK(orient2d(a, b, Vec2(0.3, 0.3)) == 0);
    CHECK(orient2d(a, b, Vec2(0.3, std::nextafter(0.3, 1.0))) == 1);   // just above y = x: left turn
    CHECK(orient2d(a, b, Vec2(0.3, std::nextafter(0.3, 0.0))) == -1);  // just below
    CHECK(orient2d(Vec2(0, 0), Vec2(1, 0), Vec2(0, 1)) == 1);
    CHECK(orient2d(Vec2(0, 0), Vec2(0, 1), Vec2(1, 0)) == -1);
    // Far from the origin, where plain evaluation loses all digits.
    const double big = 1e15;
    CHECK(orient2d(Vec2(big, big), Vec2(big + 1, big + 1), Vec2(big + 2, big + 2)) == 0);
    CHECK(orient2d(Vec2(big, big), Vec2(big + 1, big + 1), Vec2(big + 2, big + 2.125)) == 1);
}

TEST_CASE("geometry: orient3d is exact on nearly coplanar points") {
    const Vec3 a(0, 0, 0), b(1, 0, 0), c(0, 1, 0);  // counter-clockwise seen from +z
    CHECK(orient3d(a, b, c, Vec3(0.3, 0.7, 0.0)) == 0);
    CHECK(orient3d(a, b, c, Vec3(0.3, 0.7, -1e-300)) == 1);  // below: positive by the convention
    CHECK(orient3d(a, b, c, Vec3(0.3, 0.7, 1e-300)) == -1);
    // The plane x + y + z = 1 holds (0.25, 0.25, 0.5) exactly; a neighbour of 0.5 does not.
    const Vec3 p(1, 0, 0), q(0, 1, 0), r(0, 0, 1);
    CHECK(orient3d(p, q, r, Vec3(0.25, 0.25, 0.5)) == 0);
    CHECK(orient3d(p, q, r, Vec3(0.25, 0.25, std::nextafter(0.5, 1.0))) == -1);
    CHECK(orient3d(p, q, r, Vec3(0.25, 0.25, std::nextafter(0.5, 0.0))) == 1);
    // Coplanar points with coordinates 0.1, 0.2, 0.3 on the plane z = x (exactly).
    CHECK(orient3d(Vec3(0.1, 0.0, 0.1), Vec3(0.2, 1.0, 0.2), Vec3(0.3, 5.0, 0.3), Vec3(0.7, -3.0, 0.7)) == 0);
}
