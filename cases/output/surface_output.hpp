#pragma once
// One surface in a result file: its mesh (/mesh/<surface>) and its panel values
// (/baseline/<surface>, /perturbed/<surface>, ...). Both murk solve and murk run
// write surfaces through these.
#include "cases/output/hdf5_file.hpp"
#include "solver/scene.hpp"

#include <string>

namespace murk {

// HDF5 group name of a surface: its mesh name with '/' replaced.
std::string surface_group_name(const std::string& mesh_name);

// The mesh group: vertices, triangles, region tags, centroids, normals, areas.
void write_mesh(H5Group&& group, const TriangleMesh& mesh);

// One surface's panel values: water-side and inner potential, normal current
// density, and the transdermal voltage of a membrane.
template <class S>
void write_surface_values(H5Group&& group, const Surface<S>& surface, const SurfaceSolution<S>& values);

}  // namespace murk
