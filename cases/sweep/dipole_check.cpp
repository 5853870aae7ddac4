#include "cases/sweep/dipole_check.hpp"

#include "cases/sweep/parallel_points.hpp"

#include <algorithm>
#include <map>
#include <mutex>

namespace murk {

namespace {

template <class S>
std::map<std::size_t, const PlacedPoint<S>*> dipole_points(const PointRoutes<S>& routes) {
    std::map<std::size_t, const PlacedPoint<S>*> out;
    for (const auto& block : routes.dipole_blocks)
        for (const PlacedPoint<S>& q : block) out[q.point] = &q;
    return out;
}

}  // namespace

template <class S>
std::vector<std::size_t> dipole_check_sample(const PointRoutes<S>& routes, std::size_t count) {
    const auto points = dipole_points(routes);
    const std::size_t n = std::min(points.size(), count);
    std::vector<const PlacedPoint<S>*> by_ratio;
    for (const auto& [p, q] : points) by_ratio.push_back(q);
    std::stable_sort(by_ratio.begin(), by_ratio.end(),
                     [](const PlacedPoint<S>* a, const PlacedPoint<S>* b) { return a->size_to_distance > b->size_to_distance; });
    std::vector<std::size_t> sample;
    for (std::size_t k = 0; k < (n + 1) / 2; ++k) sample.push_back(by_ratio[k]->point);
    std::vector<std::size_t> rest;
    for (const auto& [p, q] : points)
        if (std::find(sample.begin(), sample.end(), p) == sample.end()) rest.push_back(p);
    const std::size_t m = n - sample.size();
    for (std::size_t k = 0; k < m; ++k) sample.push_back(rest[(2 * k + 1) * rest.size() / (2 * m)]);
    std::sort(sample.begin(), sample.end());
    return sample;
}

template <class S>
void check_dipole_points(const PointRoutes<S>& routes, std::size_t count, const std::vector<char>& share,
                         const PointPath<S>& exact, const SweepBaselines<S>& baselines, PointJournal& journal) {
    const auto points = dipole_points(routes);
    std::vector<char> checked(journal.header().points, 0);
    for (const CheckRecord& c : journal.checks()) checked[c.point] = 1;
    std::vector<std::size_t> todo;
    for (std::size_t p : dipole_check_sample(routes, count))
        if ((share.empty() || share[p]) && !checked[p]) todo.push_back(p);
    std::mutex journal_lock;
    for_each_in_parallel(todo.size(), [&](std::size_t k) {
        const PlacedPoint<S>& q = *points.at(todo[k]);
        const std::vector<S> solved = exact.solve({q}).front().reading;
        const std::vector<S>& base = baselines.waters[q.water].readings;
        std::lock_guard<std::mutex> lock(journal_lock);
        const std::vector<S> dipole = journal.template read<S>(q.point).change;
        double diff = 0, size = 0;
        for (std::size_t i = 0; i < solved.size(); ++i) {
            const S change = solved[i] - base[i];
            diff = std::max(diff, std::abs(dipole[i] - change));
            size = std::max(size, std::abs(change));
        }
        journal.append_check({q.point, size > 0 ? diff / size : 0.0, q.size_to_distance});
    });
}

DipoleCheck dipole_check_of(const PointJournal& journal) {
    std::vector<CheckRecord> checks = journal.checks();
    std::sort(checks.begin(), checks.end(), [](const CheckRecord& a, const CheckRecord& b) { return a.point < b.point; });
    DipoleCheck c;
    for (const CheckRecord& r : checks) {
        c.points.push_back(std::int64_t(r.point));
        c.discrepancy.push_back(r.discrepancy);
        c.size_to_distance.push_back(r.size_to_distance);
    }
    return c;
}

template std::vector<std::size_t> dipole_check_sample(const PointRoutes<double>&, std::size_t);
template std::vector<std::size_t> dipole_check_sample(const PointRoutes<Complex>&, std::size_t);
template void check_dipole_points(const PointRoutes<double>&, std::size_t, const std::vector<char>&,
                                  const PointPath<double>&, const SweepBaselines<double>&, PointJournal&);
template void check_dipole_points(const PointRoutes<Complex>&, std::size_t, const std::vector<char>&,
                                  const PointPath<Complex>&, const SweepBaselines<Complex>&, PointJournal&);

}  // namespace murk
