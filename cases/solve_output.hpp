#pragma once
// What `murk solve` writes: the meshes, the baseline (sensing body alone), the
// perturbed solution (with the objects) and their difference on the surfaces
// and electrodes they share. Layout (all SI, units on every dataset):
//   /mesh/<surface>/{vertices, triangles, region, area, centroid, normal}
//   /baseline/<surface>/{outer_potential, inner_potential, current_density, transdermal_voltage}
//   /perturbed/<surface>/...          every surface, objects included
//   /difference/<surface>/...         perturbed - baseline, surfaces present in both
//   /{baseline,perturbed,difference}/electrodes/{potential, current}  (names as an attribute)
// inner_potential only for two-sided surfaces; transdermal_voltage (inner - outer)
// only for membranes (the skin).
#include "cases/hdf5_file.hpp"
#include "solver/scene.hpp"

namespace murk {

template <class S>
struct SolvedCase {
    Scene<S> baseline, perturbed;
    Solution<S> baseline_solution, perturbed_solution;
};

// HDF5 group name of a surface: its mesh name with '/' replaced.
std::string surface_group_name(const std::string& mesh_name);

template <class S>
void write_solve_result(H5Group root, const SolvedCase<S>& solved);

// The pieces, for other writers (murk run): a mesh group, and one surface's panel values.
void write_mesh(H5Group&& group, const TriangleMesh& mesh);
template <class S>
void write_surface_values(H5Group&& group, const Surface<S>& surface, const SurfaceSolution<S>& values);

}  // namespace murk
