#include "solver/incident_field.hpp"

#include <cmath>

namespace murk {

template <class S>
IncidentField<S>::IncidentField(const Scene<S>& scene, std::vector<std::size_t> water_sources)
    : field_(scene.uniform_field) {
    for (std::size_t i : water_sources) {
        const auto& src = scene.sources[i];
        const S strength = src.current / (S(4.0 * M_PI) * scene.water_conductivity);
        poles_.push_back({src.position, strength});
        // Image sources: |T x - y| = |x - T^-1 y|; the series' constant shifts the potential.
        for (const FieldImage<S>& t : scene.images.terms) poles_.push_back({t.source_of(src.position), strength * t.weight});
        pole_constant_ += strength * scene.images.constant;
    }
    for (const PointDipole<S>& d : scene.dipoles) {
        const Eigen::Matrix<S, 3, 1> m = d.moment / S(4.0 * M_PI);
        dipoles_.push_back({d.position, m});
        // Image dipoles: m . (T x - c) = (L^T m) . (x - T^-1 c) for T x = L x + shift
        // (a reflection reverses the normal part of the moment).
        for (const FieldImage<S>& t : scene.images.terms) {
            const Eigen::Matrix<S, 3, 3> lt = t.linear.transpose().template cast<S>();
            dipoles_.push_back({t.source_of(d.position), Eigen::Matrix<S, 3, 1>(lt * m * t.weight)});
        }
    }
}

template <class S>
S IncidentField<S>::potential(const Vec3& x) const {
    S phi = -x.cast<S>().dot(field_) - pole_constant_;  // (Eigen conjugates the left operand)
    for (const Pole& p : poles_) phi += p.strength / (x - p.position).norm();
    for (const Dipole& d : dipoles_) {
        const Vec3 r = x - d.position;
        const double len = r.norm();
        phi += r.cast<S>().dot(d.moment) / (len * len * len);
    }
    return phi;
}

template <class S>
S IncidentField<S>::normal_derivative(const Vec3& x, const Vec3& n) const {
    S d = -n.cast<S>().dot(field_);
    for (const Pole& p : poles_) {
        const Vec3 r = x - p.position;
        const double len = r.norm();
        d -= p.strength * (r.dot(n) / (len * len * len));
    }
    // grad (p.r / r^3) = p / r^3 - 3 (p.r) r / r^5
    for (const Dipole& q : dipoles_) {
        const Vec3 r = x - q.position;
        const double len2 = r.squaredNorm(), len = std::sqrt(len2);
        const S pr = r.cast<S>().dot(q.moment), pn = n.cast<S>().dot(q.moment);
        d += (pn - 3.0 * pr * (r.dot(n) / len2)) / (len2 * len);
    }
    return d;
}

template <class S>
Eigen::Matrix<S, 3, 3> IncidentField<S>::hessian(const Vec3& x) const {
    Eigen::Matrix<S, 3, 3> h = Eigen::Matrix<S, 3, 3>::Zero();
    // d_i d_j (1/r) = (3 r_i r_j - r^2 delta_ij) / r^5
    for (const Pole& p : poles_) {
        const Vec3 r = x - p.position;
        const double len2 = r.squaredNorm(), len = std::sqrt(len2);
        const Eigen::Matrix3d k = (3.0 * r * r.transpose() - len2 * Eigen::Matrix3d::Identity()) / (len2 * len2 * len);
        h += p.strength * k.cast<S>();
    }
    // d_i d_j (m.r / r^3) = -3 (m_i r_j + m_j r_i + (m.r) delta_ij) / r^5 + 15 (m.r) r_i r_j / r^7
    for (const Dipole& q : dipoles_) {
        const Vec3 r = x - q.position;
        const double len2 = r.squaredNorm(), len5 = len2 * len2 * std::sqrt(len2);
        const Eigen::Matrix<S, 3, 1> rs = r.cast<S>();
        const S mr = rs.dot(q.moment);
        const Eigen::Matrix<S, 3, 3> mrt = q.moment * rs.transpose();
        h += (S(-3.0) * (mrt + mrt.transpose() + mr * Eigen::Matrix<S, 3, 3>::Identity()) +
              S(15.0) * mr * (rs * rs.transpose()) / S(len2)) /
             S(len5);
    }
    return h;
}

template class IncidentField<double>;
template class IncidentField<Complex>;

}  // namespace murk
