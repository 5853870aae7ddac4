// A lossy dielectric sphere in lossy water, across its Maxwell-Wagner relaxation:
// amplitude and phase of the computed dipole factor against the single-pole
// relaxation form K_inf + (K_0 - K_inf) / (1 + i omega tau) (Morgan & Green 2003,
// see exact_solutions.hpp), at frequencies from a hundredth of the relaxation
// frequency f_MW = 1 / (2 pi tau) to a hundred times it. The object is resistive at
// low frequency (K_0 < 0) and dielectric-dominated at high frequency (K_inf > 0),
// so the phase of K swings through about 70 degrees near f_MW: the regime in which a
// capacitive object differs from a resistive one of the same amplitude.
#include "geometry/shapes.hpp"
#include "solver/dipole_moment.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

#include <cmath>
#include <cstdio>

namespace murk {

namespace {
using namespace verification;

// Test values: a 1 cm sphere of 1e-3 S/m and relative permittivity 2e5 (a lossy
// dielectric, as tissue at kHz) in water of 1e-2 S/m and 80: f_MW = 3.77 kHz, inside
// the band of wave-type fish.
constexpr double kRadius = 0.01;                // m
constexpr double kEpsilon0 = 8.8541878128e-12;  // F/m, CODATA 2018
constexpr double kWater = 1e-2, kWaterEps = 80 * kEpsilon0;
constexpr double kObject = 1e-3, kObjectEps = 2e5 * kEpsilon0;

// Computed dipole factor p_z / (4 pi a^3 E) at angular frequency omega.
Complex computed_factor(int level, double omega, const QuadratureOptions& quad, int& panels) {
    const Complex water(kWater, omega * kWaterEps), object(kObject, omega * kObjectEps);
    Scene<Complex> scene;
    scene.water_conductivity = water;
    scene.uniform_field = Eigen::Matrix<Complex, 3, 1>(0, 0, 1);
    TriangleMesh mesh = make_icosphere(kRadius, level);
    mesh.name = "sphere";
    panels = static_cast<int>(mesh.size());
    scene.surfaces.push_back(contact_surface<Complex>(mesh, object));
    const Solution<Complex> sol = solve_scene(scene, quad);
    const auto p = induced_dipole_moment(scene.surfaces[0].mesh, sol.surfaces[0], water);
    return p(2) / (4.0 * M_PI * std::pow(kRadius, 3));
}

}  // namespace

void check_maxwell_wagner_sphere(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    const double tau = exact::maxwell_wagner_relaxation_time(kObject, kObjectEps, kWater, kWaterEps);
    for (double ratio : {0.01, 0.3, 1.0, 3.0, 100.0}) {  // f / f_MW
        const double omega = ratio / tau;
        const Complex reference = exact::maxwell_wagner_dipole_factor(kObject, kObjectEps, kWater, kWaterEps, omega);
        char at[32];
        std::snprintf(at, sizeof at, "%g f_MW", ratio);
        CheckResult amplitude;
        amplitude.name = std::string("Maxwell-Wagner sphere, ") + at + ", |K|";
        amplitude.source = "Morgan & Green 2003, Maxwell-Wagner relaxation";
        amplitude.quantity = "|dipole factor K|";
        amplitude.tolerance = options.quick ? 0.01 : 0.005;  // and rad for the phase
        add_amplitude_and_phase(amplitude, std::string("Maxwell-Wagner sphere, ") + at + ", arg K (rad)",
                                "phase of K (rad)", reference, options,
                                [&](int level, int& panels) { return computed_factor(level, omega, options.quadrature, panels); },
                                add);
    }
}

}  // namespace murk
