#pragma once
// How many entries the fixed part's system holds under each solver
// (solver_options.hpp), for the memory checks and time estimates made before
// anything is assembled. Dense: the n x n matrix, factored in place. Compressed:
// the layer kernels' hierarchical matrices (layer_operator.hpp), whose low-rank
// blocks grow about as n log n, and the preconditioner beside it.
#include <algorithm>
#include <cmath>

namespace murk {

// Entries of the compressed operator per n log2(n), as `build/murk-bench-large`
// prints it ("stored entries per n log2 n") on the built-in fish at the default
// compression tolerance (1e-7), stored as layer kernels: 200 at 18,576 unknowns
// and 279 at 100,800 (2026-12-04; one matrix over the unknowns had needed 372
// to 486); rounded up, since the near field's share falls slowly.
inline constexpr double kCompressedEntriesPerUnknownLog = 300;
// Entries of the preconditioner (hodlr_inverse.hpp) per unknown: its dense
// leaves (up to 512 unknowns each) and its low-rank factors, whose ranks grow
// about as sqrt(n) on a surface. The same benchmark at the default
// preconditioner_tolerance (1e-4) measured 1,950 at 18,576 unknowns, 2,630 at
// 37,200 and 3,930 at 91,580 (2026-12-04): 512 + 10.6, 11.0 and 11.3 sqrt(n);
// with the ranks cut at 300 (hodlr_inverse.hpp), 3,520 at 91,580 (9.9 sqrt(n)).
inline constexpr double kPreconditionerLeafEntries = 512;
inline constexpr double kPreconditionerEntriesPerRootUnknown = 12;
// At the default preconditioner_tolerance those entries are stored in single
// precision (CompressedSystem::kSinglePrecisionFrom): half a working-precision
// entry each. Like the ranks above, this holds for the default tolerance only.
inline constexpr double kPreconditionerStorageShare = 0.5;
// Building the preconditioner takes longer than the compression of the layer
// kernels: the same benchmark measured 1.4 times it at 18,576 unknowns and 2.6
// times at 100,800 (2026-12-04); between the two, since the smaller sizes
// dominate sweeps.
inline constexpr double kPreconditionerSetupShare = 2.0;
// Iterations of one compressed solve to the default iteration_tolerance, for the
// time estimate: the same benchmark measured 4 or 5 from 3,876 to 91,580
// unknowns; one more for the last preconditioner solve.
inline constexpr int kExpectedSystemIterations = 6;

// Entries held by the compressed operator and its preconditioner for n unknowns,
// counted in working-precision entries (the preconditioner's at
// kPreconditionerStorageShare). Neither holds more than the dense matrix would
// (a block that does not compress is stored whole), which matters only for small n.
inline double compressed_system_entries(double n) {
    const double dense = n * n;
    const double op = n > 1 ? kCompressedEntriesPerUnknownLog * n * std::log2(n) : dense;
    const double preconditioner = (kPreconditionerLeafEntries + kPreconditionerEntriesPerRootUnknown * std::sqrt(n)) * n;
    return std::min(op, dense) + kPreconditionerStorageShare * std::min(preconditioner, dense);
}

// Entries the fixed part holds once assembled and factored.
inline double system_entries(double n, bool compressed) { return compressed ? compressed_system_entries(n) : n * n; }

}  // namespace murk
