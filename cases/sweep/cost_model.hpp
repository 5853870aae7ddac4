#pragma once
// What a sweep will cost before it runs: memory, and time per stage and per
// point, from the sizes of its systems and a few rates of the machine. The
// estimate (`murk run --estimate`) prints it; job shares (--shard, MPI ranks)
// are balanced by it. The model counts the dominant operations only:
//   assembly of n x n entries           n^2 / entry_rate
//   dense LU of n unknowns              (2/3) n^3 / lu_flop_rate         (x4 complex)
//   one solve against stored factors    bytes of the factors / solve_byte_rate
//                                       (memory-bound: the factors are read once)
//   blocked solve, b right-hand sides   2 n^2 b / block_flop_rate
// An exact point costs a solve per GMRES iteration (two far from the body,
// more as the object nears it) plus its coupling blocks; a dipole block one
// blocked solve; a full point its own assembly and LU. With planes bounding the
// water every entry sums over their images: assembly and coupling are scaled by
// image_factor() below.
// When the body's system is compressed (solver/system_cost.hpp: about
// c n log2 n + (512 + 12 sqrt(n)) n entries instead of n^2), the model is instead
//   compression of the operator         entries / entry_rate
//   the preconditioner                  twice as long
//   one solve                           iterations x bytes of the compressed
//                                       system / solve_byte_rate (each iteration
//                                       reads the operator and preconditioner)
// and a blocked solve is one such solve per right-hand side. Full points are
// always dense (the reference re-solve).
#include <algorithm>
#include <cstddef>

namespace murk {

struct MachineRates {
    double entry_rate = 0;       // system entries assembled per second, one thread
    double lu_flop_rate = 0;     // dense LU, flop/s, all threads
    double solve_byte_rate = 0;  // bytes of factors read per second by one thread's solve
    double block_flop_rate = 0;  // blocked triangular solve, flop/s, one thread
    int threads = 1;
};

// Rates measured on the machine this project is benchmarked on (2 cores, quiet;
// tools/bench_sweep.cpp and tools/bench_core.cpp print the figures they come
// from). Job shares use these, never the running machine's, so that every task
// of an array computes the same shares.
MachineRates reference_rates(int threads);

// The running machine's rates, from a few micro-benchmarks (about half a second).
MachineRates measure_rates(int threads);

// The sizes a sweep's cost depends on.
struct SweepSizes {
    std::size_t fixed_unknowns = 0;   // per water
    std::size_t waters = 1;
    std::size_t moving_unknowns = 0;  // the largest moving form
    std::size_t moving_panels = 0;
    std::size_t fixed_panels = 0;
    bool complex = false;
    bool compressed = false;          // the fixed part's system is compressed (uses_compression)
    int images = 0;                   // the water's images (solver/image_series.hpp), which every entry sums over
};

// Exact points are solved in batches (solve_coupled_together), their GMRES steps
// sharing one blocked solve against the body's factors, which reads the factors
// once per batch. Each point of a running batch holds its two coupling blocks
// (about body unknowns x object unknowns entries), so the batch holds as many
// points as fit in kExactBatchBytes per thread, at most kMaxExactBatch and at
// least one. Taken from the case's sizes alone, so that every run, share or rank
// deals the same batches and each point's arithmetic is the same. Measured on
// 2026-12-02 (`time build/murk run tools/bench/fish_grid.toml`, 2 threads, with
// this file's limit changed by hand to force each size; 5,856 body and 640
// object unknowns): 70 s with batches of 1, 58 s of 4, 47 s of 8, 40 s of 16 and
// 38 s of 32 (1 GB more memory than 16).
inline constexpr double kExactBatchBytes = 512.0 * 1024 * 1024;
inline constexpr std::size_t kMaxExactBatch = 16;
// A compressed body's batches run one at a time, all threads inside each step's
// products with the operator (which read its gigabytes once for the whole
// batch), so one batch may hold what the threads' batches would: 4 GiB, eight
// points of a 640-unknown object on a 45,790-panel fish (91,580 unknowns),
// where 512 MiB would leave batches of one, each reading the operator alone.
inline constexpr double kCompressedExactBatchBytes = 4.0 * 1024 * 1024 * 1024;
std::size_t exact_batch_size(const SweepSizes& sizes);

struct CostModel {
    MachineRates rates;
    SweepSizes sizes;

    double scalar_bytes() const { return sizes.complex ? 16.0 : 8.0; }
    // How much an entry costs with the water's images against one in unbounded water.
    // The first image (a plane's mirror) is often near the panels and takes the closed
    // forms; the further ones of a two-plane or sediment series are far and cheap.
    // Measured by build/murk-bench-images (10,240 unknowns, dense assembly, 2 threads,
    // quiet machine, 2026-12-03): 2.03 s unbounded, 2.30 s with one image (factor 1.13),
    // 7.75 s with 36 (3.82), 17.9 s with 77 (8.83); this rule gives 1.15, 4.30 and 7.99.
    double image_factor() const {
        return 1.0 + (sizes.images > 0 ? 0.15 : 0.0) + 0.09 * std::max(sizes.images - 1, 0);
    }
    double flop_factor() const { return sizes.complex ? 4.0 : 1.0; }
    // Seconds, on one thread unless said.
    double fixed_part_seconds() const;  // assembly and LU of every water, all threads
    double exact_point_seconds(double size_to_distance) const;
    double dipole_block_seconds(std::size_t points) const;
    double full_point_seconds() const;
    // One solve against the compressed fixed part (compressed only).
    double compressed_solve_seconds() const;
    // Bytes of one water's fixed part once factored (dense LU or compressed).
    double fixed_part_bytes() const;
    // Bytes held at once: the fixed parts' factors, and per thread the coupling
    // blocks (exact) or a whole system (full).
    double memory_bytes(bool exact, bool full) const;
};

// GMRES iterations of an exact point, by how large the object is against its
// distance from the fixed part: two when small and far (measured on the
// benchmark case), more as it nears the body.
int expected_coupling_iterations(double size_to_distance);

}  // namespace murk
