#pragma once
// Stage `points` of murk run: every point not yet in the file, placed, solved by
// its path and written as it finishes.
//
// Routing depends on geometry only (where the object goes, how large it is
// against its distance from the fixed part), so every run of a case, resumed or
// not and on any number of threads, places, routes and groups the points the
// same way: full points one per thread, exact and dipole points in blocks of
// fixed membership (each of one water), one block per thread. Each point's arithmetic is then the
// same whatever the threads or interruptions, and so are the results, bit for bit.
#include "cases/sweep/point_path.hpp"
#include "cases/sweep/point_placement.hpp"
#include "cases/sweep/run_stats.hpp"
#include "cases/sweep/point_journal.hpp"

#include <memory>
#include <vector>

namespace murk {

template <class S>
struct PointPaths {
    std::unique_ptr<PointPath<S>> exact, dipole, full;
};

template <class S>
PointPaths<S> make_point_paths(const PathContext<S>& context);

// Every point of the sweep, placed, with the path it takes.
template <class S>
struct PointRoutes {
    std::vector<PlacedPoint<S>> full;
    std::vector<std::vector<PlacedPoint<S>>> exact_blocks, dipole_blocks;  // each block of one water
    std::vector<PointResult<S>> masked;
};

template <class S>
PointRoutes<S> route_points(const SweepPlan& plan, const PointPlacement& placement, const MovingObjects<S>& objects,
                            std::size_t exact_block, std::size_t dipole_block);

// Computes the points of `share` (flags over all points; empty: every point) that
// the journal does not hold yet, appending each to it as it finishes.
template <class S>
void compute_points(const PointRoutes<S>& routes, const PointPaths<S>& paths, const SweepBaselines<S>& baselines,
                    const std::vector<char>& share, PointJournal& journal, bool quiet, RunStats& stats);

}  // namespace murk
