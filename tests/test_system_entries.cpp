// The system's entries one block at a time (solver/system_entries.hpp), which the
// compressed operator is built from, against the dense assembly of the same
// scene: the same discrete equations, entry for entry, so they agree to rounding
// (only the Gauss's-law diagonal is summed in another order).
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/system_entries.hpp"

#include <cmath>

#include <doctest/doctest.h>

#include <numeric>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

// Every kind of unknown: a membrane body with a source inside, a contact object,
// a sealed hull with current-, voltage-driven and floating electrodes, and an
// insulating plane above them.
template <class S>
Scene<S> mixed_scene(S skin_resistance, S object_conductivity) {
    Scene<S> scene;
    scene.water_conductivity = S(0.02);
    Surface<S> body;
    body.mesh = make_ellipsoid(Vec3(0.05, 0.012, 0.01), 0.012);
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
    scene.plane = InsulatingPlane{Vec3(0, 0, 0.03), Vec3::UnitZ()};
    return scene;
}

template <class S>
double max_abs(const MatrixX<S>& m) {
    return m.size() ? m.cwiseAbs().maxCoeff() : 0.0;
}

}  // namespace

TEST_CASE_TEMPLATE("the system's entries block by block equal the dense assembly", S, double, Complex) {
    const Scene<S> scene = mixed_scene<S>(S(0.2), S(0.1));
    const LinearSystem<S> full = assemble_system(scene, kQuad);
    const SystemEntries<S> entries(scene, kQuad);
    const Eigen::Index n = entries.panel_unknowns(), e = entries.electrodes();
    REQUIRE(n + e == full.layout.size);
    REQUIRE(e == 3);

    std::vector<Eigen::Index> panel(std::size_t(n), 0);
    std::iota(panel.begin(), panel.end(), Eigen::Index(0));
    MatrixX<S> part;
    entries.panel_block(panel, panel, part);
    const double scale = max_abs<S>(full.matrix);
    CHECK(max_abs<S>(part - full.matrix.topLeftCorner(n, n)) < 1e-12 * scale);
    CHECK(max_abs<S>(entries.electrode_columns() - full.matrix.topRightCorner(n, e)) < 1e-12 * scale);
    CHECK(max_abs<S>(entries.electrode_rows() - full.matrix.bottomRows(e)) == 0.0);
    CHECK(max_abs<S>(entries.rhs() - full.rhs) == 0.0);
    CHECK(entries.points().cols() == n);

    SUBCASE("a scattered block of rows and columns, in any order") {
        const std::vector<Eigen::Index> rows{n - 1, 0, 7, n / 2, 3}, cols{5, n - 2, 1, n / 3};
        MatrixX<S> block;
        entries.panel_block(rows, cols, block);
        for (std::size_t i = 0; i < rows.size(); ++i)
            for (std::size_t j = 0; j < cols.size(); ++j)
                CHECK(std::abs(block(Eigen::Index(i), Eigen::Index(j)) - full.matrix(rows[i], cols[j])) <= 1e-12 * scale);
    }
}
