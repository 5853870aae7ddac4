#pragma once
// Stage `plan` of murk run: what the sweep varies and which objects it moves,
// worked out once from the case before anything is meshed or solved.
#include "cases/input/case_spec.hpp"
#include "cases/sweep/sweep_axes.hpp"

#include <cstddef>
#include <string>
#include <vector>

namespace murk {

struct SweepPlan {
    SweepSpec sweep;
    std::string where;  // "file:line: sweep", for messages
    std::vector<SweepAxis> axes;
    std::vector<std::size_t> shape;
    std::size_t total = 0;  // points
    // The objects the sweep moves: one (sweep.object, or the first), or the
    // alternatives of an object axis, in axis order; indices into spec.objects.
    std::vector<std::size_t> moving;
    // The objects that stay where the case puts them at every point: part of the
    // fixed part, with the body.
    std::vector<ObjectSpec> still;
    std::vector<double> waters;  // water conductivities (S/m): the axis, or the case's one

    // Index of the axis of each kind, -1 when the sweep has none.
    int axis(AxisKind kind) const { return find_axis(axes, kind); }
    // Per-axis indices of a point (C order over the axes).
    std::vector<std::size_t> index_of(std::size_t point) const { return unflatten(point, axes); }
    std::size_t water_of(const std::vector<std::size_t>& index) const;
    // Index into `moving` of the object in the water at a point.
    std::size_t moving_of(const std::vector<std::size_t>& index) const;
};

// Refuses, with one line naming the case file and line, a sweep that names no
// object the case has, moves the object both by distance and on a grid, or has
// more points than a machine can count.
SweepPlan plan_sweep(const CaseSpec& spec);

}  // namespace murk
