// Convergence of patch electrodes cut into the hull (geometry/electrode_cut.hpp,
// cases/scene/hull_electrodes.hpp): the drive current of two voltage-driven patches
// and the potential of a third, sensing patch as the panels shrink. With panel
// edges on the patch rims, graded toward them, and every patch its true area, both
// must change monotonically and by less at every step (the behaviour of a
// convergent discretization, common practice; the figures are printed so that
// they can be quoted). The case is invented: a 12 cm capsule of radius 2 cm in
// water of 200 uS/cm, two 1 cm patches at +-0.5 V, a 6 mm sensing patch.
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/bem_system.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

using namespace murk;

namespace {

std::string patch_case(const std::string& panel) {
    return R"(title = "patch convergence"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = ")" + panel + R"("
[robot]
shape = "capsule"
radius = "2 cm"
overall_length = "12 cm"
[[robot.electrode]]
name = "plus"
form = "patch"
at = ["3 cm", "0 cm", "2 cm"]
radius = "1 cm"
role = "emitter"
voltage = "0.5 V"
[[robot.electrode]]
name = "minus"
form = "patch"
at = ["-3 cm", "0 cm", "2 cm"]
radius = "1 cm"
role = "emitter"
voltage = "-0.5 V"
[[robot.electrode]]
name = "eye"
form = "patch"
at = ["1.5 cm", "-1.2 cm", "1.6 cm"]
radius = "6 mm"
role = "sensor"
)";
}

// Monotone, with every step smaller than the one before.
void check_converging(const std::vector<double>& v) {
    for (double x : v) CAPTURE(x);
    const double first = v[1] - v[0];
    for (std::size_t k = 1; k + 1 < v.size(); ++k) {
        const double step = v[k + 1] - v[k], before = v[k] - v[k - 1];
        CHECK(step * first > 0.0);
        CHECK(std::abs(step) < std::abs(before));
    }
}

}  // namespace

TEST_CASE("patch electrodes: drive current and a sensing patch's potential converge monotonically") {
    std::vector<double> current, reading;
    for (const char* panel : {"20 mm", "14 mm", "10 mm", "7 mm"}) {
        const CaseSpec spec = read_case_text(patch_case(panel), "case.toml");
        const Scene<double> scene = build_scene<double>(spec, true);
        const std::vector<ElectrodeArea> areas = electrode_areas(spec, scene);
        for (const ElectrodeArea& a : areas) CHECK(std::abs(a.mesh_m2 / a.exact_m2 - 1.0) < 1e-3);
        const Solution<double> s = solve_scene(scene, quadrature_options(spec));
        current.push_back(s.electrode_current[0]);
        reading.push_back(s.electrode_potential[2]);
        // Order of magnitude: a disc of radius a on an insulating plane has the access
        // resistance 1 / (4 sigma a) to infinity (Newman 1966, "Resistance for flow of
        // current to a disk", J. Electrochem. Soc. 113; from memory), so 0.5 V drives
        // 4 sigma a 0.5 V = 0.4 mA; the convex hull and the opposite patch add some.
        // (The two drive currents need not balance: the potentials are set against
        // infinity, and the sensing patch breaks the mirror symmetry.)
        const double newman = 4.0 * 0.02 * 0.01 * 0.5;
        CHECK(current.back() > newman);
        CHECK(current.back() < 1.5 * newman);
        CHECK(s.electrode_current[1] < 0.0);
        CHECK(std::abs(s.electrode_current[1] / s.electrode_current[0] + 1.0) < 0.02);
        std::printf("patch convergence: panel_size %s, %zu panels, drive current %.6e A, sensing patch %.6e V, "
                    "patch areas %.4e %.4e %.4e m^2 (exact %.4e %.4e %.4e)\n",
                    panel, scene.surfaces[0].mesh.size(), current.back(), reading.back(), areas[0].mesh_m2,
                    areas[1].mesh_m2, areas[2].mesh_m2, areas[0].exact_m2, areas[1].exact_m2, areas[2].exact_m2);
    }
    check_converging(current);
    check_converging(reading);
}
