// Insulating plane: a sphere and a point source below the water surface, solved
// with the image Green's function, against the same scene mirrored across the
// plane and solved in unbounded water (method of images; Jackson 1999 §2.1-2.2).
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "verify/check_support.hpp"

namespace murk {

namespace {
using namespace verification;

constexpr double kWater = 0.01, kObject = 0.1;  // S/m

}  // namespace

void check_insulating_plane(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    CheckResult row;
    row.name = "insulating plane, image vs mirrored scene";
    row.source = "method of images (exact)";
    row.quantity = "max surface potential (V)";
    row.tolerance = 0.001;
    add(refine(row, options, [&](int level) {
        const Vec3 plane_point(0, 0, 0), up(0, 0, 1);
        TriangleMesh sphere = make_icosphere(0.01, level);
        sphere.name = "sphere";
        translate(sphere, Vec3(0, 0, -0.02));
        const Vec3 source(0.025, 0.0, -0.01);

        Scene<double> imaged;
        imaged.water_conductivity = kWater;
        imaged.images = plane_images<double>(InsulatingPlane{plane_point, up});
        imaged.surfaces.push_back(contact_surface<double>(sphere, kObject));
        imaged.sources.push_back({source, 1e-3});

        Scene<double> doubled = imaged;
        doubled.images = {};
        TriangleMesh twin = sphere;
        twin.name = "mirrored sphere";
        mirror(twin, plane_point, up);
        doubled.surfaces.push_back(contact_surface<double>(twin, kObject));
        doubled.sources.push_back({Vec3(source.x(), source.y(), -source.z()), 1e-3});

        const auto a = solve_scene(imaged, options.quadrature).surfaces[0].outer_potential;
        const auto b = solve_scene(doubled, options.quadrature).surfaces[0].outer_potential;
        LevelValue v;
        v.panels = static_cast<int>(sphere.size());
        v.reference = b.cwiseAbs().maxCoeff();
        v.computed = a.cwiseAbs().maxCoeff();
        v.error = (a - b).cwiseAbs().maxCoeff() / v.reference;
        return v;
    }));
}

}  // namespace murk
