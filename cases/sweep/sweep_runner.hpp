#pragma once
// `murk run`: a case's sweep, point by point, written incrementally to HDF5 so
// that an interrupted run keeps every finished point and --resume completes it.
// Stages: plan (axes, sensors), baseline (one solve per water conductivity),
// points (configure, build, solve, read sensors, write), analysis (detection
// range, falloff), sidecar, commit.
#include "cases/input/case_spec.hpp"

#include <atomic>
#include <cstddef>
#include <string>

namespace murk {

struct RunOptions {
    std::string output_path;
    std::string command_line;
    bool resume = false;
    bool force = false;
    bool quiet = false;
};

// Outcome of a run: every point computed and the file committed, or stopped
// by a signal with the finished points kept in the partial file.
enum class RunOutcome { complete, interrupted };

// Where a run's time and memory went (printed unless quiet; the benchmark reads it).
struct RunStats {
    double assembly_seconds = 0, factor_seconds = 0;  // the fixed part (body), all waters
    std::size_t factor_bytes = 0;                      // largest fixed part's dense factors
    double setup_seconds = 0;                          // plan, baselines, fixed part, output file
    double wall_seconds = 0;                           // the whole run
    double check_seconds = 0;                          // re-solving the dipole check points
    double point_seconds = 0;                          // exact and full points (and sorting out dipole ones)
    double dipole_seconds = 0;                         // dipole points
    std::size_t exact_points = 0, dipole_points = 0, full_points = 0;
    std::atomic<std::size_t> fallbacks{0};             // exact points that fell back on the full solve
    std::size_t checked = 0;                           // dipole points re-solved exactly
    double max_discrepancy = 0;
    double peak_memory_MiB = 0;

    RunStats() = default;
    RunStats(const RunStats& o) { *this = o; }
    RunStats& operator=(const RunStats& o) {
        assembly_seconds = o.assembly_seconds, factor_seconds = o.factor_seconds, factor_bytes = o.factor_bytes;
        setup_seconds = o.setup_seconds, wall_seconds = o.wall_seconds, check_seconds = o.check_seconds;
        point_seconds = o.point_seconds, dipole_seconds = o.dipole_seconds;
        exact_points = o.exact_points, dipole_points = o.dipole_points, full_points = o.full_points;
        fallbacks = o.fallbacks.load(), checked = o.checked, max_discrepancy = o.max_discrepancy;
        peak_memory_MiB = o.peak_memory_MiB;
        return *this;
    }
};

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options, RunStats* stats = nullptr);

// Installs SIGINT/SIGTERM handlers that ask a running sweep to stop after the
// point in progress.
void install_stop_handlers();

}  // namespace murk
