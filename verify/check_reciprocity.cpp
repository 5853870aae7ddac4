// Reciprocity: on a capsule hull with four ring electrodes and a conducting
// sphere nearby, driving A->B and reading C-D gives the same transfer impedance
// as driving C->D and reading A-B. This is an exact theorem of linear
// conduction (Helmholtz reciprocity; e.g. Plonsey & Barr, "Bioelectricity"), so
// the disagreement measures discretization error only.
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "verify/check_support.hpp"

#include <cmath>

namespace murk {

namespace {
using namespace verification;

constexpr double kWater = 0.01;  // S/m
constexpr double kHullRadius = 0.02, kHullCylinder = 0.16, kRingWidth = 0.012;
const double kRingCentres[4] = {-0.07, -0.03, 0.03, 0.07};  // A, B, C, D along the axis

double hull_edge(int level) { return 0.012 / std::pow(2.0, 0.5 * (level - 2)); }

// Transfer impedance (ohm): current I into `from`, out of `to`; voltage read
// between the two other (floating) rings.
double transfer_impedance(int level, int from, int to, int read_plus, int read_minus,
                          const QuadratureOptions& quad, int& panels) {
    Scene<double> scene;
    scene.water_conductivity = kWater;
    TriangleMesh hull = make_capsule(kHullRadius, kHullCylinder, hull_edge(level));
    hull.name = "hull";
    Surface<double> surface = sealed_surface<double>(hull, -1);
    for (std::size_t t = 0; t < hull.size(); ++t)
        for (int e = 0; e < 4; ++e)
            if (std::abs(hull.centroid(t).x() - kRingCentres[e]) < 0.5 * kRingWidth) surface.panel_electrode[t] = e;
    scene.surfaces.push_back(surface);
    const char* names[4] = {"A", "B", "C", "D"};
    for (int e = 0; e < 4; ++e) {
        ElectrodeDrive drive = (e == from || e == to) ? ElectrodeDrive::current : ElectrodeDrive::floating;
        scene.electrodes.push_back({names[e], drive, e == from ? 1e-3 : e == to ? -1e-3 : 0.0});
    }
    TriangleMesh object = make_sphere(0.015, hull_edge(level));
    object.name = "object";
    translate(object, Vec3(0.01, 0.045, 0.0));
    scene.surfaces.push_back(contact_surface<double>(object, 10 * kWater));
    panels = static_cast<int>(hull.size());
    const Solution<double> sol = solve_scene(scene, quad);
    return (sol.electrode_potential[read_plus] - sol.electrode_potential[read_minus]) / 1e-3;
}

}  // namespace

void check_reciprocity(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    CheckResult row;
    row.name = "reciprocity, hull with four rings";
    row.source = "reciprocity theorem (exact)";
    row.quantity = "transfer impedance (ohm)";
    row.tolerance = 0.001;
    add(refine(row, options, [&](int level) {
        LevelValue v;
        v.reference = transfer_impedance(level, 0, 1, 2, 3, options.quadrature, v.panels);
        v.computed = transfer_impedance(level, 2, 3, 0, 1, options.quadrature, v.panels);
        v.error = relative_error(v.computed, v.reference);
        return v;
    }));
}

}  // namespace murk
