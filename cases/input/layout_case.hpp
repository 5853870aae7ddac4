#pragma once
// The case of one [[layout]]: the robot keeps only the sites the layout uses,
// with their parts (emitters driven, sensors floating or held at a potential, the
// reference floating), so that the scene builder and the solver see an ordinary
// single-layout robot. Sites the layout does not use are bare, insulating hull.
#include "cases/input/case_spec.hpp"

#include <cstddef>

namespace murk {

// Electrode order in the returned case: the emitters, then the sensors (for pairs,
// every electrode the pairs name, in order of first mention), then the reference.
// Its layouts are cleared and its sweep (if any) reads single electrodes.
CaseSpec layout_case(const CaseSpec& spec, std::size_t layout);

// The layout's sensor electrodes in the order layout_case() gives them (after the emitters).
std::vector<std::string> layout_sensor_electrodes(const LayoutSpec& layout);

// What murk solve and murk run solve: the case itself, or, for a case with
// [[layout]] tables, the case of its first layout (cases/README.md says so).
CaseSpec case_to_solve(const CaseSpec& spec);

}  // namespace murk
