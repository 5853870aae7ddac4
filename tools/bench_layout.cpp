// murk-bench-layout: the speed of murk layout's sensitivity map, which the goal of
// issue 11 asks for: a map of 10^5 target positions for 16 readings in under 10 s
// after the body's factorization, on this 2-core machine. It asserts nothing.
//
// The case (our own, invented): a 40 cm capsule robot, radius 2.5 cm, 8 mm panels,
// two emitter rings at the ends and 17 ring sites along the middle read as 16
// differential pairs of neighbours. Printed:
//   - the body's assembly and factorization (once; not part of the map's time);
//   - the lead fields' set-up (16 transposed solves) and the map of 10^5 points
//     (100 x 1000 grid beside the hull), each a wall time with all threads;
//   - the way without reciprocity: each point's three unit dipoles solved against
//     the factors by a blocked solve (unknowns_with_dipoles), timed on 128 points and
//     scaled to 10^5, and the ratio of the two;
//   - the largest relative difference of the two on those 128 points.
//
// Usage: murk-bench-layout [POINTS]   (default 100000)
//
// With --placement [POINTS] (default about 3000) it times instead the placement stage of
// murk layout ([placement], cases/layout/layout_placement.hpp), which the issue asks to
// choose 6 sensors out of 40 candidates in under a minute on this machine: the same capsule
// with 40 candidate rings of 4 mm from -12 to 14 cm read against a reference ring, the
// emitter rings driven by a current, targets of 2 cm on a plane beside the hull. Printed:
// the placement body's assembly and factorization (with the 40 rings meshed), the 40 lead
// fields and the reading changes (or position gradients) at every target, the choice
// (greedy + exchange from every start), for both criteria; and two naive ways, each
// estimated from a timed sample: every one of the C(40, 6) = 3,838,380 subsets scored from
// the same readings (timed: all C(20, 6) subsets of the first 20 candidates), and a body
// factored per subset (timed: the placement body's own factorization). It prints the load
// average before and after: figures from a busy machine are not comparable.

#include "cases/design/sensor_placement.hpp"
#include "cases/input/case_reader.hpp"
#include "cases/input/layout_case.hpp"
#include "cases/layout/layout_placement.hpp"
#include "cases/layout/target_grid.hpp"
#include "cases/layout/target_placement.hpp"
#include "cases/layout/layout_readout.hpp"
#include "cases/layout/sensitivity_map.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/dipole_path.hpp"

#include <omp.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <string>

using namespace murk;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

std::string bench_case() {
    std::string text = R"(title = "bench: 16 differential readings on a 40 cm capsule"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "8 mm"
[robot]
shape = "capsule"
radius = "2.5 cm"
overall_length = "40 cm"
[[robot.electrode]]
name = "nose"
form = "ring"
from = "16 cm"
to = "18 cm"
[[robot.electrode]]
name = "tail"
form = "ring"
from = "-18 cm"
to = "-16 cm"
)";
    // 17 rings of 1 cm, 1.8 cm apart, from -15 cm to 14.8 cm.
    for (int k = 0; k < 17; ++k) {
        const double from = -15.0 + 1.8 * k;
        text += "[[robot.electrode]]\nname = \"s" + std::to_string(k) + "\"\nform = \"ring\"\nfrom = \"" +
                std::to_string(from) + " cm\"\nto = \"" + std::to_string(from + 1.0) + " cm\"\n";
    }
    text += "[[layout]]\nname = \"pairs16\"\nemitters = [{ electrode = \"nose\", current = \"50 uA\" }, "
            "{ electrode = \"tail\", current = \"-50 uA\" }]\nread = \"pairs\"\npairs = [";
    for (int k = 1; k < 17; ++k)
        text += std::string(k > 1 ? ", " : "") + "[\"s" + std::to_string(k) + "\", \"s" + std::to_string(k - 1) + "\"]";
    text += "]\n";
    return text;
}

// 40 candidate rings between a reference ring and the nose ring; a target plane of about
// `points` positions beside the hull (61 along the hull).
std::string placement_case(const std::string& criterion, long points) {
    const long across = std::max(2L, points / 61);
    return R"toml(title = "bench: 6 of 40 candidate rings on a 40 cm capsule"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "10 mm"
electrode_edge = "4 mm"
[robot]
shape = "capsule"
radius = "2.5 cm"
overall_length = "40 cm"
[[robot.electrode]]
name = "nose"
form = "ring"
from = "15 cm"
to = "17 cm"
[[robot.electrode]]
name = "tail"
form = "ring"
from = "-17 cm"
to = "-15 cm"
[[robot.electrode]]
name = "ref"
form = "ring"
from = "-14 cm"
to = "-13 cm"
[placement]
candidate_rings = { from = "-12 cm", to = "14 cm", count = 40, width = "4 mm" }
drive = "drive"
budget = 6
criterion = ")toml" + criterion + R"toml("
[[layout]]
name = "drive"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", current = "-50 uA" }]
read = "reference"
sensors = ["c01"]
reference = "ref"
[[object]]
name = "target"
shape = "sphere"
radius = "2 cm"
position = ["0 cm", "8 cm", "0 cm"]
conductivity = "conductor"
[sweep]
object = "target"
[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = { from = "-30 cm", to = "30 cm", count = 61 }
v = { from = "5 cm", to = "30 cm", count = )toml" + std::to_string(across) + R"toml( }
[detection]
amplifier_noise = "30 nV/sqrt(Hz)"
integration_time = "2 ms"
)toml";
}

std::string load_average() {
    std::ifstream in("/proc/loadavg");
    std::string one, five;
    in >> one >> five;
    return one.empty() ? "unknown" : one + " (1 min), " + five + " (5 min)";
}

int bench_placement(long points) {
    std::printf("load average before: %s on %d threads\n", load_average().c_str(), omp_get_max_threads());
    for (const char* criterion : {"detectable_area", "mean_log_det"}) {
        const CaseSpec spec = read_case_text(placement_case(criterion, points), "bench_placement");
        const QuadratureOptions quad = quadrature_options(spec);
        const TargetGrid grid = target_grid(spec);
        const TargetPlacement placed = place_targets(spec, grid);
        auto t0 = std::chrono::steady_clock::now();
        const PlacementProblem problem = placement_problem(spec, grid, placed, quad);
        const PlacementResult r = place_sensors(problem.readings, problem.options);
        const double stage = seconds_since(t0);
        const double choose = stage - problem.factor_seconds - problem.lead_seconds;
        std::printf("placement 6 of %ld by %s, %zu target points: %.2f s in all (body %.2f s, 40 lead fields and the "
                    "responses %.2f s, choice %.2f s); chosen",
                    static_cast<long>(problem.readings.change.rows()), criterion, problem.points.size(), stage,
                    problem.factor_seconds, problem.lead_seconds, choose);
        for (int c : r.chosen) std::printf(" %s", spec.placement->candidates[std::size_t(c)].c_str());
        std::printf(" (criterion %.4g)\n", r.criterion);

        // Naive 1: every subset scored from the same readings, timed on C(20, 6).
        CandidateReadings first20 = problem.readings;
        first20.change = problem.readings.change.topRows(20);
        for (Eigen::MatrixXd& g : first20.gradient) g = g.topRows(20).eval();
        first20.candidate.resize(20);
        first20.noise_rms = problem.readings.noise_rms.head(20);
        if (problem.options.criterion == PlacementCriterion::mean_log_det)
            first20.information_scale = information_diagonal(problem.readings);  // the same scale as the 40
        t0 = std::chrono::steady_clock::now();
        (void)best_placement_exhaustive(first20, problem.options);
        const double per_subset = seconds_since(t0) / 38760.0;
        const double subsets = 3838380.0;
        std::printf("  naive: every subset scored: %.3g ms a subset (C(20,6) = 38760 timed), %.0f s for C(40,6) = "
                    "3838380, %.0fx the stage, %.0fx its choice\n",
                    1e3 * per_subset, per_subset * subsets, per_subset * subsets / stage, per_subset * subsets / choose);
        std::printf("  naive: a body factored per subset: %.2f s each (the placement body's), %.3g s for C(40,6), "
                    "%.3gx the stage\n",
                    problem.factor_seconds, problem.factor_seconds * subsets, problem.factor_seconds * subsets / stage);
        std::printf("  placement body: %ld unknowns\n", static_cast<long>(problem.unknowns));
    }
    std::printf("load average after: %s\n", load_average().c_str());
    return 0;
}

}  // namespace

int main(int argc, char** argv) {
    if (argc > 1 && std::strcmp(argv[1], "--placement") == 0) return bench_placement(argc > 2 ? std::atol(argv[2]) : 3000);
    const Eigen::Index points = argc > 1 ? std::atol(argv[1]) : 100000;
    const CaseSpec spec = read_case_text(bench_case(), "bench_layout");
    auto t0 = std::chrono::steady_clock::now();
    const FixedPart<double> fixed(build_scene<double>(layout_case(spec, 0), true), QuadratureOptions{},
                                  solver_options(spec));
    std::printf("body: %ld unknowns, %zu water rows; assembly %.2f s, factorization %.2f s (threads %d)\n",
                static_cast<long>(fixed.size()), fixed.water_rows().size(), fixed.assembly_seconds(),
                fixed.factor_seconds(), omp_get_max_threads());
    (void)seconds_since(t0);
    const LayoutReadout readout = layout_readout(spec.layouts[0], fixed);

    t0 = std::chrono::steady_clock::now();
    const SensitivityMap map(fixed, readout.rows);
    const double setup = seconds_since(t0);

    // A 100 x 1000 grid (or the points asked for) on a plane beside the hull, 4 to 30 cm out.
    Eigen::Matrix3Xd grid(3, points);
    const Eigen::Index nu = 100;
    for (Eigen::Index k = 0; k < points; ++k) {
        const double s = double(k % nu) / double(nu - 1), t = double(k / nu) / double(std::max<Eigen::Index>(1, points / nu - 1));
        grid.col(k) = Eigen::Vector3d(-0.3 + 0.6 * s, 0.04 + 0.26 * t, 0.01);
    }
    t0 = std::chrono::steady_clock::now();
    const Eigen::MatrixXd s = map.at(grid);
    const double mapped = seconds_since(t0);
    std::printf("sensitivity map: %ld readings x %ld points: lead fields %.3f s, map %.3f s (%.2f us a point)\n",
                static_cast<long>(s.rows()), static_cast<long>(points), setup, mapped, 1e6 * mapped / double(points));

    // Without reciprocity: three unit dipoles per point, a blocked solve against the factors.
    const Eigen::Index sample = std::min<Eigen::Index>(128, points);
    std::vector<PointDipole<double>> dipoles;
    for (Eigen::Index j = 0; j < sample; ++j)
        for (int k = 0; k < 3; ++k) {
            PointDipole<double> d;
            d.position = grid.col(j * (points / sample));
            d.moment = Eigen::Vector3d::Unit(k);
            dipoles.push_back(d);
        }
    t0 = std::chrono::steady_clock::now();
    const Eigen::MatrixXd x = unknowns_with_dipoles(fixed, dipoles);
    const double direct = seconds_since(t0);
    const Eigen::MatrixXd direct_readings = readout.rows * (x.colwise() - fixed.unknowns());
    double worst = 0;
    for (Eigen::Index j = 0; j < sample; ++j)
        for (int k = 0; k < 3; ++k) {
            const Eigen::VectorXd a = s.col(3 * (j * (points / sample)) + k), b = direct_readings.col(3 * j + k);
            worst = std::max(worst, (a - b).norm() / b.norm());
        }
    const double direct_all = direct / double(sample) * double(points);
    std::printf("dipole solved per point: %.3f ms a point (%ld points timed), %.1f s for %ld points\n",
                1e3 * direct / double(sample), static_cast<long>(sample), direct_all, static_cast<long>(points));
    std::printf("sensitivity map: %.3f s for %ld points and %ld readings (goal: under 10 s); %.0fx faster than a "
                "dipole solve per point; max relative difference %.2g\n",
                mapped + setup, static_cast<long>(points), static_cast<long>(s.rows()), direct_all / (mapped + setup),
                worst);
    return 0;
}
