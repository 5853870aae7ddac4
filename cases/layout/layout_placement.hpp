#pragma once
// Stage 4 of murk layout, when the case has [placement] (cases/README.md): choose
// `budget` sensors out of candidate sites on the hull, and score every [[layout]] by
// the same criterion on the same targets.
//
// The candidates' readings. The body is factored once with the drive layout's emitters
// (their drives) and its reference (floating); the candidate sites are bare, insulating
// hull in it (meshed on their edges like any site), and candidate c reads the mean
// potential of its panels (area-weighted) minus the reference's potential. Why bare: the
// criterion adds the candidates' contributions independently (sensor_placement.hpp), which
// holds exactly when no candidate changes the field the others see; a floating electrode
// would (it shorts the potential along its band), and so would 20 unused ones. The price:
// a chosen site built as a floating electrode reads the potential that makes its net
// current zero, close to but not equal to the mean of the bare hull's potential over it
// (murk layout with the chosen set as a [[layout]] gives that reading).
//
// Each candidate's lead field comes from one transposed solve (SensitivityMap or
// LeadFields, as layout_evaluation does); then per target point only field evaluations:
//  - detectable_area / detectable_volume: the reading change sensitivity . (M E_b), the
//    d'^2 of each reading with the drive layout's channel noise, and the cells (each
//    point's own cell, as detectable_region.hpp counts them) where the chosen readings
//    together reach the d' of [detection]'s false_alarm_probability and
//    probability_level. Points: those where the target fits.
//  - mean_log_det: the position gradients of the reading change (target_response,
//    solver/target_derivatives.hpp); points: where the target fits and lies at least
//    kMinBoundClearance panel diameters from the placement body's panels. The scale D of
//    each coordinate is the candidates' information diagonal, floored at 1e-12 of the best
//    informed coordinate at that point: rings cannot tell a target above a plane of
//    symmetry from one below, and without the floor the z information, rounding there,
//    would be scaled up to one.
// Then greedy + exchange selection (place_sensors).
//
// The user's layouts, scored on the same points, size and criterion, each with its own
// drive, readings and channel noise: the detectable region from the reading changes of
// evaluate_layout (so equal to its detectable_area there), mean_log_det from its position
// gradients, scaled by the candidates' information diagonal D (so the numbers of the
// layouts and of the chosen set are on one scale).
#include "cases/design/sensor_placement.hpp"
#include "cases/input/case_spec.hpp"
#include "cases/layout/layout_quantities.hpp"
#include "cases/layout/target_grid.hpp"
#include "cases/layout/target_placement.hpp"
#include "solver/dipole_path.hpp"
#include "solver/quadrature_options.hpp"

#include <string>
#include <vector>

namespace murk {

struct PlacementQuantities {
    std::string criterion;         // "detectable_area", "detectable_volume" or "mean_log_det"
    std::string units;             // "m2", "m3" or "1"
    std::string drive;             // the drive layout's name
    std::size_t size_index = 0;    // index into TargetGrid::size_m
    double target_size_m = 0;
    double channel_noise_V = 0;    // rms noise of one candidate reading
    std::size_t points = 0;        // target points the criterion counts
    std::vector<std::string> candidates;
    PlacementResult result;        // chosen (candidate indices), greedy steps, exchanges
    std::vector<std::string> layouts;      // every [[layout]], in case order
    std::vector<double> layout_criterion;  // the criterion of each, on the same targets
    double factor_seconds = 0, lead_seconds = 0, choose_seconds = 0;
    long unknowns = 0;             // of the placement body
    SystemSolverUsed solver_used;  // how the placement body's system was solved
};

// The index into grid.size_m of [placement] target_size (default: the largest size).
std::size_t placement_size_index(const CaseSpec& spec, const TargetGrid& grid);

// Position gradients (x, y, z; readings x grid points) of the reading change of the
// target of size `size` at every grid point where it fits, NaN elsewhere. evaluate_layout
// keeps them for mean_log_det (LayoutQuantities::placement_gradient).
std::vector<Eigen::MatrixXd> placement_gradients(const LeadFields<double>& lead, const TargetGrid& grid,
                                                 const TargetPlacement& placement, std::size_t size);

// What the stage chooses from: the candidates' readings at the target points the
// criterion counts, and the options of place_sensors (budget, criterion, d' needed, cells).
struct PlacementProblem {
    CandidateReadings readings;       // one reading per candidate, in [placement] order
    PlacementOptions options;
    std::vector<Eigen::Index> points;  // the grid points counted (columns of the readings)
    std::size_t size_index = 0;
    double channel_noise = 0;         // V
    double factor_seconds = 0, lead_seconds = 0;
    long unknowns = 0;                // of the placement body
    SystemSolverUsed solver_used;     // how the placement body's system was solved
};
PlacementProblem placement_problem(const CaseSpec& spec, const TargetGrid& grid, const TargetPlacement& placement,
                                   const QuadratureOptions& quad);

// The criterion of a layout evaluated by evaluate_layout, on the problem's points and scale.
double layout_placement_criterion(const PlacementProblem& problem, const LayoutQuantities& q);

// The stage: needs spec.placement, and `layouts` evaluated by evaluate_layout in case order.
PlacementQuantities place_layout_sensors(const CaseSpec& spec, const TargetGrid& grid,
                                         const TargetPlacement& placement,
                                         const std::vector<LayoutQuantities>& layouts, const QuadratureOptions& quad);

// The candidates' readout rows on the placement body (exposed for tests and the benchmark):
// the body's fixed part is built from `spec` with the drive layout's emitters and
// reference as its only electrodes, every candidate site meshed but bare.
struct PlacementBody {
    FixedPart<double> fixed;
    Eigen::MatrixXd readout;  // candidates x unknowns: mean potential of the site's panels minus the reference's
};
PlacementBody placement_body(const CaseSpec& spec, const TargetGrid& grid, const QuadratureOptions& quad);

}  // namespace murk
