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

#include "cases/input/case_reader.hpp"
#include "cases/input/layout_case.hpp"
#include "cases/layout/layout_readout.hpp"
#include "cases/layout/sensitivity_map.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/dipole_path.hpp"

#include <omp.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
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

}  // namespace

int main(int argc, char** argv) {
    const Eigen::Index points = argc > 1 ? std::atol(argv[1]) : 100000;
    const CaseSpec spec = read_case_text(bench_case(), "bench_layout");
    auto t0 = std::chrono::steady_clock::now();
    const FixedPart<double> fixed(build_scene<double>(layout_case(spec, 0), true), QuadratureOptions{});
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
