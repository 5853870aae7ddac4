// The Green's function of bounded water as images (solver/image_series.hpp):
// two insulating planes against an independent Bessel-function series for the
// slab, a sediment bottom against the two-layer image formula of resistivity
// sounding, the limits r = 0 and r = 1, and solved scenes as one plane recedes.
#include "geometry/input_error.hpp"
#include "solver/bem_system.hpp"
#include "solver/image_series.hpp"
#include "solver/system_entries.hpp"
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "tests/scene_fixtures.hpp"
#include "verify/exact_solutions.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <vector>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

// 4 pi G of a point source between insulating planes z = b and z = s by the
// Bessel-function series of the slab (verify/exact_solutions.hpp names its source;
// tests/test_exact_solutions.cpp checks it), independent of the image series.
double slab_bessel_series(double b, double s, const Vec3& x, const Vec3& y) {
    return exact::insulating_slab_kernel(s - b, std::hypot(x.x() - y.x(), x.y() - y.y()), x.z() - b, y.z() - b);
}

// 4 pi G of the images' series with the direct term.
template <class S>
S series_kernel(const ImageSeries<S>& series, const Vec3& x, const Vec3& y) {
    return S(1.0 / (x - y).norm()) + image_kernel(series, x, y);
}

// A conducting sphere between two point sources of opposite sign (no net current:
// the series' constant cannot matter), its water-side potential solved.
Scene<double> sphere_between_sources() {
    Scene<double> scene;
    scene.water_conductivity = 0.01;
    Surface<double> ball;
    ball.mesh = make_icosphere(0.01, 2);
    ball.mesh.name = "ball";
    translate(ball.mesh, Vec3(0.0, 0.0, -0.02));
    ball.kind = InterfaceKind::contact;
    ball.inner_conductivity = 0.1;
    scene.surfaces.push_back(ball);
    scene.sources.push_back({Vec3(0.03, 0.0, -0.015), 1e-3});
    scene.sources.push_back({Vec3(-0.03, 0.01, -0.025), -1e-3});
    return scene;
}

Eigen::VectorXd outer_potential(const Scene<double>& scene) {
    return solve_scene(scene, kQuad).surfaces[0].outer_potential;
}

}  // namespace

TEST_CASE("image series: two insulating planes against the slab's Bessel-function series") {
    const double b = -0.05, s = 0.05;
    WaterLayer layer;
    layer.surface_z = s, layer.bottom_z = b, layer.reach = 0.3;
    const double far = std::hypot(0.3, s - b);
    const Vec3 y(0.0, 0.0, 0.013);
    std::vector<Vec3> x;
    for (double rho : {0.025, 0.05, 0.1, 0.2, 0.3})
        for (double z : {b, -0.02, 0.0, 0.03, s}) x.push_back(Vec3(rho * 0.6, rho * 0.8, z));
    double previous = 1.0;
    for (double tolerance : {1e-3, 1e-4, 1e-6, 1e-8}) {
        layer.tolerance = tolerance;
        const ImageSeries<double> series = layer_images(layer, 1.0);
        CHECK(series.tolerance == tolerance);
        // The potential is defined up to a constant: compare differences to the first point.
        double worst = 0.0;
        const double a0 = series_kernel(series, x[0], y), b0 = slab_bessel_series(b, s, x[0], y);
        for (const Vec3& xi : x)
            worst = std::max(worst, std::abs((series_kernel(series, xi, y) - a0) - (slab_bessel_series(b, s, xi, y) - b0)));
        worst *= far;  // relative to the direct kernel at the largest distance
        MESSAGE("tolerance " << tolerance << ": " << series.terms.size() << " images, error " << worst);
        CHECK(worst <= 2.0 * tolerance);
        CHECK(worst < previous);
        previous = worst;
    }
}

TEST_CASE("image series: with two insulating planes the images vanish for coincident points on the mid-plane") {
    // The reference the documentation states (image_series.hpp).
    WaterLayer layer;
    layer.surface_z = 0.3, layer.bottom_z = 0.1, layer.reach = 0.5;
    const ImageSeries<double> series = layer_images(layer, 1.0);
    const Vec3 p(0.07, -0.2, 0.2);
    CHECK(std::abs(image_kernel(series, p, p)) < 1e-12 / 0.2);
    // ... and not elsewhere: near the surface the images add about 1/(2 d).
    const Vec3 q(0.07, -0.2, 0.29);
    CHECK(image_kernel(series, q, q) > 10.0);
}

TEST_CASE("image series: sediment bottom against the two-layer image formula") {
    // Source and receiver on the surface of a layer of thickness h over a half-space:
    // V = I rho_1 / (2 pi) [1/r + 2 sum_n k^n / sqrt(r^2 + (2 n h)^2)],
    // k = (rho_2 - rho_1) / (rho_2 + rho_1) (Telford, Geldart & Sheriff 1990, Applied
    // Geophysics, 2nd ed., resistivity methods, the horizontal two-layer earth; from
    // memory). In 4 pi G units this is 2/r + 4 sum_n k^n / sqrt(r^2 + (2 n h)^2).
    const double h = 0.4, sigma_w = 0.02;
    WaterLayer layer;
    layer.surface_z = 0.0, layer.bottom_z = -h, layer.reach = 2.0, layer.tolerance = 1e-9;
    for (double sigma_b : {0.005, 0.08, 0.0201}) {
        const double k = reflection_coefficient(sigma_w, sigma_b);
        CHECK(k == doctest::Approx((1 / sigma_b - 1 / sigma_w) / (1 / sigma_b + 1 / sigma_w)));
        const ImageSeries<double> series = layer_images(layer, k);
        for (double r : {0.05, 0.3, 1.0, 2.0}) {
            double telford = 2.0 / r;
            for (int n = 1; n < 2000; ++n) telford += 4.0 * std::pow(k, n) / std::hypot(r, 2.0 * n * h);
            const double ours = series_kernel(series, Vec3(r, 0, 0), Vec3(0, 0, 0));
            CHECK(std::abs(ours - telford) * std::hypot(2.0, h) < 1e-8);
        }
    }
    SUBCASE("a conducting half-space alone: one image of weight k") {
        // V = I / (4 pi sigma_1) (1/R + k/R'), R' to the source mirrored in the
        // interface (Telford et al. 1990, the same chapter; from memory).
        const double sigma_b = 0.1, k = (sigma_w - sigma_b) / (sigma_w + sigma_b);
        WaterLayer bottom;
        bottom.bottom_z = -0.2;
        const ImageSeries<double> series = layer_images(bottom, reflection_coefficient(sigma_w, sigma_b));
        const Vec3 source(0.01, 0.02, -0.05), x(0.2, -0.1, -0.15);
        const Vec3 mirrored(0.01, 0.02, -0.35);
        CHECK(series_kernel(series, x, source) ==
              doctest::Approx(1 / (x - source).norm() + k / (x - mirrored).norm()).epsilon(1e-14));
    }
}

TEST_CASE("image series: sediment limits, r = 0 is unbounded water and r = 1 the insulating plane") {
    const double sigma_w = 0.01;
    Scene<double> scene = sphere_between_sources();
    const Eigen::VectorXd unbounded = outer_potential(scene);
    WaterLayer bottom;
    bottom.bottom_z = -0.06;

    // sigma_bottom = sigma_water: no image at all, the same bits as unbounded water.
    scene.images = layer_images(bottom, reflection_coefficient(sigma_w, sigma_w));
    CHECK(scene.images.terms.empty());
    CHECK(scene.images.bounds.size() == 1);
    CHECK((outer_potential(scene) - unbounded).cwiseAbs().maxCoeff() == 0.0);

    // r = 1: the insulating plane, the same bits; a nearly insulating sediment
    // differs by about 2 sigma_b / sigma_w.
    scene.images = plane_images<double>(BoundingPlane{Vec3(0, 0, -0.06), -Vec3::UnitZ()});
    const Eigen::VectorXd insulating = outer_potential(scene);
    scene.images = layer_images(bottom, 1.0);
    CHECK((outer_potential(scene) - insulating).cwiseAbs().maxCoeff() == 0.0);
    scene.images = layer_images(bottom, reflection_coefficient(sigma_w, 1e-12 * sigma_w));
    const double scale = insulating.cwiseAbs().maxCoeff();
    CHECK((outer_potential(scene) - insulating).cwiseAbs().maxCoeff() < 1e-10 * scale);
    CHECK((insulating - unbounded).cwiseAbs().maxCoeff() > 1e-3 * scale);  // the plane matters here

    // With a surface too, r = 0 leaves the surface's image alone: the same bits.
    WaterLayer both = bottom;
    both.surface_z = 0.0;
    scene.images = layer_images(both, reflection_coefficient(sigma_w, sigma_w));
    CHECK(scene.images.terms.size() == 1);
    const Eigen::VectorXd two = outer_potential(scene);
    scene.images = plane_images<double>(BoundingPlane{Vec3(0, 0, 0.0), Vec3::UnitZ()});
    CHECK((two - outer_potential(scene)).cwiseAbs().maxCoeff() == 0.0);
}

TEST_CASE("image series: as the bottom recedes, two planes approach the surface alone") {
    Scene<double> scene = sphere_between_sources();
    scene.images = plane_images<double>(BoundingPlane{Vec3(0, 0, 0.0), Vec3::UnitZ()});
    const Eigen::VectorXd surface_only = outer_potential(scene);
    const double scale = surface_only.cwiseAbs().maxCoeff();
    double previous = 1.0;
    for (double depth : {0.08, 0.16, 0.32, 0.64}) {
        WaterLayer layer;
        layer.surface_z = 0.0, layer.bottom_z = -depth, layer.reach = 0.08;
        scene.images = layer_images(layer, 1.0);
        const double difference = (outer_potential(scene) - surface_only).cwiseAbs().maxCoeff() / scale;
        MESSAGE("bottom at " << depth << " m: " << scene.images.terms.size() << " images, difference " << difference);
        CHECK(difference < 0.5 * previous);
        previous = difference;
    }
    CHECK(previous < 1e-3);
}

TEST_CASE("image series: a bad layer is refused") {
    WaterLayer layer;
    layer.surface_z = -0.1, layer.bottom_z = 0.1;
    CHECK_THROWS_AS(layer_images(layer, 1.0), InputError);
    layer.surface_z = 0.1, layer.bottom_z = 0.0;
    CHECK_THROWS_AS(layer_images(layer, 1.5), InputError);
    // |r| so near 1 that the geometric series needs more images than allowed.
    layer.tolerance = 1e-9, layer.reach = 1.0;
    CHECK_THROWS_WITH_AS(layer_images(layer, 0.99999), doctest::Contains("images to reach"), InputError);
}

TEST_CASE_TEMPLATE("image series: dense and entry-wise assembly agree with sediment images", S, double, Complex) {
    // Complex admittivities give complex weights: the dense assembly keeps their
    // imaginary part in layers of its own, the entries multiply them one by one.
    Scene<S> scene = fixtures::mixed_scene<S>(S(0.2), S(0.1), 0.02);
    WaterLayer layer;
    layer.surface_z = 0.03, layer.bottom_z = -0.04, layer.reach = 0.2, layer.tolerance = 1e-4;
    S bottom = S(0.05);
    if constexpr (!std::is_same_v<S, double>) bottom = S(0.05, 0.03);
    scene.images = layer_images(layer, reflection_coefficient(scene.water_conductivity, bottom));
    REQUIRE(scene.images.terms.size() > 4);
    const LinearSystem<S> full = assemble_system(scene, kQuad);
    const SystemEntries<S> entries(scene, kQuad);
    const Eigen::Index n = entries.panel_unknowns(), e = entries.electrodes();
    std::vector<Eigen::Index> panel;
    for (Eigen::Index i = 0; i < n; ++i) panel.push_back(i);
    MatrixX<S> part;
    entries.panel_block(panel, panel, part);
    const double scale = full.matrix.cwiseAbs().maxCoeff();
    CHECK((part - full.matrix.topLeftCorner(n, n)).cwiseAbs().maxCoeff() < 1e-12 * scale);
    CHECK((entries.electrode_columns() - full.matrix.topRightCorner(n, e)).cwiseAbs().maxCoeff() < 1e-12 * scale);
}

namespace {

// Grid lines from -half to half: cells of `core` within |x| < 3 core, growing by
// half at each step beyond.
std::vector<double> graded_lines(double half, double core) {
    std::vector<double> right = {0.0};
    double step = core;
    while (right.back() < half - 1e-12) {
        if (right.back() >= 3.0 * core - 1e-12) step *= 1.5;
        right.push_back(std::min(half, right.back() + step));
    }
    std::vector<double> lines;
    for (auto it = right.rbegin(); it != right.rend(); ++it) lines.push_back(-*it);
    for (std::size_t i = 1; i < right.size(); ++i) lines.push_back(right[i]);
    return lines;
}

// A slab of the given horizontal width between heights z0 < z1, meshed on graded lines.
TriangleMesh slab_mesh(double width, double z0, double z1, const std::string& name) {
    const std::vector<double> xy = graded_lines(0.5 * width, 0.01);
    TriangleMesh m = make_box_on_lines({xy, xy, {z0, z1}});
    m.name = name;
    return m;
}

}  // namespace

TEST_CASE("image series: meshed insulating slabs approach the two-plane series as they grow") {
    // The water between an insulating surface (z = 0) and bottom (z = -4.5 cm) as
    // images, against the same scene with each plane meshed as a thin insulating
    // box (1 cm thick) of growing width: the current leaking round the boxes' edges
    // falls as they grow, down to the boxes' discretization error.
    Scene<double> scene = sphere_between_sources();
    const Eigen::VectorXd unbounded = outer_potential(scene);
    WaterLayer layer;
    layer.surface_z = 0.0, layer.bottom_z = -0.045, layer.reach = 0.08;
    scene.images = layer_images(layer, 1.0);
    const Eigen::VectorXd imaged = outer_potential(scene);
    const double effect = (imaged - unbounded).cwiseAbs().maxCoeff();
    std::vector<double> differences;
    for (double width : {0.08, 0.16, 0.32}) {
        Scene<double> meshed = sphere_between_sources();
        for (const TriangleMesh& m : {slab_mesh(width, 0.0, 0.01, "surface"), slab_mesh(width, -0.055, -0.045, "bottom")}) {
            Surface<double> s;
            s.mesh = m;
            s.kind = InterfaceKind::sealed;
            s.panel_electrode.assign(m.size(), -1);
            meshed.surfaces.push_back(s);
        }
        const double d = (outer_potential(meshed) - imaged).cwiseAbs().maxCoeff() / effect;
        MESSAGE("boxes " << width << " m wide (" << meshed.surfaces[1].mesh.size() << " panels each): difference "
                         << d << " of the planes' effect");
        differences.push_back(d);
    }
    CHECK(differences[1] < 0.7 * differences[0]);
    CHECK(differences[2] < differences[1]);
    CHECK(differences[2] < 0.1);
}

TEST_CASE("image series: a meshed block of sediment approaches the sediment bottom's image as it grows") {
    // A bottom of conductivity 0.05 S/m under water of 0.01 S/m (r = -2/3) at
    // z = -4.5 cm as one image, against a block of that conductivity (a contact
    // surface) below the same plane, of growing width and depth (half the width):
    // the difference falls as the block grows, down to its discretization error.
    const double sigma_b = 0.05, top = -0.045;
    Scene<double> scene = sphere_between_sources();
    WaterLayer layer;
    layer.bottom_z = top;
    scene.images = layer_images(layer, reflection_coefficient(scene.water_conductivity, sigma_b));
    const Eigen::VectorXd imaged = outer_potential(scene);
    scene.images = {};
    const double effect = (imaged - outer_potential(scene)).cwiseAbs().maxCoeff();
    std::vector<double> differences;
    for (double width : {0.06, 0.12, 0.24}) {
        Scene<double> meshed = sphere_between_sources();
        const std::vector<double> xy = graded_lines(0.5 * width, 0.01);
        // depths graded from the top face down to half the width, increasing z
        const std::vector<double> depth = graded_lines(0.5 * width, 0.01);
        std::vector<double> z;
        for (auto it = depth.rbegin(); it != depth.rend(); ++it)
            if (*it >= 0.0) z.push_back(top - *it);
        Surface<double> block;
        block.mesh = make_box_on_lines({xy, xy, z});
        block.mesh.name = "sediment";
        block.kind = InterfaceKind::contact;
        block.inner_conductivity = sigma_b;
        meshed.surfaces.push_back(block);
        const double d = (outer_potential(meshed) - imaged).cwiseAbs().maxCoeff() / effect;
        MESSAGE("block " << width << " m wide (" << block.mesh.size() << " panels): difference " << d
                         << " of the bottom's effect");
        differences.push_back(d);
    }
    CHECK(differences[1] < 0.7 * differences[0]);
    CHECK(differences[2] < differences[1]);
    CHECK(differences[2] < 0.2);
}
