// A tank: closed insulating walls around the water (solver/tank.hpp), checked
// against exact solutions of the interior Neumann problem and against open water
// and the insulating plane's image solution as the tank grows.
#include "geometry/cylinder_mesh.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/coupled_solve.hpp"
#include "solver/dipole_path.hpp"
#include "solver/image_series.hpp"
#include "solver/tank.hpp"
#include "tests/scene_fixtures.hpp"

#include <doctest/doctest.h>

#include <chrono>
#include <cmath>
#include <iostream>
#include <vector>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};
constexpr double kSigma = 0.05;  // S/m

// Potential of point sources in open water (sign and 1/(4 pi sigma r): common practice).
double free_potential(const std::vector<PointSource<double>>& sources, const Vec3& x) {
    double phi = 0;
    for (const auto& s : sources) phi += s.current / (4 * M_PI * kSigma * (x - s.position).norm());
    return phi;
}

// The same with the insulating plane z = 0 above the water: each source plus its
// mirror image of the same sign (method of images; e.g. Jackson, Classical
// Electrodynamics, ch. 2; for the Neumann condition the image has the same sign).
double plane_potential(const std::vector<PointSource<double>>& sources, const Vec3& x) {
    double phi = free_potential(sources, x);
    for (const auto& s : sources) {
        const Vec3 image(s.position.x(), s.position.y(), -s.position.z());
        phi += s.current / (4 * M_PI * kSigma * (x - image).norm());
    }
    return phi;
}

Scene<double> tank_scene(TriangleMesh walls) {
    Scene<double> scene;
    scene.water_conductivity = kSigma;
    walls.name = "tank";
    scene.surfaces.push_back(make_tank_surface<double>(std::move(walls)));
    return scene;
}

double wall_mean(const Scene<double>& scene, const Solution<double>& solution) {
    const int t = tank_index(scene);
    const TriangleMesh& mesh = scene.surfaces[std::size_t(t)].mesh;
    double sum = 0, area = 0;
    for (std::size_t k = 0; k < mesh.size(); ++k) {
        sum += mesh.area(k) * solution.surfaces[std::size_t(t)].outer_potential(Eigen::Index(k));
        area += mesh.area(k);
    }
    return sum / area;
}

// Lines from `at` toward `to` (excluded at, included to), the first step
// `first`, each next one `growth` times longer; the last cell absorbs the rest.
std::vector<double> steps_toward(double at, double to, double first, double growth) {
    std::vector<double> out;
    const double dir = to > at ? 1.0 : -1.0;
    for (double x = at, step = first; dir * (to - x) > 0; step *= growth) {
        x += dir * step;
        if (dir * (to - x) < 0.5 * step * growth) x = to;
        out.push_back(x);
    }
    return out;
}

// Lines from lo to hi graded toward `at` (lo <= at <= hi).
std::vector<double> graded_lines(double lo, double hi, double at, double first, double growth) {
    const std::vector<double> below = steps_toward(at, lo, first, growth), above = steps_toward(at, hi, first, growth);
    std::vector<double> lines(below.rbegin(), below.rend());
    lines.push_back(at);
    lines.insert(lines.end(), above.begin(), above.end());
    return lines;
}

}  // namespace

TEST_CASE("a dipole at the centre of a spherical tank: the exact interior Neumann solution") {
    // Exact solution (derived here): inside an insulating sphere of radius R a
    // dipole p at the centre gives phi = p.r / (4 pi) (1/r^3 + 2/R^3): the second
    // term is harmonic and makes d phi / dr = p cos(theta) / (4 pi) (-2/R^3 + 2/R^3)
    // vanish at r = R. The wall mean of phi is zero (odd in r), so the reference adds
    // no constant. The tank's part is the uniform field -2 p / (4 pi R^3).
    const double radius = 0.1;
    const Vec3 p(2e-6, 0, 0);  // V m^2
    const Eigen::Matrix3Xd probes = (Eigen::Matrix3Xd(3, 4) << 0.02, -0.03, 0.0, 0.025,  //
                                     0.0, 0.01, 0.03, -0.02,                             //
                                     0.01, 0.0, -0.02, 0.03)
                                        .finished();
    double previous = 1e300;
    std::vector<double> errors;
    for (int level : {1, 2, 3}) {
        Scene<double> scene = tank_scene(make_icosphere(radius, level));
        scene.dipoles.push_back({Vec3::Zero(), p});
        const Solution<double> solution = solve_scene(scene, kQuad);
        const Eigen::VectorXd phi = potential_at(scene, solution, probes, kQuad);
        double error = 0, correction = 0;
        for (Eigen::Index i = 0; i < probes.cols(); ++i) {
            const Vec3 r = probes.col(i);
            const double open = p.dot(r) / (4 * M_PI * std::pow(r.norm(), 3));
            const double walls = 2 * p.dot(r) / (4 * M_PI * std::pow(radius, 3));
            error = std::max(error, std::abs(phi(i) - open - walls));
            correction = std::max(correction, std::abs(walls));
        }
        const double relative = error / correction;
        MESSAGE("spherical tank, " << scene.surfaces[0].mesh.size() << " panels: error / wall term " << relative
                                   << ", wall mean " << wall_mean(scene, solution));
        CHECK(relative < previous / 2.5);  // refinement by 2 in edge: about 4 expected
        CHECK(std::abs(wall_mean(scene, solution)) < 1e-12 * solution.surfaces[0].outer_potential.cwiseAbs().maxCoeff());
        previous = relative;
        errors.push_back(relative);
    }
    // Observed orders in the panel edge (halved at each level), the second order of
    // flat panels with centroid collocation: both steps above 1.5.
    for (std::size_t k = 1; k < errors.size(); ++k) {
        const double order = std::log2(errors[k - 1] / errors[k]);
        MESSAGE("observed order " << order);
        CHECK(order > 1.5);
    }
    CHECK(previous < 0.05);
}

TEST_CASE("a source pair at the centre of a growing cubic tank tends to open water as (d/L)^3") {
    // Leading correction: the walls answer the pair's dipole moment p = I d with a
    // field ~ p / (sigma L^3) near the centre (exactly 2 p / (4 pi sigma R^3) for a
    // sphere, see the test above; dimensional analysis for the cube), so the
    // relative change of a potential difference over a span s falls as (s/L)^3.
    const double d = 0.02, current = 1e-4;
    const std::vector<PointSource<double>> pair{{Vec3(d / 2, 0, 0), current}, {Vec3(-d / 2, 0, 0), -current}};
    const Vec3 a(0.03, 0.005, 0), b(-0.02, -0.01, 0.01);
    const double open = free_potential(pair, a) - free_potential(pair, b);
    std::vector<double> sizes{0.12, 0.24, 0.48}, errors;
    for (double side : sizes) {
        Scene<double> scene = tank_scene(make_box(Vec3::Constant(side), side / 8));
        scene.sources = pair;
        const Solution<double> solution = solve_scene(scene, kQuad);
        Eigen::Matrix3Xd probes(3, 2);
        probes << a, b;
        const Eigen::VectorXd phi = potential_at(scene, solution, probes, kQuad);
        errors.push_back(std::abs((phi(0) - phi(1)) - open) / std::abs(open));
        MESSAGE("cubic tank L = " << side << " m (" << scene.surfaces[0].mesh.size()
                                  << " panels): relative change of the difference " << errors.back());
        CHECK(std::abs(wall_mean(scene, solution)) < 1e-12 * solution.surfaces[0].outer_potential.cwiseAbs().maxCoeff());
    }
    for (std::size_t i = 1; i < sizes.size(); ++i) {
        const double rate = std::log(errors[i - 1] / errors[i]) / std::log(sizes[i] / sizes[i - 1]);
        MESSAGE("observed exponent " << rate);
        CHECK(rate > 2.7);
        CHECK(rate < 3.3);
    }
}

TEST_CASE("a source pair near one wall of a large tank tends to the insulating plane's image solution") {
    // Box tank whose top face is the plane z = 0; the pair lies 2 cm below it. Lines
    // graded toward the pair so that the near wall is resolved where it matters.
    const double depth = 0.02, current = 1e-4;
    const std::vector<PointSource<double>> pair{{Vec3(0.01, 0, -depth), current}, {Vec3(-0.01, 0, -depth), -current}};
    const Eigen::Matrix3Xd probes =
        (Eigen::Matrix3Xd(3, 3) << 0.03, -0.02, 0.0, 0.0, 0.01, 0.02, -0.015, -0.01, -0.03).finished();
    auto difference = [&](double side, double first) {
        const double half = side / 2;
        const std::array<std::vector<double>, 3> lines{graded_lines(-half, half, 0, first, 1.5),
                                                       graded_lines(-half, half, 0, first, 1.5),
                                                       graded_lines(-side, 0, 0, first, 1.5)};
        Scene<double> scene = tank_scene(make_box_on_lines(lines));
        scene.sources = pair;
        const Solution<double> solution = solve_scene(scene, kQuad);
        const Eigen::VectorXd phi = potential_at(scene, solution, probes, kQuad);
        // Potentials are compared as differences to the first probe: the tank's
        // reference (wall mean zero) differs from open water's (zero far away).
        double worst = 0, scale = 0;
        for (Eigen::Index i = 1; i < probes.cols(); ++i) {
            const double image = plane_potential(pair, probes.col(i)) - plane_potential(pair, probes.col(0));
            worst = std::max(worst, std::abs(phi(i) - phi(0) - image));
            scale = std::max(scale, std::abs(image));
        }
        MESSAGE("tank L = " << side << " m, first spacing " << first << " m (" << scene.surfaces[0].mesh.size()
                            << " panels): relative difference to the image solution " << worst / scale);
        return worst / scale;
    };
    // The far walls' part falls as L^-3 (the test above): from 0.15 m to 0.3 m by about 8.
    // At 0.3 m what is left (~1e-3) is that part and the near wall's discretization
    // together, of similar size and partly cancelling, so halving the first spacing
    // moves it within that floor rather than below it (measured 1.2e-3 and 1.8e-3).
    const double small = difference(0.15, 0.008), large = difference(0.3, 0.008), fine = difference(0.3, 0.004);
    CHECK(large < small / 3);
    CHECK(fine < small / 3);
    CHECK(large < 0.005);
    CHECK(fine < 0.005);
}

TEST_CASE("a tank refuses a net current, sources outside it and a plane") {
    Scene<double> scene = tank_scene(make_box(Vec3::Constant(0.1), 0.03));
    scene.sources.push_back({Vec3(0.01, 0, 0), 1e-4});
    CHECK_THROWS_AS(solve_scene(scene, kQuad), InputError);  // net 1e-4 A into closed walls
    scene.sources.push_back({Vec3(-0.01, 0, 0), -1e-4});
    CHECK_NOTHROW(solve_scene(scene, kQuad));
    Scene<double> outside = scene;
    outside.sources.push_back({Vec3(0.2, 0, 0), 1e-5});
    outside.sources.push_back({Vec3(0.0, 0, 0.01), -1e-5});
    CHECK_THROWS_WITH_AS(solve_scene(outside, kQuad), doctest::Contains("outside the tank 'tank'"), InputError);
    Scene<double> plane = scene;
    plane.images = plane_images<double>(InsulatingPlane{Vec3(0, 0, 0.2), Vec3::UnitZ()});
    CHECK_THROWS_AS(solve_scene(plane, kQuad), InputError);
}

TEST_CASE_TEMPLATE("a compressed fixed part with a tank solves as the dense one, with and without held electrodes", S,
                   double, Complex) {
    // The mixed scene of the compressed solver's tests (a membrane body, a contact
    // object, a hull with electrodes) inside a box tank instead of under a plane. The
    // reference unknown and row join the electrodes' dense border; without an
    // electrode held at a potential its column enters every wall row (solver/tank.hpp).
    for (const bool held : {false, true}) {
        CAPTURE(held);
        Scene<S> scene = fixtures::mixed_scene<S>(S(0.2), S(0.1), 0.02);
        scene.images = ImageSeries<S>{};
        if (held)
            scene.electrodes = {{"drive", ElectrodeDrive::voltage, S(1e-3)},
                                {"ground", ElectrodeDrive::voltage, S(0.0)},
                                {"sense", ElectrodeDrive::floating, S(0.0)}};
        else
            scene.electrodes = {{"drive", ElectrodeDrive::current, S(1e-3)},
                                {"ground", ElectrodeDrive::current, S(-1e-3)},
                                {"sense", ElectrodeDrive::floating, S(0.0)}};
        TriangleMesh walls = make_box(Vec3(0.3, 0.2, 0.16), 0.04);
        walls.name = "tank";
        scene.surfaces.push_back(make_tank_surface<S>(std::move(walls)));
        SolverOptions dense, compressed;
        dense.choice = SystemSolver::dense;
        compressed.choice = SystemSolver::compressed;
        compressed.compression_tolerance = 1e-10;
        compressed.iteration_tolerance = 1e-12;
        const FixedPart<S> a(scene, kQuad, dense), b(scene, kQuad, compressed);
        REQUIRE(b.compressed());
        CHECK(b.report().baseline_iterations > 0);
        CHECK((b.unknowns() - a.unknowns()).norm() < 1e-8 * a.unknowns().norm());
        std::srand(11);
        const MatrixX<S> rhs = MatrixX<S>::Random(a.size(), 2);
        CHECK((b.solve(rhs) - a.solve(rhs)).norm() < 1e-8 * a.solve(rhs).norm());
        CHECK((b.solve_transposed(rhs) - a.solve_transposed(rhs)).norm() < 1e-8 * a.solve_transposed(rhs).norm());
        MESSAGE("held electrodes " << held << ": compressed baseline in " << b.report().baseline_iterations
                                   << " iterations");
    }
    // auto: by size, as without a tank.
    Scene<S> small = fixtures::mixed_scene<S>(S(0.2), S(0.1), 0.02);
    small.images = ImageSeries<S>{};
    small.electrodes = {{"drive", ElectrodeDrive::current, S(1e-3)}, {"ground", ElectrodeDrive::current, S(-1e-3)},
                        {"sense", ElectrodeDrive::floating, S(0.0)}};
    TriangleMesh walls = make_box(Vec3(0.3, 0.2, 0.16), 0.04);
    walls.name = "tank";
    small.surfaces.push_back(make_tank_surface<S>(std::move(walls)));
    SolverOptions automatic;
    automatic.dense_limit = 10;
    CHECK(FixedPart<S>(small, kQuad, automatic).compressed());
}

TEST_CASE("in a tank only the differences of electrode voltages matter") {
    // Two voltage-driven electrodes on an insulating sphere: with no ground at
    // infinity, raising both drives by the same constant changes nothing (the
    // reference fixes the common mode), and their currents balance.
    auto solve = [](double offset) {
        Scene<double> scene = tank_scene(make_box(Vec3::Constant(0.2), 0.04));
        Surface<double> hull;
        hull.mesh = make_icosphere(0.02, 2);
        hull.mesh.name = "hull";
        hull.kind = InterfaceKind::sealed;
        for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
            const double x = hull.mesh.centroid(t).x();
            hull.panel_electrode.push_back(x > 0.012 ? 0 : x < -0.012 ? 1 : -1);
        }
        scene.surfaces.push_back(hull);
        scene.electrodes.push_back({"plus", ElectrodeDrive::voltage, 0.5 + offset});
        scene.electrodes.push_back({"minus", ElectrodeDrive::voltage, -0.5 + offset});
        const Solution<double> s = solve_scene(scene, kQuad);
        CHECK(std::abs(wall_mean(scene, s)) < 1e-12);
        return s;
    };
    const Solution<double> a = solve(0.0), b = solve(3.0);
    CHECK(std::abs(a.electrode_current[0]) > 0);
    CHECK(std::abs(a.electrode_current[0] + a.electrode_current[1]) < 1e-6 * std::abs(a.electrode_current[0]));
    CHECK((a.surfaces[1].outer_potential - b.surfaces[1].outer_potential).cwiseAbs().maxCoeff() < 1e-10);
    CHECK(a.electrode_potential[0] - a.electrode_potential[1] == doctest::Approx(1.0).epsilon(1e-12));
    CHECK(std::abs(a.electrode_current[0] - b.electrode_current[0]) < 1e-9 * std::abs(a.electrode_current[0]));
}

TEST_CASE("the exact and dipole paths work on a fixed part with a tank") {
    // Fixed part: the tank and a membrane-covered body with its organ; a small
    // conducting sphere moves. The exact path solves the same discrete equations
    // as the full solve, so they agree to the GMRES tolerance; the dipole path's
    // blocked solve equals the full solve with that dipole in the water.
    Scene<double> fixed_scene = tank_scene(make_box(Vec3(0.3, 0.2, 0.2), 0.04));
    Surface<double> body;
    body.mesh = make_ellipsoid(Vec3(0.06, 0.012, 0.01), 0.02);
    body.mesh.name = "body";
    body.kind = InterfaceKind::membrane;
    body.inner_conductivity = 1.0;
    body.membrane_resistance = 0.2;
    fixed_scene.surfaces.push_back(body);
    fixed_scene.sources = {{Vec3(0.04, 0, 0), 1e-4}, {Vec3(-0.04, 0, 0), -1e-4}};
    const FixedPart<double> fixed(fixed_scene, kQuad);

    Scene<double> full = fixed_scene;
    Surface<double> object;
    object.mesh = make_icosphere(0.005, 2);
    object.mesh.name = "object";
    translate(object.mesh, Vec3(0.01, 0.03, 0));
    object.kind = InterfaceKind::contact;
    object.inner_conductivity = 0.5;
    full.surfaces.push_back(object);
    const MovingBlock<double> block = factor_moving_block(full, {2}, kQuad);
    const Solution<double> direct = solve_scene(full, kQuad);
    const CoupledSolution<double> coupled = solve_coupled(full, {2}, fixed, block, kQuad, CouplingOptions{});
    CHECK(coupled.gmres.converged);
    for (std::size_t s = 0; s < 3; ++s) {
        const double scale = direct.surfaces[s].outer_potential.cwiseAbs().maxCoeff();
        CHECK((direct.surfaces[s].outer_potential - coupled.solution.surfaces[s].outer_potential).cwiseAbs().maxCoeff() <
              1e-8 * scale);
    }
    // The object's effect on the skin is resolved, not lost in the tank's reference.
    const Eigen::VectorXd base = fixed.solution().surfaces[1].outer_potential;
    const Eigen::VectorXd change = direct.surfaces[1].outer_potential - base;
    const Eigen::VectorXd change_coupled = coupled.solution.surfaces[1].outer_potential - base;
    CHECK((change - change_coupled).cwiseAbs().maxCoeff() < 1e-6 * change.cwiseAbs().maxCoeff());

    const PointDipole<double> dipole{Vec3(0.01, 0.03, 0), Vec3(1e-8, 2e-8, 0)};
    const Eigen::MatrixXd x = unknowns_with_dipoles<double>(fixed, {dipole});
    const Solution<double> by_path = unpack_solution(fixed.scene(), fixed.layout(), Eigen::VectorXd(x.col(0)));
    Scene<double> with_dipole = fixed_scene;
    with_dipole.dipoles.push_back(dipole);
    const Solution<double> by_solve = solve_scene(with_dipole, kQuad);
    const Eigen::VectorXd d_path = by_path.surfaces[1].outer_potential - base;
    const Eigen::VectorXd d_solve = by_solve.surfaces[1].outer_potential - base;
    CHECK(d_solve.cwiseAbs().maxCoeff() > 0);
    CHECK((d_path - d_solve).cwiseAbs().maxCoeff() < 1e-9 * d_solve.cwiseAbs().maxCoeff());
}

TEST_CASE("the tank's one-time cost: the fixed part with and without it (printed figures)") {
    // Not a timed test: it prints the figures the report quotes (run with -s) and
    // checks only that the tank adds its wall panels and one reference unknown.
    Scene<double> body;
    body.water_conductivity = kSigma;
    Surface<double> fish;
    fish.mesh = make_ellipsoid(Vec3(0.08, 0.015, 0.012), 0.025);  // a coarse body: the figures in the report are at 0.006
    fish.mesh.name = "body";
    fish.kind = InterfaceKind::membrane;
    fish.inner_conductivity = 1.0;
    fish.membrane_resistance = 0.2;
    body.surfaces.push_back(fish);
    body.sources = {{Vec3(0.06, 0, 0), 1e-4}, {Vec3(-0.06, 0, 0), -1e-4}};
    Scene<double> tanked = body;
    TriangleMesh walls = make_box(Vec3(0.4, 0.3, 0.2), 0.04);
    walls.name = "tank";
    tanked.surfaces.push_back(make_tank_surface<double>(walls));
    const FixedPart<double> open(body, kQuad), closed(tanked, kQuad);
    CHECK(closed.size() == open.size() + Eigen::Index(walls.size()) + 1);
    MESSAGE("fixed part without tank: " << open.size() << " unknowns, assembly " << open.assembly_seconds()
                                        << " s, LU " << open.factor_seconds() << " s");
    MESSAGE("fixed part with tank (" << walls.size() << " wall panels): " << closed.size() << " unknowns, assembly "
                                     << closed.assembly_seconds() << " s, LU " << closed.factor_seconds() << " s");
}

TEST_CASE("a cylindrical tank's walls: closed, valid, outward, the volume of the inscribed polygon") {
    const double radius = 0.2, height = 0.15, edge = 0.03;
    const TriangleMesh m = make_cylinder(radius, height, edge);
    CHECK_NOTHROW(require_valid_mesh(m, "cylinder"));
    // The side's vertices lie on the circle, so the mesh encloses the prism on the
    // inscribed n-gon: n/2 sin(2 pi/n) r^2 h (elementary geometry), below pi r^2 h.
    int around = 0;
    for (const Vec3& v : m.vertices)
        if (std::abs(v.z() + 0.5 * height) < 1e-12 && std::abs(Eigen::Vector2d(v.x(), v.y()).norm() - radius) < 1e-12)
            ++around;
    const double polygon = 0.5 * around * std::sin(2 * M_PI / around) * radius * radius * height;
    CHECK(mesh_volume(m) == doctest::Approx(polygon).epsilon(1e-12));
    CHECK(polygon < M_PI * radius * radius * height);
    CHECK(around >= int(2 * M_PI * radius / edge));
    double longest = 0;
    for (std::size_t t = 0; t < m.size(); ++t)
        for (int k = 0; k < 3; ++k) longest = std::max(longest, (m.corner(t, k) - m.corner(t, (k + 1) % 3)).norm());
    MESSAGE("cylinder: " << m.size() << " panels, longest edge " << longest << " m for a target of " << edge << " m");
    CHECK(longest < 2.0 * edge);
}
