// The multi-domain system on problems with exact answers that exercise each
// interface kind, electrode drive, the image Green's function and the field
// and potential evaluation at points.
#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "solver//bem_system.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

namespace {

constexpr double kWater = 0.01;  // S/m
const QuadratureOptions kQuad{};

Surface<double> electrode_sphere(double radius, int level) {
    Surface<double> s;
    s.mesh = make_icosphere(radius, level);
    s.mesh.name = "electrode";
    s.kind = InterfaceKind::sealed;
    s.panel_electrode.assign(s.mesh.size(), 0);
    return s;
}

}  // namespace

TEST_CASE("a spherical electrode driven by a current has the spreading resistance 1/(4 pi sigma a)") {
    // Ohm's law for radial current from a sphere in an unbounded medium:
    // U = I / (4 pi sigma a) (any electrostatics text, e.g. Jackson 1999 §1.6 by analogy).
    const double a = 0.01, current = 1e-3;
    Scene<double> scene;
    scene.water_conductivity = kWater;
    scene.surfaces.push_back(electrode_sphere(a, 3));
    scene.electrodes.push_back({"e", ElectrodeDrive::current, current});
    const auto sol = solve_scene(scene, kQuad);
    CHECK(sol.electrode_current[0] == doctest::Approx(current).epsilon(1e-10));
    CHECK(sol.electrode_potential[0] == doctest::Approx(current / (4 * M_PI * kWater * a)).epsilon(1e-3));

    SUBCASE("driven by a voltage it draws the current of the same resistance") {
        scene.electrodes[0] = {"e", ElectrodeDrive::voltage, 1.0};
        const auto v = solve_scene(scene, kQuad);
        CHECK(v.electrode_potential[0] == doctest::Approx(1.0));
        CHECK(v.electrode_current[0] == doctest::Approx(4 * M_PI * kWater * a).epsilon(1e-3));
    }
    SUBCASE("the potential at a point outside is that of a point source") {
        Eigen::Matrix3Xd x(3, 2);
        x.col(0) = Vec3(0.03, 0.0, 0.0);
        x.col(1) = Vec3(0.0, -0.05, 0.04);
        const auto phi = potential_at(scene, sol, x, kQuad);
        for (int i = 0; i < 2; ++i)
            CHECK(phi(i) == doctest::Approx(current / (4 * M_PI * kWater * x.col(i).norm())).epsilon(2e-3));
        // Field of a point source: I r / (4 pi sigma r^3).
        const auto e = field_at(scene, sol, x, kQuad);
        for (int i = 0; i < 2; ++i) {
            const Vec3 r = x.col(i);
            const Vec3 exact = current * r / (4 * M_PI * kWater * std::pow(r.norm(), 3));
            CHECK((e.col(i) - exact).norm() / exact.norm() < 3e-3);
        }
    }
}

TEST_CASE("an electrode below an insulating plane sees its image") {
    // Method of images (Jackson 1999 §2.1): a small sphere of radius a at depth h
    // under an insulating plane has U ~ I / (4 pi sigma) (1/a + 1/(2h)), with a
    // relative error of order (a / 2h)^3 from the image's non-uniform potential.
    const double a = 0.005, h = 0.05, current = 1e-3;
    Scene<double> scene;
    scene.water_conductivity = kWater;
    scene.images = plane_images<double>(InsulatingPlane{Vec3(0, 0, h), Vec3(0, 0, 1)});
    scene.surfaces.push_back(electrode_sphere(a, 3));
    scene.electrodes.push_back({"e", ElectrodeDrive::current, current});
    const auto sol = solve_scene(scene, kQuad);
    const double expected = current / (4 * M_PI * kWater) * (1 / a + 1 / (2 * h));
    CHECK(sol.electrode_potential[0] == doctest::Approx(expected).epsilon(2e-3));
    // Near the plane the field is that of the source and its image, I r / (4 pi sigma r^3)
    // summed; it lies along the plane (the plane is insulating).
    Eigen::Matrix3Xd x(3, 1);
    x.col(0) = Vec3(0.02, 0.01, h - 0.002);
    const auto e = field_at(scene, sol, x, kQuad);
    Vec3 exact = Vec3::Zero();
    for (const Vec3& pole : {Vec3(0, 0, 0), Vec3(0, 0, 2 * h)}) {
        const Vec3 r = Vec3(x.col(0)) - pole;
        exact += current * r / (4 * M_PI * kWater * std::pow(r.norm(), 3));
    }
    CHECK((e.col(0) - exact).norm() < 3e-3 * exact.norm());
}

TEST_CASE("inside a membrane-covered sphere in a uniform field the field is uniform") {
    // Thin resistive membrane, uniform field E along z: inside phi = C r cos(theta) with
    // C = -s_out (E + 2 beta) / s_in, beta = E (R - g) / (R + 2 g), g = (R + rho s_in) s_out / s_in
    // (separation of variables with the membrane jump condition; the same boundary-value
    // problem as Kotnik, Bobanovic & Miklavcic 1997 in the thin-membrane limit).
    const double R = 0.01, s_in = 0.5, s_out = kWater, rho = 1.0, E = 1.0;
    Scene<double> scene;
    scene.water_conductivity = s_out;
    scene.uniform_field = Vec3(0, 0, E);
    Surface<double> cell;
    cell.mesh = make_icosphere(R, 3);
    cell.mesh.name = "cell";
    cell.kind = InterfaceKind::membrane;
    cell.inner_conductivity = s_in;
    cell.membrane_resistance = rho;
    scene.surfaces.push_back(cell);
    const auto sol = solve_scene(scene, kQuad);
    const double g = (R + rho * s_in) * s_out / s_in;
    const double beta = E * (R - g) / (R + 2 * g);
    const double C = -s_out * (E + 2 * beta) / s_in;
    Eigen::Matrix3Xd x(3, 2);
    x.col(0) = Vec3(0.002, 0.001, 0.004);
    x.col(1) = Vec3(-0.003, 0.0, -0.005);
    const auto phi = potential_at(scene, sol, x, kQuad);
    for (int i = 0; i < 2; ++i) CHECK(phi(i) == doctest::Approx(C * x(2, i)).epsilon(5e-3));
    const auto e = field_at(scene, sol, x, kQuad);
    CHECK(e(2, 0) == doctest::Approx(-C).epsilon(5e-3));
    CHECK(std::abs(e(0, 0)) < 1e-2 * std::abs(C));
    // Outside: the dipole field beta R^3 cos(theta) / r^2 on top of -E z.
    Eigen::Matrix3Xd y(3, 1);
    y.col(0) = Vec3(0.0, 0.0, 0.03);
    CHECK(potential_at(scene, sol, y, kQuad)(0) == doctest::Approx(-E * 0.03 + beta * R * R * R / (0.03 * 0.03)).epsilon(2e-3));
}

TEST_CASE("complex arithmetic with real data reproduces the real solution") {
    Scene<double> real;
    real.water_conductivity = kWater;
    real.surfaces.push_back(electrode_sphere(0.01, 2));
    real.electrodes.push_back({"e", ElectrodeDrive::current, 1e-3});
    Surface<double> object;
    object.mesh = make_icosphere(0.008, 2);
    translate(object.mesh, Vec3(0.04, 0, 0));
    object.mesh.name = "object";
    object.kind = InterfaceKind::membrane;
    object.inner_conductivity = 0.3;
    object.membrane_resistance = 0.05;
    real.surfaces.push_back(object);

    Scene<Complex> cplx;
    cplx.water_conductivity = kWater;
    for (const auto& s : real.surfaces) {
        Surface<Complex> c;
        c.mesh = s.mesh, c.kind = s.kind, c.panel_electrode = s.panel_electrode;
        c.inner_conductivity = s.inner_conductivity, c.membrane_resistance = s.membrane_resistance;
        cplx.surfaces.push_back(c);
    }
    cplx.electrodes.push_back({"e", ElectrodeDrive::current, Complex(1e-3, 0)});
    const auto a = solve_scene(real, kQuad);
    const auto b = solve_scene(cplx, kQuad);
    for (int s = 0; s < 2; ++s) {
        CHECK((b.surfaces[s].outer_potential.real() - a.surfaces[s].outer_potential).norm() <
              1e-12 * a.surfaces[s].outer_potential.norm());
        CHECK(b.surfaces[s].outer_potential.imag().norm() < 1e-12 * a.surfaces[s].outer_potential.norm());
    }
}

TEST_CASE("sources inside sealed surfaces and points inside them are refused") {
    Scene<double> scene;
    scene.water_conductivity = kWater;
    scene.surfaces.push_back(electrode_sphere(0.01, 1));
    scene.surfaces[0].mesh.name = "hull";
    scene.electrodes.push_back({"e", ElectrodeDrive::floating, 0.0});
    scene.sources.push_back({Vec3(0.001, 0, 0), 1e-3});
    CHECK_THROWS_WITH_AS(solve_scene(scene, kQuad), doctest::Contains("inside 'hull'"), InputError);
    CHECK(enclosing_surface(scene, Vec3(0.001, 0, 0)) == 0);
    CHECK(enclosing_surface(scene, Vec3(0.02, 0, 0)) == -1);
}

TEST_CASE("blocks and solutions indexed by a layout of another scene, or a row selected twice, are internal errors") {
    Scene<double> one;
    one.water_conductivity = kWater;
    one.surfaces.push_back(electrode_sphere(0.01, 1));
    one.electrodes.push_back({"e", ElectrodeDrive::current, 1e-3});
    Scene<double> two = one;
    Surface<double> other = electrode_sphere(0.01, 1);
    translate(other.mesh, Vec3(0.05, 0, 0));
    two.surfaces.push_back(other);
    const SystemLayout layout_of_two = system_layout(two);
    const std::vector<Eigen::Index> first{0, 1};
    CHECK_THROWS_WITH_AS(assemble_block(one, layout_of_two, kQuad, first, first),
                         doctest::Contains("the layout was made for this scene"), InternalError);
    const VectorX<double> x = VectorX<double>::Zero(layout_of_two.size);
    CHECK_THROWS_AS(unpack_solution(one, layout_of_two, x), InternalError);
    const SystemLayout layout_of_one = system_layout(one);
    CHECK_THROWS_WITH_AS(assemble_block(one, layout_of_one, kQuad, {0, 1, 0}, first),
                         doctest::Contains("no row or column is selected twice"), InternalError);
    // The same calls with matching arguments pass the checks.
    CHECK(assemble_block(one, layout_of_one, kQuad, first, first).matrix.rows() == 2);
}
