#pragma once
// The incident potential in the water: what the water sources, the point
// dipoles and the imposed uniform field would produce with no surfaces present (including the image
// sources of the planes bounding the water, Scene::images). It is harmonic inside every closed surface,
// which is what lets the representation formula be applied to the scattered
// part alone (see potential_at).
#include "solver/scene.hpp"

#include <vector>

namespace murk {

template <class S>
class IncidentField {
public:
    // water_sources: the indices of the scene's sources that lie in the water.
    IncidentField(const Scene<S>& scene, std::vector<std::size_t> water_sources);

    S potential(const Vec3& x) const;
    // Derivative along the unit vector n at x.
    S normal_derivative(const Vec3& x, const Vec3& n) const;
    // Second derivatives d^2 phi / dx_i dx_j at x (the uniform field adds none);
    // closed form, used for the gradient of the baseline field (target_derivatives.hpp).
    Eigen::Matrix<S, 3, 3> hessian(const Vec3& x) const;

private:
    struct Pole { Vec3 position; S strength; };  // potential strength / |x - position|
    struct Dipole { Vec3 position; Eigen::Matrix<S, 3, 1> moment; };  // moment / (4 pi), V m^2
    Eigen::Matrix<S, 3, 1> field_;
    std::vector<Pole> poles_;
    S pole_constant_{};  // the image series' constant times the water sources' strengths
    std::vector<Dipole> dipoles_;
};

}  // namespace murk
