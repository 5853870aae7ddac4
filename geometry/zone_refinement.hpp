#pragma once
// Local refinement of a generated surface: smaller panels inside chosen balls
// (refinement zones), grading back to the surface's own panels outside them.
//
// Why: an electric image a few millimetres wide needs panels a fraction of that
// size where it falls, but panels that small over the whole body would make the
// dense system far too large. A zone refines only where the image is.
//
// How: longest-edge bisection (each refined panel is cut through the midpoint of
// its longest edge, and every panel sharing a cut edge is cut too, so the mesh
// stays conforming); the new vertex is moved onto the true surface by the
// generator's projection. Bisecting the longest edge never makes panels much
// worse than those it starts from, and a closed, 2-manifold, outward mesh stays
// so. The generators in shapes.hpp call this before they keep the true volume.
#include "geometry/mesh.hpp"

#include <functional>
#include <string>
#include <vector>

namespace murk {

// A ball of `radius` (m) around `centre` (m, in the frame of the mesh being
// refined): every panel edge that comes within the ball is at most `panel_size`
// (m) long.
struct RefinementZone {
    Vec3 centre = Vec3::Zero();
    double radius = 0.0;
    double panel_size = 0.0;
};

// How fast the panel size may grow with the distance outside a zone: a panel
// whose nearest point is d beyond the zone's radius is refined until its edges
// are at most panel_size + kZoneGrading * d. 0.5 keeps neighbouring panels
// within a factor of about two of each other, so the surface values vary
// smoothly from the fine panels to the coarse ones.
constexpr double kZoneGrading = 0.5;

// Maps a point near the surface (an edge's midpoint) onto the true surface.
using SurfaceProjection = std::function<Vec3(const Vec3&)>;

// Refines `mesh` in place until every panel within a zone has edges no longer
// than the zone's panel_size and the panels outside follow kZoneGrading. New
// panels inherit their parent's region tag. Throws InputError when the result
// would exceed kMaxGeneratedPanels (shapes.hpp) or a size is not positive.
void refine_in_zones(TriangleMesh& mesh, const std::vector<RefinementZone>& zones, const SurfaceProjection& project);

// Largest edge length (m) a panel with corners a, b, c may have.
using AllowedEdge = std::function<double(const Vec3& a, const Vec3& b, const Vec3& c)>;

// The same bisection with any size rule (refine_in_zones passes the zones'; the
// electrode cut, electrode_cut.hpp, a size graded from the electrode edges).
// When the mesh would exceed kMaxGeneratedPanels: InputError "<what>: the mesh
// would need more than N panels; <hint>".
void refine_to_allowed(TriangleMesh& mesh, const AllowedEdge& allowed, const SurfaceProjection& project,
                       const std::string& what, const std::string& hint);

// Largest ratio of edge length to the zone's panel_size over the edges that
// come within a zone's ball (0 when none does): at most 1 when the zones are met.
double zone_edge_excess(const TriangleMesh& mesh, const std::vector<RefinementZone>& zones);

// Least distance (m) from `point` to the surface of `mesh`.
double distance_to_surface(const TriangleMesh& mesh, const Vec3& point);

}  // namespace murk
