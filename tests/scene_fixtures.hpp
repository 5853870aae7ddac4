#pragma once
// Scenes shared by the solver tests of the dense and the compressed paths.
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "solver/scene.hpp"

#include <cmath>

namespace murk::fixtures {

// Every kind of unknown: a membrane body with a source inside, a contact object,
// a sealed hull with current-, voltage-driven and floating electrodes, and an
// insulating plane above them. `body_panel` (m) sets the body's mesh: the
// default gives 3,479 unknowns, 0.02 about half as many.
template <class S>
Scene<S> mixed_scene(S skin_resistance, S object_conductivity, double body_panel = 0.012) {
    Scene<S> scene;
    scene.water_conductivity = S(0.02);
    Surface<S> body;
    body.mesh = make_ellipsoid(Vec3(0.05, 0.012, 0.01), body_panel);
    body.mesh.name = "body";
    body.kind = InterfaceKind::membrane;
    body.inner_conductivity = S(0.5);
    body.membrane_resistance = skin_resistance;
    scene.surfaces.push_back(body);
    scene.sources.push_back({Vec3(0.03, 0, 0), S(1e-4)});
    scene.sources.push_back({Vec3(-0.03, 0, 0), S(-1e-4)});

    Surface<S> object;
    object.mesh = make_icosphere(0.006, 2);
    object.mesh.name = "object";
    translate(object.mesh, Vec3(0.0, 0.03, 0.0));
    object.kind = InterfaceKind::contact;
    object.inner_conductivity = object_conductivity;
    scene.surfaces.push_back(object);

    Surface<S> hull;
    hull.mesh = make_box(Vec3(0.08, 0.02, 0.02), 0.01);
    hull.mesh.name = "hull";
    translate(hull.mesh, Vec3(0.0, -0.05, 0.0));
    hull.kind = InterfaceKind::sealed;
    hull.panel_electrode.assign(hull.mesh.size(), -1);
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const double x = hull.mesh.centroid(t).x();
        if (x > 0.03) hull.panel_electrode[t] = 0;
        else if (x < -0.03) hull.panel_electrode[t] = 1;
        else if (std::abs(x) < 0.006) hull.panel_electrode[t] = 2;
    }
    scene.surfaces.push_back(hull);
    scene.electrodes = {{"drive", ElectrodeDrive::current, S(1e-3)},
                        {"ground", ElectrodeDrive::voltage, S(0.0)},
                        {"sense", ElectrodeDrive::floating, S(0.0)}};
    scene.images = plane_images<S>(InsulatingPlane{Vec3(0, 0, 0.03), Vec3::UnitZ()});
    return scene;
}

}  // namespace murk::fixtures
