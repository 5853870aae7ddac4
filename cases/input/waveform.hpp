#pragma once
// The emitter's periodic waveform of [signal] (cases/README.md): harmonics given
// by the user, or samples over one period decomposed into harmonics by a discrete
// Fourier transform. The case's emitter values (organ current, source currents,
// electrode currents and voltages) are rms values, as everywhere in murk: with a
// waveform they are its rms over one period, so that at every instant the emitter
// carries its given value times w(t) / rms(w) (for a sinusoid that is the usual
// sqrt(2) x rms x cos). murk run solves the harmonics that carry more than
// energy_fraction of the waveform's energy and synthesizes each sensor's waveform
// from them (cases/sweep/waveform_synthesis.hpp).
#include <complex>
#include <cstddef>
#include <vector>

namespace murk {

// One term a cos(2 pi n f0 t + phase) of a periodic waveform.
struct Harmonic {
    int order = 1;           // n >= 1
    double amplitude = 0.0;  // a >= 0, in the waveform's own units
    double phase_rad = 0.0;
    // Its share of the mean square of the waveform: a^2 / 2, or for the harmonic at
    // the Nyquist order of an even number of samples a^2 (cos(pi k)^2 = 1 at every sample).
    double energy = 0.0;
};

struct WaveformSpec {
    enum class Form { harmonics, samples };
    Form form = Form::harmonics;
    double fundamental_Hz = 0.0;
    std::vector<Harmonic> harmonics;  // by increasing order, each order once; from samples: orders 1 .. N/2
    std::vector<double> samples;      // Form::samples: one period as given, uniform, the first not repeated
    double energy_fraction = 1e-3;    // harmonics carrying more than this share of the energy are solved
    int synthesis_samples = 0;        // time samples per period of the synthesized waveforms
    // Which positions of the map (flat indices over the sweep axes other than frequency) get
    // their synthesized waveform written; `peak` adds the one with the largest peak perturbation.
    std::vector<std::size_t> synthesize_points;
    bool synthesize_peak = false;
    bool synthesize_all = false;  // "all": every position (refused when too large, see the reader)
    int line = 0;                 // line of [signal]
};

// Harmonics of one period of uniform samples (the first not repeated at the end) by a
// direct discrete Fourier transform, O(N^2), which is cheap for the few hundred samples a
// period takes: c_n = (2/N) sum_k s_k exp(-2 pi i n k / N) for 1 <= n < N/2 and (1/N) times
// that sum at n = N/2, so that s_k = mean + sum_n a_n cos(2 pi n k / N + phase_n) exactly.
// Every order 1 .. N/2 is returned, zero amplitudes included.
std::vector<Harmonic> harmonics_of_samples(const std::vector<double>& samples);

// The mean of the samples (the term at zero frequency, which murk does not solve).
double samples_mean(const std::vector<double>& samples);

// The harmonics' sum at `count` uniform instants of one period: sum a cos(2 pi n k / count + phase).
std::vector<double> waveform_samples(const std::vector<Harmonic>& harmonics, int count);

// The waveform's rms over one period, sqrt(sum of the harmonics' energies) (Parseval; the
// mean, which murk refuses, is not part of it).
double waveform_rms(const WaveformSpec& w);

// The harmonics murk solves: those whose energy exceeds energy_fraction of the total, and
// the fundamental (order 1) whenever it has any amplitude, by increasing order.
std::vector<Harmonic> kept_harmonics(const WaveformSpec& w);
double total_energy(const std::vector<Harmonic>& harmonics);

// One period synthesized from complex amplitudes: x_k = Re sum_j c_j exp(2 pi i n_j k / count),
// for the phasor convention exp(+i omega t) of the solver (cases/scene/scene_builder.hpp).
std::vector<double> synthesize_period(const std::vector<int>& orders, const std::vector<std::complex<double>>& phasors,
                                      int count);

}  // namespace murk
