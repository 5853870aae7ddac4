#pragma once
// Choosing K sensor readings out of a set of candidates to maximize one of two
// criteria over a grid of target points, from precomputed responses (reading
// changes and their gradients per candidate and point, e.g. target_response of
// solver/target_derivatives.hpp with every candidate reading in the lead fields).
//
// Criteria (independent Gaussian noise between readings):
//  - detectable_volume: cells whose d'^2 = sum over the chosen readings of
//    (dV / sigma)^2 reaches required_snr^2 (the generalized matched filter of
//    cases/detection/detectability.hpp), times the cell volume (or the sum of
//    their own volumes, cell_volumes_m3). Greedy steps tie
//    often on a count (one sensor alone may detect nothing), so sets are compared
//    first by that volume and then by the "saturated coverage"
//    sum over points of min(d'^2, required_snr^2) (a smooth, submodular stand-in
//    for the count, in the spirit of Krause & Guestrin; see below).
//  - mean_log_det (D-optimal design): the mean over points of
//    log det(D^-1/2 J_S D^-1/2 + prior_weight I), J_S the Fisher information of the
//    chosen readings (localization_bound.hpp) and D the diagonal of the
//    information of ALL candidates at that point (a parameter that no candidate
//    informs gets D = 1 there). The scaling makes the criterion independent of
//    the parameters' units and of a common noise scale; the prior_weight term is
//    the information of a weak Gaussian prior (Bayesian D-optimality), which keeps
//    the determinant finite while fewer readings than parameters are chosen.
//
// Method: greedy selection (add the candidate that raises the criterion most),
// by default also from every forced first candidate (every_start), then exchange moves (swap a chosen and an unchosen candidate, the best swap of
// each pass, while it improves the criterion by more than a relative 1e-12), the
// classical scheme of sequential and exchange algorithms for D-optimal designs
// (Fedorov 1972, "Theory of Optimal Experiments", ch. 3; Mitchell 1974,
// Technometrics 16:203, the DETMAX exchange) and of greedy sensor placement
// (Krause, Singh & Guestrin 2008, "Near-optimal sensor placements in Gaussian
// processes", JMLR 9:235) -- cited from memory. Neither step guarantees the
// global optimum; best_placement_exhaustive finds it for small cases.
//
// Ties: values within a relative 1e-12 are equal (sums taken in a different order
// differ by rounding); among equal candidates or swaps the lowest index wins, so
// the result is deterministic.
#include "geometry/eigen_core.hpp"

#include <vector>

namespace murk {

struct CandidateReadings {
    Eigen::MatrixXd change;                 // readings x points: dV (V or A); complex readings as
                                            // two real rows of the same candidate (as_real_readings)
    std::vector<Eigen::MatrixXd> gradient;  // per parameter, readings x points (mean_log_det only)
    Eigen::VectorXd noise_rms;              // per reading, > 0
    std::vector<int> candidate;             // per reading: its candidate, 0 .. candidates-1
    // mean_log_det: the scale D of every parameter at every point (parameters x points);
    // empty: the diagonal of all these readings' information (information_diagonal). Given,
    // it lets a set of other readings (a user's own layout) be scored on the same scale as
    // the candidates it is compared with.
    Eigen::MatrixXd information_scale;
};

enum class PlacementCriterion { detectable_volume, mean_log_det };

struct PlacementOptions {
    PlacementCriterion criterion = PlacementCriterion::detectable_volume;
    int budget = 1;                 // K, 1 .. candidates
    double required_snr = 1.0;      // detectable_volume: the d' a point needs (required_snr())
    double cell_volume_m3 = 1.0;    // detectable_volume: volume of one grid point's cell
    std::vector<double> cell_volumes_m3;  // detectable_volume: per point, replacing cell_volume_m3
                                          // (uneven cells, e.g. the half cells at a grid's edge)
    double prior_weight = 1e-6;     // mean_log_det: regularization (see above), > 0
    int max_exchange_passes = 100;  // 0: greedy only
    // Also run greedy + exchange once from each candidate forced as the first
    // choice, and keep the best run (candidates + 1 runs in all): exchange moves
    // stop at a local optimum, and D-optimal criteria with few readings per
    // parameter have many (measured: on an 8-choose-3 case one run stopped 5 %
    // below the optimum, tests/test_sensor_placement.cpp).
    bool every_start = true;
};

// The d' at which the Neyman-Pearson detector reaches detection probability
// `level` at false-alarm probability P_FA: Q^-1(P_FA) - Q^-1(level) (inverting
// detection_probability of detectability.hpp).
double required_snr(double false_alarm_probability, double detection_level);

struct PlacementStep {
    std::vector<int> chosen;  // sorted
    double criterion = 0;     // m^3 (detectable_volume) or mean log-determinant
    int added = -1, removed = -1;
};

struct PlacementResult {
    std::vector<int> chosen;  // sorted
    double criterion = 0;
    // The run that won: -1 the plain greedy run, else the candidate it was forced to start from.
    int start = -1;
    std::vector<PlacementStep> greedy;     // after each greedy addition (budget entries)
    std::vector<PlacementStep> exchanges;  // after each accepted swap
};

// D of the mean_log_det criterion: per parameter and point the sum over all readings of
// (gradient / noise)^2, 1 where that sum is 0 (parameters x points).
Eigen::MatrixXd information_diagonal(const CandidateReadings& readings);

// The criterion of any set of candidates (a user's own layout among them).
double placement_criterion(const CandidateReadings& readings, const std::vector<int>& chosen,
                           const PlacementOptions& options);

PlacementResult place_sensors(const CandidateReadings& readings, const PlacementOptions& options);

// Every subset of `budget` candidates (refused beyond 10^6 subsets): the
// optimum, compared as place_sensors compares. `greedy` and `exchanges` are empty.
PlacementResult best_placement_exhaustive(const CandidateReadings& readings, const PlacementOptions& options);

}  // namespace murk
