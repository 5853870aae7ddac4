#pragma once
// The axes of a sweep and the product of their values: the set of points a
// `murk run` computes. Axis order in every array is fixed:
// water_conductivity, frequency, surface_distance, bottom_distance or wall_distance (the fixed axes: each
// combination of their values is a fixed part of its own), alternative, conductivity, permittivity, size, distance, grid_u,
// grid_v (those given).
#include "cases/input/sweep_spec.hpp"

#include <cstddef>
#include <string>
#include <vector>

namespace murk {

enum class AxisKind { water_conductivity, frequency, boundary_distance, alternative, conductivity, permittivity, size, distance, grid_u, grid_v };

struct SweepAxis {
    AxisKind kind;
    std::string name;       // dataset name under /sweep
    std::string units;      // UDUNITS
    std::string long_name;
    std::vector<double> values;
};

std::vector<SweepAxis> sweep_axes(const SweepSpec& sweep);

// Number of points and conversion between a flat point number (C order over the
// axes) and one index per axis.
std::size_t point_count(const std::vector<SweepAxis>& axes);
std::vector<std::size_t> axis_shape(const std::vector<SweepAxis>& axes);
std::vector<std::size_t> unflatten(std::size_t point, const std::vector<SweepAxis>& axes);

// Position of an axis of the given kind in `axes`, or -1.
int find_axis(const std::vector<SweepAxis>& axes, AxisKind kind);

}  // namespace murk
