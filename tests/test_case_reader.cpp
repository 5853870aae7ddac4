// Case files: reading the TOML schema of cases/README.md into a CaseSpec, and one
// error message per kind of bad input. Unit conversions are worked out by hand
// beside each check (SI prefixes: BIPM, "The International System of Units",
// 9th edition, 2019).
#include "cases/case_reader.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

using namespace murk;

namespace {

// 1-based line of the nth (1-based) occurrence of `needle` in `text` (the test's own count).
int line_with(const std::string& text, const std::string& needle, int nth = 1) {
    auto pos = text.find(needle);
    for (int k = 1; k < nth && pos != std::string::npos; ++k) pos = text.find(needle, pos + 1);
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

// Checks that reading `text` fails with a one-line message at the line of the
// nth occurrence of `needle`, naming `key`, and containing `words`.
void check_error(const std::string& text, const std::string& needle, const std::string& key,
                 const std::string& words, int nth = 1) {
    const std::string m = error_of(text);
    CAPTURE(m);
    const std::string place = "case.toml:" + std::to_string(line_with(text, needle, nth)) + ": " + key + ":";
    CHECK(m.rfind(place, 0) == 0);
    CHECK(m.find(words) != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
}

const std::string kFish = R"(title = "t"
[water]
conductivity = "100 uS/cm"
[fish]
length = "15 cm"
interior_conductivity = "1 S/m"
skin_resistance = "0.25 ohm*m^2"
[fish.organ]
current = "50 uA"
)";

// kFish with `line` inserted after the line that contains `after`.
std::string fish_with(const std::string& after, const std::string& line) {
    std::string text = kFish;
    const auto pos = text.find('\n', text.find(after));
    return text.insert(pos + 1, line + "\n");
}

const std::string kRobot = R"(title = "r"
[water]
conductivity = "200 uS/cm"
[robot]
shape = "capsule"
radius = "2 cm"
length = "30 cm"
[[robot.electrode]]
name = "E"
form = "ring"
from = "10 cm"
to = "12 cm"
role = "emitter"
current = "1 mA"
)";

}  // namespace

TEST_CASE("case reader: a full fish case in SI units") {
    const std::string text = R"(title = "Full"
description = "every key"
frequency = "2 kHz"
[water]
conductivity = "50 uS/cm"
permittivity = 80
surface_z = "10 cm"
[mesh]
panel_size = "4 mm"
near_ratio = 2.5
far_ratio = 12
[fish]
length = "20 cm"
profile = [[0, 0, 0], [0.5, 0.05, 0.08], [1, 0, 0]]
nose = ["1 cm", "-2 cm", "3 mm"]
heading = "90 deg"
pitch = "10 deg"
interior_conductivity = "0.8 S/m"
interior_permittivity = 50
skin_resistance = "2 kohm*cm^2"
skin_capacitance = "1 uF/cm^2"
[fish.organ]
from = 0.2
to = 0.8
distribution = "cosine"
points = 7
current = "0.2 mA"
[[object]]
name = "stone"
shape = "box"
size = ["1 cm", "2 cm", "3 cm"]
position = ["0 cm", "5 cm", "0 cm"]
conductivity = "insulator"
[[object]]
shape = "spheroid"
polar_radius = "4 mm"
equatorial_radius = "2 mm"
position = ["0 cm", "-5 cm", "0 cm"]
conductivity = "1 mS/cm"
membrane_resistance = "0.1 ohm*m^2"
membrane_capacitance = "2 uF/cm^2"
)";
    const CaseSpec s = read_case_text(text, "full.toml");
    CHECK(s.path == "full.toml");
    CHECK(s.text == text);
    CHECK(s.title == "Full");
    CHECK(s.description == "every key");
    REQUIRE(s.frequency_Hz);
    CHECK(*s.frequency_Hz == doctest::Approx(2000.0));
    CHECK(s.water.conductivity_S_per_m == doctest::Approx(5e-3));  // 50e-6 S / 1e-2 m
    CHECK(*s.water.permittivity_relative == 80.0);
    REQUIRE(s.water.plane);
    CHECK(s.water.plane->height_m == doctest::Approx(0.1));
    CHECK(s.water.plane->water_below);
    CHECK(*s.mesh.panel_size_m == doctest::Approx(4e-3));
    CHECK(s.mesh.near_ratio == 2.5);
    CHECK(s.mesh.far_ratio == 12.0);
    REQUIRE(s.fish);
    CHECK(!s.robot);
    const FishSpec& f = *s.fish;
    CHECK(f.length_m == doctest::Approx(0.2));
    REQUIRE(f.profile.size() == 3);
    CHECK(f.profile[1].x_fraction == 0.5);
    CHECK(f.profile[1].half_width_fraction == 0.05);
    CHECK(f.profile[1].half_height_fraction == 0.08);
    CHECK(f.anchored_at_nose);
    CHECK(f.position_m[0] == doctest::Approx(0.01));
    CHECK(f.position_m[1] == doctest::Approx(-0.02));
    CHECK(f.position_m[2] == doctest::Approx(0.003));
    CHECK(f.orientation.heading_rad == doctest::Approx(M_PI / 2));
    CHECK(f.orientation.pitch_rad == doctest::Approx(10 * M_PI / 180));
    CHECK(f.orientation.roll_rad == 0.0);
    CHECK(f.interior_conductivity_S_per_m == doctest::Approx(0.8));
    CHECK(*f.interior_permittivity_relative == 50.0);
    CHECK(f.skin_resistance_ohm_m2 == doctest::Approx(0.2));         // 2e3 ohm * 1e-4 m^2
    CHECK(*f.skin_capacitance_F_per_m2 == doctest::Approx(1e-2));    // 1e-6 F / 1e-4 m^2
    CHECK(f.organ.from_fraction == 0.2);
    CHECK(f.organ.to_fraction == 0.8);
    CHECK(f.organ.profile == OrganProfile::cosine);
    CHECK(f.organ.points == 7);
    CHECK(f.organ.peak_current_A == doctest::Approx(2e-4));
    CHECK(f.organ.source.line == line_with(text, "[fish.organ]"));
    REQUIRE(s.objects.size() == 2);
    CHECK(s.objects[0].name == "stone");
    CHECK(s.objects[0].shape.kind == ShapeKind::box);
    CHECK(s.objects[0].shape.size_m[2] == doctest::Approx(0.03));
    CHECK(s.objects[0].material == Material::insulator);
    CHECK(s.objects[0].source.line == line_with(text, "[[object]]"));
    CHECK(s.objects[0].source.key == "object[1]");
    CHECK(s.objects[1].name == "object2");
    CHECK(s.objects[1].shape.kind == ShapeKind::spheroid);
    CHECK(s.objects[1].shape.semi_axes_m[0] == doctest::Approx(4e-3));
    CHECK(s.objects[1].shape.semi_axes_m[1] == doctest::Approx(2e-3));
    CHECK(s.objects[1].shape.semi_axes_m[2] == doctest::Approx(2e-3));
    CHECK(s.objects[1].material == Material::conducting);
    CHECK(s.objects[1].conductivity_S_per_m == doctest::Approx(0.1));  // 1e-3 S / 1e-2 m
    REQUIRE(s.objects[1].membrane);
    CHECK(s.objects[1].membrane->resistance_ohm_m2 == doctest::Approx(0.1));
    CHECK(*s.objects[1].membrane->capacitance_F_per_m2 == doctest::Approx(2e-2));
}

TEST_CASE("case reader: defaults of a minimal fish case") {
    const CaseSpec s = read_case_text(kFish, "case.toml");
    CHECK(!s.frequency_Hz);
    CHECK(!s.water.plane);
    CHECK(!s.mesh.panel_size_m);
    CHECK(s.mesh.near_ratio == 3.0);
    CHECK(s.mesh.far_ratio == 10.0);
    CHECK(!s.fish->anchored_at_nose);
    CHECK(s.fish->position_m == Point3{0, 0, 0});
    // the built-in profile: nose and tail tips closed
    REQUIRE(s.fish->profile.size() >= 3);
    CHECK(s.fish->profile.front().x_fraction == 0.0);
    CHECK(s.fish->profile.front().half_width_fraction == 0.0);
    CHECK(s.fish->profile.back().x_fraction == 1.0);
    CHECK(s.fish->profile.back().half_height_fraction == 0.0);
    CHECK(s.fish->organ.profile == OrganProfile::linear);
    CHECK(s.fish->organ.points == 20);
    CHECK(s.objects.empty());
}

TEST_CASE("case reader: robot electrodes, roles and [signal]") {
    const std::string text = kRobot + R"(
[[robot.electrode]]
name = "P"
form = "patch"
at = ["0 cm", "2 cm", "0 cm"]
radius = "5 mm"
role = "sensor"
potential = "0.1 V"
[[robot.electrode]]
name = "F"
form = "ring"
from = "-1 cm"
to = "1 cm"
role = "sensor"
[signal]
frequency = "500 Hz"
)";
    const CaseSpec s = read_case_text(text, "case.toml");
    REQUIRE(s.robot);
    CHECK(s.robot->hull.kind == ShapeKind::capsule);
    CHECK(s.robot->hull.radius_m == doctest::Approx(0.02));
    CHECK(s.robot->hull.length_m == doctest::Approx(0.3));
    REQUIRE(s.robot->electrodes.size() == 3);
    const ElectrodeSpec& e = s.robot->electrodes[0];
    CHECK(e.form == ElectrodeForm::ring);
    CHECK(e.from_m == doctest::Approx(0.10));
    CHECK(e.to_m == doctest::Approx(0.12));
    CHECK(e.drive == ElectrodeDrive::current);
    CHECK(e.value == doctest::Approx(1e-3));
    const ElectrodeSpec& p = s.robot->electrodes[1];
    CHECK(p.form == ElectrodeForm::patch);
    CHECK(p.at_m[1] == doctest::Approx(0.02));
    CHECK(p.radius_m == doctest::Approx(5e-3));
    CHECK(p.drive == ElectrodeDrive::fixed_potential);
    CHECK(p.value == doctest::Approx(0.1));
    CHECK(s.robot->electrodes[2].drive == ElectrodeDrive::floating);
    CHECK(*s.frequency_Hz == doctest::Approx(500.0));
}

TEST_CASE("case reader: mesh files are found next to the case file") {
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / "murk_test_case_reader";
    fs::create_directories(dir);
    { std::ofstream(dir / "rock.stl") << "solid rock\nendsolid rock\n"; }
    const std::string text = kFish + R"(
[[object]]
name = "rock"
shape = "mesh"
file = "rock.stl"
scale = "1 mm"
position = ["0 cm", "5 cm", "0 cm"]
conductivity = "insulator"
)";
    { std::ofstream(dir / "case.toml") << text; }
    const CaseSpec s = read_case_file((dir / "case.toml").string());
    REQUIRE(s.objects.size() == 1);
    CHECK(fs::equivalent(s.objects[0].shape.mesh_file, dir / "rock.stl"));
    CHECK(s.objects[0].shape.mesh_scale_m == doctest::Approx(1e-3));
    CHECK(s.text == text);
    // the same text read from elsewhere cannot find the file
    fs::remove(dir / "rock.stl");
    const std::string m = [&] {
        try {
            read_case_file((dir / "case.toml").string());
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string();
    }();
    CHECK(m.find(":" + std::to_string(line_with(text, "file = ")) + ": object[1].file: no such file") !=
          std::string::npos);
    fs::remove_all(dir);
}

TEST_CASE("case reader: a case file that cannot be opened") {
    try {
        read_case_file("/nonexistent/murk/case.toml");
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()) == "/nonexistent/murk/case.toml: cannot open the case file");
    }
}

TEST_CASE("case reader: TOML syntax errors give the line") {
    const std::string text = "title = \"t\"\n[water]\nconductivity = \"1 S/m\"\nconductivity = \"2 S/m\"\n";
    const std::string m = error_of(text);
    CHECK(m.rfind("case.toml:4: TOML syntax:", 0) == 0);
}

TEST_CASE("case reader: unknown keys are refused with the allowed ones") {
    // misspelt key
    std::string text = fish_with("[water]", "conductivty = \"1 S/m\"");
    check_error(text, "conductivty", "water.conductivty", "unknown key; allowed here: conductivity, permittivity");
    // the planned [sweep] section is not there yet
    text = kFish + "[sweep]\ndistance = [\"1 cm\"]\n";
    check_error(text, "[sweep]", "sweep", "unknown key; allowed here: title,");
    // unknown key inside an array of tables
    text = kFish + "[[object]]\nshape = \"sphere\"\nradius = \"1 mm\"\ncolour = \"red\"\n"
                   "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"insulator\"\n";
    check_error(text, "colour", "object[1].colour", "allowed here: name, shape, position");
    // a key of another shape
    text = kFish + "[[object]]\nshape = \"sphere\"\nradius = \"1 mm\"\nsize = [\"1 mm\", \"1 mm\", \"1 mm\"]\n"
                   "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"insulator\"\n";
    check_error(text, "size =", "object[1].size", "unknown key");
    // an organ key that belongs elsewhere
    text = fish_with("[fish.organ]", "radius = \"1 mm\"");
    check_error(text, "radius", "fish.organ.radius", "allowed here: from, to, distribution, weights, points, current");
}

TEST_CASE("case reader: missing required keys") {
    std::string text = kFish;
    text.erase(text.find("length = \"15 cm\"\n"), 17);
    check_error(text, "[fish]", "fish.length", "missing required key");
    text = kFish;
    text.erase(0, text.find('\n') + 1);  // no title
    const std::string m = error_of(text);
    CHECK(m.rfind("case.toml:1: title: missing required key", 0) == 0);
    // no sensing body
    text = "title = \"t\"\n[water]\nconductivity = \"1 S/m\"\n";
    CHECK(error_of(text).find("add a [fish] or a [robot]") != std::string::npos);
    // object without position
    text = kFish + "[[object]]\nshape = \"sphere\"\nradius = \"1 mm\"\nconductivity = \"insulator\"\n";
    check_error(text, "[[object]]", "object[1].position", "missing required key");
    // emitter without drive
    text = kRobot;
    text.erase(text.find("current = \"1 mA\"\n"));
    check_error(text, "role = ", "robot.electrode[1].role", "an emitter needs current");
}

TEST_CASE("case reader: wrong TOML types") {
    check_error(fish_with("[fish]", "heading = 30"), "heading", "fish.heading",
                "expected an angle written with a unit like '30 deg', got the number 30 (no unit)");
    std::string text = kFish;
    text.replace(text.find("\"15 cm\""), 7, "15");
    check_error(text, "length = 15", "fish.length", "got the number 15 (no unit)");
    text = kFish;
    text.replace(text.find("\"t\""), 3, "3");
    check_error(text, "title = 3", "title", "expected text in quotes, got the number 3");
    check_error(fish_with("[fish]", "nose = \"0 cm\""), "nose", "fish.nose", "expected an array of three lengths");
    check_error(fish_with("[fish]", "nose = [\"0 cm\", \"1 cm\"]"), "nose", "fish.nose", "got an array of 2");
    check_error(fish_with("[fish.organ]", "points = 2.5"), "points", "fish.organ.points",
                "expected a whole number from 2 to 1000");
    check_error(kFish + "[object]\nshape = \"sphere\"\n", "[object]", "object", "expected [[object]] tables");
    check_error(fish_with("[water]", "surface_z = true"), "surface_z", "water.surface_z",
                "expected a length like '2 mm', got true");
}

TEST_CASE("case reader: quantities of the wrong kind") {
    std::string text = kFish;
    text.replace(text.find("\"100 uS/cm\""), 11, "\"3 mA\"");
    check_error(text, "conductivity = \"3 mA\"", "water.conductivity",
                "expected a conductivity like '100 uS/cm', got '3 mA' (a current)");
    text = kFish;
    text.replace(text.find("\"0.25 ohm*m^2\""), 14, "\"0.25 ohm*m\"");
    check_error(text, "skin_resistance", "fish.skin_resistance", "(a resistivity)");
    check_error(fish_with("[fish]", "nose = [\"0 cm\", \"1 mV\", \"0 cm\"]"), "nose", "fish.nose[2]",
                "expected a length like '2 mm', got '1 mV' (a voltage)");
    check_error(kRobot + "[signal]\nfrequency = \"1 ms\"\n", "frequency", "signal.frequency",
                "expected a frequency like '1 kHz', got '1 ms' (a time)");
    check_error(kRobot + "[signal]\nfrequency = \"1 kHz^0.5\"\n", "frequency", "signal.frequency",
                "fractional exponents are not supported");
}

TEST_CASE("case reader: values out of range") {
    std::string text = kFish;
    text.replace(text.find("\"15 cm\""), 7, "\"-15 cm\"");
    check_error(text, "length", "fish.length", "must be positive, got '-15 cm'");
    text = kFish;
    text.replace(text.find("\"15 cm\""), 7, "\"0 cm\"");
    check_error(text, "length", "fish.length", "must be positive, got '0 cm'");
    check_error(fish_with("[water]", "permittivity = 0.5"), "permittivity", "water.permittivity",
                "at least 1, got the number 0.5");
    check_error(fish_with("[fish]", "skin_capacitance = \"-1 uF/cm^2\""), "skin_capacitance",
                "fish.skin_capacitance", "must be positive");
    check_error(kFish + "[mesh]\nnear_ratio = nan\n", "near_ratio", "mesh.near_ratio",
                "expected a finite number, got the number nan");
    check_error(kFish + "[mesh]\nnear_ratio = 5\nfar_ratio = 4\n", "far_ratio", "mesh.far_ratio",
                "must not be smaller than near_ratio");
    check_error(kFish + "[mesh]\npanel_size = \"inf mm\"\n", "panel_size", "mesh.panel_size", "not a finite number");
    check_error(fish_with("[fish.organ]", "from = 0.6\nto = 0.4"), "to = 0.4", "fish.organ.to",
                "above from (0.6)");
    check_error(fish_with("[fish.organ]", "from = -0.1"), "from", "fish.organ.from", "in [0, 1)");
    check_error(fish_with("[fish.organ]", "points = 1"), "points", "fish.organ.points", "from 2 to 1000");
    check_error(kFish + "[[object]]\nshape = \"capsule\"\nradius = \"1 cm\"\nlength = \"1 cm\"\n"
                        "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"insulator\"\n",
                "length = \"1 cm\"", "object[1].length", "at least twice its radius");
    check_error(kFish + "[[object]]\nshape = \"ellipsoid\"\nsemi_axes = [\"1 cm\", \"0 cm\", \"1 cm\"]\n"
                        "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"insulator\"\n",
                "semi_axes", "object[1].semi_axes[2]", "must be positive");
    check_error(kFish + "[[object]]\nshape = \"sphere\"\nradius = \"1 cm\"\n"
                        "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"0 S/m\"\n",
                "conductivity = \"0", "object[1].conductivity", "write \"insulator\" for none");
    check_error(kFish + "[[object]]\nshape = \"cube\"\n", "shape = \"cube\"", "object[1].shape",
                "expected one of sphere, spheroid, ellipsoid, capsule, box, mesh, got 'cube'");
}

TEST_CASE("case reader: body profile and organ rules") {
    check_error(fish_with("[fish]", "profile = [[0, 0, 0], [1, 0, 0]]"), "profile", "fish.profile",
                "at least 3 stations");
    check_error(fish_with("[fish]", "profile = [[0.1, 0, 0], [0.5, 0.1, 0.1], [1, 0, 0]]"), "profile",
                "fish.profile[1]", "x_fraction must be 0");
    check_error(fish_with("[fish]", "profile = [[0, 0, 0], [0.5, 0.1, 0.1], [0.9, 0, 0]]"), "profile",
                "fish.profile[3]", "x_fraction must be 1");
    check_error(fish_with("[fish]", "profile = [[0, 0, 0], [0.5, 0.1, 0.1], [0.4, 0.1, 0.1], [1, 0, 0]]"),
                "profile", "fish.profile[3]", "must increase");
    check_error(fish_with("[fish]", "profile = [[0, 0.01, 0], [0.5, 0.1, 0.1], [1, 0, 0]]"), "profile",
                "fish.profile[1]", "zero half_width and half_height");
    check_error(fish_with("[fish]", "profile = [[0, 0, 0], [0.5, 0.1, 0], [1, 0, 0]]"), "profile",
                "fish.profile[2]", "positive half_width and half_height");
    check_error(fish_with("[fish]", "profile = [[0, 0, 0], [0.5, 0.1], [1, 0, 0]]"), "profile",
                "fish.profile[2]", "expected a station");
    check_error(fish_with("[fish.organ]", "weights = [3, 1, -2, -1]"), "weights", "fish.organ.weights",
                "must sum to zero");
    check_error(fish_with("[fish.organ]", "weights = [0, 0]"), "weights", "fish.organ.weights", "all zero");
    check_error(fish_with("[fish.organ]", "weights = [1, -1]\ndistribution = \"linear\""), "weights",
                "fish.organ.weights", "not both");
    check_error(fish_with("[fish.organ]", "distribution = \"dipole\"\npoints = 4"), "points", "fish.organ.points",
                "not used with the dipole");
    check_error(fish_with("[fish.organ]", "distribution = \"wave\""), "distribution", "fish.organ.distribution",
                "expected one of linear, cosine, dipole, got 'wave'");
    check_error(fish_with("[fish]", "nose = [\"0 m\", \"0 m\", \"0 m\"]\ncentre = [\"0 m\", \"0 m\", \"0 m\"]"),
                "centre", "fish.centre", "not both");
}

TEST_CASE("case reader: conflicts between parts") {
    check_error(kFish + "[robot]\nshape = \"sphere\"\n", "[robot]", "robot", "[fish] or [robot], not both");
    check_error("frequency = \"1 kHz\"\n" + kFish + "[signal]\nfrequency = \"2 kHz\"\n", "frequency = \"2",
                "signal.frequency", "already given");
    check_error(fish_with("[water]", "surface_z = \"1 m\"\nbottom_z = \"-1 m\""), "bottom_z", "water.bottom_z",
                "only one insulating plane");
    const std::string sphere = "shape = \"sphere\"\nradius = \"1 mm\"\nposition = [\"0 m\", \"1 m\", \"0 m\"]\n";
    check_error(kFish + "[[object]]\nname = \"a\"\n" + sphere + "conductivity = \"insulator\"\n" +
                    "[[object]]\nname = \"a\"\n" + sphere + "conductivity = \"insulator\"\n",
                "name = \"a\"", "object[2].name", "already named 'a'", 2);
    check_error(kFish + "[[object]]\n" + sphere + "conductivity = \"conductor\"\npermittivity = 5\n", "permittivity",
                "object[1].permittivity", "does not apply");
    check_error(kFish + "[[object]]\n" + sphere + "conductivity = \"1 S/m\"\nmembrane_capacitance = \"1 uF/cm^2\"\n",
                "membrane_capacitance", "object[1].membrane_capacitance", "needs membrane_resistance");
}

TEST_CASE("case reader: robot electrode rules") {
    const std::string ring = "[[robot.electrode]]\nname = \"S\"\nform = \"ring\"\nfrom = \"0 cm\"\nto = \"1 cm\"\n";
    check_error(kRobot + ring + "role = \"sensor\"\ncurrent = \"1 mA\"\n", "current = ", "robot.electrode[2].current",
                "a sensor is not driven", 2);
    check_error(kRobot + ring + "role = \"emitter\"\ncurrent = \"1 mA\"\nvoltage = \"1 V\"\n", "voltage",
                "robot.electrode[2].voltage", "not both");
    check_error(kRobot + ring + "role = \"emitter\"\nvoltage = \"1 V\"\npotential = \"1 V\"\n", "potential",
                "robot.electrode[2].potential", "only for sensors");
    check_error(kRobot + ring + "role = \"listener\"\n", "listener", "robot.electrode[2].role",
                "expected one of emitter, sensor");
    std::string text = kRobot + ring + "role = \"sensor\"\n";
    text.replace(text.find("name = \"S\""), 10, "name = \"E\"");
    check_error(text, "name = \"E\"", "robot.electrode[2].name", "already named 'E'", 2);
    text = kRobot;
    text.replace(text.find("name = \"E\""), 10, "name = \"object:x\"");
    check_error(text, "name = ", "robot.electrode[1].name", "kept for conducting objects");
    text = kRobot;
    text.replace(text.find("to = \"12 cm\""), 12, "to = \"9 cm\"");
    check_error(text, "to = ", "robot.electrode[1].to", "must lie beyond from");
    check_error(kRobot + "[[robot.electrode]]\nname = \"R\"\nform = \"region\"\nregion = \"tip\"\nrole = \"sensor\"\n",
                "form = \"region\"", "robot.electrode[2].form", "need a hull read from a Gmsh .msh file");
    check_error(kRobot + "[[robot.electrode]]\nname = \"P\"\nform = \"patch\"\nfrom = \"1 cm\"\n", "from = \"1 cm\"",
                "robot.electrode[2].from", "allowed here: name, form, role, current, voltage, potential, at, radius");
    // no emitter at all
    text = kRobot;
    text.replace(text.find("role = \"emitter\"\ncurrent = \"1 mA\""), 33, "role = \"sensor\"");
    check_error(text, "[[robot.electrode]]", "robot.electrode", "at least one electrode with role = \"emitter\"");
    // electrodes given as a plain table
    check_error("title = \"r\"\n[water]\nconductivity = \"1 S/m\"\n[robot]\nshape = \"sphere\"\nradius = \"1 cm\"\n"
                "[robot.electrode]\nname = \"E\"\n",
                "[robot.electrode]", "robot.electrode", "expected [[robot.electrode]] tables");
}
