#pragma once
// What a sweep will cost, from its geometry alone (nothing assembled): points per
// path, memory, and time on given machine rates. `murk run --estimate` prints it;
// every run checks it against the memory it may use before assembling anything.
#include "cases/sweep/cost_model.hpp"
#include "cases/sweep/sweep_points.hpp"
#include "solver/solver_options.hpp"

#include <string>

namespace murk {

struct SweepEstimate {
    std::size_t points = 0, exact = 0, dipole = 0, full = 0, masked = 0;
    SweepSizes sizes;
    MachineRates rates;
    double memory_bytes = 0;
    double setup_seconds = 0;   // the fixed part: assembly and LU, every water
    double points_seconds = 0;  // every point, spread over the threads
    double total_seconds() const { return setup_seconds + points_seconds; }
};

// `solver` decides whether the fixed part is taken as compressed (method "full"
// re-solves densely and never is).
template <class S>
SweepSizes sweep_sizes(const std::vector<Scene<S>>& fixed, const MovingObjects<S>& objects, const SweepPlan& plan,
                       const SolverOptions& solver);

template <class S>
SweepEstimate estimate_sweep(const SweepPlan& plan, const PointRoutes<S>& routes, const CostModel& cost);

// A few lines for people: the plan, the memory, the time.
std::string format_estimate(const SweepEstimate& e);

// Refuses (InputError) a run whose memory estimate exceeds `limit_bytes`, naming
// the unknowns and what to change.
void require_memory(const SweepEstimate& e, double limit_bytes, const std::string& where);

// Bytes a run keeps per point while it places and routes them (placement, path,
// status), counted in the estimate's memory.
inline constexpr double kBytesPerPoint = 160;

// Refuses (InputError) a sweep whose points alone would not fit in `limit_bytes`,
// before anything is placed.
void require_point_memory(std::size_t points, double limit_bytes, const std::string& where);

}  // namespace murk
