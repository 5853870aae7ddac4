#pragma once
// A hull mesh cut along its electrodes' boundaries: panel edges on every edge of a
// patch electrode (and of a ring on a hull that electrode_hulls.hpp cannot mesh on
// its stations: an ellipsoid, an imported mesh), panels graded finer toward those
// edges, and, where the true area is known, every electrode exactly that area.
//
// Why: an electrode chosen as the panels whose centroids fall inside it has the
// area of those panels, not its own (10-20 % off on the examples' meshes), and
// that error jumps as the mesh changes; and the current density at an electrode's
// edge is singular like distance^-1/2 (common practice), so the panels must be
// small there and only there (see electrode_hulls.hpp, which does this for rings
// on capsules, spheres and boxes by placing its stations).
//
// How (a level-set cut). An electrode is the part of the hull where a few smooth
// functions, its sides, are all <= 0: a patch is within `radius` of its centre
// (|x - c| - r, the rule of regions.hpp's tag_disc), a ring between two planes
// across the axis. Then:
//  1. refine: longest-edge bisection (zone_refinement.hpp, new vertices on the
//     surface by the caller's projection) until a panel a side's zero level
//     crosses is at most edge_size long, the allowed length growing by
//     kElectrodeEdgeGrowth - 1 per metre of distance from it (electrode_hulls.hpp);
//  2. snap: a vertex that an edge crossing the zero level would cut within
//     kCutSnapFraction of its length is moved onto the zero level (along the
//     surface), so that no sliver panel is made;
//  3. split: each panel the zero level crosses is split into two or three, with
//     new vertices at the level's root on its edges, on the surface;
//  4. tag: a panel is in an electrode when all its corners are (so the flat
//     panel lies in it: the sides are convex functions);
//  5. area rule: flat panels on a curved hull, and chords along a curved edge,
//     fall short of the true area; an electrode with a known true area gets its
//     boundary vertices moved outward along the surface, all by the same
//     distance (a small fraction of edge_size), until its panels have that area.
// Closed, 2-manifold and outward meshes stay so (splits keep the corners' order).
#include "geometry/mesh.hpp"
#include "geometry/zone_refinement.hpp"

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace murk {

// Fraction of an edge within which a crossing snaps the nearer corner onto the
// zero level instead of cutting the edge (a cut there would leave a sliver).
// Measured on the hulls of tests/test_geometry_electrode_cut.cpp (2026-12-03):
// the smallest angle is 11 degrees on a sphere, 8.6 on a spheroid, 17-19 on a box
// and a capsule with 0.3; 7-14 with 0.2; with 0.35 a box face fell to 1 degree
// (snaps that far distort the panels beside them).
constexpr double kCutSnapFraction = 0.3;

// One smooth boundary function of an electrode, negative inside; 1-Lipschitz, so
// that |level| is at most the distance to the zero level.
struct ElectrodeSide {
    bool ball = false;            // ball: |x - point| - radius; else plane: (x - point) . normal
    Vec3 point = Vec3::Zero();
    Vec3 normal = Vec3::UnitX();  // plane: unit, out of the electrode
    double radius = 0.0;
    double level(const Vec3& x) const { return ball ? (x - point).norm() - radius : (x - point).dot(normal); }
    Vec3 gradient(const Vec3& x) const;
};

ElectrodeSide ball_side(const Vec3& centre, double radius);
ElectrodeSide plane_side(const Vec3& point, const Vec3& outward);

struct CutElectrode {
    std::string where;                     // starts every message about it ("file:line: robot.electrode[3]")
    std::string name;                      // names it in messages ("patch electrode 'top'")
    std::vector<ElectrodeSide> sides;      // the electrode is where every side's level is <= 0
    std::optional<double> exact_area_m2;   // the true area, when known: the area rule aims at it
};

struct CutOptions {
    double edge_size = 0.0;         // panel length (m) at an electrode edge
    SurfaceProjection project;      // onto the hull (identity for flat hulls and hulls meshed on stations)
    std::vector<ElectrodeSide> keep;  // zero levels the mesh already follows (rings meshed on stations): never moved off
    std::string refine_label = "electrode edges";  // starts the message when the refinement would make too many panels
};

struct CutResult {
    std::vector<std::vector<std::size_t>> panels;  // per electrode, its panels
    std::vector<double> area_before_rule;          // per electrode, its panels' area before the area rule (m^2)
};

// Cuts `mesh` along the electrodes (above) and returns their panels. Region tags
// are kept (a split panel's pieces inherit its tag). InputError "<where>: <name>
// ..." for an electrode that covers no panel (it lies off the hull)
// or every panel, two that share a panel, or a mesh that would exceed
// kMaxGeneratedPanels.
CutResult cut_electrodes(TriangleMesh& mesh, const std::vector<CutElectrode>& electrodes, const CutOptions& options);

// Smallest interior angle (degrees) over the panels of `mesh`.
double min_panel_angle_deg(const TriangleMesh& mesh);

}  // namespace murk
