// The [placement] table of a case (cases/README.md, [placement]): candidates listed or
// generated as rings, the drive layout, budget, criterion and target size, and one
// error line (file, line, key) per kind of bad placement.
#include "cases/input/case_reader.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <string>

using namespace murk;

namespace {

int line_with(const std::string& text, const std::string& needle) {
    const auto pos = text.find(needle);
    REQUIRE(pos != std::string::npos);
    return 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<long>(pos), '\n'));
}

std::string error_of(const std::string& text) {
    try {
        read_case_text(text, "case.toml");
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

// The message starts with "case.toml:LINE: KEY:" at the line of `needle` and holds `words`.
void check_error(const std::string& text, const std::string& needle, const std::string& key, const std::string& words) {
    const std::string m = error_of(text);
    CAPTURE(m);
    const std::string place = "case.toml:" + std::to_string(line_with(text, needle)) + ": " + key + ":";
    CHECK(m.rfind(place, 0) == 0);
    CHECK(m.find(words) != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
}

std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const auto pos = text.find(from);
    REQUIRE(pos != std::string::npos);
    return text.replace(pos, from.size(), to);
}

// A 40 cm capsule (x from -20 to 20 cm): emitters at the ends, a reference ring, two
// rings and a patch; a layout reading against the reference; targets of two sizes.
const std::string kCase = R"TOML(title = "t"
[water]
conductivity = "200 uS/cm"
[robot]
shape = "capsule"
radius = "2.5 cm"
overall_length = "40 cm"
[[robot.electrode]]
name = "nose"
form = "ring"
from = "15 cm"
to = "17 cm"
[[robot.electrode]]
name = "tail"
form = "ring"
from = "-17 cm"
to = "-15 cm"
[[robot.electrode]]
name = "ref"
form = "ring"
from = "-14 cm"
to = "-13 cm"
[[robot.electrode]]
name = "a"
form = "ring"
from = "12 cm"
to = "13 cm"
[[robot.electrode]]
name = "b"
form = "ring"
from = "-12 cm"
to = "-11 cm"
[[robot.electrode]]
name = "top"
form = "patch"
at = ["13.5 cm", "0 cm", "2.5 cm"]
radius = "0.3 cm"
[placement]
candidate_rings = { from = "-10 cm", to = "10 cm", count = 8, width = "1 cm" }
drive = "ends"
budget = 3
criterion = "detectable_area"
[[layout]]
name = "ends"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", current = "-50 uA" }]
read = "reference"
sensors = ["a", "b", "c03"]
reference = "ref"
[[layout]]
name = "diff"
emitters = [{ electrode = "nose", current = "50 uA" }]
read = "pairs"
pairs = [["a", "b"]]
[[object]]
name = "target"
shape = "sphere"
radius = "1 cm"
position = ["0 cm", "8 cm", "0 cm"]
conductivity = "conductor"
[sweep]
object = "target"
size = ["1 cm", "2 cm"]
[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = { from = "-30 cm", to = "30 cm", count = 3 }
v = { from = "5 cm", to = "10 cm", count = 2 }
)TOML";

const std::string kRings = "candidate_rings = { from = \"-10 cm\", to = \"10 cm\", count = 8, width = \"1 cm\" }";

// The case with `list` as its candidates instead of the rings (the layout then reads a and b).
std::string listed(const std::string& list) {
    return replaced(replaced(kCase, kRings, "candidates = " + list), "sensors = [\"a\", \"b\", \"c03\"]",
                    "sensors = [\"a\", \"b\"]");
}

}  // namespace

TEST_CASE("placement: generated rings become sites c01 .. c08, evenly spaced, usable by the layouts") {
    const CaseSpec spec = read_case_text(kCase, "case.toml");
    REQUIRE(spec.placement);
    const PlacementSpec& p = *spec.placement;
    CHECK(p.drive == 0);
    CHECK(p.budget == 3);
    CHECK(p.goal == PlacementGoal::detectable_region);
    CHECK(!p.target_size_m);
    CHECK(p.generated_rings);
    REQUIRE(p.candidates.size() == 8);
    CHECK(p.candidates.front() == "c01");
    CHECK(p.candidates.back() == "c08");
    // 8 rings of 1 cm in 20 cm: 12 cm of gaps, 7 of them, each 12/7 cm; the first starts at
    // -10 cm, the last ends at 10 cm (arithmetic of the definition in cases/README.md).
    std::vector<const ElectrodeSpec*> rings;
    for (const ElectrodeSpec& e : spec.robot->electrodes)
        if (e.name.size() == 3 && e.name[0] == 'c') rings.push_back(&e);
    REQUIRE(rings.size() == 8);
    CHECK(rings.front()->from_m == doctest::Approx(-0.10).epsilon(1e-12));
    CHECK(rings.back()->to_m == doctest::Approx(0.10).epsilon(1e-12));
    for (std::size_t k = 0; k < rings.size(); ++k) {
        CHECK(rings[k]->to_m - rings[k]->from_m == doctest::Approx(0.01).epsilon(1e-12));
        if (k > 0) CHECK(rings[k]->from_m - rings[k - 1]->to_m == doctest::Approx(0.12 / 7).epsilon(1e-12));
    }
    CHECK(spec.layouts[0].sensors[2] == "c03");  // a layout names a generated ring
}

TEST_CASE("placement: listed candidates, mean_log_det and a target size") {
    std::string t = replaced(kCase, kRings, "candidates = [\"b\", \"a\", \"top\"]");
    t = replaced(t, "sensors = [\"a\", \"b\", \"c03\"]", "sensors = [\"a\"]");
    t = replaced(t, "criterion = \"detectable_area\"", "criterion = \"mean_log_det\"\ntarget_size = \"1 cm\"");
    const CaseSpec spec = read_case_text(t, "case.toml");
    REQUIRE(spec.placement);
    CHECK(spec.placement->candidates == std::vector<std::string>{"b", "a", "top"});
    CHECK(!spec.placement->generated_rings);
    CHECK(spec.placement->goal == PlacementGoal::mean_log_det);
    REQUIRE(spec.placement->target_size_m);
    CHECK(*spec.placement->target_size_m == doctest::Approx(0.01));
}

TEST_CASE("placement: refusals name file, line and key") {
    SUBCASE("unknown key") {
        check_error(replaced(kCase, "budget = 3", "budget = 3\nsensors = 3"), "sensors = 3", "placement.sensors",
                    "unknown key");
    }
    SUBCASE("no drive") {
        check_error(replaced(kCase, "drive = \"ends\"\n", ""), "[placement]", "placement.drive", "missing required key");
    }
    SUBCASE("a drive that is no layout") {
        check_error(replaced(kCase, "drive = \"ends\"", "drive = \"front\""), "drive = \"front\"", "placement.drive",
                    "no [[layout]] is named 'front'");
    }
    SUBCASE("a drive without a reference") {
        check_error(replaced(kCase, "drive = \"ends\"", "drive = \"diff\""), "drive = \"diff\"", "placement.drive",
                    "has no reference");
    }
    SUBCASE("both kinds of candidates") {
        check_error(replaced(kCase, kRings, kRings + "\ncandidates = [\"a\"]"), kRings, "placement.candidate_rings",
                    "one of the two");
    }
    SUBCASE("no candidates") {
        check_error(replaced(kCase, kRings + "\n", ""), "[placement]", "placement.candidates", "one of the two");
    }
    SUBCASE("an unknown candidate") {
        const std::string t = listed("[\"a\", \"fin\"]");
        check_error(t, "candidates = [\"a\", \"fin\"]", "placement.candidates[2]", "no [[robot.electrode]] is named 'fin'");
    }
    SUBCASE("a candidate listed twice") {
        const std::string t = listed("[\"a\", \"b\", \"a\"]");
        check_error(t, "candidates = [\"a\", \"b\", \"a\"]", "placement.candidates[3]", "listed twice");
    }
    SUBCASE("a candidate that emits in the drive layout") {
        const std::string t = listed("[\"a\", \"nose\"]");
        check_error(t, "candidates = [\"a\", \"nose\"]", "placement.candidates", "emits in the drive layout");
    }
    SUBCASE("the drive layout's reference as a candidate") {
        const std::string t = listed("[\"ref\", \"a\"]");
        check_error(t, "candidates = [\"ref\", \"a\"]", "placement.candidates", "is the reference");
    }
    SUBCASE("rings that overlap each other") {
        const std::string t = replaced(kCase, "count = 8, width = \"1 cm\"", "count = 8, width = \"2.5 cm\"");
        check_error(t, "count = 8", "placement.candidate_rings.width", "would overlap each other");
    }
    SUBCASE("rings that overlap an existing site") {
        const std::string t = replaced(kCase, "from = \"-10 cm\", to = \"10 cm\"", "from = \"-11.5 cm\", to = \"10 cm\"");
        check_error(t, "from = \"-11.5 cm\"", "placement.candidate_rings", "electrode 'c01' overlaps electrode 'b'");
    }
    SUBCASE("a ring width that is not a length") {
        const std::string t = replaced(kCase, "width = \"1 cm\"", "width = \"1 s\"");
        check_error(t, "width = \"1 s\"", "placement.candidate_rings.width", "length");
    }
    SUBCASE("a ring count of zero") {
        const std::string t = replaced(kCase, "count = 8", "count = 0");
        check_error(t, "count = 0", "placement.candidate_rings.count", "a whole number from 1");
    }
    SUBCASE("a budget beyond the candidates") {
        check_error(replaced(kCase, "budget = 3", "budget = 9"), "budget = 9", "placement.budget",
                    "from 1 to the 8 candidates, got the number 9");
    }
    SUBCASE("a budget of zero") {
        check_error(replaced(kCase, "budget = 3", "budget = 0"), "budget = 0", "placement.budget", "from 1 to the 8");
    }
    SUBCASE("an unknown criterion") {
        check_error(replaced(kCase, "criterion = \"detectable_area\"", "criterion = \"coverage\""),
                    "criterion = \"coverage\"", "placement.criterion", "expected one of detectable_area");
    }
    SUBCASE("a volume criterion on a plane") {
        check_error(replaced(kCase, "criterion = \"detectable_area\"", "criterion = \"detectable_volume\""),
                    "criterion = \"detectable_volume\"", "placement.criterion", "use \"detectable_area\"");
    }
    SUBCASE("a target size that is not one of the sizes") {
        check_error(replaced(kCase, "budget = 3", "budget = 3\ntarget_size = \"3 cm\""), "target_size = \"3 cm\"",
                    "placement.target_size", "not one of the target sizes");
    }
    SUBCASE("placement without layouts") {
        std::string t = kCase.substr(0, kCase.find("[[layout]]")) + kCase.substr(kCase.find("[[object]]"));
        check_error(t, "[placement]", "placement", "the case has none");
    }
}
