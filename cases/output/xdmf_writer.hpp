#pragma once
// The XDMF 3 sidecar of a result file (cases/RESULT_LAYOUT.md): a small XML text beside OUT.h5 that
// tells ParaView and other XDMF readers which HDF5 datasets hold the triangle meshes and
// the values per panel, so that surface results open without conversion. The sidecar holds
// no numbers itself: it points into the HDF5 file, which must stay beside it.
//
//   write_xdmf_sidecar("out/run.xdmf", "run.h5",
//                      {{"/mesh/fish", n_vertices, n_triangles,
//                        {{"baseline transdermal voltage (V)", "/baseline/fish/transdermal_voltage"}}}});
//
// Types the sidecar declares, as murk writes them (cases/output/surface_output.cpp):
// vertices are (n, 3) 64-bit reals, triangles (t, 3) 32-bit integers, attributes (t) 64-bit
// reals. Complex values cannot be described as one scalar: surface_output's sidecar_fields
// writes their magnitudes and names those.
#include <cstddef>
#include <functional>
#include <string>
#include <vector>

namespace murk {

// One value per panel (XDMF Center="Cell"), read from a real dataset of shape (t).
struct XdmfAttribute {
    std::string name;     // what readers show, e.g. "transdermal voltage (V)"
    std::string dataset;  // absolute path inside the HDF5 file
};

struct XdmfSurface {
    std::string mesh_group;  // e.g. "/mesh/fish", holding `vertices` and `triangles`
    std::size_t vertex_count = 0;
    std::size_t triangle_count = 0;
    std::vector<XdmfAttribute> cell_attributes;
};

// XDMF refers to a dataset as "FILE:PATH", and readers split that at the first ':', so an
// HDF5 file whose name holds a ':' cannot be referred to. Throws InputError naming the file;
// a run can call this before it starts rather than fail at the end.
void check_xdmf_file_name(const std::string& h5_file_name);

// The sidecar's text. One surface becomes one grid (which every XDMF reader opens, meshio
// included); several become a spatial collection of grids (ParaView shows a multiblock).
// `h5_file_name` is written as given: readers resolve it against the sidecar's folder.
std::string xdmf_text(const std::string& h5_file_name, const std::vector<XdmfSurface>& surfaces);

// Writes xdmf_text() to `xdmf_path` atomically: to "<xdmf_path>.partial", then renamed,
// so that a reader never sees half a sidecar. A folder that is missing or not writable is
// an InputError naming the path.
void write_xdmf_sidecar(const std::string& xdmf_path, const std::string& h5_file_name_relative,
                        const std::vector<XdmfSurface>& surfaces);

// "dir/OUT.h5" -> "dir/OUT.xdmf": where the sidecar of a result file goes.
std::string xdmf_sidecar_path(const std::string& h5_path);

class H5Output;
// The sidecar of `surfaces` (none when empty), then output.commit(once_named):
// a stop between the two leaves no result without its sidecar, and a commit
// that fails takes the sidecar back, so a failed write leaves nothing.
void commit_with_sidecar(H5Output& output, const std::vector<XdmfSurface>& surfaces,
                         const std::function<void()>& once_named = {});

}  // namespace murk
