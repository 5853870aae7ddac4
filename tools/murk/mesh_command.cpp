// `murk mesh FILE|CASE`: panel counts, sizes and quality of a mesh file, or of
// every surface a case builds; optional conversion of a mesh file to STL or VTK.
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_quality.hpp"
#include "cases/input/units.hpp"
#include "tools/murk/commands.hpp"
#include "cases/input/case_reader.hpp"
#include "cases/scene/scene_builder.hpp"

#include <cstdio>

namespace murk::cli {

namespace {

bool ends_with(const std::string& s, const std::string& tail) {
    return s.size() >= tail.size() && s.compare(s.size() - tail.size(), tail.size(), tail) == 0;
}

// Prints the report; returns true when the mesh has no problems.
bool report(const TriangleMesh& mesh) {
    const MeshReport r = inspect_mesh(mesh);
    std::printf("== %s\n%s\n", mesh.name.c_str(), format_report(r).c_str());
    return r.problems.empty();
}

}  // namespace

int mesh_command(const MeshArgs& args) {
    if (ends_with(args.input, ".toml")) {
        if (!args.convert_to.empty())
            throw InputError(args.input + ": --convert takes a mesh file, not a case file");
        bool all_good = true;
        // Complex arithmetic accepts every case; only the meshes are used.
        const Scene<Complex> scene = build_scene<Complex>(read_case_file(args.input), true);
        for (const auto& surface : scene.surfaces) all_good = report(surface.mesh) && all_good;
        return all_good ? 0 : 2;
    }
    // A length with its unit, as every quantity murk reads (case files say the same with file_unit).
    const double unit_m = args.file_unit.empty() ? 1.0 : parse_quantity(args.file_unit, Dimension::length, "--file-unit");
    if (!(unit_m > 0)) throw InputError("--file-unit: must be a positive length, got " + args.file_unit);
    TriangleMesh mesh = read_mesh(args.input, unit_m);
    const bool good = report(mesh);
    if (!args.convert_to.empty()) {
        if (ends_with(args.convert_to, ".stl")) write_stl(args.convert_to, mesh);
        else if (ends_with(args.convert_to, ".vtk")) write_vtk(args.convert_to, mesh);
        else throw InputError(args.convert_to + ": --convert writes .stl or .vtk files");
        std::printf("wrote %s\n", args.convert_to.c_str());
    }
    return good ? 0 : 2;
}

}  // namespace murk::cli
