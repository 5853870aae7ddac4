// murk-bench-design: speed of the layout-design chain (it asserts nothing; the
// goal, a placement of 6 out of 40 candidates in well under a minute, is read
// from its output, never from a timed test).
//
// A 40 cm capsule hull (radius 4 cm) with a current-driven emitter ring at one
// end and a grounded return ring at the other; 40 candidate readings, each the
// mean potential of the insulating panels inside a patch on the hull (10 rings
// of 4 patches); a 3 mm insulating sphere as the target; a grid of a few thousand
// target points around the hull. Timed stages: the fixed part (assembly + LU),
// the lead fields (40 transposed solves), target_response (changes and position
// gradients at every point), the localization-bound map, and the placement of 6
// sensors by both criteria (greedy + exchange).
//
// Usage: murk-bench-design [--points N]   (default about 3000 grid points)
#include "cases/design/localization_bound.hpp"
#include "cases/design/sensor_placement.hpp"
#include "geometry/shapes.hpp"
#include "solver/target_derivatives.hpp"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

using namespace murk;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

int main(int argc, char** argv) {
    int wanted = 3000;
    for (int i = 1; i + 1 < argc; ++i)
        if (std::strcmp(argv[i], "--points") == 0) wanted = std::atoi(argv[i + 1]);

    const double radius = 0.04, cylinder = 0.32;
    Scene<double> scene;
    scene.water_conductivity = 0.05;
    Surface<double> hull;
    hull.mesh = make_capsule(radius, cylinder, 0.012);
    hull.mesh.name = "hull";
    hull.kind = InterfaceKind::sealed;
    hull.panel_electrode.assign(hull.mesh.size(), -1);
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const double x = hull.mesh.centroid(t).x();
        if (x > 0.17) hull.panel_electrode[t] = 0;
        else if (x < -0.17) hull.panel_electrode[t] = 1;
    }
    scene.surfaces.push_back(hull);
    scene.electrodes = {{"emitter", ElectrodeDrive::current, 1e-3}, {"return", ElectrodeDrive::voltage, 0.0}};

    auto t0 = std::chrono::steady_clock::now();
    const FixedPart<double> fixed(scene, QuadratureOptions{});
    std::printf("hull: %zu panels; fixed part (assembly + LU): %.2f s\n", hull.mesh.size(), seconds_since(t0));

    // 40 candidates: patches of insulating panels, 10 rings along x times 4 sides.
    const int rings = 10, sides = 4;
    Eigen::MatrixXd readout = Eigen::MatrixXd::Zero(rings * sides, fixed.size());
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        if (hull.panel_electrode[t] >= 0) continue;
        const Vec3 c = hull.mesh.centroid(t);
        const double ring_pitch = 0.3 / rings;
        const int ring = int(std::floor((c.x() + 0.15) / ring_pitch));
        if (ring < 0 || ring >= rings || std::abs(c.x() + 0.15 - (ring + 0.5) * ring_pitch) > 0.01) continue;
        const double angle = std::atan2(c.z(), c.y());
        const int side = int(std::lround(angle / (M_PI / 2))) & 3;
        if (std::abs(angle - side * M_PI / 2) > 0.3 && std::abs(angle - side * M_PI / 2 + 2 * M_PI) > 0.3 &&
            std::abs(angle - side * M_PI / 2 - 2 * M_PI) > 0.3)
            continue;
        readout(ring * sides + side, Eigen::Index(t)) = hull.mesh.area(t);
    }
    for (Eigen::Index k = 0; k < readout.rows(); ++k) {
        if (!(readout.row(k).sum() > 0)) {
            std::printf("candidate %ld has no panels: the patch rule does not fit this mesh\n", long(k));
            return 1;
        }
        readout.row(k) /= readout.row(k).sum();  // mean potential over the patch
    }

    t0 = std::chrono::steady_clock::now();
    const LeadFields<double> lead(fixed, readout);
    std::printf("lead fields of %ld candidate readings: %.2f s\n", long(readout.rows()), seconds_since(t0));

    // Grid: a box around the hull from 2 to 10 cm off its axis, cells of equal size.
    const double cell = std::cbrt(0.5 * 0.24 * 0.24 / wanted);
    std::vector<Vec3> pts;
    for (double x = -0.25; x <= 0.25; x += cell)
        for (double y = -0.12; y <= 0.12; y += cell)
            for (double z = -0.12; z <= 0.12; z += cell) {
                const double off_axis = std::hypot(y, z);
                const double beyond = std::max(0.0, std::abs(x) - cylinder / 2);
                if (std::hypot(off_axis, beyond) > radius + 0.02) pts.emplace_back(x, y, z);
            }
    Eigen::Matrix3Xd points(3, Eigen::Index(pts.size()));
    for (std::size_t i = 0; i < pts.size(); ++i) points.col(Eigen::Index(i)) = pts[i];

    const double a = 0.003;
    const Matrix3<double> m = ellipsoid_polarization(Eigen::Vector3d(a, a, a), Eigen::Matrix3d::Identity(), 0.0, 0.05);
    t0 = std::chrono::steady_clock::now();
    const TargetResponse<double> response = target_response(lead, points, m);
    const double response_s = seconds_since(t0);
    std::printf("target_response at %ld points (changes + position gradients, %ld readings): %.2f s (%.2f ms a point)\n",
                long(points.cols()), long(readout.rows()), response_s, 1e3 * response_s / double(points.cols()));

    const double noise = 1e-8;  // V rms per reading (invented for the demo)
    const Eigen::VectorXd rms = Eigen::VectorXd::Constant(readout.rows(), noise);
    t0 = std::chrono::steady_clock::now();
    const BoundMap map = localization_bound_map(response.gradient, rms, 0.005, cell * cell * cell);
    std::printf("localization bound map: %.3f s; %zu points within 5 mm (1 sd, worst direction)\n", seconds_since(t0),
                map.points_within);

    CandidateReadings candidates;
    candidates.change = response.change;
    candidates.gradient = response.gradient;
    candidates.noise_rms = rms;
    for (Eigen::Index k = 0; k < readout.rows(); ++k) candidates.candidate.push_back(int(k));
    for (PlacementCriterion criterion : {PlacementCriterion::detectable_volume, PlacementCriterion::mean_log_det}) {
        PlacementOptions o;
        o.criterion = criterion;
        o.budget = 6;
        o.required_snr = required_snr(1e-3, 0.5);
        o.cell_volume_m3 = cell * cell * cell;
        t0 = std::chrono::steady_clock::now();
        const PlacementResult p = place_sensors(candidates, o);
        const double s = seconds_since(t0);
        std::printf("placement 6 of 40 by %s: %.3f s; greedy", criterion == PlacementCriterion::detectable_volume
                                                                      ? "detectable volume"
                                                                      : "mean log-det (D-optimal)",
                    s);
        for (const PlacementStep& step : p.greedy) std::printf(" %.4g", step.criterion);
        std::printf("; %zu exchange(s) -> %.4g; chosen", p.exchanges.size(), p.criterion);
        for (int c : p.chosen) std::printf(" %d", c);
        std::printf("\n");
    }
    return 0;
}
