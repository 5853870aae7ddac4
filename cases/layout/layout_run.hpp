#pragma once
// `murk layout CASE -o OUT.h5`: every [[layout]] of the case evaluated on the same
// targets and noise model, written to one result file. The stages, in order:
//   1. read    the case (by the caller) and the targets: grid, sizes, tensors (target_grid)
//   2. place   the targets against the hull, once for all layouts (place_targets)
//   3. layouts per layout: factor, lead fields, maps, detection (evaluate_layout)
//   4. place   with [placement]: sensors chosen from candidate sites, every layout scored
//              by the same criterion (place_layout_sensors, layout_placement.hpp)
//   5. write   the result to OUT.h5.partial, then rename it onto OUT.h5 (H5Output)
#include "cases/input/case_spec.hpp"
#include "cases/layout/layout_placement.hpp"
#include "cases/layout/layout_quantities.hpp"
#include "cases/layout/target_grid.hpp"
#include "solver/quadrature_options.hpp"

#include <optional>
#include <string>
#include <vector>

namespace murk {

struct LayoutOptions {
    std::string output_path;
    std::string command_line;
    bool force = false;
    bool quiet = false;
};

struct LayoutRun {
    TargetGrid grid;
    std::vector<LayoutQuantities> layouts;
    std::optional<PlacementQuantities> placement;  // with [placement]
};

// Stages 1-4 (no file). InputError for a case without layouts, with complex
// arithmetic, or without a target grid or noise model.
LayoutRun evaluate_layouts(const CaseSpec& spec, const QuadratureOptions& quad, bool quiet);

// All five stages.
LayoutRun run_layouts(const CaseSpec& spec, const LayoutOptions& options);

}  // namespace murk
