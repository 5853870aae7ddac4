// A membrane-covered sphere with membrane capacitance and conductance in a uniform
// field, across its characteristic frequency: amplitude and phase of the induced
// transmembrane voltage against the frequency-dependent Schwan equation (Grosse &
// Schwan 1992, see exact_solutions.hpp), at frequencies from a hundredth of the
// corner f_m = 1 / (2 pi tau_m) to a hundred times it. Below the corner the
// membrane's resistance holds the voltage; above it the capacitance shorts it, the
// amplitude falls as 1/f and the phase tends to -90 degrees.
#include "geometry/shapes.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

#include <cmath>
#include <cstdio>

namespace murk {

namespace {
using namespace verification;

// The values of the direct-current membrane check (radius 1 cm, inside 0.5 S/m,
// outside 0.01 S/m, membrane 1 S/m^2, field 1 V/m) plus a membrane capacitance of
// 1 uF/cm^2 = 1e-2 F/m^2 (the textbook value of a cell membrane, common practice):
// tau_m = 3.4 ms, f_m = 46.5 Hz.
constexpr double kRadius = 0.01, kInside = 0.5, kOutside = 0.01, kConductance = 1.0, kField = 1.0;
constexpr double kCapacitance = 1e-2;  // F/m^2

// Complex amplitude A of the transmembrane voltage A cos(theta) at angular
// frequency omega, by an area-weighted least-squares fit over all panels.
Complex membrane_amplitude(int level, double omega, const QuadratureOptions& quad, int& panels) {
    Scene<Complex> scene;
    scene.water_conductivity = kOutside;
    scene.uniform_field = Eigen::Matrix<Complex, 3, 1>(0, 0, kField);
    Surface<Complex> cell = contact_surface<Complex>(make_icosphere(kRadius, level), kInside);
    cell.mesh.name = "cell";
    cell.kind = InterfaceKind::membrane;
    cell.membrane_resistance = 1.0 / Complex(kConductance, omega * kCapacitance);
    panels = static_cast<int>(cell.mesh.size());
    scene.surfaces.push_back(cell);
    const Solution<Complex> sol = solve_scene(scene, quad);
    const auto& values = sol.surfaces[0];
    Complex num = 0;
    double den = 0;
    for (std::size_t t = 0; t < cell.mesh.size(); ++t) {
        const double cos_theta = cell.mesh.centroid(t).normalized().z();
        num += cell.mesh.area(t) * (values.inner_potential(t) - values.outer_potential(t)) * cos_theta;
        den += cell.mesh.area(t) * cos_theta * cos_theta;
    }
    return num / den;
}

}  // namespace

void check_membrane_capacitance(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    const double tau = exact::membrane_charging_time(kRadius, kConductance, kCapacitance, kInside, kOutside);
    for (double ratio : {0.01, 0.3, 1.0, 3.0, 100.0}) {  // f / f_m
        const double omega = ratio / tau;
        const Complex reference =
            exact::membrane_voltage_at_frequency(kField, kRadius, kConductance, kCapacitance, kInside, kOutside, omega);
        char at[32];
        std::snprintf(at, sizeof at, "%g f_m", ratio);
        CheckResult amplitude;
        amplitude.name = std::string("membrane sphere with C_m, ") + at + ", |dV|";
        amplitude.source = "Grosse & Schwan 1992, Schwan eq. with C_m, g_m";
        amplitude.quantity = "amplitude of dV cos(theta) (V)";
        amplitude.tolerance = options.quick ? 0.01 : 0.005;  // and rad for the phase
        add_amplitude_and_phase(amplitude, std::string("membrane sphere with C_m, ") + at + ", arg dV",
                                "phase of dV (rad)", reference, options,
                                [&](int level, int& panels) { return membrane_amplitude(level, omega, options.quadrature, panels); },
                                add);
    }
}

}  // namespace murk
