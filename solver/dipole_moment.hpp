#pragma once
// Induced dipole moment of an object from its panel values.
//
// Outside every source, the perturbation a closed surface adds to the water
// potential is, far away, that of a dipole p with potential p.r / (4 pi r^3).
// From Green's representation of the perturbation and the far-field expansion of
// G, with u the water-side potential and j the outward current density:
//   p = integral over S of ( u n + y j / sigma_water ) dS
// (the incident field's own contribution integrates to zero for any field that is
// linear inside S, by the divergence theorem). Units: V m^2 (potential times area).
#include "geometry/internal_check.hpp"
#include "geometry/mesh.hpp"
#include "solver/scene.hpp"

namespace murk {

template <class S>
Eigen::Matrix<S, 3, 1> induced_dipole_moment(const TriangleMesh& mesh, const SurfaceSolution<S>& values,
                                             S water_conductivity) {
    const auto panels = static_cast<Eigen::Index>(mesh.size());
    MURK_CHECK(values.outer_potential.size() == panels && values.current_density.size() == panels,
               "the panel values belong to this mesh");
    Eigen::Matrix<S, 3, 1> p = Eigen::Matrix<S, 3, 1>::Zero();
    for (std::size_t t = 0; t < mesh.size(); ++t) {
        const Eigen::Index k = static_cast<Eigen::Index>(t);
        p += mesh.area(t) * (values.outer_potential(k) * mesh.normal(t).cast<S>() +
                             mesh.centroid(t).cast<S>() * (values.current_density(k) / water_conductivity));
    }
    return p;
}

}  // namespace murk
