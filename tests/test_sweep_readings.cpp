// What the sensors of a sweep read (cases/sweep/sweep_readings): which sensors a
// case has, what each reads from a solution, and the peak and width of an image.
// Solutions are made by hand here, so every expected reading is written out from
// the definitions in the header (transdermal voltage = inner - outer potential;
// a floating sensor reads its potential, a held one its current; a pair reads
// the later sensor minus the earlier), not computed by the code under test.
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/sweep_readings.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <string>

using namespace murk;

namespace {

std::string robot(const std::string& sensors, const std::string& extra = "") {
    return R"(
title = "readings"
[water]
conductivity = "100 uS/cm"
[mesh]
panel_size = "1 cm"
[robot]
shape = "capsule"
radius = "2 cm"
overall_length = "30 cm"
position = ["0 cm", "0 cm", "0 cm"]
[[robot.electrode]]
name = "E"
form = "ring"
from = "10 cm"
to = "12 cm"
role = "emitter"
current = "1 mA"
)" + sensors + extra;
}

std::string ring(const std::string& name, double from_cm, const std::string& drive = "") {
    return "[[robot.electrode]]\nname = \"" + name + "\"\nform = \"ring\"\nfrom = \"" + std::to_string(from_cm) +
           " cm\"\nto = \"" + std::to_string(from_cm + 1.5) + " cm\"\nrole = \"sensor\"\n" + drive;
}

// A solution of the right shape whose electrode values are given.
Solution<double> with_electrodes(const Scene<double>& scene, std::vector<double> potential, std::vector<double> current) {
    Solution<double> s;
    for (const auto& surface : scene.surfaces) {
        SurfaceSolution<double> v;
        v.outer_potential = Eigen::VectorXd::Zero(Eigen::Index(surface.mesh.size()));
        v.current_density = v.outer_potential;
        s.surfaces.push_back(v);
    }
    s.electrode_potential = std::move(potential);
    s.electrode_current = std::move(current);
    return s;
}

}  // namespace

TEST_CASE("readings: floating sensors read their potentials, in case order") {
    const CaseSpec spec = read_case_text(robot(ring("S1", -8) + ring("S2", -3) + ring("S3", 2)), "r.toml");
    const Scene<double> scene = build_scene<double>(spec, false);
    const SensorLayout sensors = sensor_layout(spec, scene, "r.toml: sweep");
    CHECK(sensors.units == "V");
    CHECK(sensors.names == std::vector<std::string>{"S1", "S2", "S3"});
    // Electrodes: E (emitter, index 0), S1, S2, S3.
    const auto r = sensor_readings(sensors, scene, with_electrodes(scene, {9.0, 1.0, 2.5, -4.0}, {1e-3, 0, 0, 0}), {});
    CHECK(r == std::vector<double>{1.0, 2.5, -4.0});
    // A sensor's position is its ring's centre on the axis (rings from -8 to -6.5 cm, ...).
    CHECK(sensors.position[0].x() == doctest::Approx(-0.0725).epsilon(1e-2));
}

TEST_CASE("readings: pairs read the later sensor minus the earlier") {
    const CaseSpec spec = read_case_text(robot(ring("S1", -8) + ring("S2", -3) + ring("S3", 2), "[sweep]\nreadings = \"pairs\"\ndistance = [\"1 cm\"]\n[[object]]\nname = \"o\"\nshape = \"sphere\"\nradius = \"5 mm\"\nposition = [\"0 cm\", \"5 cm\", \"0 cm\"]\nconductivity = \"1 S/m\"\n"), "r.toml");
    const Scene<double> scene = build_scene<double>(spec, false);
    const SensorLayout sensors = sensor_layout(spec, scene, "r.toml: sweep");
    CHECK(sensors.names == std::vector<std::string>{"S2-S1", "S3-S2"});
    const auto r = sensor_readings(sensors, scene, with_electrodes(scene, {9.0, 1.0, 2.5, -4.0}, {1e-3, 0, 0, 0}), {});
    CHECK(r == std::vector<double>{1.5, -6.5});
}

TEST_CASE("readings: sensors held at a potential read their currents") {
    const CaseSpec spec =
        read_case_text(robot(ring("S1", -8, "potential = \"0 V\"\n") + ring("S2", -3, "potential = \"0 V\"\n")), "r.toml");
    const Scene<double> scene = build_scene<double>(spec, false);
    const SensorLayout sensors = sensor_layout(spec, scene, "r.toml: sweep");
    CHECK(sensors.units == "A");
    const auto r = sensor_readings(sensors, scene, with_electrodes(scene, {9.0, 0.0, 0.0}, {1e-3, -2e-6, 3e-6}), {});
    CHECK(r == std::vector<double>{-2e-6, 3e-6});
}

TEST_CASE("readings: a perfectly conducting object that stays is no sensor") {
    const CaseSpec spec = read_case_text(
        robot(ring("S1", -8), "[[object]]\nname = \"can\"\nshape = \"sphere\"\nradius = \"1 cm\"\nposition = [\"0 cm\", \"8 cm\", \"0 cm\"]\nconductivity = \"conductor\"\n"),
        "r.toml");
    const Scene<double> scene = build_scene<double>(spec, true);  // the object's floating electrode comes last
    REQUIRE(scene.electrodes.size() == 3);
    const SensorLayout sensors = sensor_layout(spec, scene, "r.toml: sweep");
    CHECK(sensors.names == std::vector<std::string>{"S1"});
}

TEST_CASE("readings: mixed voltage and current sensors, or none, are refused") {
    const CaseSpec mixed =
        read_case_text(robot(ring("S1", -8) + ring("S2", -3, "potential = \"0 V\"\n")), "r.toml");
    CHECK_THROWS_AS(sensor_layout(mixed, build_scene<double>(mixed, false), "r.toml: sweep"), InputError);
    const CaseSpec none = read_case_text(robot(""), "r.toml");
    CHECK_THROWS_AS(sensor_layout(none, build_scene<double>(none, false), "r.toml: sweep"), InputError);
}

TEST_CASE("readings: the image's peak and its width at half maximum along the body axis") {
    SensorLayout skin;
    skin.skin = true;
    skin.body_axis = Vec3::UnitX();
    for (int k = 0; k < 11; ++k) skin.position.push_back(Vec3(0.01 * k, 0.02, 0.0));  // 1 cm apart along x
    // A triangular bump peaking at x = 5 cm: |change| >= half the peak from 3 cm to 7 cm.
    std::vector<double> change = {0, 0, 0.1, 0.5, 0.75, -1.0, 0.75, 0.5, 0.2, 0, 0};
    const ImageSummary s = summarize_image(skin, change);
    CHECK(s.peak == 1.0);
    CHECK(s.peak_sensor == 5);
    CHECK(s.width == doctest::Approx(0.04));
    // Complex values: the magnitude counts.
    std::vector<Complex> z(11, Complex(0, 0));
    z[2] = Complex(0, -2.0);
    const ImageSummary c = summarize_image(skin, z);
    CHECK(c.peak == 2.0);
    CHECK(c.peak_sensor == 2);
    CHECK(c.width == doctest::Approx(0.0));
}
