#include "cases/sweep/sweep_plan.hpp"

#include "geometry/input_error.hpp"

#include <algorithm>
#include <limits>

namespace murk {

std::size_t SweepPlan::water_of(const std::vector<std::size_t>& index) const {
    const int w = axis(AxisKind::water_conductivity), f = axis(AxisKind::frequency), d = axis(AxisKind::boundary_distance);
    return ((w >= 0 ? index[w] : 0) * frequency_count() + (f >= 0 ? index[f] : 0)) * boundary_count() +
           (d >= 0 ? index[d] : 0);
}

std::size_t SweepPlan::moving_of(const std::vector<std::size_t>& index) const {
    const int o = axis(AxisKind::alternative);
    return o >= 0 ? index[o] : 0;
}

namespace {

std::size_t object_named(const CaseSpec& spec, const std::string& where, const std::string& key,
                         const std::string& name) {
    for (std::size_t k = 0; k < spec.objects.size(); ++k)
        if (spec.objects[k].name == name) return k;
    throw InputError(where + "." + key + ": no object named '" + name + "'");
}

}  // namespace

SweepPlan plan_sweep(const CaseSpec& spec) {
    if (!spec.sweep) throw InputError(spec.path + ": murk run needs a [sweep] section (murk solve runs one configuration)");
    SweepPlan plan;
    plan.sweep = *spec.sweep;
    plan.where = spec.path + ":" + std::to_string(plan.sweep.line) + ": sweep";
    if (spec.objects.empty()) throw InputError(plan.where + ": the case has no [[object]] to sweep");
    if (plan.sweep.grid && !plan.sweep.grid->w_m.empty())
        throw InputError(plan.where + ".grid.w: a third grid axis places murk layout's targets in a volume; murk run "
                                      "sweeps a planar grid (remove w and w_direction)");
    if (!plan.sweep.distance_m.empty() && plan.sweep.grid)
        throw InputError(plan.where + ": a sweep moves the object either by distance or on a grid, not both");
    if (spec.waveform) {
        if (!plan.sweep.frequency_Hz.empty())
            throw InputError(plan.where + ".frequency: the [signal] waveform sets the frequencies; remove this axis");
        for (const Harmonic& h : kept_harmonics(*spec.waveform))
            plan.sweep.frequency_Hz.push_back(h.order * spec.waveform->fundamental_Hz);
    }
    if (!plan.sweep.permittivity_relative.empty() && plan.sweep.conductivity_S_per_m.empty())
        for (std::size_t m = 0; m < spec.objects.size(); ++m) {
            const ObjectSpec& o = spec.objects[m];
            const bool moves = plan.sweep.alternatives.empty() ? (plan.sweep.object.empty() ? m == 0 : o.name == plan.sweep.object)
                                                               : std::find(plan.sweep.alternatives.begin(), plan.sweep.alternatives.end(), o.name) != plan.sweep.alternatives.end();
            if (moves && o.material != Material::conducting)
                throw InputError(plan.where + ".permittivity: object '" + o.name + "' is an insulator or a perfect "
                                 "conductor, which a permittivity does not change");
        }
    plan.axes = sweep_axes(plan.sweep);
    plan.shape = axis_shape(plan.axes);
    // The product of the axis lengths must fit in a point index.
    std::size_t total = 1;
    std::string product;
    for (const SweepAxis& a : plan.axes) {
        product += (product.empty() ? "" : " x ") + std::to_string(a.values.size());
        if (total > std::numeric_limits<std::size_t>::max() / a.values.size())
            throw InputError(plan.where + ": the sweep has " + product + "... points, more than can be counted");
        total *= a.values.size();
    }
    plan.total = total;

    if (plan.sweep.alternatives.empty()) {
        plan.moving = {plan.sweep.object.empty() ? 0 : object_named(spec, plan.where, "object", plan.sweep.object)};
    } else {
        for (const std::string& name : plan.sweep.alternatives)
            plan.moving.push_back(object_named(spec, plan.where, "objects", name));
    }
    for (std::size_t k = 0; k < spec.objects.size(); ++k)
        if (std::find(plan.moving.begin(), plan.moving.end(), k) == plan.moving.end())
            plan.still.push_back(spec.objects[k]);
    const int w = plan.axis(AxisKind::water_conductivity);
    plan.waters = w >= 0 ? plan.axes[w].values : std::vector<double>{spec.water.conductivity_S_per_m};
    plan.frequencies = plan.sweep.frequency_Hz;
    plan.boundary_distances = plan.sweep.boundary_distance_m;
    if (spec.waveform) {  // the positions whose waveform is written must exist
        const std::size_t positions = plan.total / plan.frequencies.size();
        for (std::size_t p : spec.waveform->synthesize_points)
            if (p >= positions)
                throw InputError(spec.path + ":" + std::to_string(spec.waveform->line) + ": signal.synthesize: position " +
                                 std::to_string(p) + " is beyond the map's " + std::to_string(positions) +
                                 " positions (flat indices over the axes other than frequency, from 0)");
    }
    return plan;
}

}  // namespace murk
