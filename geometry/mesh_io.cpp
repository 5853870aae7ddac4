#include "geometry/mesh_io.hpp"

#include "geometry/input_error.hpp"
#include "geometry/mesh_reading.hpp"
#include "geometry/message_text.hpp"

#include <algorithm>
#include <cerrno>
#include <cstdint>
#include <cstring>
#include <fstream>
#include <iomanip>
#include <limits>

// read_stl is in stl_reader.cpp, read_msh in msh_reader.cpp.
namespace murk {
namespace {

void write_or_fail(std::ofstream& out, const std::string& path) {
    out.close();
    if (!out) throw InputError(printable(path) + ": error while writing the file");
}

}  // namespace

TriangleMesh read_mesh(const std::string& path, double scale) {
    const std::size_t dot = path.find_last_of('.');
    const std::string ext = dot == std::string::npos ? "" : lower_case(path.substr(dot));
    if (ext == ".stl") return read_stl(path, scale);
    if (ext == ".msh") return read_msh(path, scale);
    throw InputError(printable(path) + ": unknown mesh format " + in_quotes(ext) + "; expected .stl or .msh");
}

void write_stl(const std::string& path, const TriangleMesh& mesh) {
    std::ofstream out(path, std::ios::binary);
    if (!out) throw InputError(printable(path) + ": cannot open file for writing (" + std::strerror(errno) + ")");
    char header[80];
    std::memset(header, ' ', sizeof header);
    const std::string title = "murk: " + mesh.name;
    std::memcpy(header, title.data(), std::min(title.size(), sizeof header));
    out.write(header, sizeof header);
    const auto n = static_cast<std::uint32_t>(mesh.size());
    out.write(reinterpret_cast<const char*>(&n), 4);
    for (std::size_t t = 0; t < mesh.size(); ++t) {
        float rec[12];
        const Vec3 a2 = mesh.area_vector2(t);
        const double len = a2.norm();
        for (int d = 0; d < 3; ++d) rec[d] = len > 0.0 ? static_cast<float>(a2[d] / len) : 0.0f;
        for (int k = 0; k < 3; ++k)
            for (int d = 0; d < 3; ++d) rec[3 + 3 * k + d] = static_cast<float>(mesh.corner(t, k)[d]);
        out.write(reinterpret_cast<const char*>(rec), sizeof rec);
        const std::uint16_t attribute = 0;
        out.write(reinterpret_cast<const char*>(&attribute), 2);
    }
    write_or_fail(out, path);
}

void write_vtk(const std::string& path, const TriangleMesh& mesh, const CellArrays& cell_arrays) {
    for (const auto& a : cell_arrays)
        if (a.second.size() != mesh.size())
            throw InputError(printable(path) + ": cell array " + in_quotes(a.first) + " has " + std::to_string(a.second.size()) + " values for " +
                             std::to_string(mesh.size()) + " panels");
    std::ofstream out(path);
    if (!out) throw InputError(printable(path) + ": cannot open file for writing (" + std::strerror(errno) + ")");
    out << std::setprecision(std::numeric_limits<double>::max_digits10);
    out << "# vtk DataFile Version 3.0\n";
    std::string title = "murk mesh " + mesh.name;
    std::replace(title.begin(), title.end(), '\n', ' ');
    out << title.substr(0, 255) << "\nASCII\nDATASET POLYDATA\n";
    out << "POINTS " << mesh.vertices.size() << " double\n";
    for (const Vec3& v : mesh.vertices) out << v.x() << ' ' << v.y() << ' ' << v.z() << '\n';
    out << "POLYGONS " << mesh.size() << ' ' << 4 * mesh.size() << '\n';
    for (const Triangle& t : mesh.triangles) out << "3 " << t[0] << ' ' << t[1] << ' ' << t[2] << '\n';
    out << "CELL_DATA " << mesh.size() << '\n';
    out << "SCALARS region int 1\nLOOKUP_TABLE default\n";
    for (std::size_t t = 0; t < mesh.size(); ++t) out << (t < mesh.region.size() ? mesh.region[t] : 0) << '\n';
    for (std::size_t k = 0; k < cell_arrays.size(); ++k) {
        std::string name = cell_arrays[k].first.empty() ? "array_" + std::to_string(k) : cell_arrays[k].first;
        for (char& c : name)
            if (std::isspace(static_cast<unsigned char>(c))) c = '_';
        out << "SCALARS " << name << " double 1\nLOOKUP_TABLE default\n";
        for (double v : cell_arrays[k].second) out << v << '\n';
    }
    write_or_fail(out, path);
}

}  // namespace murk
