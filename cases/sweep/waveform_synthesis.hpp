#pragma once
// The emitter's periodic waveform in a sweep's result (cases/RESULT_LAYOUT.md, /signal and
// the synthesis datasets of /sweep). murk run solves the kept harmonics as a frequency axis
// (sweep_plan): the perturbation P_n at frequency n f0 is the (rms) answer to a sinusoid of
// the emitter's given rms value. The waveform w(t) = sum a_n cos(2 pi n f0 t + phase_n) is
// scaled to the given value as its rms, so the emitter's harmonic n has the rms phasor
// a_n exp(i phase_n) / (sqrt(2) rms(w)) times that value, and a sensor's perturbation at
// time t is
//   p(t) = Re sum_n (a_n exp(i phase_n) / rms(w)) P_n exp(i 2 pi n f0 t),
// its local baseline waveform b(t) the same sum over the baseline readings. The synthesis
// reads everything from the result file, so a resumed run and murk merge give the same bits
// as one uninterrupted run.
#include "cases/input/case_spec.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/sweep/sweep_axes.hpp"

#include <string>
#include <vector>

namespace murk {

// Values a default synthesize (no key) writes every position's waveform up to; beyond it
// only the peak position's. "all" is refused beyond kMaxSynthesisValues.
inline constexpr std::size_t kDefaultSynthesisValues = std::size_t(1) << 20;
inline constexpr std::size_t kMaxSynthesisValues = std::size_t(1) << 25;

// Refuses (InputError naming [signal]'s line) synthesize = "all" when positions x sensors x
// synthesis_samples exceeds kMaxSynthesisValues.
void check_synthesis_size(const CaseSpec& spec, std::size_t positions, std::size_t sensors);

// The kept harmonics, their share of the energy and the energy left out, one line each.
std::string describe_kept_harmonics(const WaveformSpec& w);

// /signal: the waveform's harmonics (all, with their energy share and whether solved), its
// rms, the energy left out, the emitter's waveform over one period.
void write_signal_group(const H5Group& root, const WaveformSpec& w);

// With a /signal group: the fundamental's amplitude and phase, the phase shift and the
// change of the biphasic peak ratio per position and sensor, and the synthesized waveforms
// of the chosen positions, into /sweep. Does nothing without /signal.
void write_waveform_synthesis(const H5Group& root, const std::vector<SweepAxis>& axes);

// The ratio of the positive peak to the negative peak's magnitude of one period,
// max(x) / -min(x); NaN unless the period has both phases.
double phase_peak_ratio(const std::vector<double>& x);

}  // namespace murk
