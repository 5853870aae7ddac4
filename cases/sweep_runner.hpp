#pragma once
// `murk run`: a case's sweep, point by point, written incrementally to HDF5 so
// that an interrupted run keeps every finished point and --resume completes it.
// Stages: plan (axes, sensors), baseline (one solve per water conductivity),
// points (configure, build, solve, read sensors, write), analysis (detection
// range, falloff), sidecar, commit.
#include "cases/case_spec.hpp"

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

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options);

// Installs SIGINT/SIGTERM handlers that ask a running sweep to stop after the
// point in progress.
void install_stop_handlers();

}  // namespace murk
