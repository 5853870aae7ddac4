// Tests of geometry/triangle_distance: hand-computed distances and sampled brute force.
#include "geometry/triangle_distance.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <random>

using namespace murk;

namespace {

const Vec3 A(0, 0, 0), B(2, 0, 0), C(0, 2, 0);

// Least distance from p to a fine barycentric grid on the triangle: an upper bound of
// the true distance, within the grid spacing of it.
double sampled_point_triangle(const Vec3& p, const Vec3& a, const Vec3& b, const Vec3& c, int n) {
    double best = INFINITY;
    for (int i = 0; i <= n; ++i)
        for (int j = 0; i + j <= n; ++j) {
            const Vec3 x = a + (b - a) * (double(i) / n) + (c - a) * (double(j) / n);
            best = std::min(best, (x - p).norm());
        }
    return best;
}

}  // namespace

TEST_CASE("geometry: point to triangle, hand-computed") {
    CHECK(point_triangle_distance(Vec3(0.5, 0.5, 3), A, B, C) == doctest::Approx(3.0));       // above the face
    CHECK(point_triangle_distance(Vec3(-3, -4, 0), A, B, C) == doctest::Approx(5.0));         // vertex region of A
    CHECK(point_triangle_distance(Vec3(1, -2, 0), A, B, C) == doctest::Approx(2.0));          // edge AB region
    CHECK(point_triangle_distance(Vec3(2, 2, 0), A, B, C) == doctest::Approx(std::sqrt(2.0)));  // hypotenuse x + y = 2
    CHECK(point_triangle_distance(Vec3(3, 0, 4), A, B, C) == doctest::Approx(std::sqrt(17.0)));  // vertex B
    CHECK(point_triangle_distance(Vec3(0.3, 0.4, 0), A, B, C) == 0.0);
    // Degenerate (collinear) panel: distance to the segment it covers.
    CHECK(point_triangle_distance(Vec3(1.5, 1, 0), A, B, Vec3(1, 0, 0)) == doctest::Approx(1.0));
    CHECK(point_triangle_distance(Vec3(3, 1, 0), A, Vec3(1, 0, 0), B) == doctest::Approx(std::sqrt(2.0)));
}

TEST_CASE("geometry: point to triangle agrees with sampling") {
    std::mt19937 rng(7);
    std::uniform_real_distribution<double> u(-2.0, 2.0);
    for (int k = 0; k < 40; ++k) {
        const Vec3 a(u(rng), u(rng), u(rng)), b(u(rng), u(rng), u(rng)), c(u(rng), u(rng), u(rng)), p(u(rng), u(rng), u(rng));
        const int n = 300;
        const double exact = point_triangle_distance(p, a, b, c);
        const double sampled = sampled_point_triangle(p, a, b, c, n);
        const double spacing = std::max({(b - a).norm(), (c - a).norm(), (c - b).norm()}) / n;
        CHECK(exact <= sampled + 1e-12);
        CHECK(exact >= sampled - spacing);
    }
}

TEST_CASE("geometry: segment to segment") {
    // Perpendicular skew segments 3 apart in z, closest points at their middles.
    CHECK(segment_segment_distance(Vec3(-1, 0, 0), Vec3(1, 0, 0), Vec3(0, -1, 3), Vec3(0, 1, 3)) == doctest::Approx(3.0));
    // Parallel, overlapping: the gap.
    CHECK(segment_segment_distance(Vec3(0, 0, 0), Vec3(2, 0, 0), Vec3(1, 1, 0), Vec3(3, 1, 0)) == doctest::Approx(1.0));
    // Collinear, apart by 1.
    CHECK(segment_segment_distance(Vec3(0, 0, 0), Vec3(1, 0, 0), Vec3(2, 0, 0), Vec3(5, 0, 0)) == doctest::Approx(1.0));
    // Endpoint to interior: (3,4) to the x-axis segment [0, 1]: distance to (1, 0).
    CHECK(segment_segment_distance(Vec3(0, 0, 0), Vec3(1, 0, 0), Vec3(4, 4, 0), Vec3(4, 8, 0)) == doctest::Approx(5.0));
    // Points.
    CHECK(segment_segment_distance(Vec3(0, 0, 0), Vec3(0, 0, 0), Vec3(3, 4, 0), Vec3(3, 4, 0)) == doctest::Approx(5.0));
    CHECK(segment_segment_distance(Vec3(0, 0, 1), Vec3(0, 0, 1), Vec3(-1, 0, 0), Vec3(1, 0, 0)) == doctest::Approx(1.0));
    // Crossing: 0.
    CHECK(segment_segment_distance(Vec3(-1, 0, 0), Vec3(1, 0, 0), Vec3(0, -1, 0), Vec3(0, 1, 0)) == 0.0);
}

TEST_CASE("geometry: triangle to triangle") {
    // Parallel planes 0.5 apart, overlapping in projection.
    CHECK(triangle_triangle_distance(A, B, C, Vec3(0.1, 0.1, 0.5), Vec3(1, 0.1, 0.5), Vec3(0.1, 1, 0.5)) == doctest::Approx(0.5));
    // Piercing: 0 although every vertex and edge is away from the other triangle.
    CHECK(triangle_triangle_distance(A, B, C, Vec3(0.5, 0.5, -1), Vec3(0.6, 0.5, 1), Vec3(0.5, 0.6, 1)) == 0.0);
    // One in z = 0 with x <= 2, the other in z = 1 with x >= 3: at least sqrt(1 + 1) apart,
    // attained between B = (2, 0, 0) and (3, 0, 1).
    CHECK(triangle_triangle_distance(A, B, C, Vec3(3, -1, 1), Vec3(3, 1, 1), Vec3(5, 0, 1)) == doctest::Approx(std::sqrt(2.0)));
}
