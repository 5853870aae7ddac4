#pragma once
// Statistics and validity checks of a panel mesh: what the solver needs is a closed,
// 2-manifold, consistently and outward oriented surface without degenerate,
// duplicate or intersecting panels.
#include "geometry/mesh.hpp"

#include <cstddef>
#include <string>
#include <vector>

namespace murk {

// A mesh whose centre lies farther from the origin than this many times its size
// is refused: its coordinates no longer resolve its panels to useful accuracy.
inline constexpr double kMaxDistanceInSizes = 1e6;

struct MeshReport {
    std::string name;
    std::size_t panel_count = 0;
    std::size_t vertex_count = 0;
    std::size_t component_count = 0;  // edge-connected pieces
    double min_edge = 0.0, max_edge = 0.0, mean_edge = 0.0;  // m, over distinct edges
    double min_area = 0.0, max_area = 0.0;                   // m^2, per panel
    // Largest of longest edge / shortest altitude * sqrt(3)/2 over the panels:
    // 1 for an equilateral panel, growing without bound as a panel flattens.
    double worst_aspect = 0.0;
    double volume = 0.0;  // m^3, divergence theorem, positive when oriented outward
    double area = 0.0;    // m^2
    bool closed = false;                 // every edge borders exactly two panels
    bool manifold = false;               // no edge of > 2 panels, no pinched vertex
    bool oriented_consistently = false;  // neighbours traverse their shared edge oppositely
    bool oriented_outward = false;       // consistent and every piece encloses positive volume
    bool self_intersecting = false;      // two panels without a common vertex meet
    // One line per problem, most basic first; empty for a valid mesh.
    std::vector<std::string> problems;
};

// Measures and checks `mesh`. Self-intersection uses an R-tree of panel boxes and an
// exact triangle-triangle test for pairs without a shared vertex index (pairs sharing
// a vertex or an edge are neighbours and skipped); O(n log n) for ordinary meshes.
// Degenerate panels are reported and left out of the intersection test.
MeshReport inspect_mesh(const TriangleMesh& mesh);

// Empty, or why `mesh` moved by `offset` lies too far from the origin for its size
// (more than kMaxDistanceInSizes times the largest side of its box): the check
// inspect_mesh makes, for meshes that are moved after it (sweep points).
std::string too_far_from_origin(const TriangleMesh& mesh, const Vec3& offset = Vec3::Zero());

// Throws InputError "<where>: mesh '<name>' is not usable: <first problem>" unless
// the mesh is valid; `where` names the file or case key the mesh came from.
void require_valid_mesh(const TriangleMesh& mesh, const std::string& where);

// A short multi-line summary for people (murk mesh FILE).
std::string format_report(const MeshReport& report);

}  // namespace murk
