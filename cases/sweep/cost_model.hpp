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
// blocked solve; a full point its own assembly and LU.
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
};

struct CostModel {
    MachineRates rates;
    SweepSizes sizes;

    double scalar_bytes() const { return sizes.complex ? 16.0 : 8.0; }
    double flop_factor() const { return sizes.complex ? 4.0 : 1.0; }
    // Seconds, on one thread unless said.
    double fixed_part_seconds() const;  // assembly and LU of every water, all threads
    double exact_point_seconds(double size_to_distance) const;
    double dipole_block_seconds(std::size_t points) const;
    double full_point_seconds() const;
    // Bytes held at once: the fixed parts' factors, and per thread the coupling
    // blocks (exact) or a whole system (full).
    double memory_bytes(bool exact, bool full) const;
};

// GMRES iterations of an exact point, by how large the object is against its
// distance from the fixed part: two when small and far (measured on the
// benchmark case), more as it nears the body.
int expected_coupling_iterations(double size_to_distance);

}  // namespace murk
