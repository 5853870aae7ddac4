#pragma once
// A layout's readings as rows acting on the fixed part's unknowns (r = R x): the
// potential of a sensor minus the reference's, of one electrode of a pair minus the
// other's, or the current into a sensor held at a potential. Linear readings are what
// reciprocity needs: one transposed solve per row gives the lead field of the reading.
#include "cases/input/layout_spec.hpp"
#include "solver/fixed_part.hpp"

#include <string>
#include <vector>

namespace murk {

struct LayoutReadout {
    Eigen::MatrixXd rows;             // readings x unknowns of the layout's fixed part
    std::vector<std::string> names;   // "s1-ref", "s2-s1", "s3" (current)
    std::string units;                // "V" or "A"
};

// `fixed` is the fixed part of layout_case(spec, k): its electrodes are the emitters,
// then the sensors (layout_sensor_electrodes), then the reference.
LayoutReadout layout_readout(const LayoutSpec& layout, const FixedPart<double>& fixed);

}  // namespace murk
