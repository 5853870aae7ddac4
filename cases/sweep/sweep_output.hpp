#pragma once
// Stages `output` and `commit` of murk run: the result file of a sweep
// (cases/RESULT_LAYOUT.md). It is created whole before the first point, every
// per-point dataset at full size and filled with "not computed"; each point is
// written (values first, its status last, then flushed) as it finishes, so a
// stopped run keeps every finished point in OUT.h5.partial and --resume reopens
// it. At the end the analysis and the surface fields are added and the file is
// renamed onto OUT.h5, with its XDMF sidecar beside it.
#include "cases/input/case_spec.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/sweep/run_options.hpp"
#include "cases/sweep/point_result.hpp"
#include "cases/sweep/sweep_baseline.hpp"
#include "cases/sweep/sweep_plan.hpp"

#include <optional>
#include <string>
#include <vector>

namespace murk {


// The dipole points re-solved exactly (stage checks).
struct PathCheck {
    std::vector<std::int64_t> points;      // flat indices
    std::vector<double> discrepancy;       // max |dipole - exact| / max |exact|, per point
    std::vector<double> size_to_distance;  // per point (NaN when an earlier run computed the point)
    double largest() const;
};

template <class S>
class SweepFile {
public:
    // A new OUT.h5.partial; refuses an existing OUT.h5 unless force, and a
    // leftover partial file unless force (with resume, use resume()).
    SweepFile(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
              const SweepBaselines<S>& baselines);
    // The partial file of an interrupted run of the same case text, reopened.
    static SweepFile resume(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
                            const SweepBaselines<S>& baselines);

    const std::vector<PointStatus>& status() const { return status_; }
    const std::vector<PathCode>& paths() const { return path_; }
    std::size_t finished() const;  // points computed or masked
    std::size_t masked(MaskReason reason) const { return mask_count_[static_cast<int>(reason)]; }

    // Not thread-safe: the caller writes one point at a time.
    void write_point(const PointResult<S>& result);
    std::vector<S> perturbation(std::size_t point) const;

    std::optional<PathCheck> path_check() const;  // written by the run this one resumes
    void write_path_check(const PathCheck& check, const SweepSpec& sweep);

    // Analysis (/detection, /falloff), surface fields for the sidecar, commit.
    void commit(double peak_memory_MiB);
    // Closes the partial file and keeps it for --resume.
    void suspend() { output_->suspend(); }
    const std::string& partial_path() const { return partial_; }

private:
    SweepFile(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
              const SweepBaselines<S>& baselines, H5Output output);
    void create_datasets();
    void count_masks();

    const CaseSpec* spec_;
    RunOptions options_;
    const SweepPlan* plan_;
    const SweepBaselines<S>* baselines_;
    mutable std::optional<H5Output> output_;  // reading a point back does not change the file
    std::string partial_;
    std::vector<PointStatus> status_;
    std::vector<PathCode> path_;
    std::vector<std::size_t> mask_count_;
};

extern template class SweepFile<double>;
extern template class SweepFile<Complex>;

}  // namespace murk
