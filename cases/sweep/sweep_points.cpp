#include "cases/sweep/sweep_points.hpp"

#include "cases/sweep/parallel_points.hpp"
#include "cases/sweep/sweep_progress.hpp"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <mutex>

namespace murk {

namespace {

using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

// The automatic switch. A dipole point's relative error was measured at about
// 0.085 x (object half-extent / centre distance to the body) in
// tests/test_dipole_path.cpp (1.7 % at 5 radii, 0.9 % at 10, 0.4 % at 20) and
// up to 0.12 x on the coarse cases/examples/fish_map.toml (its worst checked
// point); the dipole path is taken where that ratio is at most accuracy / 0.12.
constexpr double kDipoleErrorPerRatio = 0.12;

}  // namespace

template <class S>
PointPaths<S> make_point_paths(const PathContext<S>& context) {
    PointPaths<S> paths;
    paths.full = make_full_path(context);
    if (context.baselines->waters.front().fixed) {
        paths.exact = make_exact_path(context);
        paths.dipole = make_dipole_path(context);
    }
    return paths;
}

template <class S>
PointRoutes<S> route_points(const SweepPlan& plan, const PointPlacement& placement, const MovingObjects<S>& objects,
                            std::size_t exact_block, std::size_t dipole_block) {
    const SweepMethod method = plan.sweep.method;
    const bool measure = method == SweepMethod::dipole || method == SweepMethod::automatic;
    std::vector<PlacedPoint<S>> placed(plan.total);
    std::vector<MaskReason> mask(plan.total, MaskReason::none);
    for_each_in_parallel(plan.total, [&](std::size_t p) {
        const std::vector<std::size_t> index = plan.index_of(p);
        const MovingObject<S>& object = objects.at(index);
        const Placement where = placement.place(index, object.shape->mesh);
        mask[p] = where.mask;
        if (where.mask != MaskReason::none) return;
        PlacedPoint<S>& q = placed[p];
        q.point = p;
        q.water = plan.water_of(index);
        q.object = &object;
        q.offset = where.offset;
        if (measure) q.size_to_distance = object.shape->half_extent / placement.distance_to_fixed(q.centre(), q.water);
    });
    PointRoutes<S> routes;
    std::vector<std::vector<PlacedPoint<S>>> exacts(plan.fixed_count()), dipoles(plan.fixed_count());
    for (std::size_t p = 0; p < plan.total; ++p) {
        if (mask[p] != MaskReason::none) {
            routes.masked.push_back(masked_point<S>(p, mask[p]));
            continue;
        }
        const PlacedPoint<S>& q = placed[p];
        const bool dipole = method == SweepMethod::dipole ||
                            (method == SweepMethod::automatic &&
                             q.size_to_distance <= plan.sweep.dipole_accuracy / kDipoleErrorPerRatio);
        if (dipole) dipoles[q.water].push_back(q);
        else if (method == SweepMethod::full) routes.full.push_back(q);
        else exacts[q.water].push_back(q);
    }
    auto in_blocks = [](const std::vector<std::vector<PlacedPoint<S>>>& by_water, std::size_t size,
                        std::vector<std::vector<PlacedPoint<S>>>& blocks) {
        for (const auto& of_water : by_water)
            for (std::size_t b = 0; b < of_water.size(); b += size)
                blocks.emplace_back(of_water.begin() + b, of_water.begin() + std::min(of_water.size(), b + size));
    };
    in_blocks(exacts, exact_block, routes.exact_blocks);
    in_blocks(dipoles, dipole_block, routes.dipole_blocks);
    return routes;
}

template <class S>
void compute_points(const PointRoutes<S>& routes, const PointPaths<S>& paths, const SweepBaselines<S>& baselines,
                    const std::vector<char>& share, PointJournal& journal, bool quiet, RunStats& stats) {
    // What is left when the stage starts (the journal grows as points finish).
    const std::size_t total = journal.header().points;
    std::vector<char> todo(total, 0);
    std::size_t in_share = 0, done = 0;
    for (std::size_t p = 0; p < total; ++p) {
        const bool mine = share.empty() || share[p];
        in_share += mine;
        done += mine && journal.has(p);
        todo[p] = mine && !journal.has(p);
    }
    auto pending = [&](std::size_t p) { return todo[p] != 0; };
    SweepProgress progress(in_share, done, quiet);
    std::mutex output;
    auto store = [&](const PointResult<S>& r) {
        std::lock_guard<std::mutex> lock(output);
        journal.append(r);
        progress.point_done();
    };

    for (const PointResult<S>& r : routes.masked)
        if (pending(r.point)) store(r);

    // Blocks with any point left, one per thread (the solves inside run
    // single-threaded, as OpenMP does not nest by default); a block is solved
    // whole, so that its points come out as in a run that was never interrupted.
    // Full points are blocks of one.
    std::atomic<std::size_t> fallbacks{0};
    auto solve_blocks = [&](const std::vector<std::vector<PlacedPoint<S>>>& all, const PointPath<S>& path) {
        std::vector<const std::vector<PlacedPoint<S>>*> blocks;
        for (const auto& block : all)
            if (std::any_of(block.begin(), block.end(), [&](const PlacedPoint<S>& q) { return pending(q.point); }))
                blocks.push_back(&block);
        const auto solve_block = [&](std::size_t b) {
            const std::vector<PlacedPoint<S>>& block = *blocks[b];
            std::vector<PathReading<S>> readings = path.solve(block);
            for (std::size_t k = 0; k < block.size(); ++k) {
                if (!pending(block[k].point)) continue;
                if (&path == paths.exact.get() && readings[k].path == PathCode::full) ++fallbacks;
                store(computed_point(block[k].point, block[k].centre(), std::move(readings[k].reading),
                                     readings[k].path, baselines, block[k].water));
            }
        };
        if (!path.parallel_inside()) {
            for_each_in_parallel(blocks.size(), solve_block);
            return;
        }
        for (std::size_t b = 0; b < blocks.size() && !stop_requested(); ++b) solve_block(b);
    };
    const auto t0 = Clock::now();
    if (!routes.exact_blocks.empty()) solve_blocks(routes.exact_blocks, *paths.exact);
    std::vector<std::vector<PlacedPoint<S>>> full_singles;
    for (const PlacedPoint<S>& q : routes.full) full_singles.push_back({q});
    if (!full_singles.empty()) solve_blocks(full_singles, *paths.full);
    stats.point_seconds += seconds_since(t0);
    stats.fallbacks += fallbacks;

    const auto t1 = Clock::now();
    if (!routes.dipole_blocks.empty()) solve_blocks(routes.dipole_blocks, *paths.dipole);
    stats.dipole_seconds += seconds_since(t1);
}

template PointPaths<double> make_point_paths(const PathContext<double>&);
template PointPaths<Complex> make_point_paths(const PathContext<Complex>&);
template PointRoutes<double> route_points(const SweepPlan&, const PointPlacement&, const MovingObjects<double>&,
                                          std::size_t, std::size_t);
template PointRoutes<Complex> route_points(const SweepPlan&, const PointPlacement&, const MovingObjects<Complex>&,
                                           std::size_t, std::size_t);
template void compute_points(const PointRoutes<double>&, const PointPaths<double>&, const SweepBaselines<double>&,
                             const std::vector<char>&, PointJournal&, bool, RunStats&);
template void compute_points(const PointRoutes<Complex>&, const PointPaths<Complex>&, const SweepBaselines<Complex>&,
                             const std::vector<char>&, PointJournal&, bool, RunStats&);

}  // namespace murk
