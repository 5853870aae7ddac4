// Case files from strangers: numbers and lists that decide how much is allocated
// are checked against cases/input/case_limits.hpp, and every message that echoes a
// value from the file stays one line of at most 200 characters, whatever the value
// holds (line breaks, a megabyte of text).
#include "cases/input/case_limits.hpp"
#include "cases/input/case_reader.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include "tests/temp_dir.hpp"

#include <cmath>
#include <string>
#include <vector>

using namespace murk;

namespace {

const std::string kBody = R"(title = "t"
[water]
conductivity = "100 uS/cm"
[fish]
length = "15 cm"
interior_conductivity = "1 S/m"
skin_resistance = "0.25 ohm*m^2"
[fish.organ]
current = "50 uA"
)";

const std::string kPrey = R"([[object]]
name = "prey"
shape = "sphere"
radius = "2 mm"
position = ["3 cm", "2 cm", "0 cm"]
conductivity = "0.5 S/m"
)";

// The message of reading `text`, checked to be one line of at most 200 characters.
std::string refusal(const std::string& text) {
    std::string m;
    try {
        read_case_text(text, "case.toml");
    } catch (const InputError& e) {
        m = e.what();
    }
    CAPTURE(m);
    CHECK(!m.empty());
    CHECK(m.find('\n') == std::string::npos);
    CHECK(m.size() <= 200);
    return m;
}

// Checks that `message` contains `words`, showing the message when it does not.
void expect_has(const std::string& message, const std::string& words) {
    CAPTURE(message);
    CHECK(message.find(words) != std::string::npos);
}

std::string repeated(const std::string& item, std::size_t n, const std::string& separator = ", ") {
    std::string out;
    for (std::size_t k = 0; k < n; ++k) out += (k ? separator : "") + item;
    return out;
}

}  // namespace

TEST_CASE("case limits: a value with a line break gives one short line") {
    std::string text = kBody;
    text.replace(text.find("\"100 uS/cm\""), 11, "\"100 uS/cm\\nrm -rf /\"");  // a TOML escape: a real line break
    const std::string m = refusal(text);
    CHECK(m.rfind("case.toml:3: water.conductivity: ", 0) == 0);
    expect_has(m, "'100 uS/cm\\nrm -rf /'");
    // in a name, and in a key
    expect_has(refusal(kBody + "[[object]]\nname = \"a\\nb\"\nshape = \"sphere\"\nradius = \"1 mm\"\n"
                              "position = [\"3 cm\", \"2 cm\", \"0 cm\"]\nconductivity = \"insulator\"\n"),
              "object[1].name: a name cannot hold control characters such as line breaks, got 'a\\nb'");
    expect_has(refusal(kBody + "[water2]\n\"x\\ny\" = 1\n"), "case.toml:10: water2: unknown key");
    expect_has(refusal(kBody + "\"x\\ny\" = 1\n"), "case.toml:10: fish.organ.x\\ny: unknown key");
}

TEST_CASE("case limits: a megabyte value gives one short line") {
    const std::string mb(1 << 20, 'x');
    std::string text = kBody;
    text.replace(text.find("\"100 uS/cm\""), 11, "\"1" + mb + "\"");
    expect_has(refusal(text), "case.toml:3: water.conductivity: a quantity is at most 200 bytes of text, got '1xxx");
    expect_has(refusal(text), "(1048577 bytes)");
    // a megabyte where a choice, a name, a key, a file name and an unknown unit belong
    std::string shape = kBody + kPrey;
    shape.replace(shape.find("\"sphere\""), 8, "\"" + mb + "\"");
    expect_has(refusal(shape), "object[1].shape: expected one of sphere, spheroid");
    std::string name = kBody + kPrey;
    name.replace(name.find("\"prey\""), 6, "\"" + mb + "\"");
    expect_has(refusal(name), "object[1].name: a name has at most 64 bytes");
    expect_has(refusal(kBody + "[water2]\n" + mb + " = 1\n"), "water2: unknown key");
    expect_has(refusal(kBody + mb + " = 1\n"), "case.toml:10: fish.organ.xxxx");
    std::string file = kBody + kPrey;
    file.replace(file.find("shape = \"sphere\"\nradius = \"2 mm\""), 32, "shape = \"mesh\"\nfile = \"" + mb + ".stl\"");
    expect_has(refusal(file), "object[1].file: no such file: '");
    std::string unit = kBody;
    unit.replace(unit.find("\"100 uS/cm\""), 11, "\"100 " + std::string(150, 'q') + "\"");
    expect_has(refusal(unit), "water.conductivity: unknown unit 'qqqq");
    // a TOML syntax error on a megabyte line
    expect_has(refusal(kBody + "x = " + mb + "\n"), "case.toml:10: TOML syntax: ");
}

TEST_CASE("case limits: a case file larger than the cap is refused before it is read") {
    murk::testing::TempDir tmp("murk-test-case-limits");
    const std::string path = tmp.file("big.toml", kBody + "# " + std::string(kMaxCaseFileBytes, '-') + "\n");
    try {
        read_case_file(path);
        FAIL("no error");
    } catch (const InputError& e) {
        expect_has(e.what(), "big.toml: larger than 16777216 bytes, the most murk reads for a case file");
    }
}

TEST_CASE("case limits: huge claimed counts") {
    // a range of a billion values
    expect_has(refusal(kBody + kPrey + "[sweep]\nsize = { from = \"1 mm\", to = \"2 mm\", count = 1000000000 }\n"),
              "sweep.size.count: expected a whole number from 1 to 100000, got the number 1000000000");
    // a grid of 1000 x 1000 points is allowed once, not twice
    const std::string grid = "[[probe]]\nname = \"NAME\"\nform = \"grid\"\ncorner = [\"1 cm\", \"1 cm\", \"0 cm\"]\n"
                             "along = [\"2 cm\", \"0 cm\", \"0 cm\"]\nacross = [\"0 cm\", \"0 cm\", \"1 cm\"]\npoints = [1000, 1000]\n";
    std::string one = grid, two = grid;
    one.replace(one.find("NAME"), 4, "a");
    two.replace(two.find("NAME"), 4, "b");
    CHECK(read_case_text(kBody + one, "case.toml").probe_points.size() == 1000000);
    expect_has(refusal(kBody + one + two), "case.toml:17: probe[2]: the probes would have more than 1000000 points in all");
    // point sources: the organ's 20 and 99 lines of 1000 fit; the 100th line does not
    const std::string line = "[[source]]\nform = \"line\"\nfrom = [\"1 cm\", \"5 cm\", \"0 cm\"]\n"
                             "to = [\"2 cm\", \"5 cm\", \"0 cm\"]\npoints = 1000\ntotal_current = \"1 uA\"\n";
    CHECK(read_case_text(kBody + repeated(line, 99, ""), "case.toml").sources.size() == 99);
    expect_has(refusal(kBody + repeated(line, 100, "")), "source[100]: the case would have more than 100000 point sources");
}

TEST_CASE("case limits: lists longer than their cap") {
    // weights: one point each, at most 1000 (checked before their sum)
    expect_has(refusal(kBody + "weights = [" + repeated("1", 1001) + "]\n"),
              "fish.organ.weights: expected at most 1000 weights (one point each), got 1001");
    // profile stations
    std::string profile = kBody;
    profile.replace(profile.find("[fish]\n"), 7, "[fish]\nprofile = [" + repeated("[0, 0, 0]", 1001) + "]\n");
    expect_has(refusal(profile), "fish.profile: expected at most 1000 stations, got 1001");
    // values of one axis
    expect_has(refusal(kBody + kPrey + "[sweep]\nsize = [" + repeated("\"1 mm\"", 100001) + "]\n"),
              "sweep.size: expected at most 100000 values, got an array of 100001");
    // refinement zones
    std::string zones = kBody;
    zones.replace(zones.find("[fish]\n"), 7,
                  repeated("[[mesh.zone]]\ncentre = [\"3 cm\", \"7 mm\", \"0 cm\"]\nradius = \"5 mm\"\npanel_size = \"1 mm\"\n", 1001, "") +
                      "[fish]\n");
    expect_has(refusal(zones), "case.toml:4: mesh.zone: expected at most 1000 [[mesh.zone]] tables, got 1001");
    // receptor zones
    expect_has(refusal(kBody + "[detection]\nreceptor_noise = \"5 uV\"\nreceptor_density = \"20 cm^-2\"\nreceptor_zones = [" +
                      repeated("{ from = 0, to = 1, density = \"1 cm^-2\" }", 1001) + "]\n"),
              "detection.receptor_zones: expected at most 1000 zones, got an array of 1001");
}

TEST_CASE("case limits: negative counts and counts that disagree with the content") {
    expect_has(refusal(kBody + kPrey + "[sweep]\nsize = { from = \"1 mm\", to = \"2 mm\", count = -3 }\n"),
              "sweep.size.count: expected a whole number from 1 to 100000, got the number -3");
    expect_has(refusal(kBody + "points = -9223372036854775808\n"), "fish.organ.points: expected a whole number from 2 to 1000");
    // a count beside the list it would have to match
    expect_has(refusal(kBody + "weights = [1, -1]\npoints = 3\n"), "fish.organ.points: not used with weights");
    std::string grid = "[[probe]]\nname = \"g\"\nform = \"grid\"\ncorner = [\"1 cm\", \"1 cm\", \"0 cm\"]\n"
                       "along = [\"2 cm\", \"0 cm\", \"0 cm\"]\nacross = [\"0 cm\", \"0 cm\", \"1 cm\"]\npoints = [3, 3, 3]\n";
    expect_has(refusal(kBody + grid), "probe[1].points: expected two whole numbers");
}

// Quantities murk cannot compute with: subnormal numbers (they have lost digits and
// vanish or overflow in the first quotient) and magnitudes outside the computing
// window of cases/input/case_limits.hpp. Each is refused at reading time, naming
// the line and key, whichever key holds it. The window is our own design choice
// (products of three quantities within it stay inside double precision, whose
// limits, 2.2e-308 and 1.8e308, are those of IEEE 754 binary64: common practice).
TEST_CASE("case limits: subnormal and out-of-window quantities are refused at reading time") {
    struct Bad {
        std::string from, to, key, words;
    };
    const std::vector<Bad> bad{
        {"conductivity = \"100 uS/cm\"", "conductivity = \"4.9e-324 S/m\"", "water.conductivity", "too small for double"},
        {"conductivity = \"100 uS/cm\"", "conductivity = \"1e-308 uS/cm\"", "water.conductivity", "too small for double"},
        {"conductivity = \"100 uS/cm\"", "conductivity = \"1e-31 S/m\"", "water.conductivity", "outside the range murk"},
        {"current = \"50 uA\"", "current = \"1e308 A\"", "fish.organ.current", "outside the range murk"},
        {"current = \"50 uA\"", "current = \"1e-40 A\"", "fish.organ.current", "outside the range murk"},
        {"length = \"15 cm\"", "length = \"1e31 m\"", "fish.length", "outside the range murk"},
        {"radius = \"2 mm\"", "radius = \"4.9e-324 m\"", "object[1].radius", "too small for double"},
        {"conductivity = \"0.5 S/m\"", "conductivity = \"4.9e-324 S/m\"", "object[1].conductivity", "too small"},
    };
    for (const Bad& b : bad) {
        std::string text = kBody + kPrey;
        const std::size_t at = text.find(b.from);
        REQUIRE(at != std::string::npos);
        text.replace(at, b.from.size(), b.to);
        CAPTURE(b.to);
        const std::string m = refusal(text);
        expect_has(m, "case.toml:");
        expect_has(m, b.key + ":");
        expect_has(m, b.words);
    }
}

TEST_CASE("case limits: an object's conductivity may span every normal number (solved as its limit beyond 1e8)") {
    for (const char* value : {"1e-300 S/m", "1e300 S/m", "2.3e-308 S/m"}) {
        std::string text = kBody + kPrey;
        const std::string from = "conductivity = \"0.5 S/m\"";
        text.replace(text.find(from), from.size(), std::string("conductivity = \"") + value + "\"");
        CAPTURE(value);
        CHECK_NOTHROW(read_case_text(text, "case.toml"));
    }
}

TEST_CASE("case limits: directions normalize whatever the size of their numbers") {
    // [a, a, 0] / |.| = [1/sqrt 2, 1/sqrt 2, 0] for any a > 0: plain vector algebra.
    const std::string sweep = "[sweep]\nobject = \"prey\"\ndistance = [\"1 cm\", \"2 cm\"]\n";
    for (const char* direction : {"[1e200, 1e200, 0]", "[1e-200, 1e-200, 0]", "[1e-300, 1e-300, 0]"}) {
        const CaseSpec spec = read_case_text(kBody + kPrey + sweep + "direction = " + direction + "\n", "case.toml");
        REQUIRE(spec.sweep);
        REQUIRE(spec.sweep->direction);
        const auto& d = *spec.sweep->direction;
        CAPTURE(direction);
        CHECK(d[0] == doctest::Approx(1.0 / std::sqrt(2.0)).epsilon(1e-15));
        CHECK(d[1] == doctest::Approx(1.0 / std::sqrt(2.0)).epsilon(1e-15));
        CHECK(d[2] == 0.0);
    }
    expect_has(refusal(kBody + kPrey + sweep + "direction = [0, 0, 0]\n"), "sweep.direction: a direction cannot be zero");
}
