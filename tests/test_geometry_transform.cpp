// Tests of geometry/transform: rotations, translations and mirrors against hand values.
#include "geometry/input_error.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

namespace {

constexpr double kPi = 3.14159265358979323846;

bool near(const Vec3& a, const Vec3& b, double tol = 1e-14) { return (a - b).norm() <= tol; }

TriangleMesh tetrahedron() {
    TriangleMesh t;
    t.name = "tet";
    t.vertices = {Vec3(0, 0, 0), Vec3(1, 0, 0), Vec3(0, 1, 0), Vec3(0, 0, 1)};
    t.triangles = {{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}};
    t.region.assign(4, 0);
    return t;
}

}  // namespace

TEST_CASE("geometry: axis-angle rotation") {
    // Quarter turn about +z takes x to y and y to -x (right-hand rule).
    const Eigen::Matrix3d r = rotation_from_axis_angle(Vec3(0, 0, 5), kPi / 2);
    CHECK(near(r * Vec3(1, 0, 0), Vec3(0, 1, 0)));
    CHECK(near(r * Vec3(0, 1, 0), Vec3(-1, 0, 0)));
    CHECK(near(r * Vec3(0, 0, 1), Vec3(0, 0, 1)));
    // A third of a turn about (1,1,1) permutes the axes x -> y -> z.
    const Eigen::Matrix3d c = rotation_from_axis_angle(Vec3(1, 1, 1), 2 * kPi / 3);
    CHECK(near(c * Vec3(1, 0, 0), Vec3(0, 1, 0)));
    CHECK(near(c * Vec3(0, 1, 0), Vec3(0, 0, 1)));
    CHECK_THROWS_AS(rotation_from_axis_angle(Vec3::Zero(), 1.0), InputError);
}

TEST_CASE("geometry: yaw, pitch and roll") {
    CHECK(near(rotation_from_yaw_pitch_roll(kPi / 2, 0, 0) * Vec3(1, 0, 0), Vec3(0, 1, 0)));   // nose left
    CHECK(near(rotation_from_yaw_pitch_roll(0, kPi / 2, 0) * Vec3(1, 0, 0), Vec3(0, 0, -1)));  // nose down
    CHECK(near(rotation_from_yaw_pitch_roll(0, 0, kPi / 2) * Vec3(0, 1, 0), Vec3(0, 0, 1)));   // roll about x
    // Intrinsic order: yaw first, then pitch about the turned y axis (now -x).
    CHECK(near(rotation_from_yaw_pitch_roll(kPi / 2, kPi / 2, 0) * Vec3(1, 0, 0), Vec3(0, 0, -1)));
    CHECK(near(rotation_from_yaw_pitch_roll(kPi / 2, kPi / 2, 0) * Vec3(0, 0, 1), Vec3(0, 1, 0)));
}

TEST_CASE("geometry: transform moves vertices and keeps the solid") {
    TriangleMesh m = tetrahedron();
    const Eigen::Matrix3d r = rotation_from_axis_angle(Vec3(0, 0, 1), kPi / 2);
    transform(m, r, Vec3(10, 0, 0));
    CHECK(near(m.vertices[1], Vec3(10, 1, 0)));
    CHECK(near(m.vertices[2], Vec3(9, 0, 0)));
    CHECK(near(m.vertices[3], Vec3(10, 0, 1)));
    CHECK(mesh_volume(m) == doctest::Approx(1.0 / 6.0).epsilon(1e-12));
    translate(m, Vec3(-10, 0, 0));
    CHECK(near(m.vertices[0], Vec3(0, 0, 0)));
    // A reflection matrix is accepted and the panels are reversed: still outward.
    TriangleMesh s = make_icosphere(1.0, 1);
    transform(s, Eigen::Vector3d(-1, 1, 1).asDiagonal(), Vec3::Zero());
    CHECK(mesh_volume(s) > 0.0);
    CHECK(inspect_mesh(s).problems.empty());
}

TEST_CASE("geometry: mirror across a plane") {
    TriangleMesh m = tetrahedron();
    mirror(m, Vec3(1, 0, 0), Vec3(2, 0, 0));  // plane x = 1, normal given unnormalised
    CHECK(near(m.vertices[0], Vec3(2, 0, 0)));
    CHECK(near(m.vertices[1], Vec3(1, 0, 0)));
    CHECK(near(m.vertices[3], Vec3(2, 0, 1)));
    CHECK(mesh_volume(m) == doctest::Approx(1.0 / 6.0).epsilon(1e-12));  // still outward
    const MeshReport r = inspect_mesh(m);
    CHECK(r.oriented_outward);
    CHECK(r.problems.empty());
    CHECK_THROWS_AS(mirror(m, Vec3::Zero(), Vec3::Zero()), InputError);
    flip_orientation(m);
    CHECK(mesh_volume(m) == doctest::Approx(-1.0 / 6.0).epsilon(1e-12));
}
