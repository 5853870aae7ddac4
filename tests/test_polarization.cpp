// Polarization tensors: the closed forms for ellipsoids against the published
// depolarization factors, and the boundary-element tensor of meshed objects
// against the closed forms, converging as the mesh is refined.
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/polarization.hpp"
#include "verify/exact_solutions.hpp"

#include <Eigen/Geometry>
#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};
constexpr double kWater = 0.02;  // S/m

template <class S>
Scene<S> one_object(TriangleMesh mesh, InterfaceKind kind, S inner) {
    Scene<S> scene;
    scene.water_conductivity = S(kWater);
    Surface<S> s;
    s.mesh = std::move(mesh);
    s.kind = kind;
    s.inner_conductivity = inner;
    if (kind == InterfaceKind::sealed) s.panel_electrode.assign(s.mesh.size(), -1);
    scene.surfaces.push_back(s);
    return scene;
}

template <class S>
double relative_difference(const Matrix3<S>& a, const Matrix3<S>& b) {
    return (a - b).norm() / b.norm();
}

}  // namespace

TEST_CASE("depolarization factors: a third each for a sphere, Osborn's spheroids, and they sum to one") {
    const Eigen::Vector3d sphere = depolarization_factors(Eigen::Vector3d(0.3, 0.3, 0.3));
    for (int i = 0; i < 3; ++i) CHECK(sphere(i) == doctest::Approx(1.0 / 3.0).epsilon(1e-13));
    // Osborn 1945, Phys. Rev. 67:351 (closed forms for spheroids, in verify/exact_solutions).
    for (double ratio : {0.2, 0.5, 2.0, 5.0}) {
        CAPTURE(ratio);
        const Eigen::Vector3d n = depolarization_factors(Eigen::Vector3d(ratio, 1.0, 1.0));
        const double axial = exact::spheroid_axial_depolarization(ratio, 1.0);
        CHECK(n(0) == doctest::Approx(axial).epsilon(1e-12));
        CHECK(n(1) == doctest::Approx((1.0 - axial) / 2).epsilon(1e-12));
    }
    // Stoner 1945: N_a + N_b + N_c = 1 for every ellipsoid.
    const Eigen::Vector3d general = depolarization_factors(Eigen::Vector3d(1.0, 2.5, 0.4));
    CHECK(general.sum() == doctest::Approx(1.0).epsilon(1e-13));
    CHECK(general(2) > general(0));  // the shortest axis depolarizes most
    CHECK(general(0) > general(1));
}

TEST_CASE("the ellipsoid tensor of a sphere is Maxwell's 4 pi a^3 K, conductor and insulator limits included") {
    // Sphere in a uniform field (Jackson, Classical Electrodynamics, §4.4, dielectric form):
    // p = 4 pi a^3 (s_in - s_out) / (s_in + 2 s_out) E.
    const double a = 0.004;
    const Eigen::Vector3d axes(a, a, a);
    for (double inner : {0.0, 0.001, 0.05, 3.0}) {
        const Matrix3<double> m = ellipsoid_polarization(axes, Eigen::Matrix3d::Identity(), inner, kWater);
        const double expected = 4 * M_PI * std::pow(a, 3) * exact::sphere_dipole_factor(inner, kWater);
        CHECK(relative_difference<double>(m, expected * Eigen::Matrix3d::Identity()) < 1e-13);
    }
    const Eigen::Matrix3d conductor = conducting_ellipsoid_polarization(axes, Eigen::Matrix3d::Identity());
    CHECK(relative_difference<double>(conductor, 4 * M_PI * std::pow(a, 3) * Eigen::Matrix3d::Identity()) < 1e-13);
    // The conductor is the limit of a large conductivity.
    const Eigen::Vector3d spheroid(0.01, 0.004, 0.004);
    CHECK(relative_difference<double>(ellipsoid_polarization(spheroid, Eigen::Matrix3d::Identity(), 1e9, kWater),
                                      conducting_ellipsoid_polarization(spheroid, Eigen::Matrix3d::Identity())) < 1e-9);
    // Complex conductivity: the Maxwell-Wagner form of the same factor.
    const Complex inner(0.01, 0.03), water(kWater, 0.001);
    const Matrix3<Complex> mc = ellipsoid_polarization(axes, Eigen::Matrix3d::Identity(), inner, water);
    CHECK(std::abs(mc(1, 1) - 4 * M_PI * std::pow(a, 3) * exact::sphere_dipole_factor(inner, water)) <
          1e-13 * std::abs(mc(1, 1)));
}

TEST_CASE("the computed tensor of a meshed sphere converges to Maxwell's") {
    const double a = 0.005;
    SUBCASE("an insulator: the error falls about fourfold per refinement (second order)") {
        const Matrix3<double> exact_m =
            ellipsoid_polarization(Eigen::Vector3d(a, a, a), Eigen::Matrix3d::Identity(), 0.0, kWater);
        double previous = INFINITY;
        for (int level : {1, 2, 3}) {
            const Scene<double> scene = one_object<double>(make_icosphere(a, level), InterfaceKind::sealed, 0.0);
            const double error = relative_difference<double>(computed_polarization(scene, 0, kQuad), exact_m);
            MESSAGE("level " << level << ": relative error " << error);
            CHECK(error < previous / 3);
            previous = error;
        }
        CHECK(previous < 0.003);  // 1280 panels
    }
    SUBCASE("a conducting sphere is within 1e-3 at every level (its error changes sign)") {
        const Matrix3<double> exact_m =
            ellipsoid_polarization(Eigen::Vector3d(a, a, a), Eigen::Matrix3d::Identity(), 0.2, kWater);
        for (int level : {1, 2, 3}) {
            const Scene<double> scene = one_object<double>(make_icosphere(a, level), InterfaceKind::contact, 0.2);
            CHECK(relative_difference<double>(computed_polarization(scene, 0, kQuad), exact_m) < 1e-3);
        }
    }
}

TEST_CASE("the computed tensor of a rotated prolate spheroid matches Stoner's, conductor included") {
    const Eigen::Vector3d semi(0.01, 0.004, 0.004);
    const Eigen::Matrix3d rotation = Eigen::AngleAxisd(0.7, Vec3(1, 2, 0.5).normalized()).toRotationMatrix();
    TriangleMesh mesh = make_ellipsoid(semi, 0.003);
    transform(mesh, rotation, Vec3(0.3, -0.1, 0.05));  // position must not matter
    SUBCASE("conducting") {
        const Scene<double> scene = one_object<double>(mesh, InterfaceKind::contact, 0.5);
        const Matrix3<double> m = computed_polarization(scene, 0, kQuad);
        CHECK(relative_difference<double>(m, ellipsoid_polarization(semi, rotation, 0.5, kWater)) < 0.02);
        CHECK((m - m.transpose()).norm() < 0.01 * m.norm());  // symmetric, as the exact tensor
    }
    SUBCASE("perfectly conducting: a floating electrode") {
        Scene<double> scene = one_object<double>(mesh, InterfaceKind::sealed, 0.0);
        scene.surfaces[0].panel_electrode.assign(mesh.size(), 0);
        scene.electrodes.push_back({"object:s", ElectrodeDrive::voltage, 5.0});  // the drive is ignored
        const Matrix3<double> m = computed_polarization(scene, 0, kQuad);
        CHECK(relative_difference<double>(m, conducting_ellipsoid_polarization(semi, rotation)) < 0.02);
    }
    SUBCASE("complex conductivity") {
        const Complex inner(0.001, 0.04);
        Scene<Complex> scene = one_object<Complex>(mesh, InterfaceKind::contact, inner);
        scene.water_conductivity = Complex(kWater, 0.0);
        const Matrix3<Complex> m = computed_polarization(scene, 0, kQuad);
        CHECK(relative_difference<Complex>(m, ellipsoid_polarization<Complex>(semi, rotation, inner, Complex(kWater)))
              < 0.02);
    }
}

TEST_CASE("a transparent object (as conducting as the water) is invisible, up to a mesh error that falls with refinement") {
    // Exact answer: no perturbation at all (K = 0 in Maxwell's formula). The
    // discrete model leaves a spurious moment, which sets the floor of the
    // exact path's accuracy for weakly contrasting objects.
    const double a = 0.005;
    double previous = INFINITY;
    for (int level : {1, 2, 3}) {
        const Scene<double> scene = one_object<double>(make_icosphere(a, level), InterfaceKind::contact, kWater);
        const double spurious = computed_polarization(scene, 0, kQuad).norm() / (std::sqrt(3.0) * 4 * M_PI * std::pow(a, 3));
        MESSAGE("level " << level << ": spurious moment " << spurious << " of a perfect conductor's");
        CHECK(spurious < previous);
        previous = spurious;
    }
    CHECK(previous < 0.01);
}
