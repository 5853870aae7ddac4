#pragma once
// One surface in a result file: its mesh (/mesh/<surface>) and its panel values
// (/baseline/<surface>, /perturbed/<surface>, ...), each group with the coordinates
// of its dimensions; and the real panel fields the XDMF sidecar shows. Both murk
// solve and murk run write surfaces through these.
#include "cases/output/hdf5_file.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "solver/scene.hpp"

#include <string>
#include <vector>

namespace murk {

// HDF5 group name of a surface: its mesh name with '/' replaced.
std::string surface_group_name(const std::string& mesh_name);

// The mesh group: vertices, triangles, region tags (named by flag_values / flag_meanings
// when the mesh names its regions), centroids, normals, areas.
void write_mesh(const H5Group& group, const TriangleMesh& mesh);

// One surface's panel values: water-side and inner potential, normal current
// density, and the transdermal voltage of a membrane.
template <class S>
void write_surface_values(const H5Group& group, const Surface<S>& surface, const SurfaceSolution<S>& values);

// The sidecar's view of the panel dataset `name` of `group` (one value per panel of the
// surface it will be drawn on, over the coordinate `dimension`; its units are read from the
// dataset). XDMF cell data are real
// numbers, so this writes `<name>_magnitude` beside the dataset and returns the sidecar's
// attributes: for real data the signed values, whose sign tells a conductor's image from an
// insulator's, and the magnitudes; for complex data the magnitudes only, named as such.
// `label` is what ParaView shows, e.g. "electric image dV".
std::vector<XdmfAttribute> sidecar_fields(const H5Group& group, const std::string& name, const std::string& label,
                                          const char* dimension);

}  // namespace murk
