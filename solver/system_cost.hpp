#pragma once
// How many entries the fixed part's system holds under each solver
// (solver_options.hpp), for the memory checks and time estimates made before
// anything is assembled. Dense: the n x n matrix, factored in place. Compressed:
// the hierarchical matrix, whose low-rank blocks grow about as n log n, and the
// preconditioner beside it.
#include <algorithm>
#include <cmath>

namespace murk {

// Entries of the compressed operator per n log2(n), as `build/murk-bench-large`
// prints it ("stored entries per n log2 n") on the built-in fish at the default
// compression tolerance (1e-7): 408 at 18,576 unknowns and 482 at 37,200,
// measured 2026-12-03; rounded up, since the near field's share falls slowly.
inline constexpr double kCompressedEntriesPerUnknownLog = 500;
// Entries of the preconditioner per unknown (its dense diagonal blocks).
inline constexpr double kPreconditionerEntriesPerUnknown = 512;
// Iterations of one compressed solve to the default iteration_tolerance, for the
// time estimate: the same benchmark measured 28 at 3,876 unknowns, 36 at 18,576
// and 41 at 37,200.
inline constexpr int kExpectedSystemIterations = 40;

// Entries held by the compressed operator and its preconditioner for n unknowns.
// Neither holds more than the dense matrix would (a block that does not compress
// is stored whole), which matters only for small n.
inline double compressed_system_entries(double n) {
    const double dense = n * n;
    const double op = n > 1 ? kCompressedEntriesPerUnknownLog * n * std::log2(n) : dense;
    return std::min(op, dense) + std::min(kPreconditionerEntriesPerUnknown * n, dense);
}

// Entries the fixed part holds once assembled and factored.
inline double system_entries(double n, bool compressed) { return compressed ? compressed_system_entries(n) : n * n; }

}  // namespace murk
