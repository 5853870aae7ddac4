#include "solver/polarization.hpp"

#include "geometry/internal_check.hpp"
#include "solver/bem_system.hpp"
#include "solver/dipole_moment.hpp"

#include <Eigen/LU>
#include <boost/math/special_functions/ellint_rd.hpp>
#include <cmath>
#include <map>

namespace murk {

Eigen::Vector3d depolarization_factors(const Eigen::Vector3d& a) {
    const double product = a.prod();
    const Eigen::Vector3d sq = a.cwiseProduct(a);
    Eigen::Vector3d n;
    for (int i = 0; i < 3; ++i)
        n(i) = product / 3.0 * boost::math::ellint_rd(sq((i + 1) % 3), sq((i + 2) % 3), sq(i));
    return n;
}

template <class S>
Matrix3<S> ellipsoid_polarization(const Eigen::Vector3d& semi_axes, const Eigen::Matrix3d& axes, S inner, S water) {
    const double volume = 4.0 / 3.0 * M_PI * semi_axes.prod();
    const Eigen::Vector3d n = depolarization_factors(semi_axes);
    Eigen::Matrix<S, 3, 1> principal;
    for (int i = 0; i < 3; ++i) principal(i) = S(volume) * (inner - water) / (water + S(n(i)) * (inner - water));
    const Matrix3<S> r = axes.cast<S>();
    return r * principal.asDiagonal() * r.transpose();
}

Eigen::Matrix3d conducting_ellipsoid_polarization(const Eigen::Vector3d& semi_axes, const Eigen::Matrix3d& axes) {
    const double volume = 4.0 / 3.0 * M_PI * semi_axes.prod();
    const Eigen::Vector3d n = depolarization_factors(semi_axes);
    const Eigen::Vector3d principal = volume * n.cwiseInverse();
    return axes * principal.asDiagonal() * axes.transpose();
}

template <class S>
Matrix3<S> computed_polarization(const Scene<S>& scene, std::size_t surface, const QuadratureOptions& options) {
    MURK_CHECK(surface < scene.surfaces.size(), "the object is a surface of the scene");
    Scene<S> alone;
    alone.water_conductivity = scene.water_conductivity;
    Surface<S> object = scene.surfaces[surface];
    // Centred on the origin (the moment does not depend on where the object is,
    // but the incident potential -E.x stays small on it).
    Vec3 centre = Vec3::Zero();
    for (const Vec3& v : object.mesh.vertices) centre += v;
    centre /= double(object.mesh.vertices.size());
    for (Vec3& v : object.mesh.vertices) v -= centre;
    std::map<int, int> electrode_of;  // scene electrode -> electrode of `alone`
    for (int& e : object.panel_electrode) {
        if (e < 0) continue;
        if (!electrode_of.count(e)) {
            electrode_of[e] = static_cast<int>(alone.electrodes.size());
            Electrode<S> floating = scene.electrodes.at(e);
            floating.drive = ElectrodeDrive::floating;  // carries no net current in a uniform field
            floating.value = S(0);
            alone.electrodes.push_back(floating);
        }
        e = electrode_of[e];
    }
    alone.surfaces.push_back(std::move(object));

    const LinearSystem<S> system = assemble_system(alone, options);
    const Eigen::PartialPivLU<MatrixX<S>> lu(system.matrix);
    std::vector<Eigen::Index> all(system.layout.size), none;
    for (Eigen::Index i = 0; i < system.layout.size; ++i) all[i] = i;
    Matrix3<S> m;
    for (int k = 0; k < 3; ++k) {
        alone.uniform_field = Eigen::Matrix<S, 3, 1>::Unit(k);
        const VectorX<S> rhs = assemble_block(alone, system.layout, options, all, none).rhs;
        const Solution<S> solution = unpack_solution(alone, system.layout, VectorX<S>(lu.solve(rhs)));
        m.col(k) = induced_dipole_moment(alone.surfaces.front().mesh, solution.surfaces.front(), alone.water_conductivity);
    }
    return m;
}

template Matrix3<double> ellipsoid_polarization(const Eigen::Vector3d&, const Eigen::Matrix3d&, double, double);
template Matrix3<Complex> ellipsoid_polarization(const Eigen::Vector3d&, const Eigen::Matrix3d&, Complex, Complex);
template Matrix3<double> computed_polarization(const Scene<double>&, std::size_t, const QuadratureOptions&);
template Matrix3<Complex> computed_polarization(const Scene<Complex>&, std::size_t, const QuadratureOptions&);

}  // namespace murk
