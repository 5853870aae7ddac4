#pragma once
// How many entries the fixed part's system holds under each solver
// (solver_options.hpp), for the memory checks and time estimates made before
// anything is assembled. Dense: the n x n matrix, factored in place. Compressed:
// the hierarchical matrix, whose low-rank blocks grow about as n log n, and the
// preconditioner beside it.
#include <algorithm>
#include <cmath>

namespace murk {

// Entries of the compressed operator per n log2(n). A first guess, not yet
// measured: to be replaced by the figure the solver benchmark prints for the
// compressed operator (stored entries / (n log2 n)) once the compressed path runs.
inline constexpr double kCompressedEntriesPerUnknownLog = 60;
// Entries of the preconditioner per unknown (its dense diagonal blocks).
inline constexpr double kPreconditionerEntriesPerUnknown = 512;
// Iterations of one compressed solve to the default iteration_tolerance, for the
// time estimate. Also a first guess, to be measured by the benchmark.
inline constexpr int kExpectedSystemIterations = 30;

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
