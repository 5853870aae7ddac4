#pragma once
// Reading and writing panel meshes: STL (ASCII and binary), Gmsh MSH 2.2 and 4.1
// (ASCII), legacy VTK (ASCII POLYDATA, for ParaView). Lengths in files are converted
// to metres by `scale` (e.g. 1e-3 for a file in millimetres). Every problem throws
// InputError "<file>:<line>: <what was found, what was expected>" (binary STL: the
// byte instead of the line). Files come from strangers: every count in them is
// checked against the caps and the bytes left (input_limits.hpp) before it is used. Readers do not judge the mesh: call
// require_valid_mesh (mesh_quality.hpp) afterwards. Meshes are named after the file
// (its name without folder and extension).
#include "geometry/mesh.hpp"

#include <string>
#include <utility>
#include <vector>

namespace murk {

// STL, ASCII or binary. Binary when the file is not plain text starting with "solid"
// and its size is 84 + 50 N for the N of its header; ASCII when it is text starting
// with "solid" (some binary files also start with "solid"; their bytes are not text).
// Facet normals in the file are ignored: orientation comes from the vertex order.
// Coincident corners are merged (weld_vertices with default_weld_tolerance).
// All panels get region 0.
TriangleMesh read_stl(const std::string& path, double scale = 1.0);

// Gmsh MSH, ASCII, version 2.x or 4.1. Triangles (element type 2) become panels;
// other elements are ignored; only nodes used by triangles are kept. A triangle's
// region tag is its physical surface tag (MSH 2: the first element tag; MSH 4.1: the
// first physical tag of its surface entity in $Entities), 0 when it has none; 2-D
// $PhysicalNames fill region_names. Tags must lie in 0..100000. MSH 2 repeats an
// element once per physical group; such repeats (same nodes, same elementary
// entity) are kept once, with the first physical tag.
TriangleMesh read_msh(const std::string& path, double scale = 1.0);

// The same two readers on a file's content already in memory (tests, fuzzing);
// `name` stands for the file in messages and names the mesh.
TriangleMesh read_stl_bytes(const std::string& bytes, const std::string& name, double scale = 1.0);
TriangleMesh read_msh_text(const std::string& text, const std::string& name, double scale = 1.0);

// By extension: .stl or .msh (any letter case); anything else is an InputError.
TriangleMesh read_mesh(const std::string& path, double scale = 1.0);

// Binary STL (compact, and exact to the 32-bit floats STL can hold, ~7 significant
// digits): 80-byte header "murk: <mesh name>", facet normals from the vertex order.
// Region tags are not stored (STL has no place for them).
void write_stl(const std::string& path, const TriangleMesh& mesh);

// Legacy VTK, ASCII POLYDATA, coordinates with 17 significant digits. Cell data: the
// integer "region" tags and every given (name, one value per panel) array; names have
// white space replaced by '_'. An array of the wrong length is an InputError.
using CellArrays = std::vector<std::pair<std::string, std::vector<double>>>;
void write_vtk(const std::string& path, const TriangleMesh& mesh, const CellArrays& cell_arrays = {});

}  // namespace murk
