#pragma once
// The result file of `murk layout` (cases/RESULT_LAYOUT.md, "murk layout"): one group
// per layout, /layouts/<name>, with the readings' baseline, the drives, the
// sensitivity map, the baseline field and per target size the reading change, d',
// P_D, the detectable area, range and outline (and, when asked for, the bound on the
// target's position); and /layout_comparison, one row per
// layout, which `murk inspect` prints.
#include "cases/layout/layout_placement.hpp"
#include "cases/layout/layout_quantities.hpp"
#include "cases/layout/target_grid.hpp"
#include "cases/output/hdf5_file.hpp"

#include <vector>

namespace murk {

void write_layout(const H5Group& layouts, const LayoutQuantities& q, const TargetGrid& grid);
void write_layout_comparison(const H5Group& root, const std::vector<LayoutQuantities>& all, const TargetGrid& grid);
// /placement ([placement]): the candidates, the chosen sites, the criterion after each
// greedy step and each exchange, and the criterion of every [[layout]] for comparison.
void write_placement(const H5Group& root, const PlacementQuantities& p);

// The words of the ElectrodePart codes, in code order (CF flag_meanings).
inline constexpr const char* kElectrodePartWords = "emitter_current emitter_voltage sensor held_sensor reference";
inline constexpr const char* kTargetStatusWords = "free blocked";
inline constexpr const char* kLocalizationStatusWords = "ok ill_conditioned singular not_computed";
inline constexpr const char* kWithinAccuracyWords = "outside within";
inline constexpr const char* kChosenWords = "candidate chosen";

}  // namespace murk
