#pragma once
// The plane a surface_distance or bottom_distance axis moves: for a fixed part, the
// water surface at the sensing body's highest point plus the gap, or the bottom at its
// lowest point minus the gap. The other plane, the bottom's conductivity and the image
// tolerance stay as the case gives them.
#include "cases/input/case_spec.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "geometry/mesh.hpp"

#include <cstddef>
#include <string>
#include <vector>

namespace murk {

// The case's water with the plane of fixed part `fixed` moved (the case's water when
// the sweep has no plane-distance axis). `body` is the sensing body's mesh, placed.
WaterSpec fixed_water_bounds(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed, const TriangleMesh& body);

// "file:line: sweep.surface_distance = 0.05 m", naming one value of the axis in messages.
std::string plane_value_where(const SweepPlan& plan, std::size_t fixed);

}  // namespace murk
