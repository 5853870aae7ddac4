#pragma once
// The codes murk writes into its result files' coded datasets, in one place: the
// writers, `murk inspect` and the tests use these (the files also carry the
// codes' meanings as flag_values / flag_meanings attributes).
#include <cstdint>

namespace murk {

// /sweep/status: what happened at a point.
enum class PointStatus : std::uint8_t { not_computed = 0, computed = 1, masked = 2 };

// /sweep/path: what computed a point.
enum class PathCode : std::uint8_t { none = 0, exact = 1, dipole = 2, full = 3 };

// /sweep/mask_reason: why a point was masked (the object had no valid place).
enum class MaskReason : std::uint8_t {
    none = 0,            // not masked
    touches_body = 1,    // would touch, enter or enclose the sensing body
    touches_object = 2,  // would touch, enter or enclose an object that does not move
    beyond_plane = 3,    // would reach through the water surface or bottom
    unreachable = 4,     // the clearance cannot be reached along the sweep direction
    near_source = 5,     // would hold, or come too close to, a source or probe point
};
inline constexpr int kMaskReasonCount = 6;

}  // namespace murk
