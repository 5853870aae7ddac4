// The fixed part solved through the compressed operator and the preconditioned
// iterative solve (solver/compressed_system.hpp) against the dense LU of the same
// scene: both solve the same discrete equations, so they agree to the accuracy
// the compression tolerance and the iteration tolerance ask for. The exact and
// dipole sweep paths run on top of either unchanged.
#include "solver/compressed_system.hpp"
#include "solver/coupled_solve.hpp"
#include "solver/dipole_path.hpp"
#include "solver/fixed_part.hpp"
#include "tests/scene_fixtures.hpp"

#include <doctest/doctest.h>
#include <omp.h>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};
// A coarser body than the fixture's default keeps the dense LU these tests compare
// with cheap under the sanitizers; the hull and the body are still far enough
// apart for low-rank blocks (checked below).
constexpr double kBodyPanel = 0.02;

SolverOptions forced(SystemSolver choice) {
    SolverOptions o;
    o.choice = choice;
    o.compression_tolerance = 1e-10;
    o.iteration_tolerance = 1e-12;
    return o;
}

template <class S>
double relative_difference(const MatrixX<S>& a, const MatrixX<S>& b) {
    return (a - b).norm() / b.norm();
}

// The body of mixed_scene without its object, and the scene with a 5 mm ball of
// 1 S/m added at `at` as the moving surface (the last one).
template <class S>
struct BodyAndBall {
    Scene<S> body, full;
    explicit BodyAndBall(const Vec3& at) {
        body = fixtures::mixed_scene<S>(S(0.2), S(0.1), kBodyPanel);
        body.surfaces.erase(body.surfaces.begin() + 1);  // the object moves: it is not part of the body
        full = body;
        Surface<S> ball;
        ball.mesh = make_icosphere(0.005, 2);
        ball.mesh.name = "object";
        translate(ball.mesh, at);
        ball.kind = InterfaceKind::contact;
        ball.inner_conductivity = S(1.0);
        full.surfaces.push_back(ball);
    }
};

}  // namespace

TEST_CASE_TEMPLATE("the compressed fixed part solves, and solves transposed, as the dense LU does", S, double, Complex) {
    const Scene<S> scene = fixtures::mixed_scene<S>(S(0.2), S(0.1), kBodyPanel);
    const FixedPart<S> dense(scene, kQuad, forced(SystemSolver::dense));
    const FixedPart<S> compressed(scene, kQuad, forced(SystemSolver::compressed));
    REQUIRE_FALSE(dense.compressed());
    REQUIRE(compressed.compressed());
    CHECK(compressed.report().solver == "compressed");
    CHECK(compressed.report().baseline_iterations > 0);
    REQUIRE(compressed.compressed_system() != nullptr);
    CHECK(compressed.compressed_system()->operator_stats().low_rank_blocks > 0);

    CHECK(relative_difference<S>(compressed.unknowns(), dense.unknowns()) < 1e-8);
    for (std::size_t e = 0; e < scene.electrodes.size(); ++e)
        CHECK(std::abs(compressed.solution().electrode_potential[e] - dense.solution().electrode_potential[e]) <
              1e-8 * std::abs(dense.solution().electrode_potential[0]));

    std::srand(7);
    const MatrixX<S> b = MatrixX<S>::Random(dense.size(), 3);
    CHECK(relative_difference<S>(compressed.solve(b), dense.solve(b)) < 1e-8);
    CHECK(relative_difference<S>(compressed.solve_transposed(b), dense.solve_transposed(b)) < 1e-8);
}

TEST_CASE("the exact and dipole paths on a compressed fixed part equal those on the dense one") {
    const BodyAndBall<double> scenes(Vec3(0.01, 0.028, 0.0));
    const Scene<double>& full = scenes.full;
    const FixedPart<double> dense(scenes.body, kQuad, forced(SystemSolver::dense));
    const FixedPart<double> compressed(scenes.body, kQuad, forced(SystemSolver::compressed));
    const std::size_t moving = full.surfaces.size() - 1;
    const MovingBlock<double> block = factor_moving_block(full, {moving}, kQuad);
    const CoupledSolution<double> a = solve_coupled(full, {moving}, dense, block, kQuad, CouplingOptions{});
    const CoupledSolution<double> b = solve_coupled(full, {moving}, compressed, block, kQuad, CouplingOptions{});
    REQUIRE(a.gmres.converged);
    REQUIRE(b.gmres.converged);
    // The floating sensing electrode's change, the quantity a sweep reports.
    const double change = a.solution.electrode_potential[2] - dense.solution().electrode_potential[2];
    const double change_c = b.solution.electrode_potential[2] - compressed.solution().electrode_potential[2];
    CHECK(std::abs(change) > 0);
    CHECK(std::abs(change_c - change) < 1e-6 * std::abs(change));

    // The dipole path: lead fields are transposed solves.
    MatrixX<double> readout = MatrixX<double>::Zero(1, dense.size());
    readout(0, dense.layout().electrode_offset + 2) = 1.0;
    const LeadFields<double> lead_dense(dense, readout), lead_compressed(compressed, readout);
    const PointDipole<double> dipole{Vec3(0.0, 0.03, 0.0), Vec3(1e-9, 2e-9, 0.0)};
    const MatrixX<double> rd = lead_dense.readings_change({dipole}), rc = lead_compressed.readings_change({dipole});
    CHECK(std::abs(rd(0, 0)) > 0);
    CHECK(std::abs(rc(0, 0) - rd(0, 0)) < 1e-6 * std::abs(rd(0, 0)));
}

TEST_CASE_TEMPLATE("a batch of exact points on a compressed fixed part: each as on the dense one, on any threads", S,
                   double, Complex) {
    // On a compressed fixed part the batch is solved as one GMRES on each point's
    // whole perturbation system (coupled_solve.cpp); on a dense one by the Schur
    // complement against the LU. Both solve the same equations.
    const BodyAndBall<S> start(Vec3::Zero());
    const Scene<S>& full = start.full;
    const FixedPart<S> dense(start.body, kQuad, forced(SystemSolver::dense));
    const FixedPart<S> compressed(start.body, kQuad, forced(SystemSolver::compressed));
    const std::size_t moving = full.surfaces.size() - 1;
    std::vector<Scene<S>> scenes(3, full);
    std::vector<CoupledProblem<S>> problems;
    const MovingBlock<S> block = factor_moving_block(full, {moving}, kQuad);
    for (std::size_t k = 0; k < scenes.size(); ++k) {
        translate(scenes[k].surfaces.back().mesh, Vec3(-0.02 + 0.02 * double(k), 0.028 + 0.01 * double(k), 0.0));
        problems.push_back({&scenes[k], {moving}, &block});
    }
    const int threads = omp_get_max_threads();
    omp_set_num_threads(1);
    const std::vector<CoupledSolution<S>> one = solve_coupled_together(problems, compressed, kQuad, CouplingOptions{});
    omp_set_num_threads(2);
    const std::vector<CoupledSolution<S>> two = solve_coupled_together(problems, compressed, kQuad, CouplingOptions{});
    omp_set_num_threads(threads);
    for (std::size_t k = 0; k < problems.size(); ++k) {
        const CoupledSolution<S> d = solve_coupled(scenes[k], {moving}, dense, block, kQuad, CouplingOptions{});
        REQUIRE(d.gmres.converged);
        REQUIRE(one[k].gmres.converged);
        const S change = d.solution.electrode_potential[2] - dense.solution().electrode_potential[2];
        const S change_c = one[k].solution.electrode_potential[2] - compressed.solution().electrode_potential[2];
        INFO("point " << k << ": dense change " << std::abs(change) << ", compressed " << std::abs(change_c));
        CHECK(std::abs(change) > 0);
        CHECK(std::abs(change_c - change) < 1e-6 * std::abs(change));
        // The object's own unknowns too (its surface potential).
        const auto& od = d.solution.surfaces.back().outer_potential;
        const auto& oc = one[k].solution.surfaces.back().outer_potential;
        CHECK((oc - od).norm() < 1e-6 * od.norm());
        CHECK(one[k].solution.surfaces.back().outer_potential == two[k].solution.surfaces.back().outer_potential);
        CHECK(one[k].solution.electrode_potential == two[k].solution.electrode_potential);
    }
}

TEST_CASE("compressed solves are the same to the last bit on one thread and on two") {
    // A sweep's points must not depend on the threads (DEVELOPERS.md, "How a sweep is solved").
    const Scene<double> scene = fixtures::mixed_scene<double>(0.2, 0.1, kBodyPanel);
    const FixedPart<double> fixed(scene, kQuad, forced(SystemSolver::compressed));
    std::srand(11);
    const MatrixX<double> b = MatrixX<double>::Random(fixed.size(), 4);
    const int threads = omp_get_max_threads();
    omp_set_num_threads(1);
    const MatrixX<double> one = fixed.solve(b), one_t = fixed.solve_transposed(b);
    omp_set_num_threads(2);
    const MatrixX<double> two = fixed.solve(b), two_t = fixed.solve_transposed(b);
    omp_set_num_threads(threads);
    CHECK((one.array() == two.array()).all());
    CHECK((one_t.array() == two_t.array()).all());
}
