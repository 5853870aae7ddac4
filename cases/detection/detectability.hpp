#pragma once
// Detectability of an object from the perturbation it causes at the sensors: the
// ideal-observer signal-to-noise ratio d', the detection probability of the
// Neyman-Pearson detector, and the detection range along a distance axis. These feed
// /sweep/snr, /sweep/detection_probability and /detection/* (cases/RESULT_LAYOUT.md).
//
// Model: the observer knows the signal it is looking for (the perturbation at every
// sensor, amplitude and phase) and the noise is Gaussian, zero-mean and independent
// between sensors (and between receptors). The optimal detector is then the
// generalized matched filter, whose performance depends on the signal only through the
// deflection coefficient d'^2 = s^T C^{-1} s, here a sum over sensors of
// (|s_i| / sigma_i)^2 (Kay 1998, "Fundamentals of Statistical Signal Processing,
// Volume II: Detection Theory", ch. 4, sections 4.3 "Matched Filters" and 4.4
// "Generalized Matched Filters").
//
// Amplitudes. The signal amplitude of a sensor is |dV| (or |dI|): for a perturbation
// at a frequency, read by a lock-in, it is the modulus of the complex perturbation,
// because the lock-in reads both quadratures and the known-signal detector projects
// onto the known phase (the two quadratures carry independent noise of equal size, so
// d'^2 = (Re^2 + Im^2)/sigma^2). Signal and noise must use the same convention: noise
// figures here are rms, so sinusoidal signals must be rms amplitudes (a peak phasor
// divided by sqrt(2)); a direct-current signal is its value.
//
// Amplitude and phase channels ([detection] channels, cases/README.md). A fish's
// tuberous receptors come in two classes, amplitude coders (P-units) and time coders
// (T-units) (Scheich, Bullock & Hamstra 1973, "Coding properties of two classes of
// afferent nerve fibers: high-frequency electroreceptors in the electric fish,
// Eigenmannia", J. Neurophysiol. 36:39-60); a robot's lock-in can report magnitude and
// phase, whose noise need not be that of two equal quadratures (a reference that
// jitters adds phase noise only). Relative to each sensor's baseline reading V0, the
// object changes the reading's amplitude by dA = |V0 + dV| - |V0| and its phase by
// dphi = arg((V0 + dV) / V0) (to first order in dV: Re(dV conj V0) / |V0| and
// Im(dV conj V0) / |V0|^2). With independent Gaussian noise sigma on the amplitude and
// sigma_phi (rad) on the phase of every receptor or channel, the same generalized
// matched filter gives d'^2 = sum n_k ((dA_k / sigma)^2 + (dphi_k / sigma_phi)^2). An
// object that differs from the water only in permittivity changes mostly the phase,
// so only the phase channel sees it. With sigma_phi = sigma / |V0| the sum equals the
// two-quadrature model above to first order: the phase noise that plain additive
// noise causes.
#include <complex>
#include <cstdint>
#include <vector>

namespace murk {

// ---- noise models --------------------------------------------------------------

enum class NoiseKind {
    // Fish skin: every receptor on panel k sees that panel's perturbation with its own
    // independent noise of receptor_noise_V rms; a panel holds n_k receptors
    // (density x area, may be fractional). d'^2 = sum_k n_k (|dV_k| / sigma_r)^2.
    receptors,
    // Robot voltage channel read by a lock-in (or a direct-current average): white
    // amplifier noise of density voltage_noise_density_V_per_rtHz (one-sided) in an
    // equivalent noise bandwidth noise_bandwidth_Hz; sigma = e_n sqrt(B) per channel.
    voltage_amplifier,
    // Robot fixed-potential electrode whose current is measured: the same with a
    // current noise density (A/sqrt(Hz)); the signals are currents (A).
    current_amplifier,
};

// Which parts of each sensor's perturbation the observer reads.
enum class NoiseChannels {
    quadratures,          // both quadratures of dV with the sensor noise: |dV| / sigma (the model above)
    amplitude,            // only the amplitude change dA, with the sensor noise; the phase is not read
    amplitude_and_phase,  // dA with the sensor noise and the phase change dphi with phase_noise_rad
};

struct NoiseModel {
    NoiseKind kind = NoiseKind::receptors;
    NoiseChannels channels = NoiseChannels::quadratures;
    double phase_noise_rad = 0.0;                    // amplitude_and_phase: rms phase noise of one
                                                     // receptor or channel (rad)
    double receptor_noise_V = 0.0;                   // receptors: rms noise of one receptor
    double voltage_noise_density_V_per_rtHz = 0.0;   // voltage_amplifier: e_n
    double current_noise_density_A_per_rtHz = 0.0;   // current_amplifier: i_n
    double noise_bandwidth_Hz = 0.0;                 // both amplifier kinds: B (one-sided)
};

// One-sided equivalent noise bandwidth (Hz) of a plain average over integration_time_s
// (boxcar of duration T): B = integral_0^inf |sin(pi f T)/(pi f T)|^2 df = 1/(2T).
// (Parseval: the boxcar impulse response 1/T on [0,T] has integral_-inf^inf |h|^2 dt
// = 1/T, half of which is on positive frequencies.) Throws InputError unless T > 0
// and finite.
double noise_bandwidth_of_average(double integration_time_s);

// One-sided equivalent noise bandwidth (Hz) of a first-order low-pass output filter of
// time constant tau (the "time constant" setting of many lock-ins):
// B = integral_0^inf df / (1 + (2 pi f tau)^2) = 1/(4 tau). Throws InputError unless
// tau > 0 and finite.
double noise_bandwidth_of_rc_filter(double time_constant_s);

// rms noise (V or A) of one sensor channel of an amplifier model: e_n sqrt(B) or
// i_n sqrt(B). Throws InputError for a receptors model or a non-positive or
// non-finite density or bandwidth.
double channel_noise_rms(const NoiseModel& noise);

// Ideal-observer d' (dimensionless amplitude ratio, >= 0) for the perturbation
// amplitudes at the sensors (V, or A for current_amplifier; the sign or phase is
// irrelevant, the absolute value is used). receptors_per_sensor is required, one
// count >= 0 per sensor, for NoiseKind::receptors and must be empty otherwise.
// Throws InputError for non-finite amplitudes, mismatched sizes, negative or
// non-finite receptor counts, or a noise level that is not positive and finite.
// Accuracy: rounding only (the sum is scaled to avoid overflow and underflow).
double detectability_index(const NoiseModel& noise, const std::vector<double>& perturbation,
                           const std::vector<double>& receptors_per_sensor = {});

// The same for complex perturbations (a lock-in at a frequency): the amplitude of each
// sensor is the modulus |dV|.
double detectability_index(const NoiseModel& noise,
                           const std::vector<std::complex<double>>& perturbation,
                           const std::vector<double>& receptors_per_sensor = {});

// ---- amplitude and phase channels ----------------------------------------------

// How a sensor's reading changes from its baseline v0 to v0 + perturbation: the change
// of its amplitude (same unit as the reading) and of its phase (rad, in (-pi, pi]),
// both exact (not linearized), computed without cancellation for small changes. When
// v0 is zero the phase is undefined: phase_defined is false, phase_rad 0, and the
// amplitude change is |perturbation|.
struct ReadingChange {
    double amplitude = 0.0;
    double phase_rad = 0.0;
    bool phase_defined = true;
};
ReadingChange reading_change(std::complex<double> baseline, std::complex<double> perturbation);

// The two parts of d' for a model whose channels are amplitude or amplitude_and_phase:
// d'^2 = amplitude^2 + phase^2 (phase is 0 for the amplitude channel alone, and a
// sensor with an undefined phase adds nothing to it). Throws InputError for a
// quadratures model, a phase noise that is not positive and finite (with
// amplitude_and_phase), mismatched sizes, non-finite values, and what
// detectability_index refuses.
struct ChannelIndex {
    double amplitude = 0.0, phase = 0.0;
    double total() const;  // sqrt(amplitude^2 + phase^2), without overflow
};
ChannelIndex channel_detectability(const NoiseModel& noise, const std::vector<std::complex<double>>& perturbation,
                                   const std::vector<std::complex<double>>& baseline,
                                   const std::vector<double>& receptors_per_sensor = {});

// ---- Gaussian tail and detection probability -----------------------------------

// Right-tail probability of the standard normal: Q(x) = P(N(0,1) > x)
// = erfc(x / sqrt(2)) / 2. Relative accuracy that of std::erfc (a few ulp) for every
// x, including the far tail (Q(10) ~ 7.6e-24). Q(+inf) = 0, Q(-inf) = 1.
double gaussian_tail(double x);

// Inverse of gaussian_tail: the x with Q(x) = p, for p in (0, 1). A starting value
// from the rational approximation of Abramowitz & Stegun 1964, "Handbook of
// Mathematical Functions", eq. 26.2.23 (|error| < 4.5e-4) is refined by Halley steps on
// Q(x) - p, which converge cubically; the result is within a few 1e-16 (relative, or
// absolute near x = 0) of the x whose std::erfc tail equals p, over p in [1e-300, 0.5]
// (measured) and, by symmetry, (0.5, 1 - 1e-16]. p > 0.5 uses
// Q^{-1}(p) = -Q^{-1}(1 - p) (1 - p is exact there). Throws InputError for p outside
// (0, 1) or not finite.
double inverse_gaussian_tail(double p);

// Detection probability of the Neyman-Pearson detector of a known signal in Gaussian
// noise: P_D = Q(Q^{-1}(P_FA) - d') (Kay 1998, Vol. II, section 4.3.2 "Performance of
// Matched Filter", and 4.4.1 for the generalized matched filter). d' >= 0 (may be
// +inf: P_D = 1); P_FA in (0, 1). P_D(d' = 0) = P_FA; P_D rises with d'.
// Throws InputError for P_FA outside (0, 1) or d' negative or NaN.
double detection_probability(double snr, double false_alarm_probability);

// ---- detection range -----------------------------------------------------------

// Codes as written to /detection/status (0 is this module's addition for "no point
// computed"; the layout numbers the other three).
enum class RangeStatus : std::uint8_t {
    no_data = 0,       // no distance has a computed detection probability
    crossed = 1,       // range_m lies inside the sweep
    beyond_sweep = 2,  // detectable at every computed distance: range >= bound_m
    never = 3,         // detectable at no computed distance: range < bound_m
};

struct DetectionRange {
    RangeStatus status = RangeStatus::no_data;
    double range_m = 0.0;  // the crossing (m) when status == crossed; NaN otherwise
    double bound_m = 0.0;  // crossed: = range_m; beyond_sweep: the farthest computed
                           // distance; never: the nearest computed distance; no_data: NaN
    int downward_crossings = 0;  // how many times P_D falls below the level going
                                 // outward; > 1 means P_D is not monotone in distance
};

// Detection range along a distance axis. distances_m strictly increasing, > 0 and
// finite; detection_probability one value per distance, in [0, 1], NaN marking a
// distance not computed (or masked), which is skipped. A point is detectable when
// P_D >= level, level in (0, 1).
//
// Going outward, the range is the LAST crossing from detectable to not detectable:
// past it no computed distance is detectable. P_D normally falls with distance, but
// near the body it may dip (an object over a zero of the electric image, masked or
// rough points); taking the last downward crossing reports the outermost distance at
// which detection is lost, and the count of crossings flags the non-monotone cases.
// Between the two bracketing computed points (the last detectable one and the next
// computed one) P_D is interpolated linearly against ln(distance), because the
// perturbation falls as a power of distance, so P_D varies more evenly on a log axis.
// Throws InputError for bad distances, probabilities outside [0, 1], size mismatch or
// a level outside (0, 1).
DetectionRange detection_range(const std::vector<double>& distances_m,
                               const std::vector<double>& detection_probability, double level);

}  // namespace murk
