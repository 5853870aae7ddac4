// Case files with [[layout]] tables (cases/README.md, [[layout]]): electrode sites on
// the hull, layouts that name them, and one error line per kind of bad layout or site.
#include "cases/input/case_reader.hpp"
#include "cases/input/layout_case.hpp"
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

// The message starts with "case.toml:LINE: KEY:" at the line of `needle` (plus `offset`
// lines) and holds `words`.
void check_error(const std::string& text, const std::string& needle, const std::string& key, const std::string& words,
                 int offset = 0) {
    const std::string m = error_of(text);
    CAPTURE(m);
    const std::string place = "case.toml:" + std::to_string(line_with(text, needle) + offset) + ": " + key + ":";
    CHECK(m.rfind(place, 0) == 0);
    CHECK(m.find(words) != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
}

// A 40 cm capsule of radius 2.5 cm (x from -20 to 20 cm) with four ring sites and a patch.
const std::string kHull = R"TOML(title = "t"
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
name = "a"
form = "ring"
from = "-5 cm"
to = "-4 cm"
[[robot.electrode]]
name = "b"
form = "ring"
from = "4 cm"
to = "5 cm"
[[robot.electrode]]
name = "top"
form = "patch"
at = ["0 cm", "0 cm", "2.5 cm"]
radius = "1 cm"
)TOML";

const std::string kReference = R"TOML(
[[layout]]
name = "ref"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", voltage = "-2 mV" }]
read = "reference"
sensors = ["a", "b"]
reference = "top"
)TOML";

const std::string kPairs = R"TOML(
[[layout]]
name = "diff"
emitters = [{ electrode = "a", current = "1 uA" }]
read = "pairs"
pairs = [["nose", "tail"], ["b", "top"]]
)TOML";

const std::string kHeld = R"TOML(
[[layout]]
name = "held"
emitters = [{ electrode = "nose", current = "50 uA" }]
read = "current"
sensors = ["a", "b"]
potential = "1 mV"
noise = "2 pA/sqrt(Hz)"
)TOML";

std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const auto pos = text.find(from);
    REQUIRE(pos != std::string::npos);
    return text.replace(pos, from.size(), to);
}

}  // namespace

TEST_CASE("layouts: three reading modes are read into LayoutSpec") {
    const CaseSpec spec = read_case_text(kHull + kReference + kPairs + kHeld, "case.toml");
    REQUIRE(spec.layouts.size() == 3);
    // The sites stay floating: the layouts say what they do.
    REQUIRE(spec.robot->electrodes.size() == 5);
    for (const ElectrodeSpec& e : spec.robot->electrodes) CHECK(e.drive == ElectrodeDrive::floating);

    const LayoutSpec& r = spec.layouts[0];
    CHECK(r.name == "ref");
    CHECK(r.reading == LayoutReading::reference);
    REQUIRE(r.emitters.size() == 2);
    CHECK(r.emitters[0].drive == ElectrodeDrive::current);
    CHECK(r.emitters[0].value == doctest::Approx(50e-6));  // 50 uA = 5e-5 A
    CHECK(r.emitters[1].drive == ElectrodeDrive::voltage);
    CHECK(r.emitters[1].value == doctest::Approx(-2e-3));  // -2 mV
    CHECK(r.sensors == std::vector<std::string>{"a", "b"});
    CHECK(r.reference == "top");

    const LayoutSpec& d = spec.layouts[1];
    CHECK(d.reading == LayoutReading::pairs);
    REQUIRE(d.pairs.size() == 2);
    CHECK(d.pairs[0] == std::pair<std::string, std::string>("nose", "tail"));
    CHECK(d.pairs[1] == std::pair<std::string, std::string>("b", "top"));

    const LayoutSpec& h = spec.layouts[2];
    CHECK(h.reading == LayoutReading::current);
    CHECK(h.sensor_potential_V == doctest::Approx(1e-3));
    CHECK(h.noise_density == doctest::Approx(2e-12));  // 2 pA/sqrt(Hz)
}

TEST_CASE("layouts: layout_case gives the layout's electrodes with their parts") {
    const CaseSpec spec = read_case_text(kHull + kReference + kPairs + kHeld, "case.toml");
    const CaseSpec ref = layout_case(spec, 0);
    CHECK(ref.layouts.empty());
    REQUIRE(ref.robot->electrodes.size() == 5);  // 2 emitters, 2 sensors, the reference
    const auto& e = ref.robot->electrodes;
    CHECK(e[0].name == "nose");
    CHECK(e[0].drive == ElectrodeDrive::current);
    CHECK(e[1].name == "tail");
    CHECK(e[1].drive == ElectrodeDrive::voltage);
    CHECK(e[2].name == "a");
    CHECK(e[2].drive == ElectrodeDrive::floating);
    CHECK(e[4].name == "top");
    // Pairs: every electrode a pair names, in order of first mention.
    const CaseSpec diff = layout_case(spec, 1);
    REQUIRE(diff.robot->electrodes.size() == 5);
    CHECK(diff.robot->electrodes[1].name == "nose");
    CHECK(diff.robot->electrodes[4].name == "top");
    // Held sensors carry the layout's potential.
    const CaseSpec held = layout_case(spec, 2);
    REQUIRE(held.robot->electrodes.size() == 3);
    CHECK(held.robot->electrodes[1].drive == ElectrodeDrive::fixed_potential);
    CHECK(held.robot->electrodes[1].value == doctest::Approx(1e-3));
    // murk solve and murk run solve the first layout.
    CHECK(case_to_solve(spec).robot->electrodes.size() == 5);
}

TEST_CASE("layouts: a case without layouts keeps its electrodes' roles") {
    std::string legacy = replaced(kHull, "name = \"nose\"\n", "name = \"nose\"\nrole = \"emitter\"\ncurrent = \"1 uA\"\n");
    for (const std::string name : {"tail", "a", "b", "top"})
        legacy = replaced(legacy, "name = \"" + name + "\"\n", "name = \"" + name + "\"\nrole = \"sensor\"\n");
    const CaseSpec spec = read_case_text(legacy, "case.toml");
    CHECK(spec.layouts.empty());
    CHECK(spec.robot->electrodes[0].drive == ElectrodeDrive::current);
    // Without layouts the sites' geometry is not checked here (the scene builder does it):
    // an old case with touching rings reads as before.
    const std::string touching = replaced(legacy, "from = \"4 cm\"", "from = \"-4.5 cm\"");
    CHECK_NOTHROW(read_case_text(touching, "case.toml"));
}

TEST_CASE("layouts: refusals name file, line and key") {
    const std::string good = kHull + kReference;
    SUBCASE("unknown electrode in emitters") {
        check_error(replaced(good, "electrode = \"nose\"", "electrode = \"fin\""), "electrode = \"fin\"",
                    "layout[1].emitters[1].electrode", "no [[robot.electrode]] is named 'fin'");
    }
    SUBCASE("unknown sensor") {
        check_error(replaced(good, "sensors = [\"a\", \"b\"]", "sensors = [\"a\", \"c\"]"), "sensors = [\"a\", \"c\"]",
                    "layout[1].sensors[2]", "no [[robot.electrode]] is named 'c'");
    }
    SUBCASE("unknown reference") {
        check_error(replaced(good, "reference = \"top\"", "reference = \"ground\""), "reference = \"ground\"",
                    "layout[1].reference", "no [[robot.electrode]] is named 'ground'");
    }
    SUBCASE("unknown electrode in a pair") {
        const std::string t = kHull + replaced(kPairs, "[\"b\", \"top\"]", "[\"b\", \"tip\"]");
        check_error(t, "[\"b\", \"tip\"]", "layout[1].pairs[2][2]", "no [[robot.electrode]] is named 'tip'");
    }
    SUBCASE("overlapping rings") {
        const std::string t = replaced(good, "from = \"4 cm\"", "from = \"-4.5 cm\"");
        check_error(t, "name = \"b\"", "robot.electrode[4]", "overlaps electrode 'a'", -1);  // the table's line, above its name
    }
    SUBCASE("a patch that overlaps a ring") {
        const std::string t = replaced(good, "at = [\"0 cm\", \"0 cm\", \"2.5 cm\"]", "at = [\"4.5 cm\", \"0 cm\", \"2.5 cm\"]");
        check_error(t, "name = \"top\"", "robot.electrode[5]", "overlaps electrode 'b'", -1);  // the table's line, above its name
    }
    SUBCASE("a ring off the hull") {
        const std::string t = replaced(good, "from = \"15 cm\"\nto = \"17 cm\"", "from = \"21 cm\"\nto = \"23 cm\"");
        check_error(t, "name = \"nose\"", "robot.electrode[1]", "falls off the hull", -1);  // the table's line, above its name
    }
    SUBCASE("a patch off the hull") {
        const std::string t = replaced(good, "at = [\"0 cm\", \"0 cm\", \"2.5 cm\"]", "at = [\"0 cm\", \"0 cm\", \"5 cm\"]");
        check_error(t, "name = \"top\"", "robot.electrode[5]", "falls off the hull", -1);  // the table's line, above its name
    }
    SUBCASE("a role on a site") {
        const std::string t = replaced(good, "name = \"a\"\n", "name = \"a\"\nrole = \"sensor\"\n");
        check_error(t, "role = \"sensor\"", "robot.electrode[3].role", "each layout says");
    }
    SUBCASE("an electrode with two parts") {
        check_error(replaced(good, "reference = \"top\"", "reference = \"a\""), "reference = \"a\"", "layout[1].reference",
                    "already has a part in this layout");
    }
    SUBCASE("an emitter in a pair") {
        const std::string t = kHull + replaced(kPairs, "[\"nose\", \"tail\"]", "[\"a\", \"tail\"]");
        check_error(t, "[\"a\", \"tail\"]", "layout[1].pairs[1]", "emits in this layout");
    }
    SUBCASE("sensors with pairs") {
        const std::string t = kHull + replaced(kPairs, "read = \"pairs\"", "read = \"pairs\"\nsensors = [\"b\"]");
        check_error(t, "sensors = [\"b\"]", "layout[1].sensors", "the pairs name the sensors");
    }
    SUBCASE("a reference missing") {
        const std::string t = replaced(good, "reference = \"top\"\n", "");
        check_error(t, "[[layout]]", "layout[1].reference", "missing required key");
    }
    SUBCASE("a drive missing") {
        check_error(replaced(good, "{ electrode = \"nose\", current = \"50 uA\" }", "{ electrode = \"nose\" }"),
                    "{ electrode = \"nose\" }", "layout[1].emitters[1]", "needs current");
    }
    SUBCASE("two layouts of one name") {
        check_error(good + replaced(kReference, "name = \"ref\"", "name = \"ref\"  # again"), "# again",
                    "layout[2].name", "another layout is already named 'ref'");
    }
    SUBCASE("a name that cannot name a group") {
        check_error(replaced(good, "name = \"ref\"", "name = \"a/b\""), "name = \"a/b\"", "layout[1].name",
                    "letters, digits");
    }
    SUBCASE("the wrong noise kind for a current layout") {
        check_error(replaced(kHull + kHeld, "noise = \"2 pA/sqrt(Hz)\"", "noise = \"2 nV/sqrt(Hz)\""),
                    "noise = \"2 nV", "layout[1].noise", "current noise density");
    }
}
