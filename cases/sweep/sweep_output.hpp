#pragma once
// Stage `commit` of murk run: the result file of a sweep (cases/RESULT_LAYOUT.md),
// written once, from the finished journal (point_journal.hpp): the metadata, the
// body's mesh and baseline, every per-point dataset at full size (points the
// journal does not hold stay "not computed"), the dipole checks, and, for a whole
// run, the analysis (/detection, /falloff), the surface fields and the XDMF
// sidecar. It is written under OUT.h5.writing and renamed onto OUT.h5 when
// complete. A share of a job array (--shard) writes its points the same way,
// without the analysis: murk merge joins the shares and analyses the whole.
#include "cases/input/case_spec.hpp"

#include <functional>
#include "cases/output/hdf5_file.hpp"
#include "cases/sweep/point_journal.hpp"
#include "cases/sweep/run_options.hpp"
#include "cases/sweep/point_result.hpp"
#include "cases/sweep/sweep_baseline.hpp"
#include "cases/sweep/sweep_plan.hpp"

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

namespace murk {


// The dipole points re-solved exactly (stage checks).
struct DipoleCheck {
    std::vector<std::int64_t> points;      // flat indices
    std::vector<double> discrepancy;       // max |dipole - exact| / max |exact|, per point
    std::vector<double> size_to_distance;  // per point
    double largest() const;
};

// /sweep/dipole_check: the dipole points re-solved exactly; `dipole_accuracy` with method "auto".
void write_dipole_check(const H5Group& root, const DipoleCheck& check, std::optional<double> dipole_accuracy);

template <class S>
class SweepFile {
public:
    // The temporary file under which a result is written before it gets its name.
    static std::string writing_path(const std::string& output_path) { return output_path + ".writing"; }

    // Creates the file (under writing_path) with every dataset, nothing computed yet.
    SweepFile(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
              const SweepBaselines<S>& baselines);

    void write_point(const PointResult<S>& result);
    // The CF history: one line per run that worked on the result (a resumed run adds its own).
    void set_history(const std::vector<std::string>& lines);
    void write_dipole_check(const DipoleCheck& check, const SweepSpec& sweep);
    // Analysis (/detection, /falloff) and surface fields for the sidecar; a share's
    // part file skips them. Then a whole run's sidecar, and the file gets its name;
    // `once_named` runs the moment it has it (H5Output::commit).
    void commit(double peak_memory_MiB, bool whole, const std::function<void()>& once_named = {});

private:
    void create_datasets();
    void write_point_values();
    // amplitude_change, phase_change and the channels' d' of a computed point, where the file has them.
    void write_channel_values(const PointResult<S>& result, const std::vector<std::size_t>& index);

    // The small per-point datasets, held until commit and then written whole: a
    // value at a time, each write would inflate and deflate a shared compressed
    // chunk (it took longer than computing a dipole map). The perturbations, a
    // chunk per point, are written as the points come.
    struct PointValues {
        std::vector<double> object_position, peak, peak_position, image_width, snr, detection_probability;
        std::vector<double> amplitude_change, phase_change;  // at the peak sensor; with a frequency
        std::vector<double> snr_amplitude, snr_phase;        // with amplitude (and phase) channels
        std::vector<std::int32_t> peak_sensor;
        std::vector<std::uint8_t> mask_reason, path;
    };
    PointValues values_;

    const CaseSpec* spec_;
    RunOptions options_;
    const SweepPlan* plan_;
    const SweepBaselines<S>* baselines_;
    std::optional<H5Output> output_;
    std::vector<PointStatus> status_;
};

// Writes the whole result file from the journal: every point it holds, its checks;
// `once_named` runs the moment the result has its name (the caller discards the journal).
template <class S>
void write_result_from_journal(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
                               const SweepBaselines<S>& baselines, const PointJournal& journal,
                               double peak_memory_MiB, const std::function<void()>& once_named = {});

extern template class SweepFile<double>;
extern template class SweepFile<Complex>;
extern template void write_result_from_journal(const CaseSpec&, const RunOptions&, const SweepPlan&,
                                               const SweepBaselines<double>&, const PointJournal&, double,
                                               const std::function<void()>&);
extern template void write_result_from_journal(const CaseSpec&, const RunOptions&, const SweepPlan&,
                                               const SweepBaselines<Complex>&, const PointJournal&, double,
                                               const std::function<void()>&);

}  // namespace murk
