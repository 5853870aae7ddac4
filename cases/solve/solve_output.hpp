#pragma once
// What `murk solve` writes: the meshes, the baseline (sensing body alone), the
// perturbed solution (with the objects) and their difference on the surfaces
// and electrodes they share. Layout (all SI, units on every dataset):
//   /mesh/<surface>/{vertices, triangles, region, area, centroid, normal}
//   /baseline/<surface>/{outer_potential, inner_potential, current_density, transdermal_voltage}
//   /perturbed/<surface>/...          every surface, objects included
//   /difference/<surface>/...         perturbed - baseline, surfaces present in both
//   /{baseline,perturbed,difference}/electrodes/{potential, current}  (names as an attribute)
//   /{baseline,perturbed}/electrodes/{area, exact_area}  panel area, true area (NaN: unknown)
// inner_potential only for two-sided surfaces; transdermal_voltage (inner - outer)
// only for membranes (the skin).
#include "cases/output/hdf5_file.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/scene.hpp"

namespace murk {

template <class S>
struct SolvedCase {
    Scene<S> baseline, perturbed;
    Solution<S> baseline_solution, perturbed_solution;
    // Per electrode of `perturbed` (the baseline's are its first ones): panel area
    // and true area (electrode_areas in cases/scene/scene_builder.hpp).
    std::vector<ElectrodeArea> electrode_areas;
};

template <class S>
void write_solve_result(H5Group root, const SolvedCase<S>& solved);

}  // namespace murk
