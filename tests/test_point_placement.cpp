// Where a sweep puts its moving object (cases/sweep/point_placement): at the
// requested clearance from the body, or masked with the reason why it cannot
// go there. Clearances are measured here independently, by brute force over every
// pair of panels (geometry/triangle_distance, tested on its own), and the masks
// are set up so that the reason is plain from the geometry.
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/moving_object.hpp"
#include "cases/sweep/point_placement.hpp"
#include "geometry/input_error.hpp"
#include "geometry/transform.hpp"
#include "geometry/triangle_distance.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>

using namespace murk;

namespace {

// A capsule robot (radius 2 cm, 30 cm tip to tip, along x) with a 5 mm sphere
// starting 5 cm out along y, and whatever the test adds.
std::string robot_case(const std::string& extra) {
    return R"(
title = "placement"
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
[[robot.electrode]]
name = "S"
form = "ring"
from = "-2 cm"
to = "2 cm"
role = "sensor"
[[object]]
name = "ball"
shape = "sphere"
radius = "5 mm"
position = ["0 cm", "5 cm", "0 cm"]
conductivity = "1 S/m"
)" + extra;
}

// Least distance between every pair of panels of two meshes.
double brute_force_clearance(const TriangleMesh& a, const TriangleMesh& b) {
    double d = INFINITY;
    for (std::size_t t = 0; t < a.size(); ++t)
        for (std::size_t u = 0; u < b.size(); ++u)
            d = std::min(d, triangle_triangle_distance(a.corner(t, 0), a.corner(t, 1), a.corner(t, 2), b.corner(u, 0),
                                                       b.corner(u, 1), b.corner(u, 2)));
    return d;
}

struct Setup {
    CaseSpec spec;
    SweepPlan plan;
    Scene<double> fixed;
    MovingObjects<double> objects;
    PointPlacement placement;

    explicit Setup(const std::string& text)
        : spec(read_case_text(text, "placement.toml")), plan(plan_sweep(spec)), fixed(fixed_scene(spec, plan)),
          objects(spec, plan), placement(spec, plan, meshes(fixed)) {}

    static Scene<double> fixed_scene(CaseSpec spec, const SweepPlan& plan) {
        spec.objects = plan.still;
        return build_scene<double>(spec, true);
    }
    static std::vector<TriangleMesh> meshes(const Scene<double>& scene) {
        std::vector<TriangleMesh> out;
        for (const auto& s : scene.surfaces) out.push_back(s.mesh);
        return out;
    }
    Placement place(std::size_t point) const {
        const auto index = plan.index_of(point);
        return placement.place(index, objects.at(index).shape->mesh);
    }
    TriangleMesh placed_mesh(std::size_t point, const Placement& p) const {
        TriangleMesh m = objects.at(plan.index_of(point)).shape->mesh;
        translate(m, p.offset);
        return m;
    }
};

}  // namespace

TEST_CASE("placement: the object sits at each requested clearance from the body within 0.1 %") {
    const Setup s(robot_case(R"(
[sweep]
distance = ["2 mm", "1 cm", "4 cm", "12 cm"]
direction = [0, 1, 0]
)"));
    const std::vector<double> wanted = {0.002, 0.01, 0.04, 0.12};
    for (std::size_t p = 0; p < wanted.size(); ++p) {
        const Placement where = s.place(p);
        REQUIRE(where.mask == MaskReason::none);
        const double clearance = brute_force_clearance(s.placed_mesh(p, where), s.fixed.surfaces.front().mesh);
        CHECK(std::abs(clearance - wanted[p]) <= 1e-3 * wanted[p]);
        // Moved only along the direction, from the case's position.
        CHECK(where.offset.x() == doctest::Approx(0.0));
        CHECK(where.offset.z() == doctest::Approx(0.0));
        // Hull radius 2 cm and ball radius 5 mm as meshed (facets within about
        // 2 % of the true radii): the centre is near 2 cm + clearance + 5 mm.
        CHECK(where.offset.y() == doctest::Approx(0.025 + wanted[p]).epsilon(0.02));
    }
}

TEST_CASE("placement: masks say why the object has no place") {
    SUBCASE("closer to the body than a tenth of a panel: touches the body") {
        const Setup s(robot_case("[sweep]\ndistance = [\"0.1 mm\"]\ndirection = [0, 1, 0]\n"));
        CHECK(s.place(0).mask == MaskReason::touches_body);
    }
    SUBCASE("a grid point inside the hull, and one overlapping it: touches the body") {
        const Setup s(robot_case(R"(
[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = ["0 cm"]
v = ["0 cm", "2 cm", "8 cm"]
)"));
        CHECK(s.place(0).mask == MaskReason::touches_body);  // centre on the axis: inside
        CHECK(s.place(1).mask == MaskReason::touches_body);  // centre on the skin
        CHECK(s.place(2).mask == MaskReason::none);          // 8 cm out: clear
    }
    SUBCASE("an object that stays where the moving one would go: touches an object") {
        const Setup s(robot_case(R"(
[[object]]
name = "stone"
shape = "sphere"
radius = "1 cm"
position = ["0 cm", "8 cm", "0 cm"]
conductivity = "insulator"
[sweep]
object = "ball"
[sweep.grid]
origin = ["0 cm", "0 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = ["0 cm", "10 cm"]
v = ["8 cm"]
)"));
        CHECK(s.place(0).mask == MaskReason::touches_object);
        CHECK(s.place(1).mask == MaskReason::none);
    }
    SUBCASE("reaching through the water surface: beyond the plane") {
        std::string text = robot_case(R"(
[sweep.grid]
origin = ["0 cm", "6 cm", "0 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 0, 1]
u = ["0 cm"]
v = ["0 cm", "4.8 cm"]
)");
        text.replace(text.find("conductivity = \"100 uS/cm\""), 26, "conductivity = \"100 uS/cm\"\nsurface_z = \"5 cm\"");
        const Setup s(text);
        CHECK(s.place(0).mask == MaskReason::none);
        CHECK(s.place(1).mask == MaskReason::beyond_plane);  // top of the ball at 5.3 cm
    }
    SUBCASE("a clearance the line of travel never comes down to: unreachable") {
        // Starting 10 cm out and moving nearly parallel to the hull, the clearance
        // never falls to 1 cm; 20 cm is reached by moving on.
        std::string text = robot_case(R"(
[sweep]
distance = ["1 cm", "20 cm"]
direction = [1, 0.01, 0]
)");
        const std::string from = "position = [\"0 cm\", \"5 cm\", \"0 cm\"]";
        text.replace(text.find(from), from.size(), "position = [\"0 cm\", \"10 cm\", \"0 cm\"]");
        const Setup s(text);
        CHECK(s.place(0).mask == MaskReason::unreachable);
        CHECK(s.place(1).mask == MaskReason::none);
    }
}

TEST_CASE("placement: without a body, distance counts from the emitter and probes keep the object away") {
    const Setup s(R"(
title = "no body"
[water]
conductivity = "100 uS/cm"
[mesh]
panel_size = "2 mm"
[[source]]
form = "point"
position = ["0 cm", "0 cm", "0 cm"]
current = "10 uA"
[[probe]]
name = "p"
form = "point"
position = ["3 cm", "0 cm", "0 cm"]
[[object]]
name = "ball"
shape = "sphere"
radius = "5 mm"
position = ["1 cm", "0 cm", "0 cm"]
conductivity = "1 S/m"
[sweep]
distance = ["1 cm", "2.2 cm", "5 cm"]
direction = [1, 0, 0]
)");
    // 1 cm: the ball spans 1 .. 2 cm (clear of the probe at 3 cm).
    CHECK(s.place(0).mask == MaskReason::none);
    CHECK(s.place(0).offset.x() == doctest::Approx(0.015).epsilon(0.02));
    // 2.2 cm: it spans 2.2 .. 3.2 cm and holds the probe point.
    CHECK(s.place(1).mask == MaskReason::near_source);
    CHECK(s.place(2).mask == MaskReason::none);
}

TEST_CASE("placement: a direction into the body is refused, naming the sweep") {
    try {
        const Setup s(robot_case("[sweep]\ndistance = [\"1 cm\"]\ndirection = [0, -1, 0]\n"));
        FAIL("no error");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()).find("placement.toml:") == 0);
        CHECK(std::string(e.what()).find("sweep.direction: points into the body") != std::string::npos);
    }
}
