#pragma once
// Distances between separate surfaces and the check that bodies in a scene keep apart.
#include "geometry/mesh.hpp"
#include "geometry/spatial_index.hpp"

#include <string>
#include <vector>

namespace murk {

// A surface prepared for many distance and containment queries: its panels in an
// R-tree, built once. A sweep checks every placement of a moving object against
// the surfaces that stay through one of these, instead of rebuilding them.
class SurfaceIndex {
public:
    explicit SurfaceIndex(TriangleMesh mesh);

    const TriangleMesh& mesh() const { return mesh_; }
    const BgBox& box() const { return box_; }

    // Exact (to rounding) least distance (m) between this surface's panels and
    // `other`'s: 0 when any two panels intersect or touch; +infinity when either is
    // empty. Branch and bound from each panel of `other` into the tree, cut off at
    // the best distance so far, which starts from the nearest vertex pair.
    double distance_to(const TriangleMesh& other) const;
    // True when some panel of `other` comes closer than `gap` (m) to this surface
    // (touching and intersecting included). Only panels whose boxes come that
    // close are measured, so a far surface costs one box test.
    bool closer_than(const TriangleMesh& other, double gap) const;
    // Least distance (m) from x to the surface (+infinity for an empty surface).
    double distance_to(const Vec3& x) const;
    // True when x lies inside the closed surface (contains_point, skipped for
    // points outside the bounding box).
    bool contains(const Vec3& x) const;

private:
    TriangleMesh mesh_;
    PanelTree tree_;
    BgBox box_;
};

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
