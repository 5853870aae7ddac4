#include "cases/layout/layout_evaluation.hpp"

#include "cases/input/layout_case.hpp"
#include "cases/layout/layout_localization.hpp"
#include "cases/layout/layout_noise.hpp"
#include "cases/layout/layout_placement.hpp"
#include "cases/layout/sensitivity_map.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/dipole_path.hpp"

#include <chrono>
#include <cmath>

namespace murk {

CaseSpec layout_fixed_case(const CaseSpec& spec, std::size_t layout, const TargetGrid& grid) {
    CaseSpec c = layout_case(spec, layout);
    std::vector<ObjectSpec> still;
    for (const ObjectSpec& o : c.objects)
        if (o.name != grid.object) still.push_back(o);
    c.objects = still;
    return c;
}

Eigen::VectorXd change_for_dipole(const Eigen::MatrixXd& sensitivity, Eigen::Index j, const Eigen::Vector3d& p) {
    return sensitivity.middleCols(3 * j, 3) * p;
}

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

ElectrodePart part_of(const Electrode<double>& e, const LayoutSpec& layout) {
    switch (e.drive) {
        case ElectrodeDrive::current: return ElectrodePart::emitter_current;
        case ElectrodeDrive::voltage: return ElectrodePart::emitter_voltage;
        case ElectrodeDrive::fixed_potential: return ElectrodePart::held_sensor;
        case ElectrodeDrive::floating: break;
    }
    return e.name == layout.reference && layout.reading == LayoutReading::reference ? ElectrodePart::reference
                                                                                     : ElectrodePart::sensor;
}

// Area (planar grid, m^2) or volume (3-D grid, m^3) of the flagged cells.
double flagged_region(const TargetGrid& grid, const std::vector<std::uint8_t>& flags) {
    if (!grid.planar())
        return flagged_volume(grid.u_m, grid.v_m, grid.w_m, flags,
                              std::abs(grid.u_direction.cross(grid.v_direction).dot(grid.w_direction)));
    return flagged_area(grid.u_m, grid.v_m, flags, grid.u_direction.cross(grid.v_direction).norm());
}

// Per size: the reading change of the induced dipole, d', P_D, and the region.
SizeQuantities evaluate_size(const LayoutQuantities& q, const TargetGrid& grid, const TargetPlacement& placement,
                             std::size_t s) {
    SizeQuantities out;
    const Eigen::Index n = grid.points.cols();
    const Eigen::Index readings = q.sensitivity.rows();
    out.blocked = placement.blocked[s];
    out.reading_change = Eigen::MatrixXd::Constant(readings, n, NAN);
    out.snr.assign(static_cast<std::size_t>(n), NAN);
    out.detection_probability.assign(static_cast<std::size_t>(n), NAN);
    out.detectable.assign(static_cast<std::size_t>(n), 0);
    for (Eigen::Index j = 0; j < n; ++j) {
        const std::size_t k = static_cast<std::size_t>(j);
        if (out.blocked[k]) continue;
        const Eigen::Vector3d p = grid.polarization[s] * q.baseline_field.col(j);
        out.reading_change.col(j) = change_for_dipole(q.sensitivity, j, p);
        const std::vector<double> change(out.reading_change.col(j).data(), out.reading_change.col(j).data() + readings);
        out.snr[k] = detectability_index(q.noise, change);
        out.detection_probability[k] = detection_probability(out.snr[k], q.false_alarm_probability);
        out.detectable[k] = out.detection_probability[k] >= q.probability_level;
        if (out.detectable[k])
            out.detection_range_m = std::isnan(out.detection_range_m)
                                        ? placement.clearance_m[k]
                                        : std::max(out.detection_range_m, placement.clearance_m[k]);
    }
    out.detectable_area_m2 = flagged_region(grid, out.detectable);
    if (!grid.planar()) return out;  // an outline is drawn for planar grids only
    // Simplify by a quarter of the finest grid step: drops the cells' staircase, not their shape.
    double step = INFINITY;
    for (const std::vector<double>* axis : {&grid.u_m, &grid.v_m})
        for (std::size_t i = 1; i < axis->size(); ++i) step = std::min(step, (*axis)[i] - (*axis)[i - 1]);
    out.outline = flagged_outline(grid.u_m, grid.v_m, out.detectable, std::isfinite(step) ? 0.25 * step : 0.0);
    return out;
}

}  // namespace

LayoutQuantities evaluate_layout(const CaseSpec& spec, std::size_t index, const TargetGrid& grid,
                                 const TargetPlacement& placement, const QuadratureOptions& quad) {
    const LayoutSpec& layout = spec.layouts[index];
    LayoutQuantities q;
    q.name = layout.name;
    q.noise = layout_noise(spec, layout);
    q.channel_noise = channel_noise_rms(q.noise);
    q.false_alarm_probability = spec.detection->false_alarm_probability;
    q.probability_level = spec.detection->probability_level;

    auto t0 = std::chrono::steady_clock::now();
    const FixedPart<double> fixed(build_scene<double>(layout_fixed_case(spec, index, grid), true), quad,
                                  solver_options(spec));
    q.factor_seconds = seconds_since(t0);
    q.solver_used = solver_used(fixed);
    q.water = water_bounds_summary(fixed.scene().images);
    q.readout = layout_readout(layout, fixed);
    q.baseline_reading = q.readout.rows * fixed.unknowns();
    for (std::size_t e = 0; e < fixed.scene().electrodes.size(); ++e) {
        const Electrode<double>& el = fixed.scene().electrodes[e];
        if (is_object_electrode(el.name)) continue;
        q.electrodes.push_back(el.name);
        q.electrode_part.push_back(static_cast<int>(part_of(el, layout)));
        q.electrode_potential_V.push_back(fixed.solution().electrode_potential[e]);
        q.electrode_current_A.push_back(fixed.solution().electrode_current[e]);
    }

    t0 = std::chrono::steady_clock::now();
    const SensitivityMap map(fixed, q.readout.rows);
    q.sensitivity = map.at(grid.points);
    q.water_leads = map.water_leads();
    q.row_points = map.row_points();
    q.baseline_field = baseline_field(fixed, grid.points, quad);
    for (std::size_t s = 0; s < grid.size_m.size(); ++s) q.sizes.push_back(evaluate_size(q, grid, placement, s));
    q.localization_accuracy_m = spec.detection->localization_accuracy_m;
    q.localization_size_unknown = spec.detection->localization_size_unknown;
    const bool placement_gradients_wanted = spec.placement && spec.placement->goal == PlacementGoal::mean_log_det;
    if (q.localization_accuracy_m > 0 || placement_gradients_wanted) {
        const LeadFields<double> lead(fixed, q.readout.rows);
        for (std::size_t s = 0; s < grid.size_m.size() && q.localization_accuracy_m > 0; ++s) {
            SizeQuantities& sq = q.sizes[s];
            const std::optional<double> unknown_size =
                q.localization_size_unknown ? std::optional<double>(grid.size_m[s]) : std::nullopt;
            localize_targets(sq, lead, grid.points, grid.polarization[s], unknown_size, q.channel_noise,
                             q.localization_accuracy_m);
            sq.localizable_area_m2 = flagged_region(grid, sq.within_accuracy);
        }
        if (placement_gradients_wanted)
            q.placement_gradient = placement_gradients(lead, grid, placement, placement_size_index(spec, grid));
    }
    q.map_seconds = seconds_since(t0);
    return q;
}

}  // namespace murk
