// Tests of geometry/electrode_hulls: hulls meshed on their ring electrodes' edges.
// The reference areas are the true surfaces' own, written out here:
//  - a band of a cylinder of radius r and width w: 2 pi r w (common practice);
//  - a zone of a sphere of radius R between two parallel planes Delta x apart, and
//    so a cap of height h: 2 pi R Delta x, 2 pi R h (Archimedes, "On the Sphere and
//    Cylinder", the hat-box theorem);
//  - a band of a box around its x axis: the perimeter of its y-z section times the
//    width (flat faces, common practice).
#include "geometry/electrode_hulls.hpp"
#include "geometry/input_error.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/regions.hpp"
#include "geometry/shapes.hpp"
#include "solver/bem_system.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

using namespace murk;

namespace {

constexpr double kPi = 3.14159265358979323846;

// Summed area of the panels whose centroids lie in [from, to] along x.
double band_panel_area(const TriangleMesh& m, double from, double to) {
    double a = 0.0;
    for (std::size_t t = 0; t < m.size(); ++t) {
        const double x = m.centroid(t).x();
        if (x >= from && x <= to) a += m.area(t);
    }
    return a;
}

// Distinct vertex x coordinates, sorted.
std::vector<double> vertex_xs(const TriangleMesh& m) {
    std::vector<double> xs;
    for (const Vec3& v : m.vertices) xs.push_back(v.x());
    std::sort(xs.begin(), xs.end());
    xs.erase(std::unique(xs.begin(), xs.end()), xs.end());
    return xs;
}

void check_valid(const TriangleMesh& m) {
    const MeshReport r = inspect_mesh(m);
    CAPTURE(r.problems.size() > 0 ? r.problems.front() : std::string());
    CHECK(r.problems.empty());
    CHECK(r.closed);
    CHECK(r.manifold);
    CHECK(r.oriented_outward);
    CHECK(!r.self_intersecting);
}

}  // namespace

TEST_CASE("electrode hulls: rings on a capsule have their true areas at every panel size") {
    const double r = 0.02, length = 0.30, cyl = length - 2 * r;  // cylinder from -13 to 13 cm
    // on the cylinder, across the cylinder-cap junction, on a cap, and a cap at the tip
    const std::vector<AxialBand> rings = {{-0.10, -0.09}, {0.125, 0.135}, {-0.145, -0.138}, {0.141, 0.15}};
    for (double panel : {0.010, 0.007, 0.005, 0.004, 0.003}) {
        CAPTURE(panel);
        const TriangleMesh m = make_capsule_with_rings(r, cyl, panel, rings);
        check_valid(m);
        for (const AxialBand& b : rings) {
            CAPTURE(b.from);
            // Archimedes: every band of the capsule, on cylinder or caps, has 2 pi r dx.
            const double exact = 2.0 * kPi * r * (b.to - b.from);
            CHECK(std::abs(band_panel_area(m, b.from, b.to) / exact - 1.0) < 1e-3);
            CHECK(std::abs(capsule_band_area(r, cyl, b) / exact - 1.0) < 1e-12);
        }
        // The whole hull too: 2 pi r L + 4 pi r^2.
        CHECK(std::abs(mesh_area(m) / (2 * kPi * r * cyl + 4 * kPi * r * r) - 1.0) < 1e-3);
        // The area rule's price (electrode_hulls.hpp): volume below the true one by
        // about (pi/n)^2 / 3 for n panels around; n >= 8 here, so at most 5.2 %.
        const double v_true = kPi * r * r * cyl + 4.0 / 3.0 * kPi * r * r * r;
        const double deficit = 1.0 - mesh_volume(m) / v_true;
        const int n_around = static_cast<int>(std::max(8.0, std::ceil(2 * kPi * r / (kGridSpacingFactor * panel))));
        CHECK(deficit > 0.0);
        CHECK(deficit < 1.2 * std::pow(kPi / n_around, 2) / 3.0);
    }
}

TEST_CASE("electrode hulls: rings on a sphere hull, a zone and a polar cap") {
    const double R = 0.05;
    const std::vector<AxialBand> rings = {{-0.02, 0.01}, {0.04, 0.05}};  // a zone; a cap of height 1 cm
    for (double panel : {0.01, 0.006}) {
        const TriangleMesh m = make_capsule_with_rings(R, 0.0, panel, rings);
        check_valid(m);
        CHECK(std::abs(band_panel_area(m, -0.02, 0.01) / (2 * kPi * R * 0.03) - 1.0) < 1e-3);
        CHECK(std::abs(band_panel_area(m, 0.04, 0.06) / (2 * kPi * R * 0.01) - 1.0) < 1e-3);
    }
}

TEST_CASE("electrode hulls: rings on a box have their true areas") {
    const Vec3 size(0.30, 0.04, 0.06);
    const std::vector<AxialBand> rings = {{-0.1037, -0.0911}, {0.02, 0.035}, {0.14, 0.15}};
    for (double panel : {0.012, 0.007}) {
        const TriangleMesh m = make_box_with_rings(size, panel, rings);
        check_valid(m);
        CHECK(std::abs(band_panel_area(m, -0.1037, -0.0911) / (2 * (0.04 + 0.06) * 0.0126) - 1.0) < 1e-9);
        CHECK(std::abs(band_panel_area(m, 0.02, 0.035) / (2 * (0.04 + 0.06) * 0.015) - 1.0) < 1e-9);
        // reaching the +x end: the end face belongs to the ring as well
        CHECK(std::abs(band_panel_area(m, 0.14, 0.15) / (2 * (0.04 + 0.06) * 0.01 + 0.04 * 0.06) - 1.0) < 1e-9);
        CHECK(box_band_area(size, {0.14, 0.15}) == doctest::Approx(2 * (0.04 + 0.06) * 0.01 + 0.04 * 0.06));
    }
}

TEST_CASE("electrode hulls: panels are graded toward the ring edges") {
    const double panel = 0.008;
    const AxialBand ring{-0.0523, -0.0411};
    for (const std::optional<double> edge : {std::optional<double>{}, std::optional<double>{0.0005}}) {
        const double wanted = edge ? *edge : kElectrodeEdgeFraction * panel;
        const TriangleMesh m = make_capsule_with_rings(0.02, 0.26, panel, {ring}, edge);
        const std::vector<double> xs = vertex_xs(m);
        for (double e : {ring.from, ring.to}) {
            const auto at = std::find(xs.begin(), xs.end(), e);
            REQUIRE(at != xs.end());  // a station exactly on the edge
            CHECK(*(at + 1) - *at <= wanted * (1 + 1e-9));
            CHECK(*at - *(at - 1) <= wanted * (1 + 1e-9));
            // and neighbouring spacings grow by no more than the growth factor (+ rounding of the steps)
            for (int k = 1; k < 4; ++k) CHECK(*(at + k + 1) - *(at + k) <= 1.05 * kElectrodeEdgeGrowth * (*(at + k) - *(at + k - 1)));
        }
    }
}

TEST_CASE("electrode hulls: graded positions") {
    const std::vector<double> p = graded_positions(0.0, 1.0, {0.3}, 0.1, 0.01);
    CHECK(p.front() == 0.0);
    CHECK(p.back() == 1.0);
    for (std::size_t i = 1; i < p.size(); ++i) {
        const double d = std::min(std::abs(p[i] - 0.3), std::abs(p[i - 1] - 0.3));
        // the step from an edge grows geometrically, each no longer than the rule's size
        // at its near end; the one step that meets the cap may pass it by 1 / f
        const double f = std::log(kElectrodeEdgeGrowth) / (kElectrodeEdgeGrowth - 1);
        CHECK(p[i] - p[i - 1] <= (0.01 + (kElectrodeEdgeGrowth - 1) * d) * (1 + 1e-3));
        CHECK(p[i] - p[i - 1] <= 0.1 / f * (1 + 1e-3));
    }
}

TEST_CASE("electrode hulls: rings off the hull or empty are refused") {
    CHECK_THROWS_AS(make_capsule_with_rings(0.02, 0.26, 0.01, {{0.14, 0.16}}), InputError);
    CHECK_THROWS_AS(make_capsule_with_rings(0.02, 0.26, 0.01, {{0.01, 0.01}}), InputError);
    CHECK_THROWS_AS(make_box_with_rings(Vec3(0.2, 0.05, 0.05), 0.01, {{-0.11, 0.0}}), InputError);
    CHECK_THROWS_AS(make_capsule_with_rings(0.02, 0.26, 0.01, {{0.0, 0.01}}, 0.0), InputError);
}

TEST_CASE("electrode hulls: the two-ring capsule for verification tags both rings") {
    const TriangleMesh m = make_two_ring_capsule(0.02, 0.30, 0.007, {-0.10, -0.09}, {0.09, 0.10});
    REQUIRE(m.region_names.size() >= 3);
    for (int tag : {1, 2}) {
        double a = 0.0;
        for (std::size_t t = 0; t < m.size(); ++t)
            if (m.region[t] == tag) a += m.area(t);
        CHECK(std::abs(a / (2 * kPi * 0.02 * 0.01) - 1.0) < 1e-3);
    }
}

// Two voltage-driven 1 cm rings on an insulating capsule (invented values: radius
// 1.5 cm, 20 cm long, water 0.02 S/m, +-0.5 V): with the hull meshed on the ring
// edges and graded toward them, the drive current converges monotonically as the
// panels shrink, each step changing it less than the one before. Printed, so that
// the figures can be quoted.
TEST_CASE("electrode hulls: the drive current of two rings converges monotonically") {
    const std::vector<double> panels = {0.010, 0.007, 0.005, 0.004};
    std::vector<double> current;
    for (double panel : panels) {
        Scene<double> scene;
        scene.water_conductivity = 0.02;
        Surface<double> hull;
        hull.kind = InterfaceKind::sealed;
        hull.mesh = make_two_ring_capsule(0.015, 0.20, panel, {-0.07, -0.06}, {0.06, 0.07});
        hull.panel_electrode.assign(hull.mesh.size(), -1);
        for (std::size_t t = 0; t < hull.mesh.size(); ++t)
            if (hull.mesh.region[t] > 0) hull.panel_electrode[t] = hull.mesh.region[t] - 1;
        const std::size_t n = hull.mesh.size();
        scene.surfaces.push_back(std::move(hull));
        scene.electrodes.push_back({"ring 1", ElectrodeDrive::voltage, 0.5});
        scene.electrodes.push_back({"ring 2", ElectrodeDrive::voltage, -0.5});
        const Solution<double> s = solve_scene(scene, QuadratureOptions{});
        current.push_back(s.electrode_current[0]);
        // The two currents balance (no other electrode), a check of the solve itself.
        CHECK(std::abs(s.electrode_current[0] + s.electrode_current[1]) < 1e-3 * std::abs(s.electrode_current[0]));
        std::printf("two rings: panel_size %.0f mm, %zu panels, drive current %.6e A\n", panel * 1e3, n, current.back());
    }
    for (std::size_t k = 1; k < current.size(); ++k) CAPTURE(current[k]);
    const double first_step = current[1] - current[0];
    for (std::size_t k = 1; k + 1 < current.size(); ++k) {
        const double step = current[k + 1] - current[k], before = current[k] - current[k - 1];
        CHECK(step * first_step > 0.0);                // monotone
        CHECK(std::abs(step) < std::abs(before));       // the differences shrink
    }
}
