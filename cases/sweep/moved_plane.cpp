#include "cases/sweep/moved_plane.hpp"

#include <algorithm>
#include <sstream>

namespace murk {

WaterSpec fixed_water_bounds(const CaseSpec& spec, const SweepPlan& plan, std::size_t fixed, const TriangleMesh& body) {
    WaterSpec water = spec.water;
    const std::optional<double> gap = plan.fixed_plane_distance(fixed);
    if (!gap || body.vertices.empty()) return water;
    double lowest = body.vertices.front().z(), highest = lowest;
    for (const Vec3& v : body.vertices) lowest = std::min(lowest, v.z()), highest = std::max(highest, v.z());
    const bool bottom = plan.sweep.plane_is_bottom;
    PlaneSpec plane = bottom ? *water.bottom : *water.surface;  // the reader requires the case to give it
    plane.height_m = bottom ? lowest - *gap : highest + *gap;
    plane.source = SourceLine{spec.path, plan.sweep.line, bottom ? "sweep.bottom_distance" : "sweep.surface_distance"};
    (bottom ? water.bottom : water.surface) = plane;
    return water;
}

std::string plane_value_where(const SweepPlan& plan, std::size_t fixed) {
    std::ostringstream value;
    value.precision(6);
    value << plan.fixed_plane_distance(fixed).value_or(0.0) << " m";
    return plan.where + (plan.sweep.plane_is_bottom ? ".bottom_distance = " : ".surface_distance = ") + value.str();
}

}  // namespace murk
