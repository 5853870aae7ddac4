#include "cases/layout/target_grid.hpp"

#include "cases/input/case_limits.hpp"
#include "cases/sweep/moving_object.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "geometry/input_error.hpp"

#include <algorithm>
#include <cmath>
#include <utility>
#include <vector>

namespace murk {

namespace {

std::string sweep_where(const CaseSpec& spec, const std::string& key) {
    const int line = spec.sweep ? spec.sweep->line : 0;
    return spec.path + (line > 0 ? ":" + std::to_string(line) : std::string()) + ": " + key;
}

// The target at each size of the grid, as the sweep's dipole path has it: the object
// meshed once per size in its own frame (turned by its orientation) and its tensor,
// in closed form or by boundary elements. The sweep without its grid (which the sweep
// plan would take for point axes) keeps only the size axis.
void target_forms(const CaseSpec& spec, const QuadratureOptions& quad, TargetGrid& g) {
    CaseSpec sizes_only = spec;
    sizes_only.sweep->grid.reset();
    const SweepPlan plan = plan_sweep(sizes_only);
    const MovingObjects<double> objects(spec, plan);
    const int size_axis = plan.axis(AxisKind::size);
    std::vector<std::size_t> index(plan.axes.size(), 0);
    for (std::size_t z = 0; z < g.size_m.size(); ++z) {
        if (size_axis >= 0) index[static_cast<std::size_t>(size_axis)] = z;
        const MovingObject<double>& form = objects.at(index);
        g.polarization.push_back(objects.tensor(form, quad));
        g.reach_m.push_back(form.shape->half_extent);
    }
}

}  // namespace

TargetGrid target_grid(const CaseSpec& spec, const QuadratureOptions& quad) {
    if (!spec.sweep || !spec.sweep->grid)
        throw InputError(sweep_where(spec, spec.sweep ? "sweep.grid" : "sweep") +
                         ": murk layout needs a [sweep] with a [sweep.grid] of target positions");
    const SweepSpec& s = *spec.sweep;
    // Every other axis of [sweep] would be silently ignored: name the first one given.
    const std::vector<std::pair<const char*, bool>> others = {
        {"alternatives", !s.alternatives.empty()},
        {"water_conductivity", !s.water_conductivity_S_per_m.empty()},
        {"frequency", !s.frequency_Hz.empty()},
        {boundary_axis_key(s.moved), !s.boundary_distance_m.empty()},
        {"conductivity", !s.conductivity_S_per_m.empty()},
        {"permittivity", !s.permittivity_relative.empty()},
        {"distance", !s.distance_m.empty()}};
    for (const auto& [key, given] : others)
        if (given)
            throw InputError(sweep_where(spec, std::string("sweep.") + key) +
                             ": murk layout varies only the target's position (sweep.grid) and size; remove this axis "
                             "(murk run sweeps it)");
    const std::string name = s.object.empty() ? spec.objects.front().name : s.object;
    const auto it = std::find_if(spec.objects.begin(), spec.objects.end(), [&](const ObjectSpec& o) { return o.name == name; });
    const ObjectSpec& o = *it;  // the reader checked the name

    TargetGrid g;
    g.object = name;
    const SweepGridSpec& sg = *s.grid;
    g.u_m = sg.u_m;
    g.v_m = sg.v_m;
    g.origin = Eigen::Vector3d(sg.origin_m[0], sg.origin_m[1], sg.origin_m[2]);
    g.u_direction = Eigen::Vector3d(sg.u_direction[0], sg.u_direction[1], sg.u_direction[2]).normalized();
    g.v_direction = Eigen::Vector3d(sg.v_direction[0], sg.v_direction[1], sg.v_direction[2]).normalized();
    g.w_m = sg.w_m;
    g.w_direction = Eigen::Vector3d(sg.w_direction[0], sg.w_direction[1], sg.w_direction[2]).normalized();
    // Checked one factor at a time, so that the product cannot overflow.
    std::size_t count = 1;
    for (const std::size_t n : {g.u_m.size(), g.v_m.size(), g.nw()}) {
        if (n > kMaxLayoutTargets / count)
            throw InputError(sweep_where(spec, "sweep.grid") + ": murk layout takes at most " +
                             std::to_string(kMaxLayoutTargets) + " target positions; the grid has more");
        count *= n;
    }
    g.points.resize(3, static_cast<Eigen::Index>(count));
    const std::size_t nv = g.v_m.size(), nw = g.nw();
    for (std::size_t i = 0; i < g.u_m.size(); ++i)
        for (std::size_t j = 0; j < nv; ++j)
            for (std::size_t l = 0; l < nw; ++l)
                g.points.col(static_cast<Eigen::Index>((i * nv + j) * nw + l)) =
                    g.origin + g.u_m[i] * g.u_direction + g.v_m[j] * g.v_direction +
                    (g.planar() ? 0.0 : g.w_m[l]) * g.w_direction;

    g.size_m = s.size_m.empty() ? std::vector<double>{shape_size(o.shape)} : s.size_m;
    target_forms(spec, quad, g);
    return g;
}

}  // namespace murk
