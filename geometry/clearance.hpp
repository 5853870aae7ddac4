#pragma once
// Distances between separate surfaces and the check that bodies in a scene keep apart.
#include "geometry/mesh.hpp"

#include <string>
#include <vector>

namespace murk {

// Exact (to rounding) least distance (m) between the panel sets of a and b: 0 when any
// two panels intersect or touch. Branch and bound: an R-tree over b's panel boxes is
// searched from each panel of a in order of box distance, cut off at the best
// distance so far, which starts from the nearest vertex pair. Empty meshes: +infinity.
double min_distance(const TriangleMesh& a, const TriangleMesh& b);

// True when some panel of a and some panel of b share a point (exact test).
bool meshes_intersect(const TriangleMesh& a, const TriangleMesh& b);

// True when p lies inside the closed, outward oriented surface: the winding number,
// the sum of the signed solid angles of the panels seen from p (Van Oosterom and
// Strackee 1983, "The solid angle of a plane triangle", IEEE Trans. Biomed. Eng.),
// divided by 4 pi, exceeds 1/2. Points on the surface may go either way.
bool contains_point(const TriangleMesh& mesh, const Vec3& p);

// Every pair of meshes must be at least min_gap (m) apart and neither may lie inside
// the other. Throws InputError naming both surfaces (mesh.name, or "#index" when
// unnamed): "surfaces 'A' and 'B' touch or intersect (clearance 0 m)",
// "surfaces 'A' and 'B' are closer than G m (clearance X m)" or
// "surface 'A' lies inside surface 'B'".
void require_clearance(const std::vector<const TriangleMesh*>& meshes, double min_gap);

}  // namespace murk
