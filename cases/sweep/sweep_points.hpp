#pragma once
// Stage `points` of murk run: every point not yet in the file, placed, solved by
// its path and written as it finishes.
//
// Routing depends on geometry only (where the object goes, how large it is
// against its distance from the fixed part), so every run of a case, resumed or
// not and on any number of threads, places, routes and groups the points the
// same way: exact and full points one per thread, dipole points in blocks of
// fixed membership, one block per thread. Each point's arithmetic is then the
// same whatever the threads or interruptions, and so are the results, bit for bit.
#include "cases/sweep/point_path.hpp"
#include "cases/sweep/point_placement.hpp"
#include "cases/sweep/run_stats.hpp"
#include "cases/sweep/sweep_output.hpp"

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
    std::vector<PlacedPoint<S>> exact, full;
    std::vector<std::vector<PlacedPoint<S>>> dipole_blocks;  // each of one water
    std::vector<PointResult<S>> masked;
};

template <class S>
PointRoutes<S> route_points(const SweepPlan& plan, const PointPlacement& placement, const MovingObjects<S>& objects,
                            std::size_t dipole_block);

// Computes and writes the points the file does not hold yet.
template <class S>
void compute_points(const PointRoutes<S>& routes, const PointPaths<S>& paths, const SweepBaselines<S>& baselines,
                    SweepFile<S>& file, bool quiet, RunStats& stats);

}  // namespace murk
