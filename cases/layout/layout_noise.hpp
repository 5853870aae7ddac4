#pragma once
// The noise of one reading of a layout: [detection]'s amplifier noise density, or the
// layout's own `noise`, matched to what the layout reads (voltages or currents), over
// the bandwidth of [detection]'s integration time (cases/detection/detectability.hpp).
#include "cases/detection/detectability.hpp"
#include "cases/input/case_spec.hpp"

namespace murk {

// InputError (file, line, key) without [detection], with receptor noise, or when the
// layout reads currents and only a voltage noise is given (or the reverse).
NoiseModel layout_noise(const CaseSpec& spec, const LayoutSpec& layout);

}  // namespace murk
