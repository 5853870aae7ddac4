#include "cases/sweep/cost_model.hpp"

#include "geometry/shapes.hpp"
#include "solver/bem_system.hpp"
#include "solver/system_cost.hpp"

#include <Eigen/LU>
#include <omp.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <vector>

namespace murk {

namespace {

using Clock = std::chrono::steady_clock;

template <class F>
double best_seconds(int repeats, F f) {
    double best = INFINITY;
    for (int r = 0; r < repeats; ++r) {
        const auto t0 = Clock::now();
        f();
        best = std::min(best, std::chrono::duration<double>(Clock::now() - t0).count());
    }
    return best;
}

}  // namespace

MachineRates reference_rates(int threads) {
    // Quiet 2-core machine, 2026-12-02: the body of tools/bench/fish_grid.toml
    // (5,856 unknowns) assembled in 0.88 s on 2 threads (about 2e7 entries per
    // second per thread) and factored in 1.53 s (about 9e10 flop/s); a solve
    // against its 262 MiB of factors took about 9 ms on one thread (3e10 B/s);
    // blocked triangular solves ran at about 5e10 flop/s on one thread
    // (tools/bench_core.cpp).
    MachineRates r;
    r.threads = std::max(1, threads);
    r.entry_rate = 2e7;
    r.lu_flop_rate = 4.5e10 * std::min(r.threads, 2);
    r.solve_byte_rate = 3e10;
    r.block_flop_rate = 5e10;
    return r;
}

MachineRates measure_rates(int threads) {
    MachineRates r;
    r.threads = std::max(1, threads);
    {  // assembly: a 320-panel sphere's system (near and far pairs), one thread
        Scene<double> scene;
        scene.water_conductivity = 1.0;
        Surface<double> s;
        s.mesh = make_icosphere(1.0, 2);
        s.inner_conductivity = 2.0;
        scene.surfaces.push_back(s);
        const int saved = omp_get_max_threads();
        omp_set_num_threads(1);
        double entries = 0;
        const double t = best_seconds(2, [&] { entries = double(assemble_system(scene, {}).matrix.size()); });
        omp_set_num_threads(saved);
        r.entry_rate = entries / t;
    }
    const Eigen::Index n = 1200;
    const Eigen::MatrixXd a = Eigen::MatrixXd::Random(n, n) + double(n) * Eigen::MatrixXd::Identity(n, n);
    {  // LU, all threads
        const double t = best_seconds(2, [&] { Eigen::PartialPivLU<Eigen::MatrixXd> lu(a); });
        r.lu_flop_rate = 2.0 / 3.0 * std::pow(double(n), 3) / t;
    }
    {  // blocked solve: n x n triangular against 128 right-hand sides, one thread
        const Eigen::MatrixXd b = Eigen::MatrixXd::Random(n, 128);
        const int saved = omp_get_max_threads();
        omp_set_num_threads(1);
        Eigen::MatrixXd x;
        const double t = best_seconds(2, [&] { x = a.triangularView<Eigen::Lower>().solve(b); });
        omp_set_num_threads(saved);
        r.block_flop_rate = double(n) * double(n) * 128.0 / t;
    }
    {  // memory: one pass over 128 MiB, as a solve reads its factors
        const Eigen::VectorXd big = Eigen::VectorXd::Ones(Eigen::Index(16) << 20);
        volatile double sum = 0;  // kept, so the pass is not optimized away
        const double t = best_seconds(3, [&] { sum = big.sum(); });
        r.solve_byte_rate = double(big.size()) * sizeof(double) / t;
    }
    return r;
}

int expected_coupling_iterations(double size_to_distance) {
    if (!(size_to_distance < 0.25)) return 4;  // near the body, or unknown
    return size_to_distance < 0.1 ? 2 : 3;
}

std::size_t exact_batch_size(const SweepSizes& sizes) {
    const double point_bytes =
        double(sizes.fixed_unknowns) * double(sizes.moving_unknowns) * (sizes.complex ? 16.0 : 8.0);
    if (!(point_bytes > 0.0)) return kMaxExactBatch;
    const double budget = sizes.compressed ? kCompressedExactBatchBytes : kExactBatchBytes;
    return std::size_t(std::clamp(std::floor(budget / point_bytes), 1.0, double(kMaxExactBatch)));
}

double CostModel::fixed_part_bytes() const {
    return system_entries(double(sizes.fixed_unknowns), sizes.compressed) * scalar_bytes();
}

double CostModel::compressed_solve_seconds() const {
    return kExpectedSystemIterations * fixed_part_bytes() / rates.solve_byte_rate;
}

double CostModel::fixed_part_seconds() const {
    const double n = double(sizes.fixed_unknowns);
    if (sizes.compressed) {  // compression, the preconditioner, then the fixed part's own solve
        const double compression = image_factor() * system_entries(n, true) / (rates.entry_rate * rates.threads);
        return double(sizes.waters) * ((1 + kPreconditionerSetupShare) * compression + compressed_solve_seconds());
    }
    const double assembly = image_factor() * n * n / (rates.entry_rate * rates.threads);
    const double lu = flop_factor() * 2.0 / 3.0 * n * n * n / rates.lu_flop_rate;
    return double(sizes.waters) * (assembly + lu);
}

double CostModel::exact_point_seconds(double size_to_distance) const {
    const double n = double(sizes.fixed_unknowns), m = double(sizes.moving_unknowns);
    // Per GMRES step: a batch of points shares the solve against the factors,
    // whose blocked form passes over them about three times (Eigen packs each
    // triangle, reading and writing it, then reads the packed copy), while the
    // arithmetic is each point's own; and each point reads its two coupling
    // blocks (n m entries in all). Checked by tools/bench/estimate_check.sh.
    // The coupling blocks: the fixed water rows against the object's unknowns and
    // back; most pairs are far apart and cheap (10x the body's mixed entry rate).
    const double coupling = image_factor() * 2.0 * n * m / (10.0 * rates.entry_rate);
    if (sizes.compressed) {
        // One GMRES on the whole perturbation system (solver/coupled_solve.hpp):
        // about as many steps as a body solve, each a product with the operator
        // and the preconditioner shared by the batch, and the point's own
        // coupling products.
        const double steps = kExpectedSystemIterations;
        return steps * (fixed_part_bytes() / double(exact_batch_size(sizes)) + n * m * scalar_bytes()) /
                   rates.solve_byte_rate +
               coupling;
    }
    const double solve = (3.0 * n * n / double(exact_batch_size(sizes)) + n * m) * scalar_bytes() / rates.solve_byte_rate +
                         flop_factor() * 2.0 * n * n / rates.block_flop_rate;
    return expected_coupling_iterations(size_to_distance) * solve + coupling;
}

double CostModel::dipole_block_seconds(std::size_t points) const {
    const double n = double(sizes.fixed_unknowns);
    if (sizes.compressed) return double(points) * compressed_solve_seconds();
    return flop_factor() * 2.0 * n * n * double(points) / rates.block_flop_rate;
}

double CostModel::full_point_seconds() const {
    const double n = double(sizes.fixed_unknowns + sizes.moving_unknowns);
    return image_factor() * n * n / rates.entry_rate + flop_factor() * 2.0 / 3.0 * n * n * n / (rates.lu_flop_rate / rates.threads);
}

double CostModel::memory_bytes(bool exact, bool full) const {
    const double n = double(sizes.fixed_unknowns), m = double(sizes.moving_unknowns);
    double bytes = double(sizes.waters) * fixed_part_bytes();
    // Each point of a running batch holds its two coupling blocks, about n m / 2
    // entries each (the water rows of one part against the other part).
    // A compressed body's batches run one at a time (kCompressedExactBatchBytes).
    if (exact)
        bytes += (sizes.compressed ? 1.0 : double(rates.threads)) * double(exact_batch_size(sizes)) * n * m * scalar_bytes();
    if (full) bytes += rates.threads * (n + m) * (n + m) * scalar_bytes();
    // What the terms above leave out: the process itself (libraries, HDF5; about
    // 25 MiB), the strips of layer blocks each thread assembles into, allocator
    // slack. tools/bench/estimate_check.sh found the terms 11-14 % below the peak
    // resident memory of runs on three body sizes (792 to 2,928 panels).
    return 1.1 * bytes + 24.0 * 1024 * 1024;
}

}  // namespace murk
