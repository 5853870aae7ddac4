// Membrane-covered sphere in a uniform field: the induced transmembrane voltage
// against Schwan's equation with membrane conductance (Kotnik et al. 1997).
#include "geometry/shapes.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

namespace murk {

namespace {
using namespace verification;

// Test values chosen so that the membrane conductance term matters (it changes
// the amplitude by about a third): radius 1 cm, inside 0.5 S/m, outside 0.01 S/m,
// membrane 1 ohm m^2, field 1 V/m.
constexpr double kRadius = 0.01, kInside = 0.5, kOutside = 0.01, kMembrane = 1.0, kField = 1.0;

// Amplitude A of the transmembrane voltage A cos(theta), by an area-weighted
// least-squares fit over all panels.
double membrane_amplitude(int level, const QuadratureOptions& quad, int& panels) {
    Scene<double> scene;
    scene.water_conductivity = kOutside;
    scene.uniform_field = Eigen::Vector3d(0, 0, kField);
    Surface<double> cell = contact_surface<double>(make_icosphere(kRadius, level), kInside);
    cell.mesh.name = "cell";
    cell.kind = InterfaceKind::membrane;
    cell.membrane_resistance = kMembrane;
    panels = static_cast<int>(cell.mesh.size());
    scene.surfaces.push_back(cell);
    const Solution<double> sol = solve_scene(scene, quad);
    const auto& values = sol.surfaces[0];
    double num = 0, den = 0;
    for (std::size_t t = 0; t < cell.mesh.size(); ++t) {
        const double cos_theta = cell.mesh.centroid(t).normalized().z();
        const double dv = values.inner_potential(t) - values.outer_potential(t);
        num += cell.mesh.area(t) * dv * cos_theta;
        den += cell.mesh.area(t) * cos_theta * cos_theta;
    }
    return num / den;
}

}  // namespace

void check_membrane_sphere(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    CheckResult row;
    row.name = "membrane sphere, transmembrane voltage";
    row.source = "Schwan eq. with conductance, Kotnik et al. 1997";
    row.quantity = "amplitude of dV cos(theta) (V)";
    row.tolerance = options.quick ? 0.03 : 0.01;
    add(refine(row, options, [&](int level) {
        LevelValue v;
        v.computed = membrane_amplitude(level, options.quadrature, v.panels);
        v.reference = exact::membrane_voltage_amplitude(kField, kRadius, kMembrane, kInside, kOutside);
        v.error = relative_error(v.computed, v.reference);
        return v;
    }));
}

}  // namespace murk
