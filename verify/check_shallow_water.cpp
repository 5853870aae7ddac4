// Shallow water: two small spherical electrodes (+I and -I) between an insulating
// surface and bottom, solved with the image series (solver/image_series.hpp).
// The planes' share of the drive resistance, R(slab) - R(unbounded), against the
// slab's Bessel-function series (exact::insulating_slab_kernel):
//   (1 / (4 pi sigma)) [S(x1) + S(x2) - 2 (K(x1, x2) - 1/|x1 - x2|)],
// K = 4 pi G of the slab, S(x) = lim_{y->x} K(x, y) - 1/|x - y| the images' potential
// at a source's own position. Point-like electrodes: the spheres' own dipoles in
// the images' field change this by about (a / 2d)^3 of it (d the depth).
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

#include <cmath>

namespace murk {

namespace {
using namespace verification;

constexpr double kWater = 0.01;  // S/m
constexpr double kRadius = 0.002, kBottom = -0.02, kSurface = 0.02, kCurrent = 1e-3;

double slab_kernel(const Vec3& x, const Vec3& y) {
    return exact::insulating_slab_kernel(kSurface - kBottom, std::hypot(x.x() - y.x(), x.y() - y.y()), x.z() - kBottom,
                                         y.z() - kBottom);
}

// The images' potential at a source's own position: K - 1/r on a small horizontal
// circle about it (the images' part is smooth: its error falls as the square of the offset).
double self_images(const Vec3& x) {
    const double delta = 1e-4 * (kSurface - kBottom);
    const Vec3 near = x + Vec3(delta, 0, 0);
    return slab_kernel(near, x) - 1.0 / delta;
}

double drive_resistance(const Scene<double>& scene, const QuadratureOptions& quadrature) {
    const Solution<double> s = solve_scene(scene, quadrature);
    return (s.electrode_potential[0] - s.electrode_potential[1]) / kCurrent;
}

}  // namespace

void check_shallow_water(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    CheckResult row;
    row.name = "shallow water, drive resistance";
    row.source = "slab Bessel series, Morse & Feshbach 1953";
    row.quantity = "R(slab) - R(unbounded) (ohm)";
    row.tolerance = 0.005;
    add(refine(row, options, [&](int level) {
        const Vec3 x1(-0.02, 0.0, 0.004), x2(0.02, 0.005, -0.006);
        Scene<double> scene;
        scene.water_conductivity = kWater;
        for (const Vec3& c : {x1, x2}) {
            TriangleMesh ball = make_icosphere(kRadius, level);
            ball.name = scene.surfaces.empty() ? "plus" : "minus";
            translate(ball, c);
            scene.surfaces.push_back(sealed_surface<double>(ball, static_cast<int>(scene.surfaces.size())));
        }
        scene.electrodes = {{"plus", ElectrodeDrive::current, kCurrent}, {"minus", ElectrodeDrive::current, -kCurrent}};
        const double unbounded = drive_resistance(scene, options.quadrature);
        WaterLayer layer;
        layer.surface_z = kSurface, layer.bottom_z = kBottom, layer.reach = 0.05;
        scene.images = layer_images(layer, 1.0);
        const double slab = drive_resistance(scene, options.quadrature);
        LevelValue v;
        v.panels = static_cast<int>(2 * scene.surfaces[0].mesh.size());
        v.reference = (self_images(x1) + self_images(x2) - 2.0 * (slab_kernel(x1, x2) - 1.0 / (x1 - x2).norm())) /
                      (4.0 * M_PI * kWater);
        v.computed = slab - unbounded;
        v.error = std::abs(v.computed - v.reference) / std::abs(v.reference);
        return v;
    }));
}

}  // namespace murk
