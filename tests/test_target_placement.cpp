// murk layout's targets: the grid and tensors read from [sweep], and where a target fits
// beside the hull (clearance and blocked points).
#include "cases/input/case_reader.hpp"
#include "cases/layout/target_grid.hpp"
#include "cases/layout/target_placement.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>

using namespace murk;

namespace {

const std::string kCase = R"TOML(title = "t"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1 cm"
[robot]
shape = "sphere"
radius = "5 cm"
[[robot.electrode]]
name = "e"
form = "patch"
at = ["5 cm", "0 cm", "0 cm"]
radius = "1 cm"
[[robot.electrode]]
name = "s"
form = "patch"
at = ["-5 cm", "0 cm", "0 cm"]
radius = "1 cm"
[[robot.electrode]]
name = "e2"
form = "patch"
at = ["0 cm", "5 cm", "0 cm"]
radius = "1 cm"
[[layout]]
name = "one"
emitters = [{ electrode = "e", current = "1 uA" }]
read = "reference"
sensors = ["e2"]
reference = "s"
[[object]]
name = "target"
shape = "sphere"
radius = "1 cm"
position = ["0 cm", "20 cm", "0 cm"]
conductivity = "conductor"
[sweep]
object = "target"
size = ["1 cm", "2 cm"]
[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = ["0 cm"]
v = ["0 cm", "6 cm", "9 cm", "20 cm"]
[detection]
amplifier_noise = "10 nV/sqrt(Hz)"
integration_time = "1 ms"
)TOML";

}  // namespace

TEST_CASE("target grid: points, sizes and the tensor of a perfectly conducting sphere") {
    const CaseSpec spec = read_case_text(kCase, "case.toml");
    const TargetGrid g = target_grid(spec);
    REQUIRE(g.size() == 4);
    CHECK(g.points(1, 2) == doctest::Approx(0.09));
    REQUIRE(g.size_m.size() == 2);
    // A perfectly conducting sphere of radius a in a uniform field carries p = 4 pi a^3 E
    // (Jackson 1999, "Classical Electrodynamics", 3rd ed., section 4.4, the conducting limit
    // of the dielectric sphere; as a polarizability, the depolarization factor 1/3).
    for (std::size_t k = 0; k < 2; ++k) {
        const double a = g.size_m[k];
        CHECK(g.polarization[k](0, 0) == doctest::Approx(4 * M_PI * a * a * a));
        CHECK(g.polarization[k](2, 2) == doctest::Approx(4 * M_PI * a * a * a));
        CHECK(std::abs(g.polarization[k](0, 1)) < 1e-15);
    }

    // Placement beside a 5 cm sphere: the centre is inside (blocked, clearance 0); 6 cm from
    // the centre is 1 cm out, too close for a 1 cm target (it needs 1 cm plus a tenth of a
    // panel); 9 cm is 4 cm out; 20 cm is 15 cm out. The mesh's flat panels lie inside the
    // true sphere by at most their sagitta, about r (1 - cos(edge / 2r)) = 0.25 mm here.
    const TargetPlacement p = place_targets(spec, g);
    CHECK(p.clearance_m[0] == 0.0);
    CHECK(p.clearance_m[2] == doctest::Approx(0.04).epsilon(0.02));
    CHECK(p.clearance_m[3] == doctest::Approx(0.15).epsilon(0.01));
    CHECK(p.blocked[0] == std::vector<std::uint8_t>{1, 1, 0, 0});
    CHECK(p.blocked[1] == std::vector<std::uint8_t>{1, 1, 0, 0});  // 2 cm fits at 4 cm out
}

TEST_CASE("target grid: refusals name the file and the key") {
    const auto error_of = [](const std::string& text) {
        try {
            target_grid(read_case_text(text, "case.toml"));
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string();
    };
    std::string text = kCase;
    text.replace(text.find("sensors = [\"e2\"]"), 16, "sensors = [\"e\"]");  // refused by the reader first
    CHECK(error_of(text).find("already has a part") != std::string::npos);
    std::string no_grid = kCase;
    no_grid.replace(no_grid.find("[sweep.grid]"), std::string::npos, "");
    no_grid += "distance = [\"1 cm\"]\n";
    const std::string m = error_of(no_grid);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(1 + std::count(kCase.begin(), kCase.begin() + static_cast<long>(kCase.find("[sweep]")), '\n')) + ": sweep", 0) == 0);
    CHECK(m.find("needs a [sweep] with a [sweep.grid]") != std::string::npos);
    // Every axis murk layout does not vary is refused by name, none silently ignored.
    for (const std::string axis : {"water_conductivity = [\"100 uS/cm\"]", "frequency = [\"1 kHz\"]",
                                   "conductivity = [\"conductor\"]", "surface_distance = [\"1 cm\"]"}) {
        std::string text = kCase;
        text.insert(text.find("size = ["), axis + "\n");
        if (axis.rfind("surface", 0) == 0) text.replace(text.find("conductivity = \"200 uS/cm\""), 26,
                                                        "conductivity = \"200 uS/cm\"\nsurface_z = \"30 cm\"");
        const std::string e = error_of(text);
        CAPTURE(axis);
        CAPTURE(e);
        const std::string key = axis.substr(0, axis.find(' '));
        CHECK(e.find(": sweep." + key + ": murk layout varies only the target's position") != std::string::npos);
    }
}

TEST_CASE("target grid: any shape of target, its tensor by boundary elements (a conducting cube)") {
    std::string text = kCase;
    const auto swap_text = [&text](const std::string& from, const std::string& to) {
        REQUIRE(text.find(from) != std::string::npos);
        text.replace(text.find(from), from.size(), to);
    };
    swap_text("shape = \"sphere\"\nradius = \"1 cm\"\nposition",
              "shape = \"box\"\nsize = [\"2 cm\", \"2 cm\", \"2 cm\"]\npanel_size = \"2.5 mm\"\nposition");
    swap_text("size = [\"1 cm\", \"2 cm\"]", "size = [\"1 cm\"]");
    const TargetGrid g = target_grid(read_case_text(text, "case.toml"));
    REQUIRE(g.polarization.size() == 1);
    // The normalized polarizability of a perfectly conducting cube, alpha / volume = 3.6442
    // in the units where a sphere's is 3 (p = alpha E, our M; Sihvola, Yla-Oijala, Jarvenpaa &
    // Avelin 2004, "Polarizabilities of Platonic solids", IEEE Trans. Antennas Propag. 52:2226,
    // the limit of infinite permittivity; the digits from memory). A flat-panel mesh of the
    // cube has the exact shape; 8 x 8 squares a face leave the edge singularities coarse.
    const double volume = 0.02 * 0.02 * 0.02;
    const Eigen::Matrix3d& m = g.polarization[0];
    CAPTURE(m);
    for (int i = 0; i < 3; ++i) CHECK(m(i, i) / volume == doctest::Approx(3.6442).epsilon(0.03));
    CHECK(std::abs(m(0, 1)) < 1e-3 * m(0, 0));
    // Halving the panels halves nothing exactly, but the error must shrink (convergence).
    swap_text("panel_size = \"2.5 mm\"", "panel_size = \"5 mm\"");
    const double coarse = target_grid(read_case_text(text, "case.toml")).polarization[0](0, 0) / volume;
    CHECK(std::abs(m(0, 0) / volume - 3.6442) < 0.7 * std::abs(coarse - 3.6442));
    // The target reaches its corners, sqrt(3) half-edges from its centre, and is blocked
    // within that reach of the hull, not within its half-edge.
    CHECK(g.reach_m[0] == doctest::Approx(std::sqrt(3.0) * 0.01));
}
