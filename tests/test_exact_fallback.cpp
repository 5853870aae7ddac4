// The exact path's fallback (cases/sweep/path_exact.cpp): a point whose coupling
// GMRES does not converge is solved as its whole scene, and on a compressed body
// that whole scene is compressed too (a dense LU of a large body would not fit).
// Forced here by allowing the coupling GMRES one step; the reading must then be
// the whole point scene's, which the dense solve_scene gives independently.
#include "cases/sweep/point_path.hpp"
#include "tests/scene_fixtures.hpp"

#include <doctest/doctest.h>

using namespace murk;

TEST_CASE("exact path: a point that does not converge on a compressed body is solved whole and compressed") {
    const QuadratureOptions quad{};
    Scene<double> body = fixtures::mixed_scene<double>(0.2, 0.1, 0.02);
    body.surfaces.erase(body.surfaces.begin() + 1);  // the object moves: it is not part of the body
    SolverOptions compressed;
    compressed.choice = SystemSolver::compressed;
    compressed.compression_tolerance = 1e-10;
    compressed.iteration_tolerance = 1e-12;

    SweepBaselines<double> baselines;
    baselines.waters.emplace_back();
    baselines.waters[0].fixed = std::make_unique<FixedPart<double>>(body, quad, compressed);
    REQUIRE(baselines.waters[0].fixed->compressed());
    baselines.sensors.electrodes = {2};  // the floating sensing electrode
    baselines.sensors.names = {"sense"};
    baselines.sensors.units = "V";
    baselines.sensors.position = {Vec3::Zero()};

    ObjectShape shape;
    shape.mesh = make_icosphere(0.005, 2);
    shape.half_extent = 0.005;
    MovingObject<double> ball;
    ball.shape = &shape;
    ball.kind = InterfaceKind::contact;
    ball.inner_conductivity = 1.0;
    PlacedPoint<double> point;
    point.object = &ball;
    point.offset = Vec3(0.01, 0.028, 0.0);

    // The reference: the point's whole scene, assembled and factored densely.
    PathContext<double> context{&baselines, nullptr, quad, CouplingOptions{}};
    const Scene<double> scene = point_scene(context, point);
    const double reference = sensor_readings(baselines.sensors, scene, solve_scene(scene, quad), quad)[0];
    const double baseline = baselines.waters[0].fixed->solution().electrode_potential[2];
    REQUIRE(std::abs(reference - baseline) > 0);

    const PathReading<double> exact = make_exact_path(context)->solve({point}).front();
    CHECK(exact.path == PathCode::exact);
    CHECK(std::abs(exact.reading[0] - reference) < 1e-6 * std::abs(reference - baseline));

    context.coupling.max_iterations = 1;
    const PathReading<double> whole = make_exact_path(context)->solve({point}).front();
    CHECK(whole.path == PathCode::full);
    CHECK(std::abs(whole.reading[0] - reference) < 1e-6 * std::abs(reference - baseline));
}
