#pragma once
// What the mesh file readers (stl_reader.cpp, msh_reader.cpp) share: numbers read
// from words with the place of a bad one, the length scale, and the mesh's name.
#include "geometry/mesh.hpp"

#include <string>
#include <string_view>

namespace murk {

// "<file>:<line>" for messages, the file name made printable.
std::string file_line(const std::string& path, std::size_t line);

// A finite decimal number (strtod syntax, so "1e-3" and "+2" too). A value too
// small to represent reads as 0 or a subnormal; one too large is refused. Throws
// InputError "<where>: expected a finite number, found '<word>'".
double parse_finite(std::string_view word, const std::string& where);

// A decimal integer within the range of long long. Throws InputError at `where`.
long long parse_integer(std::string_view word, const std::string& where);

// Throws InputError unless `scale` is a positive finite number.
void check_scale(const std::string& path, double scale);

// Multiplies every vertex by `scale`; throws InputError when a coordinate then
// exceeds kMaxMeshCoordinate_m (input_limits.hpp).
void apply_scale(TriangleMesh& mesh, double scale, const std::string& path);

// The file's name without folder and extension: the mesh's name.
std::string mesh_name_of(const std::string& path);

// ASCII lower case.
std::string lower_case(std::string_view text);

}  // namespace murk
