// Stage 4 of murk layout: sensors chosen from candidate sites; the model and its
// approximation are described in layout_placement.hpp.
#include "cases/layout/layout_placement.hpp"

#include "cases/detection/detectability.hpp"
#include "cases/input/layout_case.hpp"
#include "cases/layout/detectable_region.hpp"
#include "cases/layout/layout_evaluation.hpp"
#include "cases/layout/layout_localization.hpp"
#include "cases/layout/layout_noise.hpp"
#include "cases/layout/sensitivity_map.hpp"
#include "cases/scene/scene_builder.hpp"
#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"
#include "solver/target_derivatives.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>

namespace murk {

namespace {

// mean_log_det: a coordinate informed less than this fraction of the best-informed one at a
// point is taken as not informed (its Fisher information is rounding: relative 1e-32 and
// below for a gradient that vanishes by symmetry; a real one this weak means a standard
// deviation a million times the other's).
constexpr double kUninformed = 1e-12;

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

const ElectrodeSpec& site(const CaseSpec& spec, const std::string& name) {
    for (const ElectrodeSpec& e : spec.robot->electrodes)
        if (e.name == name) return e;
    MURK_CHECK(false, "the reader checked every candidate's name");
    return spec.robot->electrodes.front();
}

// Each grid point's own cell (m^2 on a plane, m^3 in a volume), as detectable_region.hpp
// counts them, so that a layout's criterion equals its detectable area.
std::vector<double> cell_sizes(const TargetGrid& grid) {
    const CellEdges cu = cell_edges(grid.u_m), cv = cell_edges(grid.v_m);
    const CellEdges cw = grid.planar() ? CellEdges{{0.0}, {1.0}} : cell_edges(grid.w_m);
    const double scale = grid.planar() ? grid.u_direction.cross(grid.v_direction).norm()
                                       : std::abs(grid.u_direction.cross(grid.v_direction).dot(grid.w_direction));
    std::vector<double> cells;
    for (std::size_t i = 0; i < grid.u_m.size(); ++i)
        for (std::size_t j = 0; j < grid.v_m.size(); ++j)
            for (std::size_t l = 0; l < grid.nw(); ++l)
                cells.push_back((cu.high[i] - cu.low[i]) * (cv.high[j] - cv.low[j]) * (cw.high[l] - cw.low[l]) * scale);
    return cells;
}

Eigen::Matrix3Xd columns(const Eigen::Matrix3Xd& m, const std::vector<Eigen::Index>& at) {
    Eigen::Matrix3Xd out(3, Eigen::Index(at.size()));
    for (std::size_t k = 0; k < at.size(); ++k) out.col(Eigen::Index(k)) = m.col(at[k]);
    return out;
}
Eigen::MatrixXd columns(const Eigen::MatrixXd& m, const std::vector<Eigen::Index>& at) {
    Eigen::MatrixXd out(m.rows(), Eigen::Index(at.size()));
    for (std::size_t k = 0; k < at.size(); ++k) out.col(Eigen::Index(k)) = m.col(at[k]);
    return out;
}

// One candidate per reading, all of the same noise.
CandidateReadings readings_of(Eigen::MatrixXd change, std::vector<Eigen::MatrixXd> gradient, double noise) {
    CandidateReadings r;
    r.noise_rms = Eigen::VectorXd::Constant(change.rows(), noise);
    for (Eigen::Index k = 0; k < change.rows(); ++k) r.candidate.push_back(int(k));
    r.change = std::move(change);
    r.gradient = std::move(gradient);
    return r;
}

}  // namespace

std::size_t placement_size_index(const CaseSpec& spec, const TargetGrid& grid) {
    const auto largest = std::max_element(grid.size_m.begin(), grid.size_m.end());
    if (!spec.placement || !spec.placement->target_size_m) return std::size_t(largest - grid.size_m.begin());
    const double want = *spec.placement->target_size_m;
    for (std::size_t s = 0; s < grid.size_m.size(); ++s)
        if (std::abs(grid.size_m[s] - want) <= 1e-9 * std::max(grid.size_m[s], want)) return s;
    MURK_CHECK(false, "the reader checked that target_size is one of the sizes");
    return 0;
}

std::vector<Eigen::MatrixXd> placement_gradients(const LeadFields<double>& lead, const TargetGrid& grid,
                                                 const TargetPlacement& placement, std::size_t size) {
    std::vector<Eigen::Index> free;
    for (Eigen::Index j = 0; j < grid.points.cols(); ++j)
        if (!placement.blocked[size][std::size_t(j)]) free.push_back(j);
    std::vector<Eigen::MatrixXd> out(3, Eigen::MatrixXd::Constant(lead.sensors(), grid.points.cols(), NAN));
    if (free.empty()) return out;
    const TargetResponse<double> r = target_response(lead, columns(grid.points, free), grid.polarization[size]);
    for (int a = 0; a < 3; ++a)
        for (std::size_t k = 0; k < free.size(); ++k) out[std::size_t(a)].col(free[k]) = r.gradient[std::size_t(a)].col(Eigen::Index(k));
    return out;
}

PlacementBody placement_body(const CaseSpec& spec, const TargetGrid& grid, const QuadratureOptions& quad) {
    const PlacementSpec& p = *spec.placement;
    const LayoutSpec& drive = spec.layouts[p.drive];
    // The drive layout's case (emitters, sensors, reference; no target), its sensors
    // replaced by every candidate: emitters [0, ne), reference ne, candidates after it.
    CaseSpec c = layout_fixed_case(spec, p.drive, grid);
    const std::size_t ne = drive.emitters.size();
    std::vector<ElectrodeSpec> electrodes(c.robot->electrodes.begin(), c.robot->electrodes.begin() + long(ne));
    electrodes.push_back(c.robot->electrodes.back());  // the reference (layout_case puts it last)
    MURK_CHECK(electrodes.back().name == drive.reference, "layout_case puts the reference last");
    for (const std::string& name : p.candidates) {
        ElectrodeSpec e = site(spec, name);
        e.drive = ElectrodeDrive::floating;
        e.value = 0.0;
        electrodes.push_back(e);
    }
    c.robot->electrodes = electrodes;
    Scene<double> scene = build_scene<double>(c, true);

    // The candidates made bare hull: their panels keep the mesh, lose the electrode.
    const int first = int(ne) + 1, count = int(p.candidates.size());
    std::vector<std::vector<std::pair<std::size_t, std::size_t>>> panels(static_cast<std::size_t>(count));  // (surface, panel)
    for (std::size_t k = 0; k < scene.surfaces.size(); ++k) {
        Surface<double>& s = scene.surfaces[k];
        for (std::size_t t = 0; t < s.panel_electrode.size(); ++t) {
            int& e = s.panel_electrode[t];
            if (e >= first && e < first + count) {
                panels[std::size_t(e - first)].push_back({k, t});
                e = -1;
            } else if (e >= first + count) {
                e -= count;  // a conducting object's electrode, after the candidates
            }
        }
    }
    scene.electrodes.erase(scene.electrodes.begin() + first, scene.electrodes.begin() + first + count);

    PlacementBody body{FixedPart<double>(std::move(scene), quad, solver_options(spec)), Eigen::MatrixXd()};
    const SystemLayout& sys = body.fixed.layout();
    body.readout = Eigen::MatrixXd::Zero(count, body.fixed.size());
    for (int c2 = 0; c2 < count; ++c2) {
        double area = 0;
        for (const auto& [k, t] : panels[std::size_t(c2)]) area += body.fixed.scene().surfaces[k].mesh.area(t);
        MURK_CHECK(area > 0, "the scene builder refuses a site that covers no panel");
        for (const auto& [k, t] : panels[std::size_t(c2)]) {
            MURK_CHECK(!sys.surfaces[k].two_sided, "electrode sites lie on the sealed hull");
            body.readout(c2, sys.surfaces[k].offset + Eigen::Index(t)) = body.fixed.scene().surfaces[k].mesh.area(t) / area;
        }
        body.readout(c2, sys.electrode_offset + Eigen::Index(ne)) = -1.0;  // minus the reference
    }
    return body;
}

PlacementProblem placement_problem(const CaseSpec& spec, const TargetGrid& grid, const TargetPlacement& placement,
                                   const QuadratureOptions& quad) {
    const PlacementSpec& p = *spec.placement;
    const bool log_det = p.goal == PlacementGoal::mean_log_det;
    PlacementProblem out;
    out.size_index = placement_size_index(spec, grid);
    const std::size_t s = out.size_index;
    out.channel_noise = channel_noise_rms(layout_noise(spec, spec.layouts[p.drive]));
    out.options.budget = p.budget;

    auto t0 = std::chrono::steady_clock::now();
    const PlacementBody body = placement_body(spec, grid, quad);
    out.factor_seconds = seconds_since(t0);
    out.unknowns = long(body.fixed.size());
    out.solver_used = solver_used(body.fixed);

    std::vector<Eigen::Index>& at = out.points;
    for (Eigen::Index j = 0; j < grid.points.cols(); ++j)
        if (!placement.blocked[s][std::size_t(j)]) at.push_back(j);
    const std::string where = spec.path + ":" + std::to_string(p.line) + ": placement: ";
    if (at.empty())
        throw InputError(where + "the target does not fit at any grid point; there is nothing to place sensors for");
    const Eigen::Matrix3d& m = grid.polarization[s];

    t0 = std::chrono::steady_clock::now();
    if (log_det) {
        out.options.criterion = PlacementCriterion::mean_log_det;
        const LeadFields<double> lead(body.fixed, body.readout);
        const TargetResponse<double> r = target_response(lead, columns(grid.points, at), m);
        std::vector<Eigen::Index> trusted, kept;  // columns of r; grid points
        for (Eigen::Index k = 0; k < r.clearance.size(); ++k)
            if (r.clearance[k] >= kMinBoundClearance) trusted.push_back(k), kept.push_back(at[std::size_t(k)]);
        if (trusted.empty())
            throw InputError(where + "no grid point where the target fits lies 3 panel diameters from the hull, where "
                                     "mean_log_det's derivatives are trusted");
        std::vector<Eigen::MatrixXd> g;
        for (const Eigen::MatrixXd& ga : r.gradient) g.push_back(columns(ga, trusted));
        out.readings = readings_of(columns(r.change, trusted), std::move(g), out.channel_noise);
        // The scale D of each coordinate, floored at kUninformed of the best-informed one at
        // that point (all three are lengths): a coordinate that no candidate informs but for
        // rounding (z of a target in a plane of symmetry of rings) must not be scaled up to
        // unit information, which would make the criterion a function of rounding errors.
        Eigen::MatrixXd d = information_diagonal(out.readings);
        for (Eigen::Index k = 0; k < d.cols(); ++k)
            d.col(k) = d.col(k).cwiseMax(kUninformed * d.col(k).maxCoeff());
        out.readings.information_scale = d;
        at = kept;
    } else {
        out.options.criterion = PlacementCriterion::detectable_volume;
        out.options.required_snr =
            required_snr(spec.detection->false_alarm_probability, spec.detection->probability_level);
        const std::vector<double> cells = cell_sizes(grid);
        for (Eigen::Index j : at) out.options.cell_volumes_m3.push_back(cells[std::size_t(j)]);
        const Eigen::Matrix3Xd points = columns(grid.points, at);
        const SensitivityMap map(body.fixed, body.readout);
        const Eigen::MatrixXd sensitivity = map.at(points);
        const Eigen::Matrix3Xd field = baseline_field(body.fixed, points, quad);
        Eigen::MatrixXd change(body.readout.rows(), points.cols());
        for (Eigen::Index k = 0; k < points.cols(); ++k)
            change.col(k) = change_for_dipole(sensitivity, k, m * field.col(k));
        out.readings = readings_of(std::move(change), {}, out.channel_noise);
    }
    out.lead_seconds = seconds_since(t0);
    return out;
}

double layout_placement_criterion(const PlacementProblem& problem, const LayoutQuantities& q) {
    const std::vector<Eigen::Index>& at = problem.points;
    CandidateReadings own;
    if (problem.options.criterion == PlacementCriterion::mean_log_det) {
        MURK_CHECK(q.placement_gradient.size() == 3, "evaluate_layout keeps the gradients for mean_log_det");
        std::vector<Eigen::MatrixXd> g;
        for (const Eigen::MatrixXd& ga : q.placement_gradient) g.push_back(columns(ga, at));
        const Eigen::Index readings = g.front().rows();  // before g is moved into the argument
        own = readings_of(Eigen::MatrixXd::Zero(readings, Eigen::Index(at.size())), std::move(g), q.channel_noise);
        own.information_scale = problem.readings.information_scale;
    } else {
        own = readings_of(columns(q.sizes[problem.size_index].reading_change, at), {}, q.channel_noise);
    }
    return placement_criterion(own, own.candidate, problem.options);
}

PlacementQuantities place_layout_sensors(const CaseSpec& spec, const TargetGrid& grid,
                                         const TargetPlacement& placement,
                                         const std::vector<LayoutQuantities>& layouts, const QuadratureOptions& quad) {
    const PlacementSpec& p = *spec.placement;
    const bool log_det = p.goal == PlacementGoal::mean_log_det;
    const PlacementProblem problem = placement_problem(spec, grid, placement, quad);
    PlacementQuantities out;
    out.criterion = log_det ? "mean_log_det" : grid.planar() ? "detectable_area" : "detectable_volume";
    out.units = log_det ? "1" : grid.planar() ? "m2" : "m3";
    out.drive = spec.layouts[p.drive].name;
    out.candidates = p.candidates;
    out.size_index = problem.size_index;
    out.target_size_m = grid.size_m[problem.size_index];
    out.channel_noise_V = problem.channel_noise;
    out.points = problem.points.size();
    out.factor_seconds = problem.factor_seconds;
    out.lead_seconds = problem.lead_seconds;
    out.unknowns = problem.unknowns;
    out.solver_used = problem.solver_used;

    const auto t0 = std::chrono::steady_clock::now();
    out.result = place_sensors(problem.readings, problem.options);
    out.choose_seconds = seconds_since(t0);
    for (const LayoutQuantities& q : layouts) {
        out.layouts.push_back(q.name);
        out.layout_criterion.push_back(layout_placement_criterion(problem, q));
    }
    return out;
}

}  // namespace murk
