#pragma once
// Closed triangle surfaces of simple solids, generated to a target panel edge length.
//
// Every generator returns a closed, 2-manifold mesh, oriented outward (see mesh.hpp),
// centred at the origin, every panel tagged 0. Bad arguments (non-positive or
// non-finite sizes, a target edge so small that the mesh would exceed kMaxPanels)
// throw InputError.
//
// Refinement zones: every generator except make_icosphere takes optional zones
// (zone_refinement.hpp, in the shape's own frame) inside which the panels are
// made smaller, new vertices lying on the true surface; the volume rule below is
// applied to the refined mesh, and the zones' sizes hold after it.
//
// Volume rule: a faceted mesh whose vertices lie on a curved surface encloses less
// than the true solid (an icosphere of 1280 panels about 0.9 % less). Because the
// solver's answers depend on the enclosed volume to first order (dipole strength of a
// small object), every curved generator rescales its vertices so that the mesh
// volume equals the true volume to rounding. Each generator states how it scales.
#include "geometry/mesh.hpp"
#include "geometry/zone_refinement.hpp"

#include <array>
#include <string>
#include <vector>

namespace murk {

// A number for the generators' messages ("%.6g"), and the check every generator
// makes of its sizes: InputError "<what> must be a positive length, got <v>" unless
// v is finite and positive.
std::string shape_number(double v);
void require_positive_length(double v, const std::string& what);

// Largest mesh any generator will build; beyond it the caller surely mistyped a unit.
constexpr std::size_t kMaxGeneratedPanels = 2000000;

// Grid generators (capsule, body, box, electrode_hulls.hpp) space their lines at
// this fraction of the target edge: a cell of sides s, s split along its diagonal
// has edges averaging (2 + sqrt 2) / 3 s ~= 1.14 s, so the mean edge stays below
// the target.
constexpr double kGridSpacingFactor = 0.85;

// Sphere of `radius` (m) as a refined icosahedron: the lowest subdivision level whose
// mean edge length is <= target_edge (m). Volume kept: vertices scaled uniformly by
// (V_true / V_mesh)^(1/3), so they sit slightly outside the true sphere.
TriangleMesh make_sphere(double radius, double target_edge, const std::vector<RefinementZone>& zones = {});

// Sphere as an icosahedron subdivided `subdivisions` times (0 -> 20 panels, each level
// x4: 3 -> 1280 panels), 0 <= subdivisions <= 8. Same volume rule as make_sphere.
TriangleMesh make_icosphere(double radius, int subdivisions);

// Ellipsoid with semi-axes (a, b, c) along x, y, z (m): the unit icosphere mapped by
// diag(a, b, c), subdivision level chosen as for a sphere of radius max(a, b, c).
// Volume kept (4/3 pi a b c) by a uniform scale (V_true / V_mesh)^(1/3).
TriangleMesh make_ellipsoid(const Vec3& semi_axes, double target_edge, const std::vector<RefinementZone>& zones = {});

// Capsule (cylinder with hemispherical ends) along x: total length
// cylinder_length + 2 radius (m); cylinder_length >= 0 (0 gives a sphere).
// Latitude/longitude grid. Volume kept (pi r^2 L + 4/3 pi r^3) by scaling the
// cross-section (y, z) by sqrt(V_true / V_mesh): the axial length stays exact and the
// polygonal cross-sections get the area of the true circles on average.
TriangleMesh make_capsule(double radius, double cylinder_length, double target_edge,
                          const std::vector<RefinementZone>& zones = {});

// Rectangular box with full edge lengths `size` (m) along x, y, z; every face a
// structured grid of cells no longer than about target_edge, each cell split in two
// triangles. Flat faces: the volume is exact without correction.
TriangleMesh make_box(const Vec3& size, double target_edge, const std::vector<RefinementZone>& zones = {});

// Box whose faces are the grid of the given lines (coordinates in m, at least two
// per axis, strictly increasing; the first and last are the faces), each cell
// split in two triangles. make_box uses evenly spaced lines; a hull carrying ring
// electrodes puts lines on the electrode edges (electrode_hulls.hpp). InputError
// for bad lines.
TriangleMesh make_box_on_lines(const std::array<std::vector<double>, 3>& lines);

// Elongated body with elliptic cross-sections, e.g. a fish. Stations along x
// (strictly increasing, m), with the semi-axes of the cross-section along y
// (half_width) and z (half_height). The first and last stations are the tips and must
// have zero radii; interior stations must have positive radii; at least 3 stations.
struct BodyProfile {
    std::vector<double> x;
    std::vector<double> half_width;
    std::vector<double> half_height;
};

// Surface of the body: the profile interpolated linearly between stations (each
// segment resampled to about target_edge, original stations kept), rings of the same
// number of vertices around every station, each tip closed by one vertex. Volume kept:
// cross-sections (y, z) scaled by sqrt(V_true / V_mesh), where V_true is the exact
// volume of the piecewise-linear elliptic body (body_profile_volume). Invalid profiles
// throw InputError naming the offending station.
TriangleMesh make_body(const BodyProfile& profile, double target_edge, const std::vector<RefinementZone>& zones = {});

// Closed surface through elliptic rings, the way make_capsule and make_body mesh:
// station i at x[i] (strictly increasing) with semi-axes a[i] along y and b[i]
// along z; the first and last stations are tips (one vertex each, a and b
// ignored), every other a ring of n_theta >= 3 vertices at the angles 2 pi j /
// n_theta, quads between rings split in two. Closed, 2-manifold, outward; tags 0.
// No volume rule: the vertices are where the caller put them.
TriangleMesh make_loft(const std::vector<double>& x, const std::vector<double>& a, const std::vector<double>& b,
                       int n_theta);

// Exact volume (m^3) of the solid described by `profile`: the integral of
// pi a(x) b(x) dx with a, b linear on each segment, i.e. per segment
// pi h / 6 (2 a0 b0 + a0 b1 + a1 b0 + 2 a1 b1). Validates like make_body.
double body_profile_volume(const BodyProfile& profile);

// Enclosed volume (m^3) of a closed, consistently oriented mesh by the divergence
// theorem; positive when oriented outward. Computed about the centre of the bounding
// box to limit cancellation.
double mesh_volume(const TriangleMesh& mesh);

// Total panel area (m^2).
double mesh_area(const TriangleMesh& mesh);

}  // namespace murk
