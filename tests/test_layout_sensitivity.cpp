// murk layout's maps: the sensitivity map by reciprocity against direct dipole solves,
// the baseline readings against the solved electrode potentials and currents, and the
// detectable area and outline of a synthetic map against values worked out by hand.
#include "cases/input/case_reader.hpp"
#include "cases/input/layout_case.hpp"
#include "cases/layout/detectable_region.hpp"
#include "cases/layout/layout_readout.hpp"
#include "cases/layout/sensitivity_map.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/dipole_path.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>

using namespace murk;

namespace {

// A 40 cm capsule at a coarse 3 cm panel size, so that the system is small.
std::string hull_case(const std::string& water_extra, const std::string& layout) {
    return R"(title = "t"
[water]
conductivity = "200 uS/cm"
)" + water_extra + R"(
[mesh]
panel_size = "3 cm"
[robot]
shape = "capsule"
radius = "2.5 cm"
overall_length = "40 cm"
[[robot.electrode]]
name = "nose"
form = "ring"
from = "14 cm"
to = "18 cm"
[[robot.electrode]]
name = "tail"
form = "ring"
from = "-18 cm"
to = "-14 cm"
[[robot.electrode]]
name = "a"
form = "ring"
from = "-8 cm"
to = "-4 cm"
[[robot.electrode]]
name = "b"
form = "ring"
from = "4 cm"
to = "8 cm"
[[robot.electrode]]
name = "mid"
form = "ring"
from = "-1.5 cm"
to = "1.5 cm"
)" + layout;
}

const std::string kReference = R"(
[[layout]]
name = "ref"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", voltage = "-2 mV" }]
read = "reference"
sensors = ["a", "b"]
reference = "mid"
)";

const std::string kHeld = R"(
[[layout]]
name = "held"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", current = "-50 uA" }]
read = "current"
sensors = ["a", "mid", "b"]
)";

// The sensitivity map at a few points against R (x(dipole) - x0), x(dipole) from a
// direct solve with the unit dipole as a water source (unknowns_with_dipoles).
void check_reciprocity(const std::string& text) {
    const CaseSpec spec = read_case_text(text, "case.toml");
    const FixedPart<double> fixed(build_scene<double>(layout_case(spec, 0), true), QuadratureOptions{});
    const LayoutReadout readout = layout_readout(spec.layouts[0], fixed);
    const SensitivityMap map(fixed, readout.rows);
    Eigen::Matrix3Xd points(3, 3);
    points << 0.05, -0.12, 0.2, 0.06, 0.1, 0.03, 0.0, -0.04, 0.08;
    const Eigen::MatrixXd s = map.at(points);
    REQUIRE(s.rows() == readout.rows.rows());
    REQUIRE(s.cols() == 9);
    for (Eigen::Index j = 0; j < points.cols(); ++j)
        for (int k = 0; k < 3; ++k) {
            PointDipole<double> d;
            d.position = points.col(j);
            d.moment = Eigen::Vector3d::Unit(k);
            const Eigen::VectorXd x = unknowns_with_dipoles(fixed, {d}).col(0);
            const Eigen::VectorXd direct = readout.rows * (x - fixed.unknowns());
            const Eigen::VectorXd by_leads = s.col(3 * j + k);
            CAPTURE(j);
            CAPTURE(k);
            CHECK(direct.norm() > 0);
            // Reciprocity holds for the discrete system exactly: only rounding separates them.
            CHECK((by_leads - direct).norm() <= 1e-9 * direct.norm());
        }
}

}  // namespace

// Green's reciprocity theorem (Helmholtz 1853; as lead fields: Plonsey 1963, "Reciprocity
// applied to volume conductors and the ECG", IEEE Trans. Bio-Medical Electronics 10:9-12):
// the reading change caused by a dipole equals the dipole's moment dotted with the field of
// the reading's adjoint problem, here R A^-1 b = (A^-T R^T)^T b.
TEST_CASE("layout sensitivity: reciprocity equals direct dipole solves (differential voltages)") {
    check_reciprocity(hull_case("", kReference));
}

TEST_CASE("layout sensitivity: reciprocity equals direct dipole solves (held currents, water surface)") {
    check_reciprocity(hull_case("surface_z = \"10 cm\"\n", kHeld));
}

TEST_CASE("layout sensitivity: reciprocity equals direct dipole solves (held currents, surface and bottom)") {
    check_reciprocity(hull_case("surface_z = \"10 cm\"\nbottom_z = \"-8 cm\"\n", kHeld));
}

TEST_CASE("layout readout: baseline readings equal the solved electrode values") {
    const CaseSpec spec = read_case_text(hull_case("", kReference + kHeld), "case.toml");
    for (std::size_t l = 0; l < 2; ++l) {
        const Scene<double> scene = build_scene<double>(layout_case(spec, l), true);
        const Solution<double> solved = solve_scene(scene, QuadratureOptions{});  // the path of murk solve
        const FixedPart<double> fixed(build_scene<double>(layout_case(spec, l), true), QuadratureOptions{});
        const LayoutReadout readout = layout_readout(spec.layouts[l], fixed);
        const Eigen::VectorXd r = readout.rows * fixed.unknowns();
        const auto index = [&](const std::string& name) {
            for (std::size_t e = 0; e < scene.electrodes.size(); ++e)
                if (scene.electrodes[e].name == name) return e;
            FAIL("no electrode " << name);
            return std::size_t{0};
        };
        if (l == 0) {
            REQUIRE(r.size() == 2);
            CHECK(readout.units == "V");
            const double ref = solved.electrode_potential[index("mid")];
            CHECK(r(0) == doctest::Approx(solved.electrode_potential[index("a")] - ref).epsilon(1e-9));
            CHECK(r(1) == doctest::Approx(solved.electrode_potential[index("b")] - ref).epsilon(1e-9));
            CHECK(std::abs(r(0)) > 0);
        } else {
            REQUIRE(r.size() == 3);
            CHECK(readout.units == "A");
            CHECK(r(0) == doctest::Approx(solved.electrode_current[index("a")]).epsilon(1e-9));
            CHECK(r(2) == doctest::Approx(solved.electrode_current[index("b")]).epsilon(1e-9));
            CHECK(std::abs(r(0)) > 0);
        }
    }
}

// Cells by hand: u = {0, 1, 3} has cells [0, 0.5], [0.5, 2], [2, 3]; v = {0, 2} has
// [0, 1], [1, 2]. Flagged (u0, v0), (u1, v0), (u1, v1): 0.5 + 1.5 + 1.5 = 3.5.
TEST_CASE("detectable region: area and outline of a synthetic map") {
    const std::vector<double> u = {0, 1, 3}, v = {0, 2};
    const std::vector<std::uint8_t> flags = {1, 0, 1, 1, 0, 0};  // u fastest outside, v inside
    CHECK(flagged_area(u, v, flags, 1.0) == doctest::Approx(3.5));
    CHECK(flagged_area(u, v, flags, 0.5) == doctest::Approx(1.75));  // a grid at 30 degrees: sin = 1/2
    const std::vector<OutlineRing> rings = flagged_outline(u, v, flags, 0.0);
    REQUIRE(rings.size() == 1);
    CHECK_FALSE(rings[0].hole);
    // Shoelace area of the closed ring (the test's own sum), and the L shape has 6 corners.
    double twice = 0;
    for (std::size_t k = 0; k + 1 < rings[0].u.size(); ++k)
        twice += rings[0].u[k] * rings[0].v[k + 1] - rings[0].u[k + 1] * rings[0].v[k];
    CHECK(std::abs(twice) / 2 == doctest::Approx(3.5));
    CHECK(rings[0].u.front() == rings[0].u.back());
    int corners = 0;  // vertices where the ring turns
    const std::size_t n = rings[0].u.size() - 1;
    for (std::size_t k = 0; k < n; ++k) {
        const std::size_t a = (k + n - 1) % n, b = (k + 1) % n;
        const double cross = (rings[0].u[k] - rings[0].u[a]) * (rings[0].v[b] - rings[0].v[k]) -
                             (rings[0].v[k] - rings[0].v[a]) * (rings[0].u[b] - rings[0].u[k]);
        corners += std::abs(cross) > 1e-12;
    }
    CHECK(corners == 6);
}

// By hand: u = {0, 1, 3} cells 0.5, 1.5, 1; v = {0, 2} cells 1, 1; w = {0, 1, 2} cells 0.5, 1, 0.5.
// Flagged (u1, v0, w1) = 1.5 x 1 x 1 and (u2, v1, w0) = 1 x 1 x 0.5: 2.0, times det.
TEST_CASE("detectable region: volume of a synthetic 3-D map") {
    const std::vector<double> u = {0, 1, 3}, v = {0, 2}, w = {0, 1, 2};
    std::vector<std::uint8_t> flags(18, 0);
    flags[(1 * 2 + 0) * 3 + 1] = 1;
    flags[(2 * 2 + 1) * 3 + 0] = 1;
    CHECK(flagged_volume(u, v, w, flags, 1.0) == doctest::Approx(2.0));
    CHECK(flagged_volume(u, v, w, flags, 0.25) == doctest::Approx(0.5));
}

TEST_CASE("detectable region: a ring of cells has an outline with a hole") {
    const std::vector<double> u = {0, 1, 2}, v = {0, 1, 2};
    const std::vector<std::uint8_t> flags = {1, 1, 1, 1, 0, 1, 1, 1, 1};
    // Cells: ends half wide: [0, .5], [.5, 1.5], [1.5, 2]; all but the centre 1 x 1: 4 - 1 = 3.
    CHECK(flagged_area(u, v, flags, 1.0) == doctest::Approx(3.0));
    const std::vector<OutlineRing> rings = flagged_outline(u, v, flags, 0.0);
    REQUIRE(rings.size() == 2);
    CHECK_FALSE(rings[0].hole);
    CHECK(rings[1].hole);
    CHECK(flagged_outline(u, v, std::vector<std::uint8_t>(9, 0), 0.0).empty());
}
