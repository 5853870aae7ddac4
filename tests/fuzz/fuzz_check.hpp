#pragma once
// What the fuzz targets of the file readers share. A target passes an input when
// the reader returns a valid result or throws murk::InputError. Any other
// exception escapes to libFuzzer, which reports it as a crash; a result that
// breaks the reader's promises is reported here, by aborting with a line saying
// which promise.
#include "geometry/input_limits.hpp"
#include "geometry/mesh.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace murk::fuzz {

inline void require(bool ok, const char* promise) {
    if (ok) return;
    std::fprintf(stderr, "fuzz: the reader broke its promise: %s\n", promise);
    std::abort();
}

// What mesh_io.hpp promises of a mesh it returns.
inline void require_valid_mesh_result(const TriangleMesh& m) {
    require(!m.triangles.empty(), "a mesh has triangles");
    require(m.triangles.size() <= kMaxMeshTriangles, "at most kMaxMeshTriangles triangles");
    require(m.region.size() == m.triangles.size(), "one region tag per triangle");
    for (const Triangle& t : m.triangles)
        for (const int v : t) require(v >= 0 && static_cast<std::size_t>(v) < m.vertices.size(), "corners index vertices");
    for (const Vec3& v : m.vertices)
        require(std::isfinite(v.x()) && std::isfinite(v.y()) && std::isfinite(v.z()) &&
                    v.cwiseAbs().maxCoeff() <= kMaxMeshCoordinate_m,
                "coordinates are finite and within kMaxMeshCoordinate_m");
    for (const int r : m.region) require(r >= 0 && r <= 100000, "region tags lie in 0..100000");
    require(m.name.find('\n') == std::string::npos, "the mesh name is one line");
}

}  // namespace murk::fuzz
