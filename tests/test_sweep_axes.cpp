// The axes of a sweep (cases/sweep/sweep_axes.hpp): which axes a [sweep] makes, in which
// order, with which names and units, and how a flat point number maps onto one index
// per axis. The expected orders are written out here by hand or counted with nested
// loops (C order, the last axis running fastest: the row-major layout of HDF5 and
// numpy, common practice); none is taken from the code under test. The fixed-part index
// of a plan (cases/sweep/sweep_plan.hpp) is checked the same way.
#include "cases/sweep/sweep_axes.hpp"
#include "cases/sweep/sweep_plan.hpp"

#include <doctest/doctest.h>

#include <limits>
#include <string>
#include <vector>

using namespace murk;

namespace {

std::vector<std::string> names_of(const std::vector<SweepAxis>& axes) {
    std::vector<std::string> out;
    for (const auto& a : axes) out.push_back(a.name);
    return out;
}

// An axis of n values 0, 1, ..., n-1 (only the count matters for indexing).
SweepAxis counting_axis(AxisKind kind, std::size_t n) {
    SweepAxis a{kind, "a", "1", "axis", {}};
    for (std::size_t k = 0; k < n; ++k) a.values.push_back(double(k));
    return a;
}

}  // namespace

TEST_CASE("sweep axes: every axis, in the documented order, whatever order the spec fills them in") {
    SweepSpec s;
    SweepGridSpec g;
    g.u_m = {0.01, 0.02};
    g.v_m = {0.03};
    s.grid = g;
    s.size_m = {0.001, 0.002, 0.004};
    s.conductivity_S_per_m = {kInsulatorConductivity, 0.5, kConductorConductivity};
    s.water_conductivity_S_per_m = {0.005, 0.03};
    s.alternatives = {"rod", "prey", "stone", "shell"};
    const std::vector<SweepAxis> axes = sweep_axes(s);
    // cases/sweep/sweep_axes.hpp: water_conductivity, object, conductivity, size, distance, grid_u, grid_v (those given)
    CHECK(names_of(axes) ==
          std::vector<std::string>{"water_conductivity", "alternative", "conductivity", "size", "grid_u", "grid_v"});
    REQUIRE(axes.size() == 6);
    CHECK(axes[0].kind == AxisKind::water_conductivity);
    CHECK(axes[1].kind == AxisKind::alternative);
    CHECK(axes[2].kind == AxisKind::conductivity);
    CHECK(axes[3].kind == AxisKind::size);
    CHECK(axes[4].kind == AxisKind::grid_u);
    CHECK(axes[5].kind == AxisKind::grid_v);
    // UDUNITS strings as the CF conventions write them (cases/RESULT_LAYOUT.md); "1" for an index
    CHECK(axes[0].units == "S m-1");
    CHECK(axes[1].units == "1");
    CHECK(axes[2].units == "S m-1");
    CHECK(axes[3].units == "m");
    CHECK(axes[4].units == "m");
    CHECK(axes[5].units == "m");
    for (const auto& a : axes) CHECK(!a.long_name.empty());
    // the object axis holds indices into the list of names: 0, 1, 2, 3
    CHECK(axes[1].values == std::vector<double>{0, 1, 2, 3});
    // the values are carried over unchanged, insulator 0 and conductor +inf included
    CHECK(axes[2].values[0] == 0.0);
    CHECK(axes[2].values[1] == 0.5);
    CHECK(axes[2].values[2] == std::numeric_limits<double>::infinity());
    CHECK(axes[4].values == std::vector<double>{0.01, 0.02});
    CHECK(axes[5].values == std::vector<double>{0.03});
    CHECK(find_axis(axes, AxisKind::size) == 3);
    CHECK(find_axis(axes, AxisKind::grid_v) == 5);
    CHECK(find_axis(axes, AxisKind::distance) == -1);
    CHECK(axis_shape(axes) == std::vector<std::size_t>{2, 4, 3, 3, 2, 1});
    CHECK(point_count(axes) == 2 * 4 * 3 * 3 * 2 * 1);
}

TEST_CASE("sweep axes: a distance sweep; empty axes are left out") {
    SweepSpec s;
    s.distance_m = {0.004, 0.008};
    s.size_m = {0.002};
    const std::vector<SweepAxis> axes = sweep_axes(s);
    CHECK(names_of(axes) == std::vector<std::string>{"size", "distance"});
    CHECK(find_axis(axes, AxisKind::distance) == 1);
    CHECK(find_axis(axes, AxisKind::water_conductivity) == -1);
    CHECK(point_count(axes) == 2);

    // no axis at all: one point (the empty product), with no index
    const std::vector<SweepAxis> none = sweep_axes(SweepSpec{});
    CHECK(none.empty());
    CHECK(point_count(none) == 1);
    CHECK(unflatten(0, none).empty());
}

TEST_CASE("sweep axes: unflatten counts in C order, the last axis fastest") {
    // shape 2 x 3 x 4, counted with nested loops
    const std::vector<SweepAxis> axes = {counting_axis(AxisKind::conductivity, 2), counting_axis(AxisKind::size, 3),
                                         counting_axis(AxisKind::distance, 4)};
    CHECK(point_count(axes) == 24);
    std::size_t p = 0;
    for (std::size_t i = 0; i < 2; ++i)
        for (std::size_t j = 0; j < 3; ++j)
            for (std::size_t k = 0; k < 4; ++k, ++p) {
                CAPTURE(p);
                CHECK(unflatten(p, axes) == std::vector<std::size_t>{i, j, k});
            }
    // two points written out by hand: 13 = 1*12 + 0*4 + 1, 22 = 1*12 + 2*4 + 2
    CHECK(unflatten(13, axes) == std::vector<std::size_t>{1, 0, 1});
    CHECK(unflatten(22, axes) == std::vector<std::size_t>{1, 2, 2});

    // axes of one value do not change the count or the order of the others
    const std::vector<SweepAxis> with_ones = {counting_axis(AxisKind::water_conductivity, 1),
                                              counting_axis(AxisKind::size, 3), counting_axis(AxisKind::grid_u, 1),
                                              counting_axis(AxisKind::grid_v, 2)};
    CHECK(point_count(with_ones) == 6);
    p = 0;
    for (std::size_t j = 0; j < 3; ++j)
        for (std::size_t l = 0; l < 2; ++l, ++p) CHECK(unflatten(p, with_ones) == std::vector<std::size_t>{0, j, 0, l});

    // a single axis: the point number is the index
    const std::vector<SweepAxis> one = {counting_axis(AxisKind::distance, 5)};
    for (std::size_t q = 0; q < 5; ++q) CHECK(unflatten(q, one) == std::vector<std::size_t>{q});
}

TEST_CASE("sweep axes: a boundary-distance axis follows frequency, and each (water, frequency, gap) has its fixed part") {
    SweepSpec s;
    s.water_conductivity_S_per_m = {0.005, 0.03};
    s.frequency_Hz = {100.0, 1000.0, 10000.0};
    s.boundary_distance_m = {0.01, 0.02, 0.04, 0.08};
    s.moved = MovedBoundary::bottom;
    s.size_m = {0.001, 0.002};
    SweepPlan plan;
    plan.sweep = s;
    plan.axes = sweep_axes(s);
    CHECK(names_of(plan.axes) == std::vector<std::string>{"water_conductivity", "frequency", "bottom_distance", "size"});
    CHECK(plan.axes[2].units == "m");
    s.moved = MovedBoundary::surface;
    CHECK(sweep_axes(s)[2].name == "surface_distance");
    s.moved = MovedBoundary::wall;
    CHECK(sweep_axes(s)[2].name == "wall_distance");
    plan.shape = axis_shape(plan.axes);
    plan.total = point_count(plan.axes);
    plan.waters = s.water_conductivity_S_per_m;
    plan.frequencies = s.frequency_Hz;
    plan.boundary_distances = s.boundary_distance_m;
    REQUIRE(plan.fixed_count() == 2 * 3 * 4);
    // Counted by hand in nested loops (C order): every point's fixed part holds its own
    // water, frequency and gap, and the fixed parts are numbered water outer, gap inner.
    std::size_t point = 0;
    for (std::size_t w = 0; w < 2; ++w)
        for (std::size_t f = 0; f < 3; ++f)
            for (std::size_t d = 0; d < 4; ++d)
                for (std::size_t z = 0; z < 2; ++z, ++point) {
                    const std::size_t fixed = plan.water_of(plan.index_of(point));
                    CHECK(fixed == (w * 3 + f) * 4 + d);
                    CHECK(plan.fixed_water(fixed) == s.water_conductivity_S_per_m[w]);
                    CHECK(*plan.fixed_frequency(fixed, std::nullopt) == s.frequency_Hz[f]);
                    CHECK(*plan.fixed_boundary_distance(fixed) == s.boundary_distance_m[d]);
                }
    plan.boundary_distances.clear();  // without the axis: no gap, and the count of before
    CHECK(!plan.fixed_boundary_distance(0));
}
