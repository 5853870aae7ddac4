// Drive resistance between two ring electrodes on an insulating capsule: a current
// I enters one ring and leaves by the other, R = (V1 - V2) / I. The reference is
// murk's own independent axisymmetric boundary-integral solver
// (verify/axisymmetric_electrodes.hpp: exact generatrix, ring-source kernels,
// elements graded at the electrode edges, Richardson-extrapolated to about 1e-7
// relative; its header says why it shares nothing with the 3-D panel code, and
// tests/test_axisymmetric_electrodes.cpp checks it against a whole-sphere
// electrode and Newman's 1966 disc resistance).
//
// The electrodes are the hull panels whose centroids fall inside each band, so
// their area follows the mesh and the current concentration at the ring edges is
// not resolved: the error need not fall monotonically. Only `ring_pair_hull`
// builds murk's mesh, so that a mesher with panel edges along the ring boundaries
// can replace it.
#include "geometry/regions.hpp"
#include "geometry/shapes.hpp"
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
    TriangleMesh hull = make_capsule(kRadius, kCylinder, hull_edge(level));
    hull.name = "hull";
    for (int e = 0; e < 2; ++e) tag_band(hull, e + 1, Vec3(0, 0, 0), Vec3(1, 0, 0), kRings[e][0], kRings[e][1]);
    Surface<double> surface = sealed_surface<double>(hull, -1);
    for (std::size_t t = 0; t < hull.size(); ++t) surface.panel_electrode[t] = hull.region[t] - 1;
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
    // Centroid-tagged rings (measured 2026-12-02, reference 1277.64 ohm): at 10, 7.1
    // and 5 mm panels the rings cover 127 %, 89 % and 105 % of their true area and R
    // is off by -4.4 %, +7.9 % and +0.4 % (12, 8.5, 6 mm: +9.1 %, +0.7 %, +4.1 %).
    // The two mesh errors (band area, unresolved edge current) cancel at some sizes,
    // so the error does not fall monotonically and the printed order is erratic;
    // these bounds pass today's meshes and fail a wrong band or a wrong drive. With
    // a hull meshed on the ring edges they should tighten to a fraction of 1 %.
    row.tolerance = options.quick ? 0.10 : 0.02;
    add(refine(row, options, [&](int level) {
        LevelValue v;
        v.reference = reference.value;
        v.computed = drive_resistance(level, options.quadrature, v.panels);
        v.error = relative_error(v.computed, v.reference);
        return v;
    }));
}

}  // namespace murk
