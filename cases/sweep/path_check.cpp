#include "cases/sweep/path_check.hpp"

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
std::vector<std::size_t> path_check_sample(const PointRoutes<S>& routes, std::size_t count) {
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
PathCheck check_dipole_points(const PointRoutes<S>& routes, std::size_t count, const PointPath<S>& exact,
                              const SweepBaselines<S>& baselines, const SweepFile<S>& file) {
    const auto points = dipole_points(routes);
    const std::vector<std::size_t> sample = path_check_sample(routes, count);
    PathCheck check;
    check.discrepancy.resize(sample.size());
    for (std::size_t p : sample) {
        check.points.push_back(static_cast<std::int64_t>(p));
        check.size_to_distance.push_back(points.at(p)->size_to_distance);
    }
    std::mutex reading;
    for_each_in_parallel(sample.size(), [&](std::size_t k) {
        const PlacedPoint<S>& q = *points.at(sample[k]);
        const std::vector<S> solved = exact.solve({q}).front().reading;
        const std::vector<S>& base = baselines.waters[q.water].readings;
        std::vector<S> dipole;
        {
            std::lock_guard<std::mutex> lock(reading);
            dipole = file.perturbation(q.point);
        }
        double diff = 0, size = 0;
        for (std::size_t i = 0; i < solved.size(); ++i) {
            const S change = solved[i] - base[i];
            diff = std::max(diff, std::abs(dipole[i] - change));
            size = std::max(size, std::abs(change));
        }
        check.discrepancy[k] = size > 0 ? diff / size : 0.0;
    });
    return check;
}

template std::vector<std::size_t> path_check_sample(const PointRoutes<double>&, std::size_t);
template std::vector<std::size_t> path_check_sample(const PointRoutes<Complex>&, std::size_t);
template PathCheck check_dipole_points(const PointRoutes<double>&, std::size_t, const PointPath<double>&,
                                       const SweepBaselines<double>&, const SweepFile<double>&);
template PathCheck check_dipole_points(const PointRoutes<Complex>&, std::size_t, const PointPath<Complex>&,
                                       const SweepBaselines<Complex>&, const SweepFile<Complex>&);

}  // namespace murk
