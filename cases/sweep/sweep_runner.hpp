#pragma once
// `murk run`: a case's sweep, point by point, written incrementally to HDF5 so
// that an interrupted run keeps every finished point and --resume completes it.
// The stages, in order (each a unit of its own in this folder):
//   plan       sweep_plan        axes, points, which objects move
//              moving_object     each form of the moving object meshed once
//              point_placement   where the object goes at each point, or why it cannot
//   baselines  sweep_baseline    the fixed part factored once per water; sensors; noise
//   (estimate  sweep_estimate    points per path, memory, time; the memory check)
//   output     point_journal     the run's journal and lock (or the interrupted run's, reopened)
//   points     sweep_points      every point routed to its path, appended to the journal
//                                (point_path: path_exact, path_dipole, path_full)
//   checks     dipole_check      dipole points re-solved exactly
//   analysis   sweep_analysis    detection range and falloff
//   commit     sweep_output      the result file written from the journal, sidecar
#include "cases/input/case_spec.hpp"
#include "cases/sweep/run_stats.hpp"
#include "cases/output/stop_request.hpp"
#include "cases/sweep/sweep_output.hpp"

namespace murk {

// Outcome of a run: every point computed and the file committed, or stopped
// by a signal with the finished points kept in the partial file.
enum class RunOutcome { complete, interrupted };

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options, RunStats* stats = nullptr);

// Where a run of OUT.h5 keeps its journal (its finished points) until it commits: OUT.h5.partial.
std::string journal_path(const std::string& output_path);

}  // namespace murk
