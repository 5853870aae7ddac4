#pragma once
// The boundary a distance-to-boundary axis moves, for one fixed part:
// - surface_distance, bottom_distance: the water surface at the sensing body's highest
//   point plus the gap, or the bottom at its lowest point minus the gap. The other plane,
//   the bottom's conductivity and the image tolerance stay as the case gives them.
// - wall_distance: the whole [tank] shifted along x or y until the named side wall lies
//   the gap beyond the body. For a box that is the body's farthest point towards the
//   wall plus the gap; for a vertical cylinder, the least horizontal distance from the
//   body to the curved wall equals the gap, the centre moving along the named axis.
#include "cases/input/case_spec.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "geometry/mesh.hpp"

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace murk {

// The case's water with the plane of fixed part `fixed` moved (the case's water when
// the sweep moves no plane). `body` is the sensing body's mesh, placed.
WaterSpec fixed_water_bounds(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed, const TriangleMesh& body);

// The case's tank with fixed part `fixed`'s wall moved (the case's tank, or none,
// when the sweep moves no wall). InputError naming the value when no shift of the
// tank gives the gap (the body is too wide for the tank).
std::optional<TankSpec> fixed_tank(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed,
                                   const TriangleMesh& body);

// Where fixed part `fixed`'s moved boundary lies: the plane's height, or the moved
// wall's coordinate along its axis (for a cylinder, the wall's crossing of the line
// through its centre along that axis). Nothing without a boundary-distance axis.
std::optional<double> moved_boundary_position(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed,
                                              const TriangleMesh& body);

// "file:line: sweep.surface_distance = 0.05 m", naming one value of the axis in messages.
std::string boundary_value_where(const SweepPlan& plan, std::size_t fixed);

}  // namespace murk
