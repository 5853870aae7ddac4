// The exact sweep path (factored fixed part + moving surfaces coupled by GMRES)
// against the full dense solve of the same scene: the two solve the same
// discrete equations, so they must agree to the iteration tolerance. Also the
// block assembly against the full matrix, entry for entry.
#include "geometry/internal_check.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "solver//coupled_solve.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <cstring>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

// A fish-like scene: an elongated membrane-covered body with a two-pole organ inside.
template <class S>
Scene<S> fish_scene(S skin_resistance) {
    Scene<S> scene;
    scene.water_conductivity = S(0.01);
    Surface<S> body;
    body.mesh = make_ellipsoid(Vec3(0.06, 0.012, 0.01), 0.02);
    body.mesh.name = "body";
    body.kind = InterfaceKind::membrane;
    body.inner_conductivity = S(1.0);
    body.membrane_resistance = skin_resistance;
    scene.surfaces.push_back(body);
    scene.sources.push_back({Vec3(0.04, 0, 0), S(1e-4)});
    scene.sources.push_back({Vec3(-0.04, 0, 0), S(-1e-4)});
    return scene;
}

template <class S>
Surface<S> sphere_object(const Vec3& centre, double radius, S conductivity) {
    Surface<S> s;
    s.mesh = make_icosphere(radius, 2);
    s.mesh.name = "object";
    translate(s.mesh, centre);
    s.kind = InterfaceKind::contact;
    s.inner_conductivity = conductivity;
    return s;
}

template <class S>
double max_difference(const Solution<S>& a, const Solution<S>& b) {
    double d = 0;
    for (std::size_t s = 0; s < a.surfaces.size(); ++s) {
        d = std::max(d, (a.surfaces[s].outer_potential - b.surfaces[s].outer_potential).cwiseAbs().maxCoeff());
        d = std::max(d, (a.surfaces[s].current_density - b.surfaces[s].current_density).cwiseAbs().maxCoeff() * 1e-3);
    }
    return d;
}

// Perturbation of the body's transdermal voltage (inner - outer) from a solution.
template <class S>
VectorX<S> transdermal(const Solution<S>& s) {
    return s.surfaces.front().inner_potential - s.surfaces.front().outer_potential;
}

// Relative difference of the object's effect on the skin, exact path vs full solve.
template <class S>
double perturbation_difference(const Scene<S>& full, const FixedPart<S>& fixed, const MovingBlock<S>& block) {
    const Solution<S> direct = solve_scene(full, kQuad);
    const CoupledSolution<S> coupled = solve_coupled(full, {1}, fixed, block, kQuad, CouplingOptions{});
    REQUIRE(coupled.gmres.converged);
    const VectorX<S> base = transdermal(fixed.solution());
    const VectorX<S> d_direct = transdermal(direct) - base, d_coupled = transdermal(coupled.solution) - base;
    return (d_direct - d_coupled).cwiseAbs().maxCoeff() / d_direct.cwiseAbs().maxCoeff();
}

}  // namespace

TEST_CASE("a block of the system is the same entries as the full matrix, bit for bit") {
    Scene<double> scene = fish_scene(0.2);
    scene.surfaces.push_back(sphere_object(Vec3(0, 0.03, 0), 0.005, 0.1));
    const LinearSystem<double> full = assemble_system(scene, kQuad);
    const std::vector<Eigen::Index> object = part_unknowns(scene, full.layout, {1});
    const std::vector<Eigen::Index> body = part_unknowns(scene, full.layout, {0});
    CHECK(object.size() + body.size() == std::size_t(full.layout.size));
    const SystemBlock<double> coupling = assemble_block(scene, full.layout, kQuad, body, object);
    const SystemBlock<double> own = assemble_block(scene, full.layout, kQuad, object, object);
    std::size_t mismatches = 0, nonzero = 0;
    for (std::size_t i = 0; i < body.size(); ++i)
        for (std::size_t j = 0; j < object.size(); ++j) {
            mismatches += coupling.matrix(i, j) != full.matrix(body[i], object[j]);
            nonzero += coupling.matrix(i, j) != 0.0;
        }
    for (std::size_t i = 0; i < object.size(); ++i) {
        mismatches += own.rhs(i) != full.rhs(object[i]);
        for (std::size_t j = 0; j < object.size(); ++j) mismatches += own.matrix(i, j) != full.matrix(object[i], object[j]);
    }
    for (std::size_t i = 0; i < body.size(); ++i) mismatches += coupling.rhs(i) != full.rhs(body[i]);
    CHECK(mismatches == 0);
    CHECK(nonzero > 0);
}

TEST_CASE("the exact path equals the full solve for an object beside a fish-like body") {
    const Scene<double> body = fish_scene(0.2);
    const FixedPart<double> fixed(body, kQuad);
    for (double gap : {0.002, 0.01, 0.04}) {  // sphere surface to body surface, m (radius 5 mm)
        CAPTURE(gap);
        Scene<double> full = body;
        full.surfaces.push_back(sphere_object(Vec3(0.01, 0.012 + gap + 0.005, 0), 0.005, 0.5));
        const MovingBlock<double> block = factor_moving_block(full, {1}, kQuad);
        const Solution<double> direct = solve_scene(full, kQuad);
        const CoupledSolution<double> coupled = solve_coupled(full, {1}, fixed, block, kQuad, CouplingOptions{});
        CHECK(coupled.gmres.converged);
        CHECK(max_difference(direct, coupled.solution) < 1e-9 * direct.surfaces[0].outer_potential.cwiseAbs().maxCoeff());
        CHECK(perturbation_difference(full, fixed, block) < 1e-6);
    }
}

TEST_CASE("the object's own block factored at one place serves every other place") {
    const Scene<double> body = fish_scene(0.2);
    const FixedPart<double> fixed(body, kQuad);
    Scene<double> first = body;
    first.surfaces.push_back(sphere_object(Vec3(0.0, 0.03, 0), 0.004, 0.0005));
    const MovingBlock<double> block = factor_moving_block(first, {1}, kQuad);
    for (const Vec3& c : {Vec3(0.03, 0.02, 0.01), Vec3(-0.05, -0.02, 0.0), Vec3(0.0, 0.0, 0.05)}) {
        Scene<double> moved = body;
        moved.surfaces.push_back(sphere_object(c, 0.004, 0.0005));
        CHECK(perturbation_difference(moved, fixed, block) < 1e-6);
    }
}

TEST_CASE("the exact path handles electrodes, a conducting object, an insulator and a plane") {
    Scene<double> robot;
    robot.water_conductivity = 0.05;
    Surface<double> hull;
    hull.mesh = make_box(Vec3(0.2, 0.05, 0.05), 0.012);
    hull.mesh.name = "hull";
    hull.kind = InterfaceKind::sealed;
    hull.panel_electrode.assign(hull.mesh.size(), -1);
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const double x = hull.mesh.centroid(t).x();
        if (x > 0.08) hull.panel_electrode[t] = 0;        // emitter
        else if (x < -0.08) hull.panel_electrode[t] = 1;  // return
        else if (std::abs(x) < 0.015 && hull.mesh.centroid(t).y() > 0.02) hull.panel_electrode[t] = 2;  // sensor
    }
    robot.surfaces.push_back(hull);
    robot.electrodes = {{"emitter", ElectrodeDrive::current, 1e-3},
                        {"return", ElectrodeDrive::voltage, 0.0},
                        {"sensor", ElectrodeDrive::floating, 0.0}};
    robot.images = plane_images<double>(InsulatingPlane{Vec3(0, 0, 0.1), Vec3::UnitZ()});

    SUBCASE("a perfectly conducting sphere (a floating electrode of its own)") {
        const FixedPart<double> fixed(robot, kQuad);
        Scene<double> full = robot;
        Surface<double> ball = sphere_object(Vec3(0.0, 0.07, 0.0), 0.01, 1.0);
        ball.kind = InterfaceKind::sealed;
        ball.panel_electrode.assign(ball.mesh.size(), 3);
        full.surfaces.push_back(ball);
        full.electrodes.push_back({"object:ball", ElectrodeDrive::floating, 0.0});
        const MovingBlock<double> block = factor_moving_block(full, {1}, kQuad);
        const Solution<double> direct = solve_scene(full, kQuad);
        const CoupledSolution<double> coupled = solve_coupled(full, {1}, fixed, block, kQuad, CouplingOptions{});
        CHECK(coupled.gmres.converged);
        const double change = direct.electrode_potential[2] - fixed.solution().electrode_potential[2];
        CHECK(std::abs(change) > 0);
        for (int e = 0; e < 4; ++e)
            CHECK(std::abs(coupled.solution.electrode_potential[e] - direct.electrode_potential[e]) < 1e-6 * std::abs(change));
        CHECK(std::abs(coupled.solution.electrode_current[1] - direct.electrode_current[1]) < 1e-9 * 1e-3);
    }
    SUBCASE("an insulating box below the plane") {
        const FixedPart<double> fixed(robot, kQuad);
        Scene<double> full = robot;
        Surface<double> box;
        box.mesh = make_box(Vec3(0.02, 0.02, 0.02), 0.02);
        box.mesh.name = "stone";
        translate(box.mesh, Vec3(0.03, -0.07, 0.02));
        box.kind = InterfaceKind::sealed;
        box.panel_electrode.assign(box.mesh.size(), -1);
        full.surfaces.push_back(box);
        const MovingBlock<double> block = factor_moving_block(full, {1}, kQuad);
        const Solution<double> direct = solve_scene(full, kQuad);
        const CoupledSolution<double> coupled = solve_coupled(full, {1}, fixed, block, kQuad, CouplingOptions{});
        const double change = direct.electrode_potential[2] - fixed.solution().electrode_potential[2];
        CHECK(std::abs(change) > 0);
        CHECK(std::abs(coupled.solution.electrode_potential[2] - direct.electrode_potential[2]) < 1e-6 * std::abs(change));
    }
}

TEST_CASE("the exact path in complex arithmetic: a capacitive skin and a dielectric object") {
    const Scene<Complex> body = fish_scene<Complex>(Complex(0.2, -0.05));
    const FixedPart<Complex> fixed(body, kQuad);
    Scene<Complex> full = body;
    full.surfaces.push_back(sphere_object<Complex>(Vec3(-0.02, 0.0, 0.02), 0.004, Complex(0.002, 0.003)));
    const MovingBlock<Complex> block = factor_moving_block(full, {1}, kQuad);
    CHECK(perturbation_difference(full, fixed, block) < 1e-6);
}

TEST_CASE("a scene whose moving part does not match the fixed part is an internal error") {
    const Scene<double> body = fish_scene(0.2);
    const FixedPart<double> fixed(body, kQuad);
    Scene<double> two = body;
    two.surfaces.push_back(sphere_object(Vec3(0, 0.03, 0), 0.004, 0.1));
    two.surfaces.push_back(sphere_object(Vec3(0, -0.03, 0), 0.004, 0.1));
    const MovingBlock<double> block = factor_moving_block(two, {1}, kQuad);
    // Two objects added where the fixed part expects one: the sizes cannot match.
    CHECK_THROWS_WITH_AS(solve_coupled(two, {1}, fixed, block, kQuad, CouplingOptions{}),
                         doctest::Contains("f.size()) == fixed.size()"), InternalError);
}

TEST_CASE("points solved together equal the full solve, each as alone, and do not depend on their batch's timing") {
    // Three places of one sphere (near, middle, far) and one of a second, larger
    // sphere, against one factored body: their GMRES runs advance in step and share
    // each solve against the factors (solve_coupled_together). Reference: the full
    // dense solve of each scene (the same discrete equations, up to the GMRES
    // tolerance, 1e-10), and each point solved alone.
    const Scene<double> body = fish_scene(0.2);
    const FixedPart<double> fixed(body, kQuad);
    std::vector<Scene<double>> scenes;
    for (const auto& [centre, radius] : {std::pair{Vec3(0.01, 0.019, 0), 0.005}, std::pair{Vec3(-0.02, 0.03, 0), 0.005},
                                         std::pair{Vec3(0.03, 0.08, 0), 0.005}, std::pair{Vec3(0.0, -0.03, 0), 0.008}}) {
        scenes.push_back(body);
        scenes.back().surfaces.push_back(sphere_object(centre, radius, 0.5));
    }
    const MovingBlock<double> small = factor_moving_block(scenes[0], {1}, kQuad);
    const MovingBlock<double> large = factor_moving_block(scenes[3], {1}, kQuad);
    std::vector<CoupledProblem<double>> problems;
    for (std::size_t k = 0; k < scenes.size(); ++k) problems.push_back({&scenes[k], {1}, k == 3 ? &large : &small});
    const std::vector<CoupledSolution<double>> together = solve_coupled_together(problems, fixed, kQuad, CouplingOptions{});
    REQUIRE(together.size() == scenes.size());
    std::vector<int> iterations;
    for (std::size_t k = 0; k < scenes.size(); ++k) {
        CAPTURE(k);
        CHECK(together[k].gmres.converged);
        iterations.push_back(together[k].gmres.iterations);
        const Solution<double> direct = solve_scene(scenes[k], kQuad);
        const double scale = direct.surfaces[0].outer_potential.cwiseAbs().maxCoeff();
        CHECK(max_difference(direct, together[k].solution) < 1e-9 * scale);
        const CoupledSolution<double> alone = solve_coupled(scenes[k], {1}, fixed, *problems[k].block, kQuad,
                                                            CouplingOptions{});
        CHECK(alone.gmres.iterations == together[k].gmres.iterations);
        CHECK(max_difference(alone.solution, together[k].solution) < 1e-12 * scale);
    }
    // The near point needs more iterations than the far one: the runs did finish
    // at different steps, so the batch's later solves had fewer columns.
    CHECK(iterations.front() > iterations[2]);
    // The same batch again gives the same bits: nothing depends on timing.
    const std::vector<CoupledSolution<double>> again = solve_coupled_together(problems, fixed, kQuad, CouplingOptions{});
    for (std::size_t k = 0; k < scenes.size(); ++k)
        CHECK(max_difference(again[k].solution, together[k].solution) == 0.0);
}

TEST_CASE("coupling blocks of water rows are the full matrix's entries, bit for bit, without being cleared first") {
    // The blocks the exact path assembles at every point: the water rows of one
    // part against the other part's unknowns. Filled into storage that holds
    // garbage (a previous block of another shape), they must still equal the
    // full matrix entry for entry.
    Scene<double> scene = fish_scene(0.2);
    scene.surfaces.push_back(sphere_object(Vec3(0, 0.03, 0), 0.005, 0.1));
    const LinearSystem<double> full = assemble_system(scene, kQuad);
    const SystemLayout& layout = full.layout;
    auto water_rows = [&](std::size_t s) {
        std::vector<Eigen::Index> rows;
        for (Eigen::Index k = 0; k < layout.surfaces[s].panels; ++k) rows.push_back(layout.surfaces[s].offset + k);
        return rows;
    };
    const std::vector<Eigen::Index> body = part_unknowns(scene, layout, {0}), object = part_unknowns(scene, layout, {1});
    for (const auto& [rows, cols] : {std::pair{water_rows(0), object}, std::pair{water_rows(1), body}}) {
        SystemBlock<double> block;
        block.matrix = Eigen::MatrixXd::Constant(Eigen::Index(rows.size()), Eigen::Index(cols.size()), 12345.0);
        assemble_block_into(scene, layout, kQuad, rows, cols, block);
        std::size_t mismatches = 0;
        for (std::size_t i = 0; i < rows.size(); ++i)
            for (std::size_t j = 0; j < cols.size(); ++j)
                mismatches += std::memcmp(&block.matrix(Eigen::Index(i), Eigen::Index(j)),
                                          &full.matrix(rows[i], cols[j]), sizeof(double)) != 0;
        CHECK(mismatches == 0);
    }
}
