#pragma once
// How precisely a layout could locate a target: the Cramér-Rao bound on the target's
// position at every grid point (cases/design/localization_bound.hpp), from the
// derivatives of the induced-dipole readings with respect to the target's position
// (solver/target_derivatives.hpp) and the layout's independent channel noise.
//
// The target moves in three dimensions even on a planar grid, so the bound has three
// position parameters (x, y, z) and its error ellipsoid three semi-axes; size and
// contrast are taken as known, unless the case says the size is unknown
// (localization_size = "unknown"): the size is then a fourth parameter, estimated with
// the position, and the position bound is that of the 4 x 4 information (larger, as a
// parameter that must also be estimated can only lose information: Kay 1993, section
// 3.9's nuisance parameters, from memory). The size enters through dM/da = 3 M / a (an
// evenly scaled object, any shape). Masked: points where the target does not fit, and
// points closer to the fixed surfaces than kMinBoundClearance panel diameters, where
// target_response's one-point rule per panel is not trusted (its header measures the
// error: 1e-4 beyond about 3 diameters, growing fast closer).
#include "cases/layout/layout_quantities.hpp"
#include "solver/dipole_path.hpp"

#include <optional>
#include <vector>

namespace murk {

inline constexpr double kMinBoundClearance = 3.0;  // panel diameters (solver/target_derivatives.hpp)

// Fills `s`'s bound_status, position_sd, semi_axes, axes and within_accuracy (not the area)
// for a target of polarization M at `points`, `s.blocked` already set; with `unknown_size`
// (the target's size, m) also size_sd.
void localize_targets(SizeQuantities& s, const LeadFields<double>& lead, const Eigen::Matrix3Xd& points,
                      const Eigen::Matrix3d& polarization, std::optional<double> unknown_size,
                      double channel_noise, double accuracy_m);

}  // namespace murk
