// The refinement study of the compressed path beyond the dense limit: a
// resistive sphere (0.1x the water) in a uniform field, its dipole factor
// against the exact value (Jackson 1999, "Classical Electrodynamics", §4.4, in
// its conductive analogue; see exact_solutions.hpp) at 1,280, 5,120 and 20,480
// panels, every level solved by the compressed operator and the preconditioned
// iterative solve. 20,480 panels are 40,960 unknowns: 13 GB as a dense matrix,
// more than the machine this project is measured on could factor. The observed
// order must stay what the dense levels of "sphere field, resistive" show (about 2).
// (The conductive sphere is no study of order: its errors at 320, 1,280 and 5,120
// panels are 6e-6, 1.6e-4 and 8e-6, a cancellation, not a convergence.)
#include "geometry/shapes.hpp"
#include "solver/dipole_moment.hpp"
#include "solver/fixed_part.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

#include <cmath>

namespace murk {

namespace {
using namespace verification;

constexpr double kRadius = 0.01;  // m
constexpr double kWater = 0.01;   // S/m
constexpr double kRatio = 0.1;    // sphere / water conductivity

double compressed_dipole_factor(int level, const QuadratureOptions& quad, int& panels) {
    Scene<double> scene;
    scene.water_conductivity = kWater;
    scene.uniform_field = Vec3(0, 0, 1);
    TriangleMesh mesh = make_icosphere(kRadius, level);
    mesh.name = "sphere";
    panels = static_cast<int>(mesh.size());
    scene.surfaces.push_back(contact_surface<double>(mesh, kRatio * kWater));
    SolverOptions solver;
    solver.choice = SystemSolver::compressed;
    const FixedPart<double> fixed(scene, quad, solver);
    const auto p = induced_dipole_moment(fixed.scene().surfaces[0].mesh, fixed.solution().surfaces[0], kWater);
    return p(2) / (4.0 * M_PI * std::pow(kRadius, 3));
}
}  // namespace

void check_compressed_sphere(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    CheckResult row;
    row.name = "sphere field, resistive, compressed";
    row.source = "Jackson 1999 §4.4 (conductive analogue)";
    row.quantity = "dipole factor K";
    row.tolerance = options.quick ? 0.03 : 0.01;
    const std::vector<int> levels = options.quick ? std::vector<int>{3} : std::vector<int>{3, 4, 5};
    for (int level : levels) {
        row.reference = exact::sphere_dipole_factor(kRatio * kWater, kWater);
        row.computed = compressed_dipole_factor(level, options.quadrature, row.panels);
        row.relative_error = relative_error(row.computed, row.reference);
        if (!options.quick) row.convergence.push_back({row.panels, row.relative_error});
    }
    add(row);
}

}  // namespace murk
