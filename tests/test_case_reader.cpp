// Case files: reading the TOML schema of cases/README.md into a CaseSpec, and one
// error message per kind of bad input. Unit conversions are worked out by hand
// beside each check (SI prefixes: BIPM, "The International System of Units",
// 9th edition, 2019).
#include "cases/input/case_reader.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/shapes.hpp"

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
overall_length = "30 cm"
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
    REQUIRE(s.water.surface);
    CHECK(!s.water.bottom);
    CHECK(s.water.surface->height_m == doctest::Approx(0.1));
    CHECK(s.water.surface->water_below);
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
    CHECK(!s.water.surface);
    CHECK(!s.water.bottom);
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
    CHECK(s.robot->hull.overall_length_m == doctest::Approx(0.3));
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
file_unit = "1 mm"
position = ["0 cm", "5 cm", "0 cm"]
conductivity = "insulator"
)";
    { std::ofstream(dir / "case.toml") << text; }
    const CaseSpec s = read_case_file((dir / "case.toml").string());
    REQUIRE(s.objects.size() == 1);
    CHECK(fs::equivalent(s.objects[0].shape.mesh_file, dir / "rock.stl"));
    CHECK(s.objects[0].shape.file_unit_m == doctest::Approx(1e-3));
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
        CHECK(std::string(e.what()).rfind("/nonexistent/murk/case.toml: cannot open the case file", 0) == 0);
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
    // a sweep changes an object, so a case without one cannot have a sweep
    text = kFish + "[sweep]\ndistance = [\"1 cm\"]\n";
    check_error(text, "[sweep]", "sweep", "the case has none");
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
    check_error(kFish + "[mesh]\nelectrode_edge = \"-1 mm\"\n", "electrode_edge", "mesh.electrode_edge",
                "must be positive");
    check_error(kFish + "[mesh]\nelectrode_edge = \"2 V\"\n", "electrode_edge", "mesh.electrode_edge", "length");
    check_error(kFish + "[mesh]\npanel_size = \"5 mm\"\nelectrode_edge = \"6 mm\"\n", "electrode_edge",
                "mesh.electrode_edge", "must not be larger than panel_size");
    check_error(fish_with("[fish.organ]", "from = 0.6\nto = 0.4"), "to = 0.4", "fish.organ.to",
                "above from (0.6)");
    check_error(fish_with("[fish.organ]", "from = -0.1"), "from", "fish.organ.from", "in [0, 1)");
    check_error(fish_with("[fish.organ]", "points = 1"), "points", "fish.organ.points", "from 2 to 1000");
    check_error(kFish + "[[object]]\nshape = \"capsule\"\nradius = \"1 cm\"\noverall_length = \"1 cm\"\n"
                        "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"insulator\"\n",
                "overall_length = \"1 cm\"", "object[1].overall_length", "at least twice its radius");
    check_error(kFish + "[[object]]\nshape = \"ellipsoid\"\nsemi_axes = [\"1 cm\", \"0 cm\", \"1 cm\"]\n"
                        "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"insulator\"\n",
                "semi_axes", "object[1].semi_axes[2]", "must be positive");
    check_error(kFish + "[[object]]\nshape = \"sphere\"\nradius = \"1 cm\"\n"
                        "position = [\"0 m\", \"1 m\", \"0 m\"]\nconductivity = \"0 S/m\"\n",
                "conductivity = \"0", "object[1].conductivity", "write \"insulator\" for none");
    check_error(kFish + "[[object]]\nshape = \"cube\"\n", "shape = \"cube\"", "object[1].shape",
                "expected one of sphere, spheroid, ellipsoid, capsule, box, mesh, got 'cube'");
}

TEST_CASE("case reader: the system solver keys of [mesh]") {
    // Unset: SolverOptions' defaults (solver/solver_options.hpp).
    const SolverOptions defaults;
    const CaseSpec plain = read_case_text(kFish, "case.toml");
    CHECK(plain.mesh.solver.choice == SystemSolver::automatic);
    CHECK(plain.mesh.solver.dense_limit == defaults.dense_limit);
    CHECK(plain.mesh.solver.compression_tolerance == defaults.compression_tolerance);
    CHECK(plain.mesh.solver.iteration_tolerance == defaults.iteration_tolerance);
    CHECK(plain.mesh.solver.preconditioner_tolerance == defaults.preconditioner_tolerance);

    const CaseSpec s = read_case_text(kFish + "[mesh]\nsolver = \"compressed\"\ndense_limit = 1200\n"
                                              "compression_tolerance = 1e-6\niteration_tolerance = 3e-9\n"
                                              "preconditioner_tolerance = 0.05\n",
                                      "case.toml");
    CHECK(s.mesh.solver.choice == SystemSolver::compressed);
    CHECK(s.mesh.solver.dense_limit == 1200);
    CHECK(s.mesh.solver.compression_tolerance == 1e-6);
    CHECK(s.mesh.solver.iteration_tolerance == 3e-9);
    CHECK(s.mesh.solver.preconditioner_tolerance == 0.05);
    CHECK(read_case_text(kFish + "[mesh]\nsolver = \"dense\"\n", "case.toml").mesh.solver.choice ==
          SystemSolver::dense);
    CHECK(read_case_text(kFish + "[mesh]\nsolver = \"auto\"\n", "case.toml").mesh.solver.choice ==
          SystemSolver::automatic);

    check_error(kFish + "[mesh]\nsolver = \"sparse\"\n", "solver", "mesh.solver",
                "expected one of auto, dense, compressed, got 'sparse'");
    check_error(kFish + "[mesh]\nsolver = 1\n", "solver", "mesh.solver", "expected text in quotes");
    check_error(kFish + "[mesh]\ndense_limit = 0\n", "dense_limit", "mesh.dense_limit",
                "expected a whole number from 1 to 1000000000, got");
    check_error(kFish + "[mesh]\ndense_limit = -5\n", "dense_limit", "mesh.dense_limit", "from 1 to");
    check_error(kFish + "[mesh]\ndense_limit = 2.5\n", "dense_limit", "mesh.dense_limit", "whole number");
    check_error(kFish + "[mesh]\ndense_limit = 2000000000\n", "dense_limit", "mesh.dense_limit", "to 1000000000");
    for (const std::string key : {"compression_tolerance", "iteration_tolerance"}) {
        CAPTURE(key);
        // Both ends of the open interval (1e-14, 1e-2) are refused, and anything beyond.
        for (const std::string value : {"0", "-1e-6", "1e-14", "1e-15", "1e-2", "0.5", "nan", "inf"})
            check_error(kFish + "[mesh]\n" + key + " = " + value + "\n", key, "mesh." + key,
                        value == "nan" || value == "inf" ? "expected a finite number"
                                                         : "between 1e-14 and 1e-2 (both excluded)");
        check_error(kFish + "[mesh]\n" + key + " = \"1e-6 V\"\n", key, "mesh." + key, "");
        CHECK(read_case_text(kFish + "[mesh]\n" + key + " = 9.9e-3\n", "case.toml").mesh.solver.choice ==
              SystemSolver::automatic);
    }
    // The preconditioner's tolerance only sets the iterations, so it may be coarse: up to 0.5.
    for (const std::string value : {"0", "-1e-3", "1e-14", "0.5", "2"})
        check_error(kFish + "[mesh]\npreconditioner_tolerance = " + value + "\n", "preconditioner_tolerance",
                    "mesh.preconditioner_tolerance", "between 1e-14 and 0.5 (both excluded)");
    CHECK(read_case_text(kFish + "[mesh]\npreconditioner_tolerance = 0.3\n", "case.toml").mesh.solver
              .preconditioner_tolerance == 0.3);
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
    check_error(fish_with("[water]", "surface_z = \"-1 m\"\nbottom_z = \"1 m\""), "bottom_z", "water.bottom_z",
                "must lie below the water surface");
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

// ---- [[source]] and [[probe]] ---------------------------------------------------

namespace {

// A case without a sensing body: one source and one probe in open water.
const std::string kOpenWater = R"(title = "o"
[water]
conductivity = "100 uS/cm"
[[source]]
form = "point"
position = ["0 cm", "0 cm", "0 cm"]
current = "10 uA"
[[probe]]
name = "near"
form = "point"
position = ["0 cm", "2 mm", "0 cm"]
)";

const std::string kLineSource = "[[source]]\nform = \"line\"\nfrom = [\"0 cm\", \"0 cm\", \"0 cm\"]\n"
                                "to = [\"0 cm\", \"0 cm\", \"1 cm\"]\n";
const std::string kGridProbe = "[[probe]]\nname = \"map\"\nform = \"grid\"\ncorner = [\"0 cm\", \"0 cm\", \"0 cm\"]\n"
                               "along = [\"1 cm\", \"0 cm\", \"0 cm\"]\n";

}  // namespace

TEST_CASE("case reader: sources of every form") {
    const std::string text = kFish + R"([[source]]
form = "point"
position = ["1 cm", "-2 cm", "3 mm"]
current = "-20 uA"
[[source]]
form = "line"
from = ["0 cm", "5 cm", "0 cm"]
to = ["4 cm", "5 cm", "0 cm"]
points = 5
total_current = "1 mA"
[[source]]
form = "line"
from = ["0 cm", "-5 cm", "0 cm"]
to = ["0 cm", "-5 cm", "2 cm"]
weights = [1, -3, 2]
peak_current = "6 uA"
)";
    const CaseSpec s = read_case_text(text, "case.toml");
    REQUIRE(s.sources.size() == 3);
    const SourceSpec& p = s.sources[0];
    CHECK(p.form == SourceForm::point);
    CHECK(p.position_m[0] == doctest::Approx(0.01));
    CHECK(p.position_m[1] == doctest::Approx(-0.02));
    CHECK(p.position_m[2] == doctest::Approx(0.003));
    CHECK(p.current_A == doctest::Approx(-2e-5));
    CHECK(p.source.line == line_with(text, "[[source]]"));
    CHECK(p.source.key == "source[1]");
    const SourceSpec& e = s.sources[1];
    CHECK(e.form == SourceForm::line);
    CHECK(e.share == LineShare::equal);
    CHECK(e.from_m[1] == doctest::Approx(0.05));
    CHECK(e.to_m[0] == doctest::Approx(0.04));
    CHECK(e.points == 5);
    CHECK(e.total_current_A == doctest::Approx(1e-3));
    CHECK(e.source.key == "source[2]");
    const SourceSpec& w = s.sources[2];
    CHECK(w.share == LineShare::weights);
    CHECK(w.weights == std::vector<double>{1, -3, 2});
    CHECK(w.points == 3);
    CHECK(w.peak_current_A == doctest::Approx(6e-6));
    CHECK(w.to_m[2] == doctest::Approx(0.02));
    CHECK(s.probes.empty());
    CHECK(s.probe_points.empty());
}

TEST_CASE("case reader: probe points of a point, a line and a grid") {
    const std::string text = kFish + R"([[probe]]
name = "tip"
form = "point"
position = ["1 cm", "2 cm", "3 cm"]
[[probe]]
name = "axis"
form = "line"
from = ["0 cm", "0 cm", "0 cm"]
to = ["3 cm", "0 cm", "6 cm"]
points = 4
[[probe]]
name = "map"
form = "grid"
corner = ["1 cm", "1 cm", "0 cm"]
along = ["2 cm", "0 cm", "0 cm"]
across = ["0 cm", "0 cm", "-1 cm"]
points = [3, 2]
)";
    const CaseSpec s = read_case_text(text, "case.toml");
    REQUIRE(s.probes.size() == 3);
    REQUIRE(s.probe_points.size() == 1 + 4 + 6);
    const ProbeSpec& tip = s.probes[0];
    CHECK(tip.name == "tip");
    CHECK(tip.form == ProbeForm::point);
    CHECK(tip.shape == std::vector<std::size_t>{1});
    CHECK(tip.first_point == 0);
    CHECK(tip.point_count == 1);
    CHECK(tip.source.line == line_with(text, "[[probe]]"));
    CHECK(tip.source.key == "probe[1]");
    CHECK(s.probe_points[0].label == "tip");
    CHECK(s.probe_points[0].probe == 0);
    CHECK(s.probe_points[0].position_m[2] == doctest::Approx(0.03));

    const ProbeSpec& axis = s.probes[1];
    CHECK(axis.form == ProbeForm::line);
    CHECK(axis.shape == std::vector<std::size_t>{4});
    CHECK(axis.first_point == 1);
    CHECK(axis.point_count == 4);
    CHECK(axis.to_m[2] == doctest::Approx(0.06));
    // four points a third of the way apart: (0, 0, 0), (1, 0, 2), (2, 0, 4), (3, 0, 6) cm
    for (int k = 0; k < 4; ++k) {
        const ProbePoint& pt = s.probe_points[1 + k];
        CHECK(pt.label == "axis[" + std::to_string(k + 1) + "]");
        CHECK(pt.probe == 1);
        CHECK(pt.position_m[0] == doctest::Approx(0.01 * k));
        CHECK(pt.position_m[1] == 0.0);
        CHECK(pt.position_m[2] == doctest::Approx(0.02 * k));
    }

    const ProbeSpec& map = s.probes[2];
    CHECK(map.form == ProbeForm::grid);
    CHECK(map.shape == std::vector<std::size_t>{3, 2});
    CHECK(map.first_point == 5);
    CHECK(map.point_count == 6);
    CHECK(map.corner_m[0] == doctest::Approx(0.01));
    CHECK(map.along_m[0] == doctest::Approx(0.02));
    CHECK(map.across_m[2] == doctest::Approx(-0.01));
    // i along x in 1 cm steps from 1 cm, j down z from 0 to -1 cm; j runs fastest
    const double expected[6][3] = {{0.01, 0.01, 0.0}, {0.01, 0.01, -0.01}, {0.02, 0.01, 0.0},
                                   {0.02, 0.01, -0.01}, {0.03, 0.01, 0.0}, {0.03, 0.01, -0.01}};
    const char* labels[6] = {"map[1,1]", "map[1,2]", "map[2,1]", "map[2,2]", "map[3,1]", "map[3,2]"};
    for (int k = 0; k < 6; ++k) {
        const ProbePoint& pt = s.probe_points[5 + k];
        CHECK(pt.label == labels[k]);
        CHECK(pt.probe == 2);
        for (int c = 0; c < 3; ++c) CHECK(pt.position_m[c] == doctest::Approx(expected[k][c]));
    }
}

TEST_CASE("case reader: a case without a sensing body needs a source and a probe") {
    const CaseSpec s = read_case_text(kOpenWater, "case.toml");
    CHECK(!s.fish);
    CHECK(!s.robot);
    CHECK(s.sources.size() == 1);
    CHECK(s.probes.size() == 1);
    // a source alone, a probe alone: refused at the top level
    std::string text = kOpenWater.substr(0, kOpenWater.find("[[probe]]"));
    check_error(text, "title", "(top level)", "at least one [[source]] and one [[probe]]");
    text = kOpenWater;
    text.erase(text.find("[[source]]"), text.find("[[probe]]") - text.find("[[source]]"));
    check_error(text, "title", "(top level)", "missing the sensing body");
}

TEST_CASE("case reader: source rules") {
    check_error(kOpenWater + "[[source]]\nposition = [\"0 m\", \"0 m\", \"0 m\"]\n", "[[source]]", "source[2].form",
                "missing required key", 2);
    check_error(kOpenWater + "[[source]]\nform = \"ring\"\n", "ring", "source[2].form",
                "expected one of point, line, got 'ring'");
    check_error(kOpenWater + "[[source]]\nform = \"point\"\nposition = [\"0 m\", \"0 m\", \"0 m\"]\ncurrent = \"1 uA\"\n"
                             "points = 3\n",
                "points", "source[2].points", "unknown key; allowed here: form, position, current");
    check_error(kOpenWater + "[[source]]\nform = \"point\"\nposition = [\"0 m\", \"0 m\", \"0 m\"]\ncurrent = \"0 uA\"\n",
                "\"0 uA\"", "source[2].current", "must not be zero, got '0 uA'");
    check_error(kOpenWater + "[[source]]\nform = \"point\"\nposition = [\"0 m\", \"0 m\", \"0 m\"]\ncurrent = \"1 uV\"\n",
                "\"1 uV\"", "source[2].current", "expected a current like");
    check_error(kOpenWater + "[[source]]\nform = \"point\"\ncurrent = \"1 uA\"\n", "[[source]]", "source[2].position",
                "missing required key", 2);
    // line: both ends the same
    check_error(kOpenWater + "[[source]]\nform = \"line\"\nfrom = [\"0 m\", \"0 m\", \"0 m\"]\n"
                             "to = [\"0 cm\", \"0 cm\", \"0 cm\"]\npoints = 3\ntotal_current = \"1 uA\"\n",
                "to = ", "source[2].to", "a line needs two different ends");
    // line: how the current is shared
    check_error(kOpenWater + kLineSource + "points = 3\n", "[[source]]", "source[2].total_current",
                "missing required key", 2);
    check_error(kOpenWater + kLineSource + "total_current = \"1 uA\"\n", "[[source]]", "source[2].points",
                "missing required key", 2);
    check_error(kOpenWater + kLineSource + "points = 3\ntotal_current = \"0 A\"\n", "total_current",
                "source[2].total_current", "must not be zero");
    check_error(kOpenWater + kLineSource + "points = 1001\ntotal_current = \"1 uA\"\n", "points",
                "source[2].points", "expected a whole number from 2 to 1000, got the number 1001");
    check_error(kOpenWater + kLineSource + "weights = [1, -1]\ntotal_current = \"1 uA\"\npeak_current = \"1 uA\"\n",
                "total_current", "source[2].total_current", "not both");
    check_error(kOpenWater + kLineSource + "weights = [1, -1]\npoints = 2\npeak_current = \"1 uA\"\n", "points",
                "source[2].points", "one point per weight");
    check_error(kOpenWater + kLineSource + "weights = [1, -2]\npeak_current = \"1 uA\"\n", "weights",
                "source[2].weights", "must sum to zero");
    check_error(kOpenWater + kLineSource + "weights = [1, -1]\n", "[[source]]", "source[2].peak_current",
                "missing required key", 2);
    check_error(kOpenWater + kLineSource + "weights = [1, -1]\npeak_current = \"-1 uA\"\n", "peak_current",
                "source[2].peak_current", "must be positive");
    check_error(kOpenWater + kLineSource + "points = 3\ntotal_current = \"1 uA\"\npeak_current = \"1 uA\"\n",
                "peak_current", "source[2].peak_current", "only used with weights");
    check_error(kOpenWater + kLineSource + "points = 3\ntotal_current = \"1 uA\"\nposition = [\"0 m\", \"0 m\", \"0 m\"]\n",
                "position = [\"0 m", "source[2].position", "allowed here: form, from, to, points, total_current");
    // a plain table instead of an array of tables
    check_error(kFish + "[source]\nform = \"point\"\n", "[source]", "source", "expected [[source]] tables");
}

TEST_CASE("case reader: probe rules") {
    check_error(kOpenWater + "[[probe]]\nform = \"point\"\nposition = [\"0 m\", \"1 m\", \"0 m\"]\n", "[[probe]]",
                "probe[2].name", "missing required key", 2);
    check_error(kOpenWater + "[[probe]]\nname = \"\"\nform = \"point\"\nposition = [\"0 m\", \"1 m\", \"0 m\"]\n",
                "name = \"\"", "probe[2].name", "must not be empty");
    check_error(kOpenWater + "[[probe]]\nname = \"near\"\nform = \"point\"\nposition = [\"0 m\", \"1 m\", \"0 m\"]\n",
                "name = \"near\"", "probe[2].name", "another probe is already named 'near'", 2);
    check_error(kOpenWater + "[[probe]]\nname = \"p\"\nform = \"cloud\"\n", "cloud", "probe[2].form",
                "expected one of point, line, grid, got 'cloud'");
    check_error(kOpenWater + "[[probe]]\nname = \"p\"\nform = \"point\"\nposition = [\"0 m\", \"1 m\", \"0 m\"]\n"
                             "points = 2\n",
                "points", "probe[2].points", "unknown key; allowed here: name, form, position");
    check_error(kOpenWater + "[[probe]]\nname = \"p\"\nform = \"point\"\nposition = [\"0 m\", \"1 m\"]\n", "position = [\"0 m\", \"1",
                "probe[2].position", "got an array of 2");
    // line
    check_error(kOpenWater + "[[probe]]\nname = \"l\"\nform = \"line\"\nfrom = [\"1 m\", \"1 m\", \"0 m\"]\n"
                             "to = [\"1 m\", \"1 m\", \"0 m\"]\npoints = 5\n",
                "to = ", "probe[2].to", "a line needs two different ends");
    check_error(kOpenWater + "[[probe]]\nname = \"l\"\nform = \"line\"\nfrom = [\"1 m\", \"1 m\", \"0 m\"]\n"
                             "to = [\"2 m\", \"1 m\", \"0 m\"]\npoints = 1\n",
                "points", "probe[2].points", "from 2 to 1000, got the number 1");
    check_error(kOpenWater + "[[probe]]\nname = \"l\"\nform = \"line\"\nfrom = [\"1 m\", \"1 m\", \"0 m\"]\n"
                             "to = [\"2 m\", \"1 m\", \"0 m\"]\n",
                "[[probe]]", "probe[2].points", "missing required key", 2);
    // grid
    check_error(kOpenWater + kGridProbe + "across = [\"2 cm\", \"0 cm\", \"0 cm\"]\npoints = [3, 3]\n", "across",
                "probe[2].across", "parallel to along");
    check_error(kOpenWater + kGridProbe + "across = [\"0 cm\", \"0 cm\", \"0 cm\"]\npoints = [3, 3]\n", "across",
                "probe[2].across", "zero length");
    check_error(kOpenWater + kGridProbe + "across = [\"0 cm\", \"1 cm\", \"0 cm\"]\npoints = 9\n", "points = 9",
                "probe[2].points", "expected two whole numbers [points along, points across]");
    check_error(kOpenWater + kGridProbe + "across = [\"0 cm\", \"1 cm\", \"0 cm\"]\npoints = [3, 1]\n", "points = [",
                "probe[2].points[2]", "from 2 to 1000, got the number 1");
    check_error(kOpenWater + kGridProbe + "across = [\"0 cm\", \"1 cm\", \"0 cm\"]\npoints = [3, 3]\nto = [\"0 m\", \"0 m\", \"1 m\"]\n",
                "to = ", "probe[2].to", "allowed here: name, form, corner, along, across, points");
    check_error(kOpenWater + kGridProbe + "points = [3, 3]\n", "[[probe]]", "probe[2].across", "missing required key", 2);
}

// ---- [sweep] and [detection] ------------------------------------------------------

namespace {

// kFish with one object to sweep; a [sweep] and [detection] section follow in each test.
const std::string kFishPrey = kFish + R"TOML([[object]]
name = "prey"
shape = "sphere"
radius = "2 mm"
position = ["3 cm", "2 cm", "0 cm"]
conductivity = "0.5 S/m"
)TOML";

const std::string kReceptors = "[detection]\nreceptor_noise = \"5 uV\"\nreceptor_density = \"20 cm^-2\"\n";

}  // namespace

TEST_CASE("case reader: [sweep] axes from arrays and range tables") {
    const std::string text = kFishPrey + R"TOML([sweep]
object = "prey"
distance = { from = "1 mm", to = "100 mm", count = 3, spacing = "log" }
direction = [0, 3, 4]
size = { from = "1 cm", to = "3 cm", count = 5 }
conductivity = ["insulator", "50 mS/m", "2 S/m", "conductor"]
water_conductivity = ["100 uS/cm"]
)TOML" + kReceptors;
    const CaseSpec s = read_case_text(text, "case.toml");
    REQUIRE(s.sweep);
    const SweepSpec& w = *s.sweep;
    CHECK(w.object == "prey");
    CHECK(w.line == line_with(text, "[sweep]"));
    // log spacing: 1 mm * (100)^(i/2) for i = 0, 1, 2 -> 1, 10, 100 mm (a geometric sequence, by hand)
    REQUIRE(w.distance_m.size() == 3);
    CHECK(w.distance_m[0] == doctest::Approx(1e-3));
    CHECK(w.distance_m[1] == doctest::Approx(1e-2));
    CHECK(w.distance_m[2] == doctest::Approx(1e-1));
    // linear spacing is the default: 1, 1.5, 2, 2.5, 3 cm, ends included
    REQUIRE(w.size_m.size() == 5);
    const double sizes[] = {0.010, 0.015, 0.020, 0.025, 0.030};
    for (int k = 0; k < 5; ++k) CHECK(w.size_m[k] == doctest::Approx(sizes[k]));
    // a direction is normalized: [0, 3, 4] / 5 (a 3-4-5 triangle)
    REQUIRE(w.direction);
    CHECK((*w.direction)[0] == 0.0);
    CHECK((*w.direction)[1] == doctest::Approx(0.6));
    CHECK((*w.direction)[2] == doctest::Approx(0.8));
    // words for the ends of the conductivity axis: insulator 0, conductor +inf; 50 mS/m = 0.05 S/m
    REQUIRE(w.conductivity_S_per_m.size() == 4);
    CHECK(w.conductivity_S_per_m[0] == 0.0);
    CHECK(w.conductivity_S_per_m[1] == doctest::Approx(0.05));
    CHECK(w.conductivity_S_per_m[2] == doctest::Approx(2.0));
    CHECK(std::isinf(w.conductivity_S_per_m[3]));
    CHECK(w.conductivity_S_per_m[3] > 0);
    // 100 uS/cm = 100e-6 S / 1e-2 m = 0.01 S/m
    REQUIRE(w.water_conductivity_S_per_m.size() == 1);
    CHECK(w.water_conductivity_S_per_m[0] == doctest::Approx(0.01));
    CHECK(!w.grid);

    // a range of one value is its 'from'; the log ends are exact
    const CaseSpec one = read_case_text(
        kFishPrey + "[sweep]\nsize = { from = \"2 mm\", to = \"1 mm\", count = 1 }\n"
                    "distance = { from = \"2 mm\", to = \"32 mm\", count = 5, spacing = \"log\" }\n",
        "case.toml");
    CHECK(one.sweep->size_m == std::vector<double>{0.002});
    // 2 mm * 16^(i/4): 2, 4, 8, 16, 32 mm (powers of two, by hand)
    REQUIRE(one.sweep->distance_m.size() == 5);
    const double doubling[] = {0.002, 0.004, 0.008, 0.016, 0.032};
    for (int k = 0; k < 5; ++k) CHECK(one.sweep->distance_m[k] == doctest::Approx(doubling[k]).epsilon(1e-12));
    CHECK(one.sweep->object.empty());  // default: the first object
    CHECK(!one.sweep->direction);      // default: away from the body
    CHECK(!one.detection);
}

TEST_CASE("case reader: [sweep.grid] and [detection] defaults") {
    const std::string text = kFishPrey + R"TOML([sweep]
[sweep.grid]
origin = ["-9 cm", "0 cm", "0 cm"]
u_direction = [2, 0, 0]
v_direction = [0, 1, 1]
u = { from = "1 cm", to = "17 cm", count = 9 }
v = ["1 cm", "2 cm"]
[detection]
amplifier_noise = "10 nV/sqrt(Hz)"
integration_time = "20 ms"
)TOML";
    const CaseSpec s = read_case_text(text, "case.toml");
    REQUIRE(s.sweep);
    REQUIRE(s.sweep->grid);
    const SweepGridSpec& g = *s.sweep->grid;
    CHECK(g.origin_m[0] == doctest::Approx(-0.09));
    CHECK(g.u_direction[0] == doctest::Approx(1.0));  // [2, 0, 0] normalized
    CHECK(g.v_direction[1] == doctest::Approx(std::sqrt(0.5)));
    CHECK(g.v_direction[2] == doctest::Approx(std::sqrt(0.5)));
    REQUIRE(g.u_m.size() == 9);
    for (int k = 0; k < 9; ++k) CHECK(g.u_m[k] == doctest::Approx(0.01 + 0.02 * k));  // 1, 3, ..., 17 cm
    CHECK(g.v_m.size() == 2);
    REQUIRE(s.detection);
    const DetectionSpec& d = *s.detection;
    CHECK(d.noise == DetectionSpec::Noise::voltage_amplifier);
    CHECK(d.noise_density == doctest::Approx(1e-8));
    CHECK(d.integration_time_s == doctest::Approx(0.02));
    // defaults documented in cases/README.md
    CHECK(d.false_alarm_probability == doctest::Approx(1e-3));
    CHECK(d.probability_level == doctest::Approx(0.5));

    const CaseSpec f = read_case_text(kFishPrey + "[sweep]\nsize = [\"1 mm\"]\n" + kReceptors +
                                          "false_alarm_probability = 0.01\nprobability_level = 0.9\n",
                                      "case.toml");
    REQUIRE(f.detection);
    CHECK(f.detection->noise == DetectionSpec::Noise::receptors);
    CHECK(f.detection->receptor_noise_V == doctest::Approx(5e-6));
    CHECK(f.detection->receptor_density_per_m2 == doctest::Approx(2e5));  // 20 per 1e-4 m^2
    CHECK(f.detection->false_alarm_probability == doctest::Approx(0.01));
    CHECK(f.detection->probability_level == doctest::Approx(0.9));

    const CaseSpec c = read_case_text(kFishPrey + "[sweep]\nsize = [\"1 mm\"]\n[detection]\n"
                                                  "amplifier_current_noise = \"2 pA/sqrt(Hz)\"\nintegration_time = \"1 s\"\n",
                                      "case.toml");
    CHECK(c.detection->noise == DetectionSpec::Noise::current_amplifier);
    CHECK(c.detection->noise_density == doctest::Approx(2e-12));
}

TEST_CASE("case reader: [sweep] errors") {
    const std::string& base = kFishPrey;
    // unknown keys, at every level
    check_error(base + "[sweep]\nsize = [\"1 mm\"]\nspeed = \"1 m/s\"\n", "speed", "sweep.speed",
                "unknown key; allowed here: object, ");
    check_error(base + "[sweep]\ndistance = { from = \"1 mm\", to = \"2 mm\", count = 2, step = \"1 mm\" }\n",
                "distance =", "sweep.distance.step", "unknown key; allowed here: from, to, count, spacing");
    check_error(base + "[sweep]\n[sweep.grid]\norigin = [\"0 cm\", \"2 cm\", \"0 cm\"]\nu_direction = [1, 0, 0]\n"
                       "v_direction = [0, 0, 1]\nu = [\"1 cm\"]\nv = [\"1 cm\"]\ntilt = [\"1 cm\"]\n",
                "tilt = ", "sweep.grid.tilt", "unknown key; allowed here: origin, u_direction, v_direction, u, v, w_direction, w");
    // a third grid axis (murk layout's volumes) needs its direction, out of the plane
    check_error(base + "[sweep]\n[sweep.grid]\norigin = [\"0 cm\", \"2 cm\", \"0 cm\"]\nu_direction = [1, 0, 0]\n"
                       "v_direction = [0, 0, 1]\nu = [\"1 cm\"]\nv = [\"1 cm\"]\nw = [\"1 cm\"]\n",
                "[sweep.grid]", "sweep.grid.w_direction", "missing required key");
    check_error(base + "[sweep]\n[sweep.grid]\norigin = [\"0 cm\", \"2 cm\", \"0 cm\"]\nu_direction = [1, 0, 0]\n"
                       "v_direction = [0, 0, 1]\nu = [\"1 cm\"]\nv = [\"1 cm\"]\nw = [\"1 cm\"]\nw_direction = [1, 0, 1]\n",
                "w_direction", "sweep.grid.w_direction", "lies in the plane of u_direction and v_direction");
    // no axis
    check_error(base + "[sweep]\nobject = \"prey\"\n", "[sweep]", "sweep", "no axis to sweep");
    // values must increase strictly: repeated, decreasing, insulator not first, conductor not last
    check_error(base + "[sweep]\nsize = [\"1 mm\", \"1 mm\"]\n", "size =", "sweep.size", "must increase strictly");
    check_error(base + "[sweep]\ndistance = [\"2 cm\", \"1 cm\"]\n", "distance =", "sweep.distance",
                "must increase strictly");
    check_error(base + "[sweep]\nconductivity = [\"1 S/m\", \"insulator\"]\n", "conductivity = [", "sweep.conductivity",
                "insulator first, conductor last");
    check_error(base + "[sweep]\nconductivity = [\"conductor\", \"1 S/m\"]\n", "conductivity = [", "sweep.conductivity",
                "must increase strictly");
    // a range whose 'to' is not above its 'from'
    check_error(base + "[sweep]\ndistance = { from = \"4 mm\", to = \"1 mm\", count = 3 }\n", "distance =",
                "sweep.distance.to", "must be larger than 'from'");
    check_error(base + "[sweep]\ndistance = { from = \"4 mm\", to = \"4 mm\", count = 2, spacing = \"log\" }\n",
                "distance =", "sweep.distance.to", "must be larger than 'from'");
    // range keys
    check_error(base + "[sweep]\nsize = { from = \"1 mm\", to = \"4 mm\" }\n", "size =", "sweep.size.count",
                "missing required key");
    check_error(base + "[sweep]\nsize = { from = \"1 mm\", to = \"4 mm\", count = 0 }\n", "size =", "sweep.size.count",
                "expected a whole number from 1 to 100000, got the number 0");
    check_error(base + "[sweep]\nsize = { from = \"1 mm\", to = \"4 mm\", count = 3, spacing = \"cubic\" }\n", "size =",
                "sweep.size.spacing", "expected one of linear, log, got 'cubic'");
    check_error(base + "[sweep]\nsize = { from = \"0 mm\", to = \"4 mm\", count = 3 }\n", "size =", "sweep.size.from",
                "must be positive");
    // values: positive, of the right kind, words only for the object's conductivity
    check_error(base + "[sweep]\nsize = [\"1 mm\", \"-2 mm\"]\n", "size =", "sweep.size[2]", "must be positive");
    check_error(base + "[sweep]\nsize = []\n", "size =", "sweep.size", "at least one value");
    check_error(base + "[sweep]\nsize = [\"1 mA\"]\n", "size =", "sweep.size[1]", "a current");
    check_error(base + "[sweep]\nsize = \"1 mm\"\n", "size =", "sweep.size",
                "expected an array of values or a range table");
    check_error(base + "[sweep]\nwater_conductivity = [\"insulator\"]\n", "water_conductivity", "sweep.water_conductivity[1]",
                "expected a conductivity");
    // grid and distance together; direction without distance
    check_error(base + "[sweep]\ndistance = [\"1 cm\"]\n[sweep.grid]\norigin = [\"0 cm\", \"2 cm\", \"0 cm\"]\n"
                       "u_direction = [1, 0, 0]\nv_direction = [0, 0, 1]\nu = [\"1 cm\"]\nv = [\"1 cm\"]\n",
                "[sweep.grid]", "sweep.grid", "either by distance or on a grid, not both");
    check_error(base + "[sweep]\nsize = [\"1 mm\"]\ndirection = [0, 1, 0]\n", "direction", "sweep.direction",
                "direction goes with a distance axis");
    check_error(base + "[sweep]\ndistance = [\"1 cm\"]\ndirection = [0, 0, 0]\n", "direction", "sweep.direction",
                "cannot be zero");
    check_error(base + "[sweep]\ndistance = [\"1 cm\"]\ndirection = [0, 1]\n", "direction", "sweep.direction",
                "three numbers");
    // grid rules
    const std::string grid = "[sweep]\n[sweep.grid]\norigin = [\"0 cm\", \"2 cm\", \"0 cm\"]\nu_direction = [1, 0, 0]\n";
    check_error(base + grid + "v_direction = [-2, 0, 0]\nu = [\"1 cm\"]\nv = [\"1 cm\"]\n", "v_direction",
                "sweep.grid.v_direction", "must not be parallel to u_direction");
    check_error(base + grid + "v_direction = [0, 0, 1]\nu = [\"1 cm\"]\n", "[sweep.grid]", "sweep.grid.v",
                "missing required key");
    check_error(base + "[sweep]\n[sweep.grid]\nu_direction = [1, 0, 0]\nv_direction = [0, 0, 1]\nu = [\"1 cm\"]\n"
                       "v = [\"1 cm\"]\n",
                "[sweep.grid]", "sweep.grid.origin", "missing required key");
    // a sweep needs an object to change
    check_error(kFish + "[sweep]\nsize = [\"1 mm\"]\n", "[sweep]", "sweep", "the case has none");
    check_error(base + "[sweep]\nobject = 3\nsize = [\"1 mm\"]\n", "object = 3", "sweep.object", "expected text");
    check_error(base + "[sweep]\nobject = \"stone\"\nsize = [\"1 mm\"]\n", "object = ", "sweep.object",
                "no [[object]] is named 'stone'");
    // alternatives: an axis of alternative objects, by name
    const std::string second = "[[object]]\nname = \"rod\"\nshape = \"capsule\"\nradius = \"1 mm\"\noverall_length = \"8 mm\"\n"
                               "position = [\"-3 cm\", \"2 cm\", \"0 cm\"]\nconductivity = \"conductor\"\n";
    const CaseSpec two = read_case_text(base + second + "[sweep]\nalternatives = [\"rod\", \"prey\"]\n", "case.toml");
    CHECK(two.sweep->alternatives == std::vector<std::string>{"rod", "prey"});
    check_error(base + second + "[sweep]\nalternatives = []\n", "alternatives", "sweep.alternatives", "expected an array of object names");
    check_error(base + second + "[sweep]\nalternatives = \"rod\"\n", "alternatives", "sweep.alternatives",
                "expected an array of object names");
    check_error(base + second + "[sweep]\nalternatives = [\"rod\", 2]\n", "alternatives", "sweep.alternatives[2]",
                "expected an object name in quotes");
    check_error(base + second + "[sweep]\nobject = \"rod\"\nalternatives = [\"rod\", \"prey\"]\n", "alternatives",
                "sweep.alternatives", "not both");
    check_error(base + second + "[sweep]\nalternatives = [\"rod\", \"stone\"]\n", "alternatives", "sweep.alternatives",
                "no [[object]] is named 'stone'");
    // the keys' earlier names are refused with their new ones
    check_error(base + second + "[sweep]\nobjects = [\"rod\", \"prey\"]\n", "objects", "sweep.objects",
                "this key is now called alternatives");
    check_error(base + "[sweep]\nsize = [\"1 mm\"]\nmethod = \"dipole\"\ncheck_points = 3\n", "check_points",
                "sweep.check_points", "this key is now called dipole_checks");
}

TEST_CASE("case reader: [detection] errors") {
    const std::string base = kFishPrey + "[sweep]\nsize = [\"1 mm\"]\n";
    // exactly one noise level
    check_error(base + kReceptors + "amplifier_noise = \"10 nV/sqrt(Hz)\"\nintegration_time = \"1 s\"\n", "[detection]",
                "detection", "give exactly one noise level");
    check_error(base + "[detection]\namplifier_noise = \"10 nV/sqrt(Hz)\"\namplifier_current_noise = \"1 pA/sqrt(Hz)\"\n"
                       "integration_time = \"1 s\"\n",
                "[detection]", "detection", "give exactly one noise level");
    check_error(base + "[detection]\nfalse_alarm_probability = 0.01\n", "[detection]", "detection",
                "give exactly one noise level");
    // what goes with each noise level
    check_error(base + "[detection]\nreceptor_noise = \"5 uV\"\n", "[detection]", "detection.receptor_density",
                "missing required key");
    check_error(base + "[detection]\namplifier_noise = \"10 nV/sqrt(Hz)\"\n", "[detection]", "detection.integration_time",
                "missing required key");
    // kinds and signs
    check_error(base + "[detection]\nreceptor_noise = \"5 uA\"\nreceptor_density = \"20 cm^-2\"\n", "receptor_noise",
                "detection.receptor_noise", "expected a voltage");
    check_error(base + "[detection]\nreceptor_noise = \"-5 uV\"\nreceptor_density = \"20 cm^-2\"\n", "receptor_noise",
                "detection.receptor_noise", "must be positive");
    check_error(base + "[detection]\namplifier_noise = \"10 nV\"\nintegration_time = \"1 s\"\n", "amplifier_noise",
                "detection.amplifier_noise", "expected a voltage noise density");
    check_error(base + "[detection]\namplifier_noise = \"10 nV/sqrt(Hz)\"\nintegration_time = \"0 s\"\n",
                "integration_time", "detection.integration_time", "must be positive");
    // probabilities strictly between 0 and 1
    for (const char* value : {"0", "1", "1.5", "-0.1"}) {
        CAPTURE(value);
        check_error(base + kReceptors + "false_alarm_probability = " + value + "\n", "false_alarm_probability",
                    "detection.false_alarm_probability", "a probability strictly between 0 and 1");
        check_error(base + kReceptors + "probability_level = " + value + "\n", "probability_level",
                    "detection.probability_level", "a probability strictly between 0 and 1");
    }
    // unknown key
    check_error(base + kReceptors + "bandwidth = \"10 Hz\"\n", "bandwidth", "detection.bandwidth",
                "unknown key; allowed here: receptor_noise, receptor_density");
    // receptor zones: fractions of the length from the nose, 0 <= from < to <= 1, density >= 0
    const CaseSpec z = read_case_text(base + kReceptors + "receptor_zones = [{ from = 0.0, to = 0.25, density = \"60 cm^-2\" }]\n",
                                      "case.toml");
    REQUIRE(z.detection->receptor_zones.size() == 1);
    CHECK(z.detection->receptor_zones[0].to_fraction == doctest::Approx(0.25));
    CHECK(z.detection->receptor_zones[0].density_per_m2 == doctest::Approx(6e5));  // 60 per 1e-4 m^2
    check_error(base + kReceptors + "receptor_zones = [{ from = 0.5, to = 0.25, density = \"60 cm^-2\" }]\n",
                "receptor_zones", "detection.receptor_zones[1].to", "expected 0 <= from < to <= 1");
    check_error(base + kReceptors + "receptor_zones = [{ from = 0.5, to = 1.5, density = \"60 cm^-2\" }]\n",
                "receptor_zones", "detection.receptor_zones[1].to", "expected 0 <= from < to <= 1");
    check_error(base + kReceptors + "receptor_zones = [{ from = 0.0, to = 0.5, density = \"-6 cm^-2\" }]\n",
                "receptor_zones", "detection.receptor_zones[1].density", "must not be negative");
    check_error(base + kReceptors + "receptor_zones = [{ from = 0.0, to = 0.5 }]\n", "receptor_zones",
                "detection.receptor_zones[1].density", "missing required key");
    check_error(base + kReceptors + "receptor_zones = [{ from = 0.0, to = 0.5, density = \"6 cm^-2\", noise = \"1 uV\" }]\n",
                "receptor_zones", "detection.receptor_zones[1].noise", "unknown key; allowed here: from, to, density");
    check_error(base + kReceptors + "receptor_zones = { from = 0.0, to = 0.5, density = \"6 cm^-2\" }\n",
                "receptor_zones", "detection.receptor_zones", "expected an array of tables");
}

TEST_CASE("case reader: grid offsets may be zero or negative, log spacing may not") {
    const std::string grid = kFishPrey + R"TOML([sweep]
[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = { from = "-2 cm", to = "2 cm", count = 5 }
v = ["-1 cm", "0 cm", "3 cm"]
)TOML";
    const CaseSpec s = read_case_text(grid, "case.toml");
    REQUIRE(s.sweep->grid);
    // -2, -1, 0, 1, 2 cm, computed by hand
    const double u[] = {-0.02, -0.01, 0.0, 0.01, 0.02};
    REQUIRE(s.sweep->grid->u_m.size() == 5);
    for (int k = 0; k < 5; ++k) CHECK(s.sweep->grid->u_m[k] == doctest::Approx(u[k]).epsilon(1e-12).scale(0.01));
    CHECK(s.sweep->grid->v_m[0] == doctest::Approx(-0.01));
    std::string log_grid = grid;
    log_grid.replace(log_grid.find("count = 5 }"), 11, "count = 5, spacing = \"log\" }");
    check_error(log_grid, "u = {", "sweep.grid.u.from", "log spacing needs a positive");
}

TEST_CASE("case reader: [[mesh.zone]] refinement zones") {
    const std::string text = kFish + R"([mesh]
panel_size = "7 mm"
[[mesh.zone]]
centre = ["3 cm", "7.5 mm", "0 cm"]
radius = "8 mm"
panel_size = "1.5 mm"
[[mesh.zone]]
centre = ["-2 cm", "0 cm", "1 cm"]
radius = "0.5 cm"
panel_size = "2 mm"
)";
    const CaseSpec s = read_case_text(text, "case.toml");
    REQUIRE(s.mesh.zones.size() == 2);
    const MeshZoneSpec& z = s.mesh.zones[0];
    CHECK(z.centre_m[0] == doctest::Approx(0.03));  // 3 cm
    CHECK(z.centre_m[1] == doctest::Approx(0.0075));  // 7.5 mm
    CHECK(z.centre_m[2] == 0.0);
    CHECK(z.radius_m == doctest::Approx(0.008));
    CHECK(z.panel_size_m == doctest::Approx(0.0015));
    CHECK(z.source.where() == "case.toml:" + std::to_string(line_with(text, "[[mesh.zone]]")) + ": mesh.zone[1]");
    CHECK(z.centre_source.where() == "case.toml:" + std::to_string(line_with(text, "centre")) + ": mesh.zone[1].centre");
    CHECK(s.mesh.zones[1].panel_size_source.where() ==
          "case.toml:" + std::to_string(line_with(text, "panel_size = \"2 mm\"")) + ": mesh.zone[2].panel_size");
    CHECK(s.mesh.zones[1].radius_m == doctest::Approx(0.005));  // 0.5 cm
    CHECK(read_case_text(kFish, "case.toml").mesh.zones.empty());
}

TEST_CASE("case reader: bad refinement zones") {
    const std::string zone = "[[mesh.zone]]\ncentre = [\"3 cm\", \"7.5 mm\", \"0 cm\"]\n";
    check_error(kFish + zone + "radius = \"0 mm\"\npanel_size = \"1 mm\"\n", "radius", "mesh.zone[1].radius",
                "must be positive");
    check_error(kFish + zone + "radius = \"5 mm\"\npanel_size = \"-1 mm\"\n", "panel_size", "mesh.zone[1].panel_size",
                "must be positive");
    check_error(kFish + zone + "radius = \"5 mm\"\npanel_size = \"1 mA\"\n", "panel_size", "mesh.zone[1].panel_size",
                "expected a length");
    check_error(kFish + zone + "radius = 5\npanel_size = \"1 mm\"\n", "radius", "mesh.zone[1].radius",
                "written with a unit");
    check_error(kFish + zone + "panel_size = \"1 mm\"\n", "[[mesh.zone]]", "mesh.zone[1].radius",
                "missing required key");
    check_error(kFish + "[[mesh.zone]]\nradius = \"5 mm\"\npanel_size = \"1 mm\"\n", "[[mesh.zone]]",
                "mesh.zone[1].centre", "missing required key");
    check_error(kFish + zone + "radius = \"5 mm\"\npanel_size = \"1 mm\"\nsize = \"3 mm\"\n", "size = \"3 mm\"",
                "mesh.zone[1].size", "unknown key; allowed here: centre, radius, panel_size");
    check_error(kFish + "[[mesh.zone]]\ncentre = [\"3 cm\", \"0 cm\"]\nradius = \"5 mm\"\npanel_size = \"1 mm\"\n",
                "centre", "mesh.zone[1].centre", "expected an array of three lengths");
    check_error(kFish + "[mesh.zone]\ncentre = [\"3 cm\", \"0 cm\", \"0 cm\"]\nradius = \"5 mm\"\npanel_size = \"1 mm\"\n",
                "[mesh.zone]", "mesh.zone", "expected [[mesh.zone]] tables");
    // Zones refine the sensing body: a case without one, or an imported hull, has none to refine.
    check_error(kOpenWater + zone + "radius = \"5 mm\"\npanel_size = \"1 mm\"\n", "[[mesh.zone]]", "mesh.zone[1]",
                "the case has no [fish] or [robot]");
    std::string robot = kRobot;
    robot.replace(robot.find("shape = \"capsule\"\nradius = \"2 cm\"\noverall_length = \"30 cm\""),
                  std::string("shape = \"capsule\"\nradius = \"2 cm\"\noverall_length = \"30 cm\"").size(),
                  "shape = \"mesh\"\nfile = \"hull.stl\"");
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / "murk_test_mesh_zone";
    fs::create_directories(dir);
    { std::ofstream(dir / "hull.stl") << "solid hull\nendsolid hull\n"; }
    const std::string hull_text = robot + zone + "radius = \"5 mm\"\npanel_size = \"1 mm\"\n";
    { std::ofstream(dir / "case.toml") << hull_text; }
    const std::string m = [&] {
        try {
            read_case_file((dir / "case.toml").string());
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string();
    }();
    CHECK(m.find(":" + std::to_string(line_with(hull_text, "[[mesh.zone]]")) + ": mesh.zone[1]: ") != std::string::npos);
    CHECK(m.find("an imported mesh keeps its own panels") != std::string::npos);
    fs::remove_all(dir);
}

TEST_CASE("case reader: [detection] amplitude and phase channels") {
    const std::string ac = "frequency = \"1 kHz\"\n" + kFishPrey + "[sweep]\nsize = [\"1 mm\"]\n";
    // Default: both quadratures, no phase noise.
    const CaseSpec plain = read_case_text(ac + kReceptors, "case.toml");
    CHECK(plain.detection->channels == DetectionSpec::Channels::quadratures);
    CHECK(plain.detection->phase_noise_rad == 0.0);
    const CaseSpec amplitude = read_case_text(ac + kReceptors + "channels = \"amplitude\"\n", "case.toml");
    CHECK(amplitude.detection->channels == DetectionSpec::Channels::amplitude);
    // Degrees become radians (2 deg = pi/90), a jitter stays a time.
    const CaseSpec phase =
        read_case_text(ac + kReceptors + "channels = \"amplitude_and_phase\"\nphase_noise = \"2 deg\"\n", "case.toml");
    CHECK(phase.detection->channels == DetectionSpec::Channels::amplitude_and_phase);
    CHECK(phase.detection->phase_noise_rad == doctest::Approx(M_PI / 90));
    const CaseSpec jitter =
        read_case_text(ac + kReceptors + "channels = \"amplitude_and_phase\"\ntiming_jitter = \"400 ns\"\n", "case.toml");
    CHECK(jitter.detection->timing_jitter_s == doctest::Approx(4e-7));
    CHECK(jitter.detection->phase_noise_rad == 0.0);

    check_error(ac + kReceptors + "channels = \"phase\"\n", "channels", "detection.channels",
                "expected one of");
    check_error(ac + kReceptors + "channels = \"amplitude_and_phase\"\n", "channels", "detection.channels",
                "needs exactly one of phase_noise");
    check_error(ac + kReceptors + "channels = \"amplitude_and_phase\"\nphase_noise = \"1 deg\"\ntiming_jitter = \"1 us\"\n",
                "channels", "detection.channels", "needs exactly one of phase_noise");
    check_error(ac + kReceptors + "phase_noise = \"1 deg\"\n", "phase_noise", "detection.phase_noise",
                "give channels = \"amplitude_and_phase\" too");
    check_error(ac + kReceptors + "channels = \"amplitude\"\ntiming_jitter = \"1 us\"\n", "timing_jitter",
                "detection.timing_jitter", "give channels = \"amplitude_and_phase\" too");
    check_error(ac + kReceptors + "channels = \"amplitude_and_phase\"\nphase_noise = \"-1 deg\"\n", "phase_noise",
                "detection.phase_noise", "must be positive");
    check_error(ac + kReceptors + "channels = \"amplitude_and_phase\"\nphase_noise = \"1 us\"\n", "phase_noise",
                "detection.phase_noise", "expected an angle");
    check_error(ac + kReceptors + "channels = \"amplitude_and_phase\"\ntiming_jitter = \"1 deg\"\n", "timing_jitter",
                "detection.timing_jitter", "expected a time");
    // Without a frequency there is no phase to read.
    check_error(kFishPrey + "[sweep]\nsize = [\"1 mm\"]\n" + kReceptors + "channels = \"amplitude_and_phase\"\n"
                "phase_noise = \"1 deg\"\n", "[detection]", "detection.channels", "the case has no frequency");
}

TEST_CASE("case reader: water between a surface and a bottom, and a sediment bottom") {
    const CaseSpec s = read_case_text(
        fish_with("[water]", "surface_z = \"10 cm\"\nbottom_z = \"-20 cm\"\nbottom_conductivity = \"20 uS/cm\"\n"
                             "image_tolerance = 1e-8"),
        "case.toml");
    REQUIRE(s.water.surface);
    REQUIRE(s.water.bottom);
    CHECK(s.water.surface->height_m == doctest::Approx(0.1));
    CHECK(s.water.bottom->height_m == doctest::Approx(-0.2));
    CHECK(!s.water.bottom->water_below);
    REQUIRE(s.water.bottom_conductivity_S_per_m);
    CHECK(*s.water.bottom_conductivity_S_per_m == doctest::Approx(2e-3));
    CHECK(s.water.image_tolerance == 1e-8);
    CHECK(s.water.planes().size() == 2);
    // the default tolerance
    CHECK(read_case_text(fish_with("[water]", "surface_z = \"1 m\"\nbottom_z = \"-1 m\""), "case.toml")
              .water.image_tolerance == 1e-6);

    check_error(fish_with("[water]", "surface_z = \"-1 m\"\nbottom_z = \"1 m\""), "bottom_z", "water.bottom_z",
                "must lie below the water surface");
    check_error(fish_with("[water]", "surface_z = \"1 m\"\nbottom_z = \"1 m\""), "bottom_z", "water.bottom_z",
                "must lie below the water surface");
    check_error(fish_with("[water]", "bottom_z = \"-1 m\"\nbottom_conductivity = \"0 S/m\""), "bottom_conductivity",
                "water.bottom_conductivity", "must be positive");
    check_error(fish_with("[water]", "bottom_z = \"-1 m\"\nbottom_conductivity = \"-1 S/m\""), "bottom_conductivity",
                "water.bottom_conductivity", "must be positive");
    check_error(fish_with("[water]", "bottom_z = \"-1 m\"\nbottom_conductivity = \"inf S/m\""), "bottom_conductivity",
                "water.bottom_conductivity", "");
    check_error(fish_with("[water]", "bottom_conductivity = \"1 S/m\""), "bottom_conductivity",
                "water.bottom_conductivity", "needs bottom_z");
    check_error(fish_with("[water]", "surface_z = \"1 m\"\nimage_tolerance = 1e-6"), "image_tolerance",
                "water.image_tolerance", "applies only to water between");
    check_error(fish_with("[water]", "surface_z = \"1 m\"\nbottom_z = \"-1 m\"\nimage_tolerance = 0"),
                "image_tolerance", "water.image_tolerance", "must lie between");
}

TEST_CASE("case reader: the wall_distance axis and the wall it moves") {
    const std::string tank = "[tank]\nshape = \"box\"\nsize = [\"40 cm\", \"20 cm\", \"20 cm\"]\n"
                             "centre = [\"0 cm\", \"0 cm\", \"0 cm\"]\npanel_size = \"4 cm\"\n";
    const std::string object = "[[object]]\nname = \"p\"\nshape = \"sphere\"\nradius = \"2 mm\"\n"
                               "position = [\"0 cm\", \"3 cm\", \"0 cm\"]\nconductivity = \"1 S/m\"\n";
    auto with_sweep = [&](const std::string& sweep, const std::string& tank_table) {
        return kFish + tank_table + object + "[sweep]\n" + sweep + "\n";
    };
    const CaseSpec s = read_case_text(with_sweep("wall = \"-y\"\nwall_distance = [\"1 cm\", \"2 cm\"]", tank), "case.toml");
    REQUIRE(s.sweep);
    CHECK(s.sweep->moved == MovedBoundary::wall);
    CHECK(s.sweep->wall_axis == 1);
    CHECK(s.sweep->wall_sign == -1);
    REQUIRE(s.sweep->boundary_distance_m.size() == 2);
    CHECK(s.sweep->boundary_distance_m[1] == doctest::Approx(0.02));
    const CaseSpec x = read_case_text(with_sweep("wall = \"+x\"\nwall_distance = [\"1 cm\"]", tank), "case.toml");
    CHECK(x.sweep->wall_axis == 0);
    CHECK(x.sweep->wall_sign == 1);

    check_error(with_sweep("wall = \"+x\"\nwall_distance = [\"1 cm\"]", ""), "wall_distance", "sweep.wall_distance",
                "moves a wall of the tank");
    check_error(with_sweep("wall_distance = [\"1 cm\"]", tank), "[sweep]", "sweep.wall", "+x");
    check_error(with_sweep("wall = \"+z\"\nwall_distance = [\"1 cm\"]", tank), "wall =", "sweep.wall", "+y");
    check_error(with_sweep("wall = \"+x\"\nwall_distance = [\"0 cm\"]", tank), "wall_distance", "sweep.wall_distance[1]", "must be positive");
    check_error(with_sweep("wall = \"+x\"\nsize = [\"1 mm\"]", tank), "wall =", "sweep.wall", "no wall_distance");
    check_error(with_sweep("surface_distance = [\"1 cm\"]\nwall = \"+x\"\nwall_distance = [\"1 cm\"]", tank),
                "wall_distance", "sweep.wall_distance", "a sweep moves one boundary");

    // A tank read from a mesh file has no named walls.
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / "murk_test_wall_axis";
    fs::create_directories(dir);
    write_stl((dir / "walls.stl").string(), make_box(Vec3(0.4, 0.2, 0.2), 0.05));
    const std::string mesh_tank = "[tank]\nshape = \"mesh\"\nfile = \"" + (dir / "walls.stl").string() + "\"\n";
    const std::string m = error_of(with_sweep("wall = \"+x\"\nwall_distance = [\"1 cm\"]", mesh_tank));
    CAPTURE(m);
    CHECK(m.find("sweep.wall_distance: moves a side wall of a box or cylinder [tank]") != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
    fs::remove_all(dir);
}
