#include "cases/sweep/sweep_axes.hpp"

namespace murk {

std::vector<SweepAxis> sweep_axes(const SweepSpec& s) {
    std::vector<SweepAxis> axes;
    auto add = [&](AxisKind kind, const char* name, const char* units, const char* long_name,
                   const std::vector<double>& values) {
        if (!values.empty()) axes.push_back({kind, name, units, long_name, values});
    };
    add(AxisKind::water_conductivity, "water_conductivity", "S m-1", "conductivity of the water",
        s.water_conductivity_S_per_m);
    add(AxisKind::frequency, "frequency", "Hz", "frequency of the emitter's sinusoid (a fixed part per water and frequency)",
        s.frequency_Hz);
    const char* boundary_long_name =
        s.moved == MovedBoundary::bottom
            ? "gap between the sensing body's lowest point and the bottom (a fixed part per value)"
        : s.moved == MovedBoundary::wall
            ? "gap between the sensing body and the tank's side wall the axis moves (a fixed part per value)"
            : "gap between the sensing body's highest point and the water surface (a fixed part per value)";
    add(AxisKind::boundary_distance, boundary_axis_key(s.moved), "m", boundary_long_name, s.boundary_distance_m);
    std::vector<double> object_index;
    for (std::size_t k = 0; k < s.alternatives.size(); ++k) object_index.push_back(double(k));
    add(AxisKind::alternative, "alternative", "1", "which alternative object is in the water (index into the attribute alternative_names)",
        object_index);
    add(AxisKind::conductivity, "conductivity", "S m-1",
        "conductivity of the object (0: insulator, inf: perfect conductor)", s.conductivity_S_per_m);
    add(AxisKind::permittivity, "permittivity", "1", "relative permittivity of the object (conducting forms only)",
        s.permittivity_relative);
    add(AxisKind::size, "size", "m", "object size (sphere radius, or largest half-extent)", s.size_m);
    add(AxisKind::distance, "distance", "m", "clearance between the object and the body surface", s.distance_m);
    if (s.grid) {
        add(AxisKind::grid_u, "grid_u", "m", "object centre along the grid's first direction", s.grid->u_m);
        add(AxisKind::grid_v, "grid_v", "m", "object centre along the grid's second direction", s.grid->v_m);
    }
    return axes;
}

std::size_t point_count(const std::vector<SweepAxis>& axes) {
    std::size_t n = 1;
    for (const auto& a : axes) n *= a.values.size();
    return n;
}

std::vector<std::size_t> axis_shape(const std::vector<SweepAxis>& axes) {
    std::vector<std::size_t> shape;
    for (const auto& a : axes) shape.push_back(a.values.size());
    return shape;
}

std::vector<std::size_t> unflatten(std::size_t point, const std::vector<SweepAxis>& axes) {
    std::vector<std::size_t> index(axes.size());
    for (std::size_t k = axes.size(); k-- > 0;) {
        index[k] = point % axes[k].values.size();
        point /= axes[k].values.size();
    }
    return index;
}

int find_axis(const std::vector<SweepAxis>& axes, AxisKind kind) {
    for (std::size_t k = 0; k < axes.size(); ++k)
        if (axes[k].kind == kind) return static_cast<int>(k);
    return -1;
}

}  // namespace murk
