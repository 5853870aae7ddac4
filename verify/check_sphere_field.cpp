// Sphere in a uniform field: conductive, resistive, near-perfect conductor,
// perfect conductor (floating equipotential), insulator, and a lossy dielectric
// at 1 kHz. Reference: the dipole factor of Jackson §4.4 (see exact_solutions.hpp).
#include "geometry/shapes.hpp"
#include "solver/dipole_moment.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

#include <cmath>

namespace murk {

namespace {
using namespace verification;

constexpr double kRadius = 0.01;        // m
constexpr double kWater = 0.01;         // S/m (100 uS/cm)
constexpr double kEpsilon0 = 8.8541878128e-12;  // F/m, CODATA 2018

enum class Limit { none, insulator, conductor };

// Computed dipole factor p_z / (4 pi a^3 E) of a sphere described by `limit` or
// by its interior conductivity.
template <class S>
S dipole_factor(int level, S sigma_in, S sigma_w, Limit limit, const QuadratureOptions& quad, int& panels) {
    Scene<S> scene;
    scene.water_conductivity = sigma_w;
    scene.uniform_field = Eigen::Matrix<S, 3, 1>(S(0), S(0), S(1));
    TriangleMesh mesh = make_icosphere(kRadius, level);
    mesh.name = "sphere";
    panels = static_cast<int>(mesh.size());
    if (limit == Limit::none) {
        scene.surfaces.push_back(contact_surface<S>(mesh, sigma_in));
    } else if (limit == Limit::insulator) {
        scene.surfaces.push_back(sealed_surface<S>(mesh, -1));
    } else {
        scene.surfaces.push_back(sealed_surface<S>(mesh, 0));
        scene.electrodes.push_back({"sphere", ElectrodeDrive::floating, S(0)});
    }
    const Solution<S> sol = solve_scene(scene, quad);
    const auto p = induced_dipole_moment(scene.surfaces[0].mesh, sol.surfaces[0], sigma_w);
    return p(2) / (4.0 * M_PI * std::pow(kRadius, 3));
}

CheckResult real_row(const char* name, double ratio, Limit limit, const VerifyOptions& options) {
    CheckResult row;
    row.name = name;
    row.source = "Jackson 1999 §4.4 (conductive analogue)";
    row.quantity = "dipole factor K";
    row.tolerance = options.quick ? 0.03 : 0.01;
    return refine(row, options, [&](int level) {
        LevelValue v;
        v.computed = dipole_factor<double>(level, ratio * kWater, kWater, limit, options.quadrature, v.panels);
        v.reference = limit == Limit::insulator ? -0.5
                      : limit == Limit::conductor ? 1.0
                                                  : exact::sphere_dipole_factor(ratio * kWater, kWater);
        v.error = relative_error(v.computed, v.reference);
        return v;
    });
}

}  // namespace

void check_sphere_in_uniform_field(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    add(real_row("sphere field, conductive (10x water)", 10.0, Limit::none, options));
    add(real_row("sphere field, resistive (0.1x water)", 0.1, Limit::none, options));
    add(real_row("sphere field, near-perfect conductor (1e6x)", 1e6, Limit::none, options));
    add(real_row("sphere field, perfect conductor (floating)", 0.0, Limit::conductor, options));
    add(real_row("sphere field, insulator (j = 0)", 0.0, Limit::insulator, options));

    // Lossy dielectric at 1 kHz: sigma + i omega eps0 eps_r. Inputs are arbitrary
    // test values chosen so that the imaginary part matters.
    const double omega = 2.0 * M_PI * 1000.0;
    const Complex water(kWater, omega * kEpsilon0 * 80.0);
    const Complex object(1e-3, omega * kEpsilon0 * 2e5);
    CheckResult row;
    row.name = "sphere field, complex conductivity at 1 kHz";
    row.source = "Jackson 1999 §4.4, Maxwell-Wagner form";
    row.quantity = "|dipole factor K|";
    row.tolerance = options.quick ? 0.03 : 0.01;
    add(refine(row, options, [&](int level) {
        LevelValue v;
        const Complex k = dipole_factor<Complex>(level, object, water, Limit::none, options.quadrature, v.panels);
        const Complex ref = exact::sphere_dipole_factor(object, water);
        v.computed = std::abs(k);
        v.reference = std::abs(ref);
        v.error = relative_error(k, ref);  // of the complex value, not only its magnitude
        return v;
    }));
}

}  // namespace murk
