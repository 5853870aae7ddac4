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
        if (scene.plane) {  // image source: the same current mirrored across the plane
            const Vec3 n = scene.plane->normal;
            const Vec3 image = src.position - 2.0 * (src.position - scene.plane->point).dot(n) * n;
            poles_.push_back({image, strength});
        }
    }
}

template <class S>
S IncidentField<S>::potential(const Vec3& x) const {
    S phi = -x.cast<S>().dot(field_);  // (Eigen conjugates the left operand)
    for (const Pole& p : poles_) phi += p.strength / (x - p.position).norm();
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
    return d;
}

template class IncidentField<double>;
template class IncidentField<Complex>;

}  // namespace murk
