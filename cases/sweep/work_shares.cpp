#include "cases/sweep/work_shares.hpp"

#include <algorithm>
#include <numeric>

namespace murk {

template <class S>
std::vector<WorkUnit> work_units(const PointRoutes<S>& routes, const CostModel& cost) {
    std::vector<WorkUnit> units;
    for (const auto& block : routes.exact_blocks) {
        WorkUnit u;
        for (const PlacedPoint<S>& q : block) {
            u.points.push_back(q.point);
            u.seconds += cost.exact_point_seconds(q.size_to_distance);
        }
        units.push_back(std::move(u));
    }
    for (const PlacedPoint<S>& q : routes.full) units.push_back({{q.point}, cost.full_point_seconds()});
    for (const auto& block : routes.dipole_blocks) {
        WorkUnit u;
        for (const PlacedPoint<S>& q : block) u.points.push_back(q.point);
        u.seconds = cost.dipole_block_seconds(block.size());
        units.push_back(std::move(u));
    }
    for (const PointResult<S>& r : routes.masked) units.push_back({{r.point}, 0.0});
    return units;
}

std::vector<std::vector<std::size_t>> deal_shares(const std::vector<WorkUnit>& units, std::size_t shares) {
    std::vector<std::size_t> order(units.size());
    std::iota(order.begin(), order.end(), std::size_t(0));
    // Longest first; equal costs in the order of their first point, so the deal
    // does not depend on how the units were listed.
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        if (units[a].seconds != units[b].seconds) return units[a].seconds > units[b].seconds;
        return units[a].points.front() < units[b].points.front();
    });
    std::vector<std::vector<std::size_t>> out(shares);
    std::vector<double> load(shares, 0.0);
    std::vector<std::size_t> count(shares, 0);
    for (std::size_t u : order) {
        // Least cost so far; among equals the fewest units (masked points cost
        // nothing and still spread), then the lowest share.
        std::size_t best = 0;
        for (std::size_t k = 1; k < shares; ++k)
            if (load[k] < load[best] || (load[k] == load[best] && count[k] < count[best])) best = k;
        out[best].push_back(u);
        load[best] += units[u].seconds;
        ++count[best];
    }
    return out;
}

std::vector<char> share_points(const std::vector<WorkUnit>& units, std::size_t total, std::size_t share,
                               std::size_t shares) {
    std::vector<char> mine(total, 0);
    const std::vector<std::vector<std::size_t>> dealt = deal_shares(units, shares);
    for (std::size_t u : dealt.at(share))
        for (std::size_t p : units[u].points) mine[p] = 1;
    return mine;
}

template std::vector<WorkUnit> work_units(const PointRoutes<double>&, const CostModel&);
template std::vector<WorkUnit> work_units(const PointRoutes<Complex>&, const CostModel&);

}  // namespace murk
