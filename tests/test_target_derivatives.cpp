// Closed-form derivatives of the induced-dipole model's readings with respect to
// the target (solver/target_derivatives.hpp): against finite differences of the
// same model (they must agree to rounding and truncation), the baseline field and
// its gradient against field_at, and the model's position gradient against finite
// differences of exact solves of the meshed sphere moved by +-h.
#include "geometry/shapes.hpp"
#include "geometry/transform.hpp"
#include "solver/image_series.hpp"
#include "solver//coupled_solve.hpp"
#include "solver/target_derivatives.hpp"

#include <doctest/doctest.h>

#include <cmath>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

// A small robot: a sealed box hull, a current-driven emitter at +x and a
// grounded return at -x (two electrodes).
// planes: 0 unbounded water, 1 an insulating surface, 2 a surface and a bottom
// (an image series: solver/image_series.hpp).
Scene<double> robot_scene(int planes) {
    Scene<double> scene;
    scene.water_conductivity = 0.05;
    Surface<double> hull;
    hull.mesh = make_box(Vec3(0.1, 0.04, 0.04), 0.006);
    hull.mesh.name = "hull";
    hull.kind = InterfaceKind::sealed;
    hull.panel_electrode.assign(hull.mesh.size(), -1);
    for (std::size_t t = 0; t < hull.mesh.size(); ++t) {
        const Vec3 c = hull.mesh.centroid(t);
        if (c.x() > 0.04) hull.panel_electrode[t] = 0;
        else if (c.x() < -0.04) hull.panel_electrode[t] = 1;
    }
    scene.surfaces.push_back(hull);
    scene.electrodes = {{"emitter", ElectrodeDrive::current, 1e-3}, {"return", ElectrodeDrive::voltage, 0.0}};
    if (planes == 1) scene.images = plane_images<double>(InsulatingPlane{Vec3(0, 0, 0.06), Vec3::UnitZ()});
    if (planes == 2) {
        WaterLayer layer;
        layer.surface_z = 0.06, layer.bottom_z = -0.07, layer.reach = 0.15;
        scene.images = layer_images(layer, 1.0);
    }
    return scene;
}

// Readings: the emitter's potential and the potentials of the two insulating
// hull panels nearest to two points on the hull.
std::vector<Eigen::Index> reading_unknowns(const FixedPart<double>& fixed) {
    const TriangleMesh& mesh = fixed.scene().surfaces[0].mesh;
    std::vector<Eigen::Index> out = {fixed.layout().electrode_offset};
    for (const Vec3& near : {Vec3(0.01, 0.02, 0.0), Vec3(-0.02, 0.0, 0.02)}) {
        std::size_t best = 0;
        for (std::size_t t = 0; t < mesh.size(); ++t)
            if ((mesh.centroid(t) - near).norm() < (mesh.centroid(best) - near).norm()) best = t;
        out.push_back(fixed.layout().surfaces[0].offset + Eigen::Index(best));
    }
    return out;
}

Eigen::MatrixXd readout_of(const FixedPart<double>& fixed) {
    const std::vector<Eigen::Index> unknowns = reading_unknowns(fixed);
    Eigen::MatrixXd r = Eigen::MatrixXd::Zero(Eigen::Index(unknowns.size()), fixed.size());
    for (std::size_t k = 0; k < unknowns.size(); ++k) r(Eigen::Index(k), unknowns[k]) = 1.0;
    return r;
}

// The same readings from an unpacked solution of the hull (+ anything else).
Eigen::VectorXd readings_of(const Solution<double>& s, const FixedPart<double>& fixed) {
    const std::vector<Eigen::Index> unknowns = reading_unknowns(fixed);
    Eigen::VectorXd v(Eigen::Index(unknowns.size()));
    v(0) = s.electrode_potential[0];
    for (std::size_t k = 1; k < unknowns.size(); ++k)
        v(Eigen::Index(k)) = s.surfaces[0].outer_potential(unknowns[k] - fixed.layout().surfaces[0].offset);
    return v;
}

Eigen::Matrix3Xd one_point(const Vec3& x) {
    Eigen::Matrix3Xd m(3, 1);
    m.col(0) = x;
    return m;
}

Surface<double> sphere(const Vec3& centre, double radius, double conductivity) {
    Surface<double> s;
    s.mesh = make_icosphere(radius, 2);
    s.mesh.name = "object";
    translate(s.mesh, centre);
    s.kind = InterfaceKind::contact;
    s.inner_conductivity = conductivity;
    return s;
}

}  // namespace

TEST_CASE("target derivatives: closed form against finite differences of the same dipole model") {
    // With an insulating plane, or a surface and a bottom, so the images' derivatives are checked too.
    int planes = 1;
    SUBCASE("one plane") { planes = 1; }
    SUBCASE("surface and bottom") { planes = 2; }
    const FixedPart<double> fixed(robot_scene(planes), kQuad);
    const LeadFields<double> lead(fixed, readout_of(fixed));
    const double a = 0.003, sigma = 0.5, sigma_w = 0.05;
    const Eigen::Vector3d axes(a, a, a);
    const Eigen::Matrix3d frame = Eigen::Matrix3d::Identity();
    const Matrix3<double> m = ellipsoid_polarization(axes, frame, sigma, sigma_w);
    const std::vector<Matrix3<double>> dm = {polarization_size_derivative(m, a),
                                             ellipsoid_polarization_conductivity_derivative(axes, frame, sigma, sigma_w)};
    for (const Vec3& x : {Vec3(0.01, 0.045, 0.005), Vec3(-0.02, 0.035, 0.035), Vec3(0.03, -0.04, -0.015)}) {
        CAPTURE(x.transpose());
        const TargetResponse<double> r = target_response(lead, one_point(x), m, dm);
        REQUIRE(r.gradient.size() == 5);
        REQUIRE(r.change.rows() == 3);
        // Central differences; truncation ~ (h/d)^2 ~ 1e-8 for h = 1e-6 m at d ~ 2 cm.
        Eigen::MatrixXd fd(3, 5);
        const double h = 1e-6;
        for (int j = 0; j < 3; ++j)
            fd.col(j) = (target_response(lead, one_point(x + h * Vec3::Unit(j)), m).change -
                         target_response(lead, one_point(x - h * Vec3::Unit(j)), m).change) /
                        (2 * h);
        const double da = 1e-9;
        const auto m_at = [&](double aa, double ss) {
            return ellipsoid_polarization(Eigen::Vector3d(aa, aa, aa), frame, ss, sigma_w);
        };
        fd.col(3) = (target_response(lead, one_point(x), m_at(a + da, sigma)).change -
                     target_response(lead, one_point(x), m_at(a - da, sigma)).change) /
                    (2 * da);
        const double ds = 1e-6;
        fd.col(4) = (target_response(lead, one_point(x), m_at(a, sigma + ds)).change -
                     target_response(lead, one_point(x), m_at(a, sigma - ds)).change) /
                    (2 * ds);
        for (int k = 0; k < 3; ++k) {
            CAPTURE(k);
            Eigen::VectorXd closed(5);
            for (int p = 0; p < 5; ++p) closed(p) = r.gradient[std::size_t(p)](k, 0);
            const Eigen::Vector3d pos = closed.head<3>(), pos_fd = fd.row(k).head<3>().transpose();
            CHECK(pos.norm() > 0);
            const double error = (pos - pos_fd).norm() / pos.norm();
            MESSAGE("reading " << k << ": position gradient vs finite differences " << error);
            CHECK(error < 1e-6);
            CHECK(std::abs(closed(3) - fd(k, 3)) < 1e-6 * std::abs(closed(3)));
            CHECK(std::abs(closed(4) - fd(k, 4)) < 1e-6 * std::abs(closed(4)));
        }
    }
}

TEST_CASE("target derivatives: the baseline field and its gradient by the point rule against field_at") {
    int planes = 1;
    SUBCASE("one plane") { planes = 1; }
    SUBCASE("surface and bottom") { planes = 2; }
    const FixedPart<double> fixed(robot_scene(planes), kQuad);
    for (const Vec3& x : {Vec3(0.01, 0.045, 0.005), Vec3(-0.02, 0.035, 0.035), Vec3(0.0, 0.0, -0.05)}) {
        CAPTURE(x.transpose());
        const BaselineFieldGradient<double> g = baseline_field_gradient(fixed, one_point(x));
        MESSAGE("clearance " << g.clearance(0) << " panel diameters");
        REQUIRE(g.clearance(0) >= 3.0);
        const Eigen::Vector3d e = baseline_field(fixed, one_point(x), kQuad).col(0);
        const double e_error = (g.field.col(0) - e).norm() / e.norm();
        // Steps of 1e-4 of the distance: truncation ~1e-8, rounding of field_at's
        // own differences (step 1e-3 d) ~1e-13 / 1e-4 ~ 1e-9.
        const double h = 1e-4 * (x - Vec3(0, 0, 0)).norm();
        Eigen::Matrix3d de_fd;
        for (int j = 0; j < 3; ++j)
            de_fd.col(j) = (baseline_field(fixed, one_point(x + h * Vec3::Unit(j)), kQuad).col(0) -
                            baseline_field(fixed, one_point(x - h * Vec3::Unit(j)), kQuad).col(0)) /
                           (2 * h);
        const Eigen::Matrix3d de = Eigen::Map<const Eigen::Matrix3d>(g.gradient.col(0).data());
        const double de_error = (de - de_fd).norm() / de_fd.norm();
        MESSAGE("E_b against field_at " << e_error << ", dE_b against its differences " << de_error);
        CHECK(e_error < 1e-3);
        CHECK(de_error < 3e-3);
        // A harmonic potential's Hessian is traceless and symmetric (Laplace's equation).
        CHECK(std::abs(de.trace()) < 1e-9 * de.norm());
        CHECK((de - de.transpose()).norm() < 1e-9 * de.norm());
    }
}

TEST_CASE("target derivatives: the dipole model's gradient against finite differences of exact solves") {
    // Exact: the meshed sphere (320 panels) solved with the body by the coupled
    // path (solve_coupled equals the full dense solve to 1e-10, tests/
    // test_coupled_solve.cpp), moved by +-h along each axis. The dipole model
    // uses the polarization tensor of the same meshed sphere (computed_polarization),
    // so the difference is the dipole model's own error: dipole_path.hpp bounds
    // it by ~(a/r)^2 (field variation across the object) and (a/2r)^3 (reflection);
    // DEVELOPERS.md ("auto" path) measures at most 0.12 a/r on readings. A
    // gradient of a term falling faster (the quadrupole part) is relatively up to
    // twice as large, so the tolerance is 2 x 0.12 a/r, plus 1 % for the finite
    // differences (h = 2 % of r: truncation ~5 (h/r)^2 = 0.2 %) and for the
    // quadrature of the baseline field near the hull.
    const FixedPart<double> fixed(robot_scene(0), kQuad);
    const Eigen::MatrixXd readout = readout_of(fixed);
    const LeadFields<double> lead(fixed, readout);
    const double a = 0.003, sigma = 0.5;
    Scene<double> alone;
    alone.water_conductivity = fixed.scene().water_conductivity;
    alone.surfaces.push_back(sphere(Vec3::Zero(), a, sigma));
    const Matrix3<double> m = computed_polarization(alone, 0, kQuad);
    const Eigen::VectorXd base = readings_of(fixed.solution(), fixed);

    Scene<double> at_origin = fixed.scene();
    at_origin.surfaces.push_back(sphere(Vec3(0, 0.2, 0), a, sigma));
    const MovingBlock<double> block = factor_moving_block(at_origin, {1}, kQuad);  // no plane: any position
    const auto exact_change = [&](const Vec3& centre) {
        Scene<double> full = fixed.scene();
        full.surfaces.push_back(sphere(centre, a, sigma));
        const CoupledSolution<double> s = solve_coupled(full, {1}, fixed, block, kQuad, CouplingOptions{});
        REQUIRE(s.gmres.converged);
        return Eigen::VectorXd(readings_of(s.solution, fixed) - base);
    };
    // Centres r from the hull's face y = 0.02 (or z = 0.02).
    struct Case { Vec3 centre; double r; };
    for (const Case& c : {Case{Vec3(0.01, 0.02 + 6 * a, 0.004), 6 * a}, Case{Vec3(-0.015, 0.02 + 10 * a, -0.005), 10 * a},
                          Case{Vec3(-0.02, 0.003, 0.02 + 8 * a), 8 * a}}) {
        CAPTURE(c.centre.transpose());
        const TargetResponse<double> model = target_response(lead, one_point(c.centre), m);
        const double h = 0.02 * c.r;
        Eigen::MatrixXd fd(readout.rows(), 3);
        for (int j = 0; j < 3; ++j)
            fd.col(j) = (exact_change(c.centre + h * Vec3::Unit(j)) - exact_change(c.centre - h * Vec3::Unit(j))) / (2 * h);
        const double tolerance = 2 * 0.12 * a / c.r + 0.01;
        for (Eigen::Index k = 0; k < readout.rows(); ++k) {
            Eigen::Vector3d g(model.gradient[0](k, 0), model.gradient[1](k, 0), model.gradient[2](k, 0));
            const Eigen::Vector3d g_exact = fd.row(k).transpose();
            const double error = (g - g_exact).norm() / g_exact.norm();
            MESSAGE("r = " << c.r / a << " a, reading " << k << ": |grad| " << g_exact.norm()
                           << ", relative error of the dipole model's gradient " << error << " (tolerance "
                           << tolerance << ")");
            CHECK(error < tolerance);
        }
    }
}

TEST_CASE("target derivatives: complex conductivities (a lossy dielectric target)") {
    // The complex instantiation: with real inputs it equals the real one; with a
    // target of complex conductivity its gradient matches finite differences.
    const Scene<double> real_scene = robot_scene(1);
    Scene<Complex> scene;
    scene.water_conductivity = real_scene.water_conductivity;
    scene.images = plane_images<Complex>(real_scene.images.bounds.at(0));
    Surface<Complex> hull;
    hull.mesh = real_scene.surfaces[0].mesh;
    hull.kind = InterfaceKind::sealed;
    hull.panel_electrode = real_scene.surfaces[0].panel_electrode;
    scene.surfaces.push_back(hull);
    for (const Electrode<double>& e : real_scene.electrodes) scene.electrodes.push_back({e.name, e.drive, e.value});
    const FixedPart<Complex> fixed(scene, kQuad);
    const FixedPart<double> fixed_real(real_scene, kQuad);
    const Eigen::MatrixXd readout = readout_of(fixed_real);
    const LeadFields<Complex> lead(fixed, readout.cast<Complex>());
    const LeadFields<double> lead_real(fixed_real, readout);
    const Eigen::Vector3d axes(0.003, 0.003, 0.003);
    const Vec3 x(0.01, 0.045, 0.005);
    const Matrix3<Complex> m_real_valued =
        ellipsoid_polarization<Complex>(axes, Eigen::Matrix3d::Identity(), Complex(0.5), Complex(0.05));
    const TargetResponse<Complex> c = target_response(lead, one_point(x), m_real_valued);
    const TargetResponse<double> r = target_response(
        lead_real, one_point(x), ellipsoid_polarization<double>(axes, Eigen::Matrix3d::Identity(), 0.5, 0.05));
    for (int j = 0; j < 3; ++j)
        CHECK((c.gradient[std::size_t(j)] - r.gradient[std::size_t(j)].cast<Complex>()).norm() <
              1e-10 * r.gradient[std::size_t(j)].norm());

    const Matrix3<Complex> m = ellipsoid_polarization<Complex>(axes, Eigen::Matrix3d::Identity(), Complex(0.02, 0.04),
                                                               Complex(0.05));
    const TargetResponse<Complex> g = target_response(lead, one_point(x), m);
    const double h = 1e-6;
    for (int j = 0; j < 3; ++j) {
        const Eigen::MatrixXcd fd = (target_response(lead, one_point(x + h * Vec3::Unit(j)), m).change -
                                     target_response(lead, one_point(x - h * Vec3::Unit(j)), m).change) /
                                    Complex(2 * h);
        CHECK(g.gradient[std::size_t(j)].imag().norm() > 0);
        CHECK((fd - g.gradient[std::size_t(j)]).norm() < 1e-6 * g.gradient[std::size_t(j)].norm());
    }
}
