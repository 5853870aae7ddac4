// The induced-dipole path: the point dipole as a water source (its potential,
// gradient and image in an insulating plane), and the path against the exact
// path for a small sphere beside a fish-like body, the error falling as the
// sphere moves away.
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "solver//coupled_solve.hpp"
#include "solver/dipole_path.hpp"
#include "solver/incident_field.hpp"
#include "solver/polarization.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

Scene<double> fish_scene() {
    Scene<double> scene;
    scene.water_conductivity = 0.01;
    Surface<double> body;
    body.mesh = make_ellipsoid(Vec3(0.06, 0.012, 0.01), 0.012);
    body.mesh.name = "body";
    body.kind = InterfaceKind::membrane;
    body.inner_conductivity = 1.0;
    body.membrane_resistance = 0.2;
    scene.surfaces.push_back(body);
    scene.sources.push_back({Vec3(0.04, 0, 0), 1e-4});
    scene.sources.push_back({Vec3(-0.04, 0, 0), -1e-4});
    return scene;
}

Surface<double> sphere(const Vec3& centre, double radius, double conductivity) {
    Surface<double> s;
    s.mesh = make_icosphere(radius, 3);
    s.mesh.name = "object";
    translate(s.mesh, centre);
    s.kind = InterfaceKind::contact;
    s.inner_conductivity = conductivity;
    return s;
}

Eigen::VectorXd transdermal(const Solution<double>& s) {
    return s.surfaces.front().inner_potential - s.surfaces.front().outer_potential;
}

}  // namespace

TEST_CASE("a point dipole in the water: potential p.r/(4 pi r^3), its gradient, and its image") {
    // Potential of a dipole (any electrostatics text; Jackson 1999 §4.1), here in
    // the V m^2 convention of induced_dipole_moment.
    Scene<double> scene;
    scene.water_conductivity = 0.05;
    scene.dipoles.push_back({Vec3(0.01, -0.02, 0.03), Vec3(2e-6, -1e-6, 3e-6)});
    const IncidentField<double> field(scene, {});
    const Vec3 x(0.05, 0.02, -0.01), r = x - scene.dipoles[0].position;
    CHECK(field.potential(x) ==
          doctest::Approx(scene.dipoles[0].moment.dot(r) / (4 * M_PI * std::pow(r.norm(), 3))).epsilon(1e-14));
    const Vec3 n = Vec3(1, -2, 2).normalized();
    const double h = 1e-6;
    const double fd = (field.potential(x + h * n) - field.potential(x - h * n)) / (2 * h);
    CHECK(field.normal_derivative(x, n) == doctest::Approx(fd).epsilon(1e-7));

    SUBCASE("an insulating plane takes no current: the normal derivative vanishes on it") {
        scene.images = plane_images<double>(InsulatingPlane{Vec3(0, 0, 0.05), Vec3::UnitZ()});
        const IncidentField<double> bounded(scene, {});
        for (const Vec3& on : {Vec3(0, 0, 0.05), Vec3(0.03, -0.04, 0.05)}) {
            CHECK(std::abs(bounded.normal_derivative(on, Vec3::UnitZ())) <
                  1e-12 * std::abs(bounded.normal_derivative(on, Vec3::UnitX())));
            CHECK(std::abs(bounded.potential(on)) > 0);
        }
    }
}

TEST_CASE("the dipole path approaches the exact path as a small sphere moves away from the body") {
    const Scene<double> body = fish_scene();
    const FixedPart<double> fixed(body, kQuad);
    const double a = 0.002, sigma = 0.1;  // a good conductor: the dipole factor K = 0.75
    const Matrix3<double> m = ellipsoid_polarization(Eigen::Vector3d(a, a, a), Eigen::Matrix3d::Identity(), sigma, 0.01);
    const Vec3 direction = Vec3(0.3, 1.0, 0.2).normalized();
    double previous = INFINITY;
    // Centre distances from the body's surface, in radii (the surface point below
    // is at y = 0.012 on the body's flank, near enough for these directions).
    for (double radii : {3.0, 5.0, 10.0, 20.0}) {
        CAPTURE(radii);
        const Vec3 centre = Vec3(0.0, 0.012, 0.0) + radii * a * direction;
        Scene<double> full = body;
        full.surfaces.push_back(sphere(centre, a, sigma));
        const MovingBlock<double> block = factor_moving_block(full, {1}, kQuad);
        const Solution<double> exact = solve_coupled(full, {1}, fixed, block, kQuad, CouplingOptions{}).solution;

        Eigen::Matrix3Xd c(3, 1);
        c.col(0) = centre;
        const Eigen::Vector3d e = baseline_field(fixed, c, kQuad).col(0);
        const Eigen::MatrixXd x = unknowns_with_dipoles<double>(fixed, {{centre, m * e}});
        const Solution<double> dipole = unpack_solution(fixed.scene(), fixed.layout(), Eigen::VectorXd(x.col(0)));

        const Eigen::VectorXd base = transdermal(fixed.solution());
        const Eigen::VectorXd d_exact = transdermal(exact) - base, d_dipole = transdermal(dipole) - base;
        const double error = (d_dipole - d_exact).cwiseAbs().maxCoeff() / d_exact.cwiseAbs().maxCoeff();
        MESSAGE(radii << " radii: relative error " << error);
        CHECK(error < previous);
        if (radii >= 5.0) CHECK(error < 0.02);
        previous = error;
    }
}

TEST_CASE("lead fields by reciprocity give the readings of the blocked solve") {
    // A box hull with a current-driven emitter, a grounded return, a floating
    // sensor and a sensor held at 0 V whose current is read.
    Scene<double> robot;
    robot.water_conductivity = 0.05;
    Surface<double> hull;
    hull.mesh = make_box(Vec3(0.2, 0.05, 0.05), 0.012);
    hull.kind = InterfaceKind::sealed;
    hull.panel_electrode.assign(hull.mesh.size(), -1);
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const Vec3 c = hull.mesh.centroid(t);
        if (c.x() > 0.08) hull.panel_electrode[t] = 0;
        else if (c.x() < -0.08) hull.panel_electrode[t] = 1;
        else if (std::abs(c.x()) < 0.015 && c.y() > 0.02) hull.panel_electrode[t] = 2;
        else if (std::abs(c.x() - 0.04) < 0.015 && c.y() > 0.02) hull.panel_electrode[t] = 3;
    }
    robot.surfaces.push_back(hull);
    robot.electrodes = {{"emitter", ElectrodeDrive::current, 1e-3},
                        {"return", ElectrodeDrive::voltage, 0.0},
                        {"sensor", ElectrodeDrive::floating, 0.0},
                        {"held", ElectrodeDrive::fixed_potential, 0.0}};
    robot.images = plane_images<double>(InsulatingPlane{Vec3(0, 0, 0.1), Vec3::UnitZ()});
    const FixedPart<double> fixed(robot, kQuad);
    // Readout: the floating sensor's potential, the held sensor's current.
    Eigen::MatrixXd readout = Eigen::MatrixXd::Zero(2, fixed.size());
    readout(0, fixed.layout().electrode_offset + 2) = 1.0;
    for (std::size_t t = 0; t < hull.mesh.size(); ++t)
        if (hull.panel_electrode[t] == 3) readout(1, Eigen::Index(t)) = robot.water_conductivity * hull.mesh.area(t);
    const LeadFields<double> lead(fixed, readout);
    std::vector<PointDipole<double>> dipoles = {{Vec3(0.0, 0.08, 0.0), Vec3(1e-7, 2e-7, -1e-7)},
                                                {Vec3(0.05, -0.06, 0.04), Vec3(0.0, -3e-7, 0.0)}};
    const Eigen::MatrixXd change = lead.readings_change(dipoles);
    const Eigen::MatrixXd x = unknowns_with_dipoles<double>(fixed, dipoles);
    for (int j = 0; j < 2; ++j) {
        const Solution<double> s = unpack_solution(fixed.scene(), fixed.layout(), Eigen::VectorXd(x.col(j)));
        const double dv = s.electrode_potential[2] - fixed.solution().electrode_potential[2];
        const double di = s.electrode_current[3] - fixed.solution().electrode_current[3];
        CHECK(std::abs(dv) > 0);
        CHECK(std::abs(di) > 0);
        CHECK(change(0, j) == doctest::Approx(dv).epsilon(1e-9));
        CHECK(change(1, j) == doctest::Approx(di).epsilon(1e-9));
    }
}
