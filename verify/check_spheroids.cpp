// Prolate and oblate spheroids along and across a uniform field: polarizability
// from the depolarization factors (Osborn 1945, Stoner 1945).
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/dipole_moment.hpp"
#include "verify/check_support.hpp"
#include "verify/exact_solutions.hpp"

#include <cstdio>

namespace murk {

namespace {
using namespace verification;

constexpr double kWater = 0.01, kObject = 0.1;  // S/m

CheckResult spheroid_row(double polar, double equatorial, bool along_axis, const VerifyOptions& options) {
    char name[96];
    std::snprintf(name, sizeof name, "%s spheroid %g:1, field %s axis", polar > equatorial ? "prolate" : "oblate",
                  polar > equatorial ? polar / equatorial : equatorial / polar, along_axis ? "along" : "across");
    CheckResult row;
    row.name = name;
    row.source = "depolarization factors, Osborn 1945";
    row.quantity = "polarizability (m^3)";
    row.tolerance = options.quick ? 0.03 : 0.01;
    const Vec3 semi_axes(equatorial, equatorial, polar);  // symmetry axis along z
    const Vec3 field = along_axis ? Vec3::UnitZ() : Vec3::UnitX();
    return refine(row, options, [&](int level) {
        Scene<double> scene;
        scene.water_conductivity = kWater;
        scene.uniform_field = field;
        // The volume-corrected unit icosphere stretched by diag(a, b, c): the volume
        // scales by abc exactly, so the mesh keeps the spheroid's volume.
        TriangleMesh mesh = make_icosphere(1.0, level);
        transform(mesh, semi_axes.asDiagonal(), Vec3::Zero());
        mesh.name = "spheroid";
        scene.surfaces.push_back(contact_surface<double>(mesh, kObject));
        const Solution<double> sol = solve_scene(scene, options.quadrature);
        const Vec3 p = induced_dipole_moment(scene.surfaces[0].mesh, sol.surfaces[0], kWater);
        const double L_axial = exact::spheroid_axial_depolarization(polar, equatorial);
        const double L = along_axis ? L_axial : 0.5 * (1.0 - L_axial);
        const double volume = 4.0 / 3.0 * M_PI * polar * equatorial * equatorial;
        LevelValue v;
        v.panels = static_cast<int>(mesh.size());
        v.computed = p.dot(field);
        v.reference = exact::ellipsoid_polarizability(volume, L, kObject, kWater);
        v.error = relative_error(v.computed, v.reference);
        return v;
    });
}

}  // namespace

void check_spheroids(const VerifyOptions& options, const std::function<void(CheckResult)>& add) {
    add(spheroid_row(0.02, 0.01, true, options));
    add(spheroid_row(0.02, 0.01, false, options));
    add(spheroid_row(0.01, 0.02, true, options));
    add(spheroid_row(0.01, 0.02, false, options));
}

}  // namespace murk
