// Shares of a sweep for job-array tasks and MPI ranks (cases/sweep/work_shares):
// every point in exactly one share, the shares balanced as greedy list
// scheduling guarantees (the largest share exceeds the mean by at most the
// largest unit: Graham 1969, "Bounds on multiprocessing timing anomalies", SIAM
// J. Appl. Math.), and the deal independent of the order the units come in.
#include "cases/sweep/work_shares.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <numeric>
#include <random>

using namespace murk;

namespace {

std::vector<WorkUnit> some_units() {
    std::mt19937 random(7);
    std::uniform_real_distribution<double> cost(0.001, 0.05);
    std::vector<WorkUnit> units;
    std::size_t p = 0;
    for (int k = 0; k < 300; ++k) units.push_back({{p++}, cost(random)});              // exact points
    for (int b = 0; b < 12; ++b) {                                                     // dipole blocks
        WorkUnit u;
        for (int k = 0; k < 128; ++k) u.points.push_back(p++);
        u.seconds = 0.2;
        units.push_back(u);
    }
    for (int k = 0; k < 40; ++k) units.push_back({{p++}, 0.0});                        // masked points
    return units;
}

std::size_t total_points(const std::vector<WorkUnit>& units) {
    std::size_t n = 0;
    for (const auto& u : units) n += u.points.size();
    return n;
}

}  // namespace

TEST_CASE("shares: every point in exactly one share, for any number of shares") {
    const std::vector<WorkUnit> units = some_units();
    const std::size_t total = total_points(units);
    for (std::size_t n : {1, 2, 3, 7, 64}) {
        std::vector<int> owners(total, 0);
        for (std::size_t k = 0; k < n; ++k) {
            const std::vector<char> mine = share_points(units, total, k, n);
            for (std::size_t p = 0; p < total; ++p) owners[p] += mine[p];
        }
        CHECK(std::all_of(owners.begin(), owners.end(), [](int o) { return o == 1; }));
    }
}

TEST_CASE("shares: the largest share exceeds the mean by at most the largest unit") {
    const std::vector<WorkUnit> units = some_units();
    double sum = 0, largest_unit = 0;
    for (const auto& u : units) sum += u.seconds, largest_unit = std::max(largest_unit, u.seconds);
    for (std::size_t n : {2, 3, 5, 16}) {
        const auto shares = deal_shares(units, n);
        double largest_share = 0;
        for (const auto& s : shares) {
            double load = 0;
            for (std::size_t u : s) load += units[u].seconds;
            largest_share = std::max(largest_share, load);
        }
        CHECK(largest_share <= sum / double(n) + largest_unit + 1e-12);
    }
}

TEST_CASE("shares: the deal does not depend on the order of the units") {
    std::vector<WorkUnit> units = some_units();
    const std::size_t total = total_points(units);
    const std::vector<char> first = share_points(units, total, 1, 4);
    std::shuffle(units.begin(), units.end(), std::mt19937(3));
    CHECK(share_points(units, total, 1, 4) == first);
}
