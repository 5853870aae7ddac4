#pragma once
// Hull meshes whose panel edges lie on the edges of ring electrodes, graded finer
// toward those edges, so that a ring is exactly the size it was asked to be.
//
// Why: a ring chosen as the panels whose centroids fall inside its band has the
// area of those panels, not its own (a 1 cm ring on a 7 mm mesh about 17 % too
// much), and that error jumps as the mesh changes. Besides, the current density
// at an electrode's edge is singular like distance^-1/2 (the edge of a conducting
// strip on an insulator, common practice), so panels must be small there and
// only there. With panel edges on the ring edges, the centroid rule of
// regions.hpp (tag_band) selects exactly the ring, and the drive current
// converges monotonically as the panels shrink (tests/test_electrode_hulls.cpp).
//
// Area rule (instead of the volume rule of shapes.hpp): the hull's cross-sections
// are regular polygons; any choice of their radius misses either the true
// perimeter or the true cross-section area. A driven electrode's current depends
// on its area at first order, so on a hull with rings each station's radius is
// chosen so that every band between neighbouring stations has the area of the
// true surface between the same two positions along the axis; every ring, whose
// edges are stations, then has its true area to rounding. The enclosed volume is
// then below the true one by about (pi/n)^2 / 3 for n panels around (1.1 % at 17,
// 0.6 % at 24), which changes the hull's own disturbance of the field by about as
// much: a smaller error than a wrong electrode area, and it falls as the mesh is
// refined like the volume rule's perimeter error would.
#include "geometry/mesh.hpp"

#include <optional>
#include <vector>

namespace murk {

// A ring electrode's interval [from, to] (m) along the hull's x axis.
struct AxialBand {
    double from = 0.0;
    double to = 0.0;
};

// Grading rule. At an electrode edge the panels are kElectrodeEdgeFraction of the
// panel size long across the edge (along it they keep the hull's size: thin
// panels aligned with the edge resolve the singular current at little cost, where
// isotropic refinement around a whole circumference would multiply the dense
// solver's panels); away from the edge each panel is kElectrodeEdgeGrowth times
// longer than the one before until the hull's own spacing is reached. Why these
// values: with a quarter and 1.4 the drive current of two 1 cm rings converges
// monotonically with shrinking steps from 10 mm panels down (the convergence test
// in tests/test_geometry_electrode_hulls.cpp); half and 1.6, or 0.4 and 1.6, did
// not (the step from 7 to 5 mm was larger than the one from 10 to 7 mm, measured
// 2026-12-02). It costs about four stations per electrode edge. [mesh]
// electrode_edge sets the edge size explicitly (the shipped examples use half
// their panel size to stay small).
constexpr double kElectrodeEdgeFraction = 0.25;
constexpr double kElectrodeEdgeGrowth = 1.4;

// Positions from a to b (both included, increasing) that are at most `spacing`
// apart, at most edge_size apart where they meet one of `edges`, the distance
// growing away from the edges by kElectrodeEdgeGrowth per step. a < b.
std::vector<double> graded_positions(double a, double b, const std::vector<double>& edges, double spacing,
                                     double edge_size);

// Capsule along x (as make_capsule: total length cylinder_length + 2 radius,
// centred) with a station (a ring of vertices) at each edge of each ring, graded
// toward them; area rule above. Untagged (tag_band selects each ring exactly).
// edge_size (m): the panel length across an electrode edge, default
// kElectrodeEdgeFraction * target_edge, never above the hull's own spacing.
// cylinder_length 0 gives a sphere. InputError for bad sizes or a ring that is
// empty or reaches beyond the tips.
TriangleMesh make_capsule_with_rings(double radius, double cylinder_length, double target_edge,
                                     const std::vector<AxialBand>& rings, std::optional<double> edge_size = {});

// Box (full edge lengths `size`, centred) whose grid has lines across x at each
// ring edge, graded toward them. Flat faces: areas and volume exact.
TriangleMesh make_box_with_rings(const Vec3& size, double target_edge, const std::vector<AxialBand>& rings,
                                 std::optional<double> edge_size = {});

// Area (m^2) of the true capsule surface between two positions along its axis:
// 2 pi radius times the axial width of the part on the hull, on the cylinder and
// on the hemispheres alike (Archimedes' hat-box theorem).
double capsule_band_area(double radius, double cylinder_length, const AxialBand& band);

// Area (m^2) of the box's surface whose points lie within the band (an end face
// counts when the band reaches it).
double box_band_area(const Vec3& size, const AxialBand& band);

// For verification checks: a capsule hull of `overall_length` (tip to tip) and
// `radius` with two rings, meshed as the scene builder meshes a robot hull with
// rings, the rings tagged as regions "ring 1" and "ring 2".
TriangleMesh make_two_ring_capsule(double radius, double overall_length, double panel_size, const AxialBand& first,
                                   const AxialBand& second, std::optional<double> edge_size = {});

}  // namespace murk
