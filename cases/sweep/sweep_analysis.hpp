#pragma once
// Stage `analysis` of murk run: from the per-point datasets under /sweep, the
// detection range along the distance axis (/detection) and the falloff of the
// peak perturbation with distance (/falloff), for every combination of the
// other axes. Reads what the file holds, so a resumed run analyses exactly the
// same numbers as an uninterrupted one.
#include "cases/output/hdf5_file.hpp"
#include "cases/sweep/sweep_axes.hpp"
#include "cases/input/sweep_spec.hpp"

#include <optional>
#include <vector>

namespace murk {

void write_sweep_analysis(H5Group& root, const std::vector<SweepAxis>& axes, const std::optional<DetectionSpec>& detection);

}  // namespace murk
