#pragma once
// Stage `plan` of murk run: what the sweep varies and which objects it moves,
// worked out once from the case before anything is meshed or solved.
#include "cases/input/case_spec.hpp"
#include "cases/sweep/sweep_axes.hpp"

#include <algorithm>
#include <cstddef>
#include <optional>
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
    // Frequencies (Hz) of the frequency axis (given, or a [signal] waveform's kept
    // harmonics); empty: the case's one frequency, or none.
    std::vector<double> frequencies;
    // Gaps (m) of the surface_distance, bottom_distance or wall_distance axis; empty: the
    // planes and the tank stay where the case puts them. Which boundary moves: sweep.moved.
    std::vector<double> boundary_distances;
    // The fixed parts: one per (water, frequency, boundary distance) combination, water outer,
    // boundary distance inner. Each is solved once and serves the points of its combination.
    std::size_t frequency_count() const { return std::max<std::size_t>(frequencies.size(), 1); }
    std::size_t boundary_count() const { return std::max<std::size_t>(boundary_distances.size(), 1); }
    std::size_t fixed_count() const { return waters.size() * frequency_count() * boundary_count(); }
    double fixed_water(std::size_t fixed) const { return waters[fixed / (frequency_count() * boundary_count())]; }
    // The case with the frequency of a fixed part (the case's own when there is no axis).
    std::optional<double> fixed_frequency(std::size_t fixed, const std::optional<double>& case_frequency) const {
        if (frequencies.empty()) return case_frequency;
        return frequencies[(fixed / boundary_count()) % frequencies.size()];
    }
    // The gap of a fixed part's moved boundary, or none without a boundary-distance axis.
    std::optional<double> fixed_boundary_distance(std::size_t fixed) const {
        if (boundary_distances.empty()) return std::nullopt;
        return boundary_distances[fixed % boundary_distances.size()];
    }

    // Index of the axis of each kind, -1 when the sweep has none.
    int axis(AxisKind kind) const { return find_axis(axes, kind); }
    // Per-axis indices of a point (C order over the axes).
    std::vector<std::size_t> index_of(std::size_t point) const { return unflatten(point, axes); }
    // The fixed part of a point: its (water, frequency, boundary distance), index below fixed_count().
    std::size_t water_of(const std::vector<std::size_t>& index) const;
    // Index into `moving` of the object in the water at a point.
    std::size_t moving_of(const std::vector<std::size_t>& index) const;
};

// Refuses, with one line naming the case file and line, a sweep that names no
// object the case has, moves the object both by distance and on a grid, or has
// more points than a machine can count. A [signal] waveform becomes the frequency
// axis of its kept harmonics (cases/input/waveform.hpp).
SweepPlan plan_sweep(const CaseSpec& spec);

}  // namespace murk
