// Tests of geometry/vertex_welding: merging coincident corners of a triangle soup.
#include "geometry/shapes.hpp"
#include "geometry/vertex_welding.hpp"

#include <doctest/doctest.h>

using namespace murk;

TEST_CASE("geometry: weld a triangle soup back into a closed mesh") {
    const TriangleMesh s = make_icosphere(1.0, 2);
    TriangleMesh soup;
    for (std::size_t t = 0; t < s.size(); ++t) {
        for (int k = 0; k < 3; ++k) {
            // Each copy jittered by up to 1e-9 (well inside the tolerance below).
            const double j = 1e-9 * static_cast<double>((t * 3 + k) % 7) / 7.0;
            soup.vertices.push_back(s.corner(t, k) + Vec3(j, -j, j));
        }
        const int b = static_cast<int>(3 * t);
        soup.triangles.push_back({b, b + 1, b + 2});
    }
    soup.vertices.emplace_back(9, 9, 9);  // unused: dropped
    TriangleMesh w = soup;
    weld_vertices(w, default_weld_tolerance(w));
    CHECK(default_weld_tolerance(soup) == doctest::Approx(1e-6 * std::sqrt(12.0)).epsilon(1e-6));  // box diagonal 2 sqrt 3
    CHECK(w.vertices.size() == s.vertices.size());
    for (std::size_t t = 0; t < s.size(); ++t)
        for (int k = 0; k < 3; ++k) CHECK((w.corner(t, k) - s.corner(t, k)).norm() < 1e-8);
    // Exact welding keeps the jittered copies apart, except those not jittered.
    TriangleMesh e = soup;
    weld_vertices(e, 0.0);
    CHECK(e.vertices.size() > s.vertices.size());
    CHECK(e.vertices.size() < soup.vertices.size() - 1);
}
