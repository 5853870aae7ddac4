// Drive resistance between two ring electrodes on an insulating capsule: a current
// I enters one ring and leaves by the other, R = (V1 - V2) / I. The reference is
// murk's own independent axisymmetric boundary-integral solver
// (verify/axisymmetric_electrodes.hpp: exact generatrix, ring-source kernels,
// elements graded at the electrode edges, Richardson-extrapolated to about 1e-7
// relative; its header says why it shares nothing with the 3-D panel code, and
// tests/test_axisymmetric_electrodes.cpp checks it against a whole-sphere
// electrode and Newman's 1966 disc resistance).
//
// murk's hull is the one a case with two rings gets (geometry/electrode_hulls.hpp):
// panel edges on the ring edges, panels graded toward them, every ring its true
// area, so the error falls as the panels shrink.
#include "geometry/electrode_hulls.hpp"
#include "verify/axisymmetric_electrodes.hpp"
#include "verify/check_support.hpp"

#include <cmath>
#include <cstdio>

namespace murk {

namespace {
using namespace verification;

constexpr double kWater = 0.01;                      // S/m
constexpr double kRadius = 0.02, kCylinder = 0.26;   // a 30 cm capsule
const double kRings[2][2] = {{0.11, 0.12}, {-0.12, -0.11}};  // axial bands (m)

// Panel edge (m): 10, 7.1, 5 mm at levels 2, 3, 4.
double hull_edge(int level) { return 0.010 / std::pow(2.0, 0.5 * (level - 2)); }

// The hull with its two rings as electrodes 0 and 1, the rest insulating.
Surface<double> ring_pair_hull(int level) {
    TriangleMesh hull = make_two_ring_capsule(kRadius, kCylinder + 2.0 * kRadius, hull_edge(level),
                                              AxialBand{kRings[0][0], kRings[0][1]},
                                              AxialBand{kRings[1][0], kRings[1][1]});
    hull.name = "hull";
    Surface<double> surface = sealed_surface<double>(hull, -1);
    for (std::size_t t = 0; t < hull.size(); ++t) {
        const auto tag = static_cast<std::size_t>(hull.region[t]);
        const std::string region = tag < hull.region_names.size() ? hull.region_names[tag] : std::string();
        surface.panel_electrode[t] = region == "ring 1" ? 0 : region == "ring 2" ? 1 : -1;
    }
    return surface;
}

double drive_resistance(int level, const QuadratureOptions& quad, int& panels) {
    constexpr double kCurrent = 1e-3;  // A
    Scene<double> scene;
    scene.water_conductivity = kWater;
    scene.surfaces.push_back(ring_pair_hull(level));
    scene.electrodes.push_back({"plus", ElectrodeDrive::current, kCurrent});
    scene.electrodes.push_back({"minus", ElectrodeDrive::current, -kCurrent});
    panels = static_cast<int>(scene.surfaces[0].mesh.size());
    const Solution<double> sol = solve_scene(scene, quad);
    return (sol.electrode_potential[0] - sol.electrode_potential[1]) / kCurrent;
}

}  // namespace

void check_ring_pair_resistance(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    // Quick runs take four levels of the reference (about 1 s; estimate ~7e-5, well
    // inside any tolerance here), full runs five (about 5 s; ~1e-7).
    const axisym::Extrapolated reference = axisym::capsule_ring_pair_study(
        kRadius, kCylinder, kRings[0][0], kRings[0][1], kRings[1][0], kRings[1][1], kWater, options.quick ? 4 : 5);
    char source[80];
    std::snprintf(source, sizeof source, "axisymmetric BIE, extrapolated (+-%.0e, %.1f s)",
                  reference.error / reference.value, reference.seconds);
    CheckResult row;
    row.name = "two rings on a capsule, drive resistance";
    row.source = source;
    row.quantity = "resistance (ohm)";
    // Measured 2026-12-02 (reference 1277.64 ohm), hull meshed on the ring edges with
    // the default edge panels (a quarter of the panel size): at 10, 7.1 and 5 mm panels
    // (1530, 2940, 5580 panels) R is +3.28 %, +2.21 % and +1.52 % off, falling
    // steadily at an observed order of about 1.1 (the edge singularity, resolved only
    // to a quarter panel). Before, with the rings the panels whose centroids fell in
    // the band, it was -4.4 %, +7.9 % and +0.4 %: no order at all. The bounds pass
    // today's meshes with a little room and fail a wrong band, area or drive.
    row.tolerance = options.quick ? 0.03 : 0.02;
    add(refine(row, options, [&](int level) {
        LevelValue v;
        v.reference = reference.value;
        v.computed = drive_resistance(level, options.quadrature, v.panels);
        v.error = relative_error(v.computed, v.reference);
        return v;
    }));
}

}  // namespace murk
