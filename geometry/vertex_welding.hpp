#pragma once
// Merging of coincident vertices, as needed for triangle soups such as STL files,
// where every facet carries its own copies of its corners.
#include "geometry/mesh.hpp"

namespace murk {

// Replaces every vertex by the first earlier vertex within `tolerance` (m, Euclidean;
// 0 merges only identical coordinates), renumbers the panels and drops vertices no
// panel uses. Greedy in vertex order, O(n) expected (hash grid of cell `tolerance`).
// Panels are kept even if they collapse; the quality check reports those.
void weld_vertices(TriangleMesh& mesh, double tolerance);

// The tolerance readers use: 1e-6 of the bounding-box diagonal of the used vertices,
// well above single-precision rounding of STL coordinates (~6e-8 relative) and well
// below any sensible panel size.
double default_weld_tolerance(const TriangleMesh& mesh);

}  // namespace murk
