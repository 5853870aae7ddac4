#pragma once
// A sweep's points cut into shares of about equal cost, for job-array tasks
// (--shard K/N) and MPI ranks. The units of work are what a run computes at
// once: one exact or full point, one dipole block (kept whole, so that its
// points come out as in a single run), one masked point. Each unit's cost comes
// from the cost model with the reference rates, never the running machine's, so
// every task computes the same shares; units are dealt longest first, each to the
// share with the least cost so far (ties to the lowest share), which keeps the
// largest share within one unit of the mean.
#include "cases/sweep/cost_model.hpp"
#include "cases/sweep/sweep_points.hpp"

#include <vector>

namespace murk {

struct WorkUnit {
    std::vector<std::size_t> points;  // flat indices
    double seconds = 0;               // estimated, one thread
};

template <class S>
std::vector<WorkUnit> work_units(const PointRoutes<S>& routes, const CostModel& cost);

// Per share, the indices of its units in `units`.
std::vector<std::vector<std::size_t>> deal_shares(const std::vector<WorkUnit>& units, std::size_t shares);

// Which points share `share` of `shares` holds (flags over all points).
std::vector<char> share_points(const std::vector<WorkUnit>& units, std::size_t total, std::size_t share,
                               std::size_t shares);

}  // namespace murk
