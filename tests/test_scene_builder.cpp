// From a case to the solver's scene: placement of meshes and sources, electrode
// tags, materials at a frequency, and the whole-scene checks. Expected positions
// and values are worked out by hand in each test from the case text.
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"
#include "geometry/clearance.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/shapes.hpp"
#include "solver/bem_system.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <numeric>
#include <string>

using namespace murk;
namespace fs = std::filesystem;

namespace {

// Vacuum permittivity (F/m), CODATA 2018 recommended value.
constexpr double kEps0 = 8.8541878128e-12;

CaseSpec spec_of(const std::string& text) { return read_case_text(text, "case.toml"); }

template <class S = double>
std::string build_error(const std::string& text, bool include_objects = true) {
    try {
        build_scene<S>(spec_of(text), include_objects);
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

int line_with(const std::string& text, const std::string& needle, int nth = 1) {
    auto pos = text.find(needle);
    for (int k = 1; k < nth && pos != std::string::npos; ++k) pos = text.find(needle, pos + 1);
    REQUIRE(pos != std::string::npos);
    return 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<long>(pos), '\n'));
}

// A 15 cm fish along +x, centre at the origin, coarse mesh.
const std::string kFish = R"(title = "f"
[water]
conductivity = "100 uS/cm"
[mesh]
panel_size = "8 mm"
[fish]
length = "15 cm"
interior_conductivity = "1 S/m"
skin_resistance = "0.25 ohm*m^2"
[fish.organ]
from = 0.2
to = 0.8
points = 4
current = "100 uA"
)";

std::string sphere_object(const std::string& name, const std::string& position, const std::string& radius,
                          const std::string& conductivity) {
    return "[[object]]\nname = \"" + name + "\"\nshape = \"sphere\"\nradius = \"" + radius + "\"\nposition = " +
           position + "\nconductivity = " + conductivity + "\n";
}

double max_coordinate(const TriangleMesh& m, int axis) {
    double v = -1e300;
    for (const Vec3& p : m.vertices) v = std::max(v, p[axis]);
    return v;
}
double min_coordinate(const TriangleMesh& m, int axis) {
    double v = 1e300;
    for (const Vec3& p : m.vertices) v = std::min(v, p[axis]);
    return v;
}

}  // namespace

TEST_CASE("scene builder: every example case reads and builds") {
    const fs::path dir = fs::path(MURK_SOURCE_DIR) / "cases" / "examples";
    int count = 0;
    for (const auto& entry : fs::directory_iterator(dir)) {
        if (entry.path().extension() != ".toml") continue;
        CAPTURE(entry.path().string());
        ++count;
        const CaseSpec spec = read_case_file(entry.path().string());
        std::size_t panels = 0, surfaces = 0;
        // the sensing body, if the case has one, and a tank's walls are the baseline's surfaces
        const std::size_t bodies = (spec.fish || spec.robot ? 1 : 0) + (spec.tank ? 1 : 0);
        if (case_needs_complex(spec)) {
            const Scene<Complex> scene = build_scene<Complex>(spec, true);
            for (const auto& s : scene.surfaces) panels += s.mesh.size();
            surfaces = scene.surfaces.size();
            CHECK(build_scene<Complex>(spec, false).surfaces.size() == bodies);
        } else {
            const Scene<double> scene = build_scene<double>(spec, true);
            for (const auto& s : scene.surfaces) panels += s.mesh.size();
            surfaces = scene.surfaces.size();
            CHECK(build_scene<double>(spec, false).surfaces.size() == bodies);
        }
        CHECK(surfaces == bodies + spec.objects.size());
        // Examples must solve in seconds: the limit set for them in the design brief.
        CHECK(panels <= 2500);
        // Each opens with a comment block saying how to run it.
        CHECK(spec.text.rfind("# ", 0) == 0);
        const std::string name = entry.path().filename().string();
        CHECK((spec.text.find("build/murk solve cases/examples/" + name) != std::string::npos ||
               spec.text.find("build/murk run cases/examples/" + name) != std::string::npos ||
               spec.text.find("build/murk layout cases/examples/" + name) != std::string::npos));
    }
    CHECK(count >= 4);
}

TEST_CASE("scene builder: organ currents and positions along the organ") {
    OrganSpec o;
    o.peak_current_A = 2e-3;
    o.from_fraction = 0.2;
    o.to_fraction = 0.8;
    o.profile = OrganProfile::linear;
    o.points = 5;
    // 1 - 2 s at s = 0, 1/4, 1/2, 3/4, 1, times 2 mA
    std::vector<double> c = organ_currents(o);
    REQUIRE(c.size() == 5);
    const double linear[] = {2e-3, 1e-3, 0.0, -1e-3, -2e-3};
    for (int k = 0; k < 5; ++k) CHECK(c[k] == doctest::Approx(linear[k]).scale(1e-3));
    const std::vector<double> f = organ_fractions(o);
    const double fractions[] = {0.2, 0.35, 0.5, 0.65, 0.8};
    for (int k = 0; k < 5; ++k) CHECK(f[k] == doctest::Approx(fractions[k]));

    o.profile = OrganProfile::cosine;
    o.points = 3;  // cos(0), cos(pi/2), cos(pi)
    c = organ_currents(o);
    REQUIRE(c.size() == 3);
    CHECK(c[0] == doctest::Approx(2e-3));
    CHECK(std::abs(c[1]) < 1e-15);
    CHECK(c[2] == doctest::Approx(-2e-3));

    o.profile = OrganProfile::dipole;
    c = organ_currents(o);
    REQUIRE(c.size() == 2);
    CHECK(c[0] == doctest::Approx(2e-3));
    CHECK(c[1] == doctest::Approx(-2e-3));
    CHECK(organ_fractions(o) == std::vector<double>{0.2, 0.8});

    o.profile = OrganProfile::weights;
    o.weights = {2.0, -1.0, -1.0};
    o.peak_current_A = 3e-3;  // the weight 2 becomes 3 mA, each -1 becomes -1.5 mA
    c = organ_currents(o);
    REQUIRE(c.size() == 3);
    CHECK(c[0] == doctest::Approx(3e-3));
    CHECK(c[1] == doctest::Approx(-1.5e-3));
    CHECK(c[2] == doctest::Approx(-1.5e-3));
}

TEST_CASE("scene builder: the fish is placed and its organ lies inside it") {
    SUBCASE("centre at the origin, heading +x") {
        const Scene<double> scene = build_scene<double>(spec_of(kFish), true);
        REQUIRE(scene.surfaces.size() == 1);
        const Surface<double>& body = scene.surfaces[0];
        CHECK(body.kind == InterfaceKind::membrane);
        CHECK(body.inner_conductivity == doctest::Approx(1.0));
        CHECK(body.membrane_resistance == doctest::Approx(0.25));
        CHECK(scene.water_conductivity == doctest::Approx(1e-2));  // 100e-6 S / 1e-2 m
        // the tips are single vertices on the axis: nose at +L/2, tail at -L/2
        CHECK(max_coordinate(body.mesh, 0) == doctest::Approx(0.075));
        CHECK(min_coordinate(body.mesh, 0) == doctest::Approx(-0.075));
        // 4 points from 0.2 to 0.8 of the length behind the nose: x = 0.075 - f * 0.15
        REQUIRE(scene.sources.size() == 4);
        const double fractions[] = {0.2, 0.4, 0.6, 0.8};
        double total = 0.0;
        for (int k = 0; k < 4; ++k) {
            const Vec3& p = scene.sources[k].position;
            CHECK(p.x() == doctest::Approx(0.075 - fractions[k] * 0.15));
            CHECK(std::abs(p.y()) < 1e-12);
            CHECK(std::abs(p.z()) < 1e-12);
            CHECK(contains_point(body.mesh, p));
            total += scene.sources[k].current;
        }
        // linear weights 1, 1/3, -1/3, -1 times 100 uA
        CHECK(scene.sources[0].current == doctest::Approx(1e-4));
        CHECK(scene.sources[1].current == doctest::Approx(1e-4 / 3));
        CHECK(std::abs(total) < 1e-18);
    }
    SUBCASE("nose given, heading 90 deg: the body lies along -y from the nose") {
        std::string text = kFish;
        text.insert(text.find("interior_conductivity"), "nose = [\"1 cm\", \"2 cm\", \"-1 cm\"]\nheading = \"90 deg\"\n");
        const Scene<double> scene = build_scene<double>(spec_of(text), true);
        const double fractions[] = {0.2, 0.4, 0.6, 0.8};
        for (int k = 0; k < 4; ++k) {
            const Vec3& p = scene.sources[k].position;
            CHECK(p.x() == doctest::Approx(0.01));
            CHECK(p.y() == doctest::Approx(0.02 - fractions[k] * 0.15));
            CHECK(p.z() == doctest::Approx(-0.01));
            CHECK(contains_point(scene.surfaces[0].mesh, p));
        }
        CHECK(max_coordinate(scene.surfaces[0].mesh, 1) == doctest::Approx(0.02));
    }
    SUBCASE("nose up: pitch 90 deg puts the tail below the nose") {
        std::string text = kFish;
        text.insert(text.find("interior_conductivity"), "nose = [\"0 cm\", \"0 cm\", \"0 cm\"]\npitch = \"90 deg\"\n");
        const Scene<double> scene = build_scene<double>(spec_of(text), true);
        CHECK(scene.sources[0].position.z() == doctest::Approx(-0.2 * 0.15));
        CHECK(scene.sources[3].position.z() == doctest::Approx(-0.8 * 0.15));
        CHECK(max_coordinate(scene.surfaces[0].mesh, 2) == doctest::Approx(0.0).epsilon(1e-12));
    }
}

TEST_CASE("scene builder: organ points outside or too near the skin are refused") {
    std::string text = kFish;
    text.replace(text.find("to = 0.8"), 8, "to = 1.0");
    const std::string m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[fish.organ]")) + ": fish.organ: organ point 4 of 4",
                  0) == 0);
    CHECK((m.find("outside the body") != std::string::npos || m.find("under the skin") != std::string::npos));
    // at 0.95 of the length the built-in body is only about a millimetre thick
    text = kFish;
    text.replace(text.find("to = 0.8"), 8, "to = 0.97");
    CHECK(build_error(text).find("fish.organ: organ point 4 of 4") != std::string::npos);
}

namespace {

const std::string kRobotHead = R"(title = "r"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1 cm"
[robot]
shape = "capsule"
radius = "2 cm"
overall_length = "30 cm"
position = ["10 cm", "20 cm", "30 cm"]
heading = "90 deg"
)";

const std::string kElectrodes = R"([[robot.electrode]]
name = "front"
form = "ring"
from = "10 cm"
to = "13 cm"
role = "emitter"
current = "1 mA"
[[robot.electrode]]
name = "back"
form = "ring"
from = "-13 cm"
to = "-10 cm"
role = "emitter"
voltage = "-2 V"
[[robot.electrode]]
name = "eye"
form = "patch"
at = ["0 cm", "0 cm", "2 cm"]
radius = "1.5 cm"
role = "sensor"
[[robot.electrode]]
name = "ground"
form = "patch"
at = ["0 cm", "-2 cm", "0 cm"]
radius = "1.5 cm"
role = "sensor"
potential = "0 V"
)";

}  // namespace

TEST_CASE("scene builder: robot electrodes are tagged on the hull panels they cover") {
    const Scene<double> scene = build_scene<double>(spec_of(kRobotHead + kElectrodes), true);
    REQUIRE(scene.surfaces.size() == 1);
    const Surface<double>& hull = scene.surfaces[0];
    CHECK(hull.kind == InterfaceKind::sealed);
    REQUIRE(hull.panel_electrode.size() == hull.mesh.size());
    REQUIRE(scene.electrodes.size() == 4);
    CHECK(scene.electrodes[0].name == "front");
    CHECK(scene.electrodes[0].drive == ElectrodeDrive::current);
    CHECK(scene.electrodes[0].value == doctest::Approx(1e-3));
    CHECK(scene.electrodes[1].drive == ElectrodeDrive::voltage);
    CHECK(scene.electrodes[1].value == doctest::Approx(-2.0));
    CHECK(scene.electrodes[2].drive == ElectrodeDrive::floating);
    CHECK(scene.electrodes[3].drive == ElectrodeDrive::fixed_potential);
    CHECK(scene.electrodes[3].value == 0.0);
    // Hull frame of each panel centre: the hull is turned 90 deg about z (its x axis
    // along world +y) and moved to (0.1, 0.2, 0.3), so hull x = y - 0.2,
    // hull y = -(x - 0.1), hull z = z - 0.3.
    std::vector<int> count(4, 0);
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const Vec3 c = hull.mesh.centroid(t);
        const Vec3 local(c.y() - 0.2, -(c.x() - 0.1), c.z() - 0.3);
        int expected = -1;
        if (local.x() >= 0.10 && local.x() <= 0.13) expected = 0;
        if (local.x() >= -0.13 && local.x() <= -0.10) expected = 1;
        if ((local - Vec3(0, 0, 0.02)).norm() <= 0.015) expected = 2;
        if ((local - Vec3(0, -0.02, 0)).norm() <= 0.015) expected = 3;
        CHECK(hull.panel_electrode[t] == expected);
        if (expected >= 0) ++count[expected];
    }
    for (int k = 0; k < 4; ++k) CHECK(count[k] > 0);
}

TEST_CASE("scene builder: electrodes that overlap or cover nothing are refused") {
    std::string text = kRobotHead + kElectrodes +
                       "[[robot.electrode]]\nname = \"late\"\nform = \"ring\"\nfrom = \"12 cm\"\nto = \"14 cm\"\n"
                       "role = \"sensor\"\n";
    std::string m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[robot.electrode]]", 5)) + ": robot.electrode[5]:",
                  0) == 0);
    CHECK(m.find("electrode 'late' overlaps electrode 'front'") != std::string::npos);
    // a patch that misses the hull
    text = kRobotHead + kElectrodes +
           "[[robot.electrode]]\nname = \"far\"\nform = \"patch\"\nat = [\"0 cm\", \"10 cm\", \"0 cm\"]\n"
           "radius = \"1 cm\"\nrole = \"sensor\"\n";
    m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[robot.electrode]]", 5)) + ": robot.electrode[5]:",
                  0) == 0);
    CHECK(m.find("patch electrode 'far' covers no part of the hull") != std::string::npos);
    // a patch over the whole hull (its ball holds the capsule)
    text = kRobotHead + "[[robot.electrode]]\nname = \"all\"\nform = \"patch\"\nat = [\"0 cm\", \"0 cm\", \"0 cm\"]\n"
                        "radius = \"20 cm\"\nrole = \"emitter\"\ncurrent = \"1 mA\"\n";
    m = build_error(text);
    CAPTURE(m);
    CHECK(m == "case.toml:" + std::to_string(line_with(text, "[[robot.electrode]]")) +
                   ": robot.electrode[1]: patch electrode 'all' covers the whole hull");
    // two patches that overlap
    text = kRobotHead + kElectrodes +
           "[[robot.electrode]]\nname = \"twin\"\nform = \"patch\"\nat = [\"1 cm\", \"0 cm\", \"2 cm\"]\n"
           "radius = \"1 cm\"\nrole = \"sensor\"\n";
    m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[robot.electrode]]", 5)) +
                      ": robot.electrode[5]: patch electrode 'twin' overlaps patch electrode 'eye'",
                  0) == 0);
    // a patch on a box across a face edge
    text = R"(title = "b"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1 cm"
[robot]
shape = "box"
size = ["20 cm", "10 cm", "8 cm"]
[[robot.electrode]]
name = "corner"
form = "patch"
at = ["9 cm", "0 cm", "4 cm"]
radius = "2 cm"
role = "emitter"
current = "1 mA"
)";
    m = build_error(text);
    CAPTURE(m);
    CHECK(m == "case.toml:" + std::to_string(line_with(text, "[[robot.electrode]]")) +
                   ": robot.electrode[1]: patch electrode 'corner' does not lie on a single face of the box hull (a "
                   "patch that crosses a face edge is not supported); move it or make it smaller");
}

TEST_CASE("scene builder: ring and patch electrodes on a capsule hull have their true areas") {
    const CaseSpec spec = spec_of(kRobotHead + kElectrodes);
    const Scene<double> scene = build_scene<double>(spec, true);
    const std::vector<ElectrodeArea> areas = electrode_areas(spec, scene);
    REQUIRE(areas.size() == 4);
    // rings 3 cm wide on a capsule of radius 2 cm: 2 pi r w (Archimedes' hat-box
    // theorem on the caps, the cylinder's lateral area on the cylinder)
    const double ring = 2.0 * M_PI * 0.02 * 0.03;
    for (int k : {0, 1}) {
        CHECK(areas[k].exact_m2 == doctest::Approx(ring).epsilon(1e-12));
        CHECK(std::abs(areas[k].mesh_m2 / ring - 1.0) < 1e-3);
    }
    // patches of radius r = 1.5 cm centred on the cylinder's surface (radius R = 2 cm):
    // at angle phi from the centre's meridian, the surface points within r lie
    // |x| <= sqrt(r^2 - 2 R^2 (1 - cos phi)), and the cylinder's area element is
    // R dx dphi (common practice); summed here by the midpoint rule
    const double R = 0.02, r = 0.015;
    double patch = 0.0;
    const int n = 200000;
    for (int i = 0; i < n; ++i) {
        const double phi = -M_PI + 2.0 * M_PI * (i + 0.5) / n;
        const double w2 = r * r - 2.0 * R * R * (1.0 - std::cos(phi));
        if (w2 > 0.0) patch += R * 2.0 * std::sqrt(w2) * 2.0 * M_PI / n;
    }
    for (int k : {2, 3}) {
        CHECK(areas[k].exact_m2 == doctest::Approx(patch).epsilon(1e-6));
        CHECK(std::abs(areas[k].mesh_m2 / patch - 1.0) < 1e-3);
        double sum = 0.0;
        for (std::size_t t = 0; t < scene.surfaces[0].mesh.size(); ++t)
            if (scene.surfaces[0].panel_electrode[t] == k) sum += scene.surfaces[0].mesh.area(t);
        CHECK(areas[k].mesh_m2 == doctest::Approx(sum));
    }
}

TEST_CASE("scene builder: mesh.electrode_edge makes the panels at ring edges smaller") {
    const std::string head = kRobotHead;
    std::string fine = head;
    fine.replace(fine.find("panel_size = \"1 cm\""), std::string("panel_size = \"1 cm\"").size(), "panel_size = \"1 cm\"\nelectrode_edge = \"1 mm\"");
    const std::size_t coarse_panels = build_scene<double>(spec_of(head + kElectrodes), false).surfaces[0].mesh.size();
    const Scene<double> scene = build_scene<double>(spec_of(fine + kElectrodes), false);
    CHECK(scene.surfaces[0].mesh.size() > coarse_panels);
    // next to the ring edge at hull x = 10 cm (world y = 30 cm) the panels are 1 mm long along the axis
    double nearest = 1.0;
    for (const Vec3& v : scene.surfaces[0].mesh.vertices)
        if (std::abs(v.y() - 0.30) > 1e-9) nearest = std::min(nearest, std::abs(v.y() - 0.30));
    CHECK(nearest <= 1e-3 * (1 + 1e-9));
    CHECK(nearest > 0.5e-3);
}

TEST_CASE("scene builder: a ring electrode off the hull is refused, named") {
    const std::string text = kRobotHead + kElectrodes +
                             "[[robot.electrode]]\nname = \"tail\"\nform = \"ring\"\nfrom = \"14 cm\"\nto = \"16 cm\"\n"
                             "role = \"sensor\"\n";
    const std::string m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[robot.electrode]]", 5)) + ": robot.electrode[5]",
                  0) == 0);
    CHECK(m.find("ring electrode 'tail'") != std::string::npos);
    CHECK(m.find("falls (partly) off the hull") != std::string::npos);
}

TEST_CASE("scene builder: region electrodes of a Gmsh hull") {
    // A 4 cm box written by hand as MSH 2.2: panels on the +x face form the
    // physical group "nose", all others "shell".
    const fs::path dir = fs::temp_directory_path() / "murk_test_scene_builder_msh";
    fs::create_directories(dir);
    const TriangleMesh box = make_box(Vec3(0.04, 0.04, 0.04), 0.01);
    std::size_t nose_panels = 0;
    {
        std::ofstream msh(dir / "hull.msh");
        msh << "$MeshFormat\n2.2 0 8\n$EndMeshFormat\n$PhysicalNames\n2\n2 1 \"shell\"\n2 2 \"nose\"\n"
               "$EndPhysicalNames\n$Nodes\n"
            << box.vertices.size() << "\n";
        msh.precision(17);
        for (std::size_t i = 0; i < box.vertices.size(); ++i)
            msh << i + 1 << " " << box.vertices[i].x() << " " << box.vertices[i].y() << " " << box.vertices[i].z()
                << "\n";
        msh << "$EndNodes\n$Elements\n" << box.size() << "\n";
        for (std::size_t t = 0; t < box.size(); ++t) {
            const bool nose = box.centroid(t).x() > 0.019;
            nose_panels += nose;
            msh << t + 1 << " 2 2 " << (nose ? 2 : 1) << " " << (nose ? 2 : 1) << " " << box.triangles[t][0] + 1
                << " " << box.triangles[t][1] + 1 << " " << box.triangles[t][2] + 1 << "\n";
        }
        msh << "$EndElements\n";
    }
    REQUIRE(nose_panels > 0);
    const std::string text = R"(title = "m"
[water]
conductivity = "1 S/m"
[robot]
shape = "mesh"
file = "hull.msh"
[[robot.electrode]]
name = "tip"
form = "region"
region = "nose"
role = "emitter"
current = "1 mA"
[[robot.electrode]]
name = "belt"
form = "ring"
from = "-5 mm"
to = "5 mm"
role = "sensor"
)";
    { std::ofstream(dir / "case.toml") << text; }
    const CaseSpec spec = read_case_file((dir / "case.toml").string());
    const Scene<double> scene = build_scene<double>(spec, true);
    const Surface<double>& hull = scene.surfaces[0];
    // The belt is cut into the hull along its edges (hull_electrodes.hpp), which
    // refines panels near them, the nose's among them: the nose keeps its region's
    // panels and, on flat faces, exactly its area (the whole +x face, 4 cm square).
    const auto nose_tag = static_cast<int>(
        std::find(hull.mesh.region_names.begin(), hull.mesh.region_names.end(), "nose") - hull.mesh.region_names.begin());
    std::size_t tip = 0, belt = 0;
    double tip_area = 0.0;
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const Vec3 c = hull.mesh.centroid(t);
        int expected = -1;
        if (hull.mesh.region[t] == nose_tag) expected = 0;
        else if (c.x() >= -0.005 && c.x() <= 0.005) expected = 1;
        CHECK(hull.panel_electrode[t] == expected);
        tip += expected == 0;
        belt += expected == 1;
        if (expected == 0) tip_area += hull.mesh.area(t);
    }
    CHECK(tip >= nose_panels);
    CHECK(tip_area == doctest::Approx(0.04 * 0.04).epsilon(1e-12));
    CHECK(belt > 0);
    // a region the file does not have
    std::string bad = text;
    bad.replace(bad.find("\"nose\""), 6, "\"mouth\"");
    { std::ofstream(dir / "case.toml") << bad; }
    try {
        build_scene<double>(read_case_file((dir / "case.toml").string()), true);
        FAIL("no error");
    } catch (const InputError& e) {
        const std::string m = e.what();
        CHECK(m.find(":7: robot.electrode[1].region: no region 'mouth'") != std::string::npos);
        CHECK(m.find("shell, nose") != std::string::npos);
    }
    fs::remove_all(dir);
}

TEST_CASE("scene builder: object materials become interfaces and electrodes") {
    const std::string text = kFish + sphere_object("stone", "[\"0 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"insulator\"") +
                             sphere_object("ball", "[\"0 cm\", \"-5 cm\", \"0 cm\"]", "5 mm", "\"conductor\"") +
                             sphere_object("snail", "[\"3 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"0.2 S/m\"") +
                             sphere_object("egg", "[\"-3 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"0.5 S/m\"") +
                             "membrane_resistance = \"0.1 ohm*m^2\"\n";
    const Scene<double> scene = build_scene<double>(spec_of(text), true);
    REQUIRE(scene.surfaces.size() == 5);
    const Surface<double>& stone = scene.surfaces[1];
    CHECK(stone.mesh.name == "stone");
    CHECK(stone.kind == InterfaceKind::sealed);
    CHECK(std::count(stone.panel_electrode.begin(), stone.panel_electrode.end(), -1) ==
          static_cast<long>(stone.mesh.size()));
    const Surface<double>& ball = scene.surfaces[2];
    CHECK(ball.kind == InterfaceKind::sealed);
    REQUIRE(scene.electrodes.size() == 1);
    CHECK(scene.electrodes[0].name == "object:ball");
    CHECK(is_object_electrode(scene.electrodes[0].name));
    CHECK(!is_object_electrode("ball"));
    CHECK(scene.electrodes[0].drive == ElectrodeDrive::floating);
    CHECK(std::count(ball.panel_electrode.begin(), ball.panel_electrode.end(), 0) ==
          static_cast<long>(ball.mesh.size()));
    // the sphere of 5 mm radius is centred where the case puts it
    CHECK(max_coordinate(ball.mesh, 1) + min_coordinate(ball.mesh, 1) == doctest::Approx(-0.1));
    CHECK(scene.surfaces[3].kind == InterfaceKind::contact);
    CHECK(scene.surfaces[3].inner_conductivity == doctest::Approx(0.2));
    CHECK(scene.surfaces[4].kind == InterfaceKind::membrane);
    CHECK(scene.surfaces[4].inner_conductivity == doctest::Approx(0.5));
    CHECK(scene.surfaces[4].membrane_resistance == doctest::Approx(0.1));

    // the baseline leaves the objects and their electrodes out
    const Scene<double> baseline = build_scene<double>(spec_of(text), false);
    CHECK(baseline.surfaces.size() == 1);
    CHECK(baseline.electrodes.empty());
}

TEST_CASE("scene builder: complex conductivities at a frequency") {
    const std::string membrane = sphere_object("cell", "[\"0 cm\", \"4 cm\", \"0 cm\"]", "5 mm", "\"0.5 S/m\"") +
                                 "permittivity = 60\nmembrane_resistance = \"0.1 ohm*m^2\"\n"
                                 "membrane_capacitance = \"1 uF/cm^2\"\n";
    std::string text = "frequency = \"100 Hz\"\n" + kFish + membrane;
    text.insert(text.find("[mesh]"), "permittivity = 80\n");
    const CaseSpec spec = spec_of(text);
    CHECK(case_needs_complex(spec));
    const Scene<Complex> scene = build_scene<Complex>(spec, true);
    const double omega = 2 * M_PI * 100.0;
    // water: sigma + i omega eps0 eps_r
    CHECK(scene.water_conductivity.real() == doctest::Approx(1e-2));
    CHECK(scene.water_conductivity.imag() == doctest::Approx(omega * kEps0 * 80));
    const Surface<Complex>& cell = scene.surfaces[1];
    CHECK(cell.inner_conductivity.imag() == doctest::Approx(omega * kEps0 * 60));
    // membrane: 1 / (1/rho + i omega C) with rho = 0.1 ohm m^2, C = 1e-2 F/m^2
    const double g = 10.0, b = omega * 1e-2;
    CHECK(cell.membrane_resistance.real() == doctest::Approx(g / (g * g + b * b)));
    CHECK(cell.membrane_resistance.imag() == doctest::Approx(-b / (g * g + b * b)));
    // the same case cannot be built in real arithmetic, and the message says why
    const std::string m = build_error<double>(text);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[water]")) + ": water.permittivity:", 0) == 0);
    CHECK(m.find("complex") != std::string::npos);

    // no frequency: direct current, permittivities carry nothing
    std::string dc = kFish + membrane;
    CHECK(!case_needs_complex(spec_of(dc)));
    const Scene<double> real_scene = build_scene<double>(spec_of(dc), true);
    CHECK(real_scene.surfaces[1].membrane_resistance == doctest::Approx(0.1));
    // a frequency without any permittivity or capacitance: still real
    CHECK(!case_needs_complex(spec_of("frequency = \"1 kHz\"\n" + kFish)));
    // the skin capacitance alone makes it complex
    std::string skin = "frequency = \"1 kHz\"\n" + kFish;
    skin.insert(skin.find("[fish.organ]"), "skin_capacitance = \"1 uF/cm^2\"\n");
    CHECK(case_needs_complex(spec_of(skin)));
    CHECK(build_error<double>(skin).rfind(
              "case.toml:" + std::to_string(line_with(skin, "[fish]")) + ": fish.skin_capacitance:", 0) == 0);
    // a real case may be built in complex arithmetic: zero imaginary parts
    const Scene<Complex> widened = build_scene<Complex>(spec_of(dc), true);
    CHECK(widened.surfaces[1].membrane_resistance == Complex(0.1, 0.0));
}

TEST_CASE("scene builder: surfaces that touch, intersect or nest are refused") {
    // the prey sphere cuts into the fish's flank (half width 7.5 mm at 0.3 of the length)
    std::string text = kFish + sphere_object("prey", "[\"3 cm\", \"8 mm\", \"0 cm\"]", "3 mm", "\"0.5 S/m\"");
    std::string m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[object]]")) + ": object[1]:", 0) == 0);
    CHECK(m.find("'fish'") != std::string::npos);
    CHECK(m.find("'prey'") != std::string::npos);
    // a sphere inside the fish
    text = kFish + sphere_object("pebble", "[\"0 cm\", \"0 cm\", \"0 cm\"]", "2 mm", "\"insulator\"");
    m = build_error(text);
    CHECK(m.find("surface 'pebble' lies inside surface 'fish'") != std::string::npos);
    // two objects overlapping each other, both clear of the fish
    text = kFish + sphere_object("a", "[\"0 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"insulator\"") +
           sphere_object("b", "[\"0 cm\", \"5.8 cm\", \"0 cm\"]", "5 mm", "\"insulator\"");
    m = build_error(text);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[object]]", 2)) + ": object[2]:", 0) == 0);
    CHECK(m.find("'a'") != std::string::npos);
    CHECK(m.find("'b'") != std::string::npos);
    // the baseline scene has no objects, so nothing to refuse
    CHECK(build_error(text, false).empty());
}

TEST_CASE("scene builder: everything must lie in the water") {
    // the water surface 1 cm above the axis cuts the fish (half height 11.7 mm)
    std::string text = kFish;
    text.insert(text.find("[mesh]"), "surface_z = \"1 cm\"\n");
    std::string m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[fish]")) + ": fish: the fish reaches", 0) == 0);
    CHECK(m.find("above the water surface") != std::string::npos);
    // an object below the bottom
    text = kFish + sphere_object("stone", "[\"0 cm\", \"5 cm\", \"-6 cm\"]", "5 mm", "\"insulator\"");
    text.insert(text.find("[mesh]"), "bottom_z = \"-5 cm\"\n");
    m = build_error(text);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[object]]")) + ": object[1]: object 'stone'", 0) ==
          0);
    CHECK(m.find("below the bottom") != std::string::npos);
    // both clear: the plane is in the scene with its normal out of the water
    text = kFish + sphere_object("stone", "[\"0 cm\", \"5 cm\", \"-3 cm\"]", "5 mm", "\"insulator\"");
    text.insert(text.find("[mesh]"), "bottom_z = \"-5 cm\"\n");
    const Scene<double> scene = build_scene<double>(spec_of(text), true);
    REQUIRE(scene.images.bounds.size() == 1);
    CHECK(scene.images.terms.size() == 1);
    CHECK(scene.images.bounds[0].point.z() == doctest::Approx(-0.05));
    CHECK(scene.images.bounds[0].normal.z() == doctest::Approx(-1.0));
}

TEST_CASE("scene builder: panel sizes, imported meshes and accuracy switches") {
    std::string text = kFish;
    text.erase(text.find("[mesh]"), std::string("[mesh]\npanel_size = \"8 mm\"\n").size());
    text += sphere_object("small", "[\"0 cm\", \"5 cm\", \"0 cm\"]", "2 mm", "\"insulator\"");
    text += sphere_object("large", "[\"0 cm\", \"-8 cm\", \"0 cm\"]", "3 cm", "\"insulator\"") +
            "panel_size = \"2 cm\"\n";
    const CaseSpec spec = spec_of(text);
    CHECK(body_panel_size(spec) == doctest::Approx(0.15 / 30));                  // length / 30
    CHECK(object_panel_size(spec, spec.objects[0]) == doctest::Approx(1e-3));    // half its radius
    CHECK(object_panel_size(spec, spec.objects[1]) == doctest::Approx(0.02));    // its own
    const QuadratureOptions q = quadrature_options(spec_of(kFish + "") );
    CHECK(q.near_ratio == 3.0);
    CHECK(q.far_ratio == 10.0);
    // The solver choice passes through as written: "dense" stays dense whatever
    // dense_limit says, "auto" switches above it.
    auto with_mesh_keys = [](const std::string& keys) {
        std::string t = kFish;
        return t.insert(t.find("[fish]"), keys);
    };
    const SolverOptions dense = solver_options(spec_of(with_mesh_keys("solver = \"dense\"\ndense_limit = 1\n")));
    CHECK(dense.choice == SystemSolver::dense);
    CHECK(dense.dense_limit == 1);
    CHECK(!uses_compression(dense, 2));
    CHECK(!uses_compression(dense, 1000000));
    const SolverOptions automatic = solver_options(spec_of(with_mesh_keys("dense_limit = 100\n")));
    CHECK(!uses_compression(automatic, 100));
    CHECK(uses_compression(automatic, 101));

    // an STL object in millimetres, found next to the case file and scaled to metres
    const fs::path dir = fs::temp_directory_path() / "murk_test_scene_builder_stl";
    fs::create_directories(dir);
    write_stl((dir / "pebble.stl").string(), make_sphere(4.0, 2.0));  // radius 4 (mm)
    const std::string stl_case =
        kFish + "[[object]]\nname = \"pebble\"\nshape = \"mesh\"\nfile = \"pebble.stl\"\nfile_unit = \"1 mm\"\n"
                "position = [\"0 cm\", \"4 cm\", \"0 cm\"]\nconductivity = \"insulator\"\n";
    { std::ofstream(dir / "case.toml") << stl_case; }
    const Scene<double> scene = build_scene<double>(read_case_file((dir / "case.toml").string()), true);
    const TriangleMesh& pebble = scene.surfaces[1].mesh;
    // every vertex 4 mm from (0, 4 cm, 0), or slightly more: the generator moves
    // vertices outward by a few percent at most to keep the sphere's volume
    for (const Vec3& v : pebble.vertices) {
        const double r = (v - Vec3(0.0, 0.04, 0.0)).norm();
        CHECK(r > 0.004 * (1 - 1e-6));
        CHECK(r < 0.004 * 1.03);
    }
    fs::remove_all(dir);
}

TEST_CASE("scene builder: object orientation turns the polar axis") {
    // a spheroid with a 1 cm polar radius along its x axis, turned to world y by heading 90 deg
    const std::string text = kFish + "[[object]]\nname = \"seed\"\nshape = \"spheroid\"\npolar_radius = \"1 cm\"\n"
                                     "equatorial_radius = \"3 mm\"\nheading = \"90 deg\"\n"
                                     "position = [\"0 cm\", \"6 cm\", \"0 cm\"]\nconductivity = \"insulator\"\n";
    const Scene<double> scene = build_scene<double>(spec_of(text), true);
    const TriangleMesh& seed = scene.surfaces[1].mesh;
    // extents: 2 cm along y, 6 mm along x and z (volume rescaling moves them by a few percent at most)
    CHECK(max_coordinate(seed, 1) - min_coordinate(seed, 1) == doctest::Approx(0.02).epsilon(0.05));
    CHECK(max_coordinate(seed, 0) - min_coordinate(seed, 0) == doctest::Approx(0.006).epsilon(0.05));
    CHECK(max_coordinate(seed, 2) - min_coordinate(seed, 2) == doctest::Approx(0.006).epsilon(0.05));
}

// ---- free sources and probes ------------------------------------------------------------

namespace {

// Checks that building `text` fails with one line that starts at the line of the
// nth `needle` with `key` and contains every one of `words`.
void check_build_error(const std::string& text, const std::string& needle, const std::string& key,
                       const std::vector<std::string>& words, int nth = 1, bool include_objects = true) {
    const std::string m = build_error(text, include_objects);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, needle, nth)) + ": " + key + ": ", 0) == 0);
    for (const std::string& w : words) CHECK(m.find(w) != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
}

std::string point_source(const std::string& position, const std::string& current = "\"1 uA\"") {
    return "[[source]]\nform = \"point\"\nposition = " + position + "\ncurrent = " + current + "\n";
}

std::string point_probe(const std::string& name, const std::string& position) {
    return "[[probe]]\nname = \"" + name + "\"\nform = \"point\"\nposition = " + position + "\n";
}

// Open water, no body: one source at the origin and a probe beside it.
const std::string kOpen = "title = \"o\"\n[water]\nconductivity = \"100 uS/cm\"\n[mesh]\npanel_size = \"2 mm\"\n" +
                          point_source("[\"0 cm\", \"0 cm\", \"0 cm\"]", "\"10 uA\"") +
                          point_probe("near", "[\"0 cm\", \"2 mm\", \"0 cm\"]");

}  // namespace

TEST_CASE("scene builder: points and currents of free sources") {
    SourceSpec point;
    point.form = SourceForm::point;
    point.position_m = {0.01, -0.02, 0.03};
    point.current_A = -5e-6;
    std::vector<PointSource<double>> p = source_points(point);
    REQUIRE(p.size() == 1);
    CHECK(p[0].position == Vec3(0.01, -0.02, 0.03));
    CHECK(p[0].current == -5e-6);

    // 4 points from (0, 0, 0) to (0.06, 0.03, 0): steps of (0.02, 0.01, 0); 1 mA / 4 each
    SourceSpec line;
    line.form = SourceForm::line;
    line.from_m = {0.0, 0.0, 0.0};
    line.to_m = {0.06, 0.03, 0.0};
    line.share = LineShare::equal;
    line.points = 4;
    line.total_current_A = 1e-3;
    p = source_points(line);
    REQUIRE(p.size() == 4);
    for (int k = 0; k < 4; ++k) {
        CHECK(p[k].position.x() == doctest::Approx(0.02 * k));
        CHECK(p[k].position.y() == doctest::Approx(0.01 * k));
        CHECK(p[k].position.z() == 0.0);
        CHECK(p[k].current == doctest::Approx(2.5e-4));
    }

    // weights 1, -3, 2 with a peak of 6 uA: 2, -6, 4 uA at z = 0, 1, 2 cm
    line.to_m = {0.0, 0.0, 0.02};
    line.share = LineShare::weights;
    line.weights = {1.0, -3.0, 2.0};
    line.points = 3;
    line.peak_current_A = 6e-6;
    p = source_points(line);
    REQUIRE(p.size() == 3);
    const double currents[] = {2e-6, -6e-6, 4e-6};
    for (int k = 0; k < 3; ++k) {
        CHECK(p[k].position.z() == doctest::Approx(0.01 * k));
        CHECK(p[k].current == doctest::Approx(currents[k]));
    }
}

TEST_CASE("scene builder: free sources follow the organ, in the water and inside the fish") {
    const std::string text = kFish + point_source("[\"0 cm\", \"5 cm\", \"0 cm\"]", "\"-20 uA\"") +
                             "[[source]]\nform = \"line\"\nfrom = [\"-3 cm\", \"4 cm\", \"0 cm\"]\n"
                             "to = [\"3 cm\", \"4 cm\", \"0 cm\"]\npoints = 4\ntotal_current = \"1 uA\"\n"
                             "[[source]]\nform = \"line\"\nfrom = [\"0 cm\", \"-4 cm\", \"-1 cm\"]\n"
                             "to = [\"0 cm\", \"-4 cm\", \"1 cm\"]\nweights = [1, -3, 2]\npeak_current = \"6 uA\"\n" +
                             // on the axis, 1 cm ahead of the middle: the body is about 7 mm wide there
                             point_source("[\"1 cm\", \"0 cm\", \"0 cm\"]", "\"3 uA\"");
    const Scene<double> scene = build_scene<double>(spec_of(text), true);
    REQUIRE(scene.sources.size() == 4 + 1 + 4 + 3 + 1);
    // the organ's 4 points first (checked above), then the case's sources in order
    CHECK(scene.sources[0].position.x() == doctest::Approx(0.075 - 0.2 * 0.15));
    CHECK(scene.sources[4].position == Vec3(0.0, 0.05, 0.0));
    CHECK(scene.sources[4].current == doctest::Approx(-2e-5));
    for (int k = 0; k < 4; ++k) {  // x = -3, -1, 1, 3 cm, a quarter of 1 uA each
        CHECK(scene.sources[5 + k].position.x() == doctest::Approx(-0.03 + 0.02 * k));
        CHECK(scene.sources[5 + k].position.y() == doctest::Approx(0.04));
        CHECK(scene.sources[5 + k].current == doctest::Approx(2.5e-7));
    }
    const double weighted[] = {2e-6, -6e-6, 4e-6};
    for (int k = 0; k < 3; ++k) {
        CHECK(scene.sources[9 + k].position.z() == doctest::Approx(-0.01 + 0.01 * k));
        CHECK(scene.sources[9 + k].current == doctest::Approx(weighted[k]));
    }
    CHECK(scene.sources[12].position == Vec3(0.01, 0.0, 0.0));
    CHECK(contains_point(scene.surfaces[0].mesh, scene.sources[12].position));
    CHECK(scene.sources[12].current == doctest::Approx(3e-6));
}

TEST_CASE("scene builder: a case without a body") {
    const std::string text =
        kOpen + sphere_object("ball", "[\"3 cm\", \"0 cm\", \"0 cm\"]", "5 mm", "\"1 S/m\"");
    const Scene<double> baseline = build_scene<double>(spec_of(text), false);
    CHECK(baseline.surfaces.empty());
    CHECK(baseline.electrodes.empty());
    REQUIRE(baseline.sources.size() == 1);
    CHECK(baseline.sources[0].position == Vec3::Zero());
    CHECK(baseline.sources[0].current == doctest::Approx(1e-5));
    CHECK(baseline.water_conductivity == doctest::Approx(1e-2));  // 100e-6 S / 1e-2 m
    const Scene<double> full = build_scene<double>(spec_of(text), true);
    REQUIRE(full.surfaces.size() == 1);
    CHECK(full.surfaces[0].mesh.name == "ball");
    CHECK(full.surfaces[0].kind == InterfaceKind::contact);
    CHECK(full.sources.size() == 1);
    // the sphere of 5 mm radius is centred at x = 3 cm
    CHECK(max_coordinate(full.surfaces[0].mesh, 0) + min_coordinate(full.surfaces[0].mesh, 0) ==
          doctest::Approx(0.06));
    // panel sizes: mesh.panel_size caps the objects; without it, half the radius
    CHECK(object_panel_size(spec_of(text), spec_of(text).objects[0]) == doctest::Approx(2e-3));
    std::string free = text;
    free.erase(free.find("[mesh]"), std::string("[mesh]\npanel_size = \"2 mm\"\n").size());
    CHECK(object_panel_size(spec_of(free), spec_of(free).objects[0]) == doctest::Approx(2.5e-3));
    CHECK(build_scene<double>(spec_of(free), true).surfaces.size() == 1);
    // no body: mesh.panel_size stands for the body's, and without it there is no limit
    CHECK(body_panel_size(spec_of(text)) == doctest::Approx(2e-3));
    CHECK(std::isinf(body_panel_size(spec_of(free))));

    // an imported object with no panel size anywhere: the file's own panels, whose
    // equilateral edge of the mean area is worked out here from the written mesh
    const fs::path dir = fs::temp_directory_path() / "murk_test_scene_builder_bodyless";
    fs::create_directories(dir);
    const TriangleMesh pebble = make_sphere(4.0, 2.0);  // radius 4 (mm), panels about 2 mm
    write_stl((dir / "pebble.stl").string(), pebble);
    double area = 0.0;
    for (std::size_t t = 0; t < pebble.size(); ++t) area += pebble.area(t);
    const double mean_edge_mm = std::sqrt(4.0 / std::sqrt(3.0) * area / static_cast<double>(pebble.size()));
    std::string imported = free;
    const std::string sphere_keys = "shape = \"sphere\"\nradius = \"5 mm\"";
    imported.replace(imported.find(sphere_keys), sphere_keys.size(),
                     "shape = \"mesh\"\nfile = \"pebble.stl\"\nfile_unit = \"1 mm\"");
    { std::ofstream(dir / "case.toml") << imported; }
    const CaseSpec spec = read_case_file((dir / "case.toml").string());
    CHECK(object_panel_size(spec, spec.objects[0]) == doctest::Approx(mean_edge_mm * 1e-3).epsilon(1e-6));
    fs::remove_all(dir);
}

TEST_CASE("scene builder: sources inside the robot or an object, or near a surface, are refused") {
    // inside the robot's capsule (radius 2 cm around its axis at y = 20 cm, z = 30 cm)
    std::string text = kRobotHead + kElectrodes + point_source("[\"10 cm\", \"20 cm\", \"30 cm\"]");
    check_build_error(text, "[[source]]", "source[1]", {"the source at (0.1, 0.2, 0.3) m lies inside the robot",
                                                        "in the water or inside the fish"});
    // inside an insulating object and inside a conducting one
    const std::string stone = sphere_object("stone", "[\"0 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"insulator\"");
    text = kFish + stone + point_source("[\"0 cm\", \"5.2 cm\", \"0 cm\"]");
    check_build_error(text, "[[source]]", "source[1]", {"lies inside object 'stone'"});
    text = kFish + sphere_object("snail", "[\"0 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"1 S/m\"") +
           point_source("[\"0 cm\", \"5.2 cm\", \"0 cm\"]");
    check_build_error(text, "[[source]]", "source[1]", {"lies inside object 'snail'"});
    // 0.1 mm outside the 5 mm sphere, whose panels are about 2.5 mm (half its radius)
    text = kFish + stone + point_source("[\"0 cm\", \"5.51 cm\", \"0 cm\"]");
    check_build_error(text, "[[source]]", "source[1]",
                      {"from the surface of object 'stone', less than a quarter of its mean panel edge"});
    // 0.2 mm outside the fish's flank (half width 0.042 * 15 cm = 6.3 mm at mid-length),
    // and 0.5 mm under its skin: the fish's panels are several millimetres
    text = kFish + point_source("[\"0 cm\", \"6.5 mm\", \"0 cm\"]");
    check_build_error(text, "[[source]]", "source[1]", {"from the surface of the fish"});
    text = kFish + point_source("[\"0 cm\", \"5.8 mm\", \"0 cm\"]");
    check_build_error(text, "[[source]]", "source[1]", {"from the surface of the fish"});
    // one point of a line: the third of 5 (x = 0) lies in the sphere at x = 0
    text = kFish + stone +
           "[[source]]\nform = \"line\"\nfrom = [\"-2 cm\", \"5 cm\", \"0 cm\"]\nto = [\"2 cm\", \"5 cm\", \"0 cm\"]\n"
           "points = 5\ntotal_current = \"1 uA\"\n";
    check_build_error(text, "[[source]]", "source[1]", {"source point 3 of 5 at (0, 0.05, 0) m lies inside object"});
    // above the water surface
    text = kFish + point_source("[\"0 cm\", \"5 cm\", \"4 cm\"]");
    text.insert(text.find("[mesh]"), "surface_z = \"3 cm\"\n");
    check_build_error(text, "[[source]]", "source[1]", {"lies above the water surface", "water.surface_z"});
    // the baseline leaves the objects out, and only checks against what it holds
    text = kFish + stone + point_source("[\"0 cm\", \"5.2 cm\", \"0 cm\"]");
    CHECK(build_error(text, false).empty());
}

TEST_CASE("scene builder: probes inside the robot or an object, near a surface or on a source are refused") {
    std::string text = kRobotHead + kElectrodes + point_probe("inner", "[\"10 cm\", \"25 cm\", \"30 cm\"]");
    check_build_error(text, "[[probe]]", "probe[1]", {"probe 'inner' at (0.1, 0.25, 0.3) m lies inside the robot",
                                                      "a probe may lie in the water or inside the fish"});
    // a grid over the sphere at (0, 5 cm, 0): x = -1, 0, 1 cm (i), y = 3..7 cm (j); the
    // first point in order inside the sphere is i = 2, j = 3 (x = 0, y = 5 cm)
    const std::string stone = sphere_object("stone", "[\"0 cm\", \"5 cm\", \"0 cm\"]", "5 mm", "\"insulator\"");
    const std::string grid = "[[probe]]\nname = \"map\"\nform = \"grid\"\ncorner = [\"-1 cm\", \"3 cm\", \"0 cm\"]\n"
                             "along = [\"2 cm\", \"0 cm\", \"0 cm\"]\nacross = [\"0 cm\", \"4 cm\", \"0 cm\"]\n"
                             "points = [3, 5]\n";
    text = kFish + stone + grid;
    check_build_error(text, "[[probe]]", "probe[1]", {"probe 'map' point map[2,3] at (0, 0.05, 0) m lies inside object 'stone'"});
    CHECK(build_error(text, false).empty());  // no objects in the baseline
    // a line whose last point is 0.1 mm from the sphere
    text = kFish + stone + "[[probe]]\nname = \"axis\"\nform = \"line\"\nfrom = [\"0 cm\", \"8 cm\", \"0 cm\"]\n"
                           "to = [\"0 cm\", \"5.51 cm\", \"0 cm\"]\npoints = 3\n";
    check_build_error(text, "[[probe]]", "probe[1]", {"probe 'axis' point axis[3]", "from the surface of object 'stone'"});
    // below the bottom
    text = kFish + point_probe("deep", "[\"0 cm\", \"0 cm\", \"-6 cm\"]");
    text.insert(text.find("[mesh]"), "bottom_z = \"-5 cm\"\n");
    check_build_error(text, "[[probe]]", "probe[1]", {"probe 'deep' at (0, 0, -0.06) m lies below the bottom"});
    // on a source point: the potential there is infinite
    text = kOpen + point_probe("on", "[\"0 cm\", \"0 cm\", \"0 cm\"]");
    check_build_error(text, "[[probe]]", "probe[2]", {"is on a source point"}, 2);
    // on an organ point (the first, 0.2 of the length behind the nose: x = 4.5 cm)
    text = kFish + point_probe("organ", "[\"4.5 cm\", \"0 cm\", \"0 cm\"]");
    check_build_error(text, "[[probe]]", "probe[1]", {"is on a source point"});
    // inside the fish, clear of the skin, and beside a source: accepted
    text = kFish + point_probe("inside", "[\"1 cm\", \"0 cm\", \"0 cm\"]") +
           point_probe("beside", "[\"4.5 cm\", \"1 mm\", \"0 cm\"]");
    CHECK(build_error(text).empty());
}

TEST_CASE("scene builder: the point emitter example holds what its comments say") {
    const CaseSpec spec = read_case_file((fs::path(MURK_SOURCE_DIR) / "cases/examples/point_emitter.toml").string());
    CHECK(!spec.fish);
    CHECK(!spec.robot);
    const Scene<double> baseline = build_scene<double>(spec, false);
    CHECK(baseline.surfaces.empty());
    REQUIRE(baseline.sources.size() == 1);
    CHECK(baseline.sources[0].current == doctest::Approx(1e-5));
    REQUIRE(spec.probes.size() == 3);
    // the probe beside the emitter is 2 mm from it
    const ProbePoint& beside = spec.probe_points[spec.probes[0].first_point];
    CHECK((Vec3(beside.position_m[0], beside.position_m[1], beside.position_m[2]) - baseline.sources[0].position)
              .norm() == doctest::Approx(2e-3));
    // the axis line in 1 mm steps, 1 mm off the axis
    const ProbeSpec& axis = spec.probes[1];
    REQUIRE(axis.point_count == 44);
    for (std::size_t k = 0; k < 44; ++k) {
        const Point3& x = spec.probe_points[axis.first_point + k].position_m;
        CHECK(x[0] == doctest::Approx(-0.02 + 1e-3 * static_cast<double>(k)));
        CHECK(x[1] == doctest::Approx(1e-3));
    }
}

TEST_CASE("objects of extreme contrast are solved as the limit they tend to, over 1e-300 to 1e300 S/m") {
    // A point source, a 5 mm sphere 3 cm away in 0.01 S/m water, and the change of
    // the potential it causes at a point between them. Physics (Maxwell's sphere,
    // e.g. Jackson, "Classical Electrodynamics", 3rd ed., section 4.4, in its
    // conductive form): the change grows monotonically with the sphere's
    // conductivity from the insulator's value to the perfect conductor's, and
    // beyond a contrast of 1e8 either way it is within 3e-8 of the limit.
    const std::string text = R"(title = "contrast"
[water]
conductivity = "100 uS/cm"
[mesh]
panel_size = "2.5 mm"
[[source]]
form = "point"
position = ["0 cm", "0 cm", "0 cm"]
current = "10 uA"
[[object]]
name = "sphere"
shape = "sphere"
radius = "5 mm"
position = ["3 cm", "0 cm", "0 cm"]
conductivity = "1 S/m"
[[probe]]
name = "between"
form = "point"
position = ["2 cm", "2 mm", "0 cm"]
)";
    const QuadratureOptions quad;
    Eigen::Matrix3Xd probe(3, 1);
    probe.col(0) = Vec3(0.02, 0.002, 0.0);
    auto change = [&](Material material, double sigma) {
        CaseSpec spec = spec_of(text);
        spec.objects[0].material = material;
        spec.objects[0].conductivity_S_per_m = sigma;
        const Scene<double> scene = build_scene<double>(spec, true);
        return potential_at(scene, solve_scene(scene, quad), probe, quad, true)(0);
    };
    const double insulator = change(Material::insulator, 0);
    const double conductor = change(Material::conductor, 0);
    // The two limits pull the potential opposite ways (a conductor draws it toward
    // its own, an insulator pushes the current around).
    REQUIRE(conductor * insulator < 0);
    const double direction = conductor > insulator ? 1.0 : -1.0, scale = std::abs(conductor - insulator);
    double previous = insulator;
    for (int e = -300; e <= 300; e += 10) {
        const double sigma = std::pow(10.0, e);
        const double v = change(Material::conducting, sigma);
        CAPTURE(sigma);
        REQUIRE(std::isfinite(v));
        CHECK(direction * (v - previous) >= -1e-9 * scale);  // monotone, to rounding
        CHECK(std::min(insulator, conductor) - 1e-9 * scale <= v);
        CHECK(v <= std::max(insulator, conductor) + 1e-9 * scale);
        const double contrast = sigma / 0.01;
        if (contrast >= 1e8) CHECK(v == doctest::Approx(conductor).epsilon(1e-7));
        if (contrast <= 1e-8) CHECK(v == doctest::Approx(insulator).epsilon(1e-7));
        previous = v;
    }
}

namespace {

// Longest edge of `m` among those passing within `radius` of `point`, found by
// sampling each edge at 101 points; 0 when none does.
double longest_edge_near(const TriangleMesh& m, const Vec3& point, double radius) {
    double longest = 0.0;
    for (const Triangle& t : m.triangles)
        for (int k = 0; k < 3; ++k) {
            const Vec3& a = m.vertices[t[k]];
            const Vec3& b = m.vertices[t[(k + 1) % 3]];
            bool near = false;
            for (int s = 0; s <= 100 && !near; ++s) near = (a + (b - a) * (s / 100.0) - point).norm() <= radius;
            if (near) longest = std::max(longest, (b - a).norm());
        }
    return longest;
}

}  // namespace

TEST_CASE("scene builder: refinement zones are placed with the body") {
    // The fish turned to face +y (heading 90 deg) with its centre at (1, 2, 0.5) m:
    // its own +x goes to world +y and its own +y (left flank) to world -x. At 0.3 of
    // the length from the nose (own x = 7.5 - 4.5 = 3 cm from the centre) the built-in
    // outline is 0.05 * 15 cm = 7.5 mm wide, so the left flank is at world
    // (1 - 0.0075, 2.03, 0.5) and the right flank at (1 + 0.0075, 2.03, 0.5).
    std::string text = kFish;
    text.insert(text.find("interior_conductivity"), "centre = [\"1 m\", \"2 m\", \"0.5 m\"]\nheading = \"90 deg\"\n");
    text += "[[mesh.zone]]\ncentre = [\"992.5 mm\", \"2.03 m\", \"0.5 m\"]\nradius = \"6 mm\"\npanel_size = \"1.5 mm\"\n";
    const Scene<double> scene = build_scene<double>(spec_of(text), false);
    const TriangleMesh& skin = scene.surfaces[0].mesh;
    const double near_left = longest_edge_near(skin, Vec3(0.9925, 2.03, 0.5), 0.006);
    CHECK(near_left > 0.0005);
    CHECK(near_left <= 0.0015);
    CHECK(longest_edge_near(skin, Vec3(1.0075, 2.03, 0.5), 0.002) > 0.003);  // the other flank stays coarse

    // A capsule hull 30 cm long, radius 2 cm, turned like the fish and placed at
    // (1, 2, 0.5) m: its own point (10 cm, 0, 2 cm) on top of the cylinder is at
    // world (1, 2.1, 0.52).
    const std::string robot = R"(title = "r"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1 cm"
[[mesh.zone]]
centre = ["1 m", "2.1 m", "0.52 m"]
radius = "1 cm"
panel_size = "3 mm"
[robot]
shape = "capsule"
radius = "2 cm"
overall_length = "30 cm"
position = ["1 m", "2 m", "0.5 m"]
heading = "90 deg"
[[robot.electrode]]
name = "E"
form = "ring"
from = "-2 cm"
to = "2 cm"
role = "emitter"
current = "1 mA"
)";
    const Scene<double> hull = build_scene<double>(spec_of(robot), false);
    const double near_top = longest_edge_near(hull.surfaces[0].mesh, Vec3(1.0, 2.1, 0.52), 0.01);
    CHECK(near_top > 0.001);
    CHECK(near_top <= 0.003);
    CHECK(longest_edge_near(hull.surfaces[0].mesh, Vec3(1.0, 1.9, 0.52), 0.005) > 0.006);  // the other end
}

TEST_CASE("scene builder: refinement zones off the body or coarser than its panels are refused") {
    const std::string off = kFish + "[[mesh.zone]]\ncentre = [\"3 cm\", \"3 cm\", \"0 cm\"]\nradius = \"1 cm\"\n"
                                    "panel_size = \"2 mm\"\n";
    // The flank is 7.5 mm from the axis at x = 3 cm: the centre is about 22 mm from the skin.
    std::string m = build_error(off);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(off, "centre = [\"3 cm\"")) + ": mesh.zone[1].centre: ", 0) == 0);
    CHECK(m.find("does not reach the fish's skin") != std::string::npos);
    CHECK(m.find("more than its radius (10 mm)") != std::string::npos);

    const std::string coarse = kFish + "[[mesh.zone]]\ncentre = [\"3 cm\", \"7.5 mm\", \"0 cm\"]\nradius = \"1 cm\"\n"
                                       "panel_size = \"9 mm\"\n";
    m = build_error(coarse);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(coarse, "panel_size = \"9 mm\"")) +
                      ": mesh.zone[1].panel_size: 9 mm is larger than the body's panel size (8 mm, mesh.panel_size)",
                  0) == 0);
    // Without mesh.panel_size the body's panels are its length / 30 = 5 mm.
    std::string by_default = coarse;
    by_default.erase(by_default.find("[mesh]"), std::string("[mesh]\npanel_size = \"8 mm\"\n").size());
    by_default.replace(by_default.find("\"9 mm\""), 6, "\"6 mm\"");
    m = build_error(by_default);
    CAPTURE(m);
    CHECK(m.find(": mesh.zone[1].panel_size: 6 mm is larger than the body's panel size (5 mm, the default") !=
          std::string::npos);
    by_default.replace(by_default.find("\"6 mm\""), 6, "\"5 mm\"");
    CHECK(build_error(by_default).empty());  // equal to the body's panels: allowed
}

TEST_CASE("scene builder: patches and rings on an imported hull are cut along their edges") {
    // an ellipsoid hull written as STL (no exact area is known for an imported hull),
    // a patch and a ring on it
    const fs::path dir = fs::temp_directory_path() / "murk_test_scene_builder_cut_stl";
    fs::create_directories(dir);
    write_stl((dir / "hull.stl").string(), make_ellipsoid(Vec3(0.1, 0.03, 0.03), 0.012));
    const std::string text = R"(title = "imported"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1.2 cm"
[robot]
shape = "mesh"
file = "hull.stl"
[[robot.electrode]]
name = "patch"
form = "patch"
at = ["0 cm", "0 cm", "3 cm"]
radius = "1 cm"
role = "emitter"
voltage = "1 V"
[[robot.electrode]]
name = "ring"
form = "ring"
from = "-6 cm"
to = "-4 cm"
role = "emitter"
voltage = "-1 V"
)";
    { std::ofstream(dir / "case.toml") << text; }
    const CaseSpec spec = read_case_file((dir / "case.toml").string());
    const Scene<double> scene = build_scene<double>(spec, true);
    fs::remove_all(dir);
    const Surface<double>& hull = scene.surfaces[0];
    // every vertex shared by an electrode's panels and the others lies on its edge
    for (int k : {0, 1}) {
        std::vector<char> inner(hull.mesh.vertices.size(), 0), outer(hull.mesh.vertices.size(), 0);
        for (std::size_t t = 0; t < hull.mesh.size(); ++t)
            for (int c = 0; c < 3; ++c) (hull.panel_electrode[t] == k ? inner : outer)[hull.mesh.triangles[t][c]] = 1;
        int on_edge = 0;
        for (std::size_t v = 0; v < hull.mesh.vertices.size(); ++v) {
            if (!(inner[v] && outer[v])) continue;
            const Vec3& x = hull.mesh.vertices[v];
            const double off = k == 0 ? std::abs((x - Vec3(0, 0, 0.03)).norm() - 0.01)
                                      : std::min(std::abs(x.x() + 0.06), std::abs(x.x() + 0.04));
            CHECK(off < 1e-9);
            ++on_edge;
        }
        CHECK(on_edge > 20);
    }
    const std::vector<ElectrodeArea> areas = electrode_areas(spec, scene);
    for (const ElectrodeArea& a : areas) {
        CHECK(std::isnan(a.exact_m2));
        CHECK(a.mesh_m2 > 0.0);
    }
}

TEST_CASE("scene builder: rings and patches on spheroid and sphere hulls have their true areas") {
    // A prolate spheroid hull, semi-axes a = 10 cm along x and b = 3 cm: a ring
    // between x1 and x2 has the area of a surface of revolution, 2 pi int y
    // sqrt(1 + y'^2) dx with y = b sqrt(1 - x^2 / a^2), that is 2 pi b int sqrt(1 -
    // e^2 x^2 / a^2) dx, e^2 = 1 - b^2 / a^2 (common practice), in closed form
    // 2 pi b [x sqrt(1 - k^2 x^2) / 2 + asin(k x) / (2 k)], k = e / a.
    const std::string spheroid = R"(title = "s"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1.2 cm"
electrode_edge = "4 mm"
[robot]
shape = "spheroid"
polar_radius = "10 cm"
equatorial_radius = "3 cm"
[[robot.electrode]]
name = "band"
form = "ring"
from = "-6 cm"
to = "-3 cm"
role = "emitter"
current = "1 mA"
[[robot.electrode]]
name = "dot"
form = "patch"
at = ["2 cm", "0 cm", "2.93939 cm"]
radius = "1 cm"
role = "emitter"
current = "-1 mA"
)";
    const double a = 0.1, b = 0.03, k = std::sqrt(1.0 - b * b / (a * a)) / a;
    auto primitive = [&](double x) { return x * std::sqrt(1.0 - k * k * x * x) / 2.0 + std::asin(k * x) / (2.0 * k); };
    const double band = 2.0 * M_PI * b * (primitive(-0.03) - primitive(-0.06));
    const CaseSpec spec = spec_of(spheroid);
    const Scene<double> scene = build_scene<double>(spec, true);
    const std::vector<ElectrodeArea> areas = electrode_areas(spec, scene);
    REQUIRE(areas.size() == 2);
    CHECK(areas[0].exact_m2 == doctest::Approx(band).epsilon(1e-6));
    CHECK(std::abs(areas[0].mesh_m2 / band - 1.0) < 1e-3);
    // the patch, centred on the surface (z = b sqrt(1 - x^2 / a^2) at x = 2 cm): no
    // closed form; a plausibility bound on its quadrature reference: the flat disc
    // pi r^2, changed by the curvature by a few (r / R)^2 ~ 10 % at most for the
    // surface's radii of curvature R >= 3 cm (common practice)
    CHECK(areas[1].exact_m2 > 0.9 * M_PI * 1e-4);
    CHECK(areas[1].exact_m2 < 1.1 * M_PI * 1e-4);
    CHECK(std::abs(areas[1].mesh_m2 / areas[1].exact_m2 - 1.0) < 1e-3);

    // A sphere hull of radius 5 cm with a patch centred on its surface: a cap whose
    // rim is r from its pole, pi r^2 (Archimedes, "On the Sphere and Cylinder").
    const std::string sphere = R"(title = "s"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "1.5 cm"
[robot]
shape = "sphere"
radius = "5 cm"
[[robot.electrode]]
name = "cap"
form = "patch"
at = ["0 cm", "3 cm", "4 cm"]
radius = "2 cm"
role = "emitter"
current = "1 mA"
)";
    const CaseSpec sphere_spec = spec_of(sphere);
    const Scene<double> sphere_scene = build_scene<double>(sphere_spec, true);
    const std::vector<ElectrodeArea> cap = electrode_areas(sphere_spec, sphere_scene);
    REQUIRE(cap.size() == 1);
    CHECK(cap[0].exact_m2 == doctest::Approx(M_PI * 4e-4).epsilon(1e-12));
    CHECK(std::abs(cap[0].mesh_m2 / (M_PI * 4e-4) - 1.0) < 1e-3);
}

TEST_CASE("scene builder: water between a surface and a bottom") {
    // fish half height 11.7 mm about z = 0
    std::string text = kFish;
    text.insert(text.find("[mesh]"), "surface_z = \"5 cm\"\nbottom_z = \"-5 cm\"\n");
    const Scene<double> scene = build_scene<double>(spec_of(text), true);
    REQUIRE(scene.images.bounds.size() == 2);
    CHECK(scene.images.terms.size() > 2);
    CHECK(scene.images.tolerance == 1e-6);
    CHECK(scene.images.reach >= 0.15);  // at least the fish's length
    CHECK(scene.images.constant > 0.0);  // two insulating planes

    // the bottom cutting the fish: refused naming the fish and the bottom
    text = kFish;
    text.insert(text.find("[mesh]"), "surface_z = \"5 cm\"\nbottom_z = \"-1 cm\"\n");
    std::string m = build_error(text);
    CAPTURE(m);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[fish]")) + ": fish: the fish reaches", 0) == 0);
    CHECK(m.find("below the bottom") != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
    // an object crossing the surface, with a bottom too
    text = kFish + sphere_object("float", "[\"0 cm\", \"5 cm\", \"4.8 cm\"]", "5 mm", "\"insulator\"");
    text.insert(text.find("[mesh]"), "surface_z = \"5 cm\"\nbottom_z = \"-5 cm\"\nbottom_conductivity = \"50 uS/cm\"\n");
    m = build_error(text);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[object]]")) + ": object[1]: object 'float'", 0) == 0);
    CHECK(m.find("above the water surface") != std::string::npos);
    // a source below a sediment bottom is not in the water
    text = kFish + "[[source]]\nform = \"point\"\nposition = [\"0 cm\", \"5 cm\", \"-6 cm\"]\ncurrent = \"1 uA\"\n";
    text.insert(text.find("[mesh]"), "surface_z = \"5 cm\"\nbottom_z = \"-5 cm\"\nbottom_conductivity = \"50 uS/cm\"\n");
    m = build_error(text);
    CHECK(m.rfind("case.toml:" + std::to_string(line_with(text, "[[source]]")) + ": source[1]:", 0) == 0);
    CHECK(m.find("below the bottom") != std::string::npos);
    // a sediment bottom alone: one image of weight r = (100 - 50) / (100 + 50)
    text = kFish;
    text.insert(text.find("[mesh]"), "bottom_z = \"-5 cm\"\nbottom_conductivity = \"50 uS/cm\"\n");
    const Scene<double> sediment = build_scene<double>(spec_of(text), true);
    REQUIRE(sediment.images.terms.size() == 1);
    CHECK(sediment.images.terms[0].weight == doctest::Approx(1.0 / 3.0));
}
