#pragma once
// Where a sweep's time and memory went: printed at the end of a run unless quiet,
// read by the benchmark (tools/bench_sweep.cpp).
#include <cstddef>

namespace murk {

struct RunStats {
    double assembly_seconds = 0, factor_seconds = 0;  // the fixed part (body), all waters
    std::size_t factor_bytes = 0;                      // largest fixed part's factors
    bool compressed = false;                           // the fixed part's system was compressed
    int system_iterations = 0;                         // most iterations of its own solve (compressed)
    double setup_seconds = 0;                          // plan, baselines, objects, output file
    double placement_seconds = 0;                      // placing every point and choosing its path
    double point_seconds = 0;                          // exact and full points
    double dipole_seconds = 0;                         // dipole points
    double check_seconds = 0;                          // re-solving the dipole check points
    double wall_seconds = 0;                           // the whole run
    std::size_t exact_points = 0, dipole_points = 0, full_points = 0;  // computed by each path (whole file)
    std::size_t fallbacks = 0;                         // exact points that fell back on the full solve (this run)
    std::size_t checked = 0;                           // dipole points re-solved exactly
    double max_discrepancy = 0;
    double peak_memory_MiB = 0;
};

}  // namespace murk
