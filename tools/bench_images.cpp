// murk-bench-images: what the images of the water's bounds cost the dense
// assembly (solver/image_series.hpp). A 15 cm membrane-covered ellipsoid (a
// demo fish-sized body) is assembled in unbounded water, under one insulating
// plane, between an insulating surface and bottom (series at 1e-6 over the
// body's reach), and over a sediment bottom with a surface. Printed: images,
// unknowns, assembly wall time (median of 3) and its ratio to unbounded water.
//
// Usage: murk-bench-images [PANEL_SIZE_MM]   (default 6 mm)
#include "geometry/shapes.hpp"
#include "solver/bem_system.hpp"
#include "solver/image_series.hpp"

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

using namespace murk;

namespace {

double assembly_seconds(const Scene<double>& scene) {
    std::vector<double> t;
    for (int rep = 0; rep < 3; ++rep) {
        const auto start = std::chrono::steady_clock::now();
        const LinearSystem<double> sys = assemble_system(scene, QuadratureOptions{});
        t.push_back(std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count());
        if (sys.matrix.rows() == 0) std::abort();
    }
    std::sort(t.begin(), t.end());
    return t[1];
}

}  // namespace

int main(int argc, char** argv) {
    const double panel = (argc > 1 ? std::atof(argv[1]) : 6.0) * 1e-3;
    Scene<double> scene;
    scene.water_conductivity = 0.01;
    Surface<double> body;
    body.mesh = make_ellipsoid(Vec3(0.075, 0.012, 0.015), panel);
    body.mesh.name = "body";
    body.kind = InterfaceKind::membrane;
    body.inner_conductivity = 0.5;
    body.membrane_resistance = 0.25;
    scene.surfaces.push_back(body);
    scene.sources = {{Vec3(0.04, 0, 0), 1e-4}, {Vec3(-0.04, 0, 0), -1e-4}};

    WaterLayer layer;
    layer.surface_z = 0.03, layer.bottom_z = -0.03, layer.reach = 0.15, layer.tolerance = 1e-6;
    struct Case {
        std::string name;
        ImageSeries<double> images;
    };
    const std::vector<Case> cases = {
        {"unbounded", {}},
        {"one insulating plane", plane_images<double>(BoundingPlane{Vec3(0, 0, 0.03), Vec3::UnitZ()})},
        {"surface + insulating bottom, 6 cm deep", layer_images(layer, 1.0)},
        {"surface + sediment bottom (r = 0.5)", layer_images(layer, 0.5)},
    };
    std::printf("dense assembly of a %zu-panel membrane ellipsoid (15 x 2.4 x 3 cm), threads as OMP_NUM_THREADS\n",
                body.mesh.size());
    std::printf("  %-40s %7s %9s %12s %8s\n", "water", "images", "unknowns", "assembly s", "ratio");
    double base = 0.0;
    for (const Case& c : cases) {
        scene.images = c.images;
        const double s = assembly_seconds(scene);
        if (base == 0.0) base = s;
        std::printf("  %-40s %7zu %9ld %12.3f %7.1fx\n", c.name.c_str(), c.images.terms.size(),
                    static_cast<long>(2 * body.mesh.size()), s, s / base);
    }
    return 0;
}
