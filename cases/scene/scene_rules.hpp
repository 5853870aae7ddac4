#pragma once
// The rules by which the parts of a scene keep apart: surfaces from each other and
// from the insulating plane, sources and probe points from surfaces. The scene
// builder refuses a case that breaks one (with a message naming the part); a sweep
// masks a point where its moving object would break one. One set of numbers for both.
#include "cases/input/case_spec.hpp"
#include "geometry/mesh.hpp"

namespace murk {

// Below this many panel sizes two surfaces, or a surface and the insulating
// plane, are taken to touch: the mesh cannot resolve a narrower gap.
inline constexpr double kMinGapInPanels = 0.1;

// Sources (organ points included) and probe points closer to a surface than this
// many panel sizes make the collocation at the nearest panels, or the values
// read there, inaccurate: piecewise-constant panel values cannot follow a
// potential that changes within a fraction of a panel.
inline constexpr double kMinSourceDepthInPanels = 0.25;

// An object (without a membrane) whose conductivity differs from the water's by
// this factor or more is solved as a perfect conductor, by its inverse or less as
// an insulator. The limit differs from the object by about 3/contrast (the
// Maxwell factor (s - w)/(s + 2w) of a sphere against 1, or -1/2), 3e-8 here,
// while the contact formulation itself loses accuracy at higher contrasts: its
// perturbation left the perfect conductor's by 2e-6 at 1e12 and 0.3 % at 1e14,
// and by 35 % at 1e16 (tests/test_scene_builder.cpp measures the whole range).
inline constexpr double kLimitContrast = 1e8;

// Edge length (m) of an equilateral panel of the mesh's mean panel area: the
// panel size the rules above count in.
double typical_edge(const TriangleMesh& mesh);

// Least clearance (m) two surfaces must keep.
double min_surface_gap(const TriangleMesh& a, const TriangleMesh& b);

// How far (m) the surface reaches out of the water through the plane: positive
// when some vertex lies beyond it, negative (minus the least distance) when all
// lie in the water. The surface breaks the rule when this exceeds
// -kMinGapInPanels * typical_edge(mesh).
double reach_beyond_plane(const TriangleMesh& mesh, const PlaneSpec& plane);

}  // namespace murk
