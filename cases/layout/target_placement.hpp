#pragma once
// Where the targets fit: each grid point's clearance to the hull and, per target size,
// whether the target would touch or enter a surface or reach the insulating plane. From
// the hull alone, once for all layouts (layouts differ in electrodes, not in surfaces).
#include "cases/input/case_spec.hpp"
#include "cases/layout/target_grid.hpp"
#include "solver/scene.hpp"

#include <cstdint>
#include <vector>

namespace murk {

struct TargetPlacement {
    std::vector<std::vector<std::uint8_t>> blocked;  // per size, per point: 1 = the target does not fit
    std::vector<double> clearance_m;                 // per point: distance to the nearest surface
};

// Builds the scene with every site of the hull at once (all floating), so that the scene
// builder checks on the mesh that no two sites share a panel and that each covers one,
// whichever layouts use them; the target object is left out.
TargetPlacement place_targets(const CaseSpec& spec, const TargetGrid& grid);

// Whether a target reaching `reach` (m, TargetGrid::reach_m) from its centre, centred at each grid point would touch, enter or
// enclose a surface of `scene` or reach the insulating plane: closer than reach plus
// kMinGapInPanels panel sizes of the surface (cases/scene/scene_rules.hpp). 1 = blocked.
std::vector<std::uint8_t> blocked_points(const TargetGrid& grid, const Scene<double>& scene, double reach);

// Distance (m) from each grid point to the nearest surface of the scene (0 inside one).
std::vector<double> clearance_of_points(const TargetGrid& grid, const Scene<double>& scene);

}  // namespace murk
