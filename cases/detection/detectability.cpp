// Ideal-observer d', Neyman-Pearson detection probability and detection range; the
// contracts and sources are in detectability.hpp.
#include "cases/detection/detectability.hpp"

#include "geometry/input_error.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
#include <sstream>
#include <string>

namespace murk {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string num(double x) {
    std::ostringstream s;
    s.precision(6);
    s << x;
    return s.str();
}

// Throws InputError "<what> must be positive and finite (got X)" unless 0 < x < inf.
void require_positive(double x, const char* what) {
    if (!(x > 0.0) || !std::isfinite(x))
        throw InputError(std::string(what) + " must be positive and finite (got " + num(x) + ")");
}

// Throws InputError unless 0 < p < 1.
void require_open_unit(double p, const char* what) {
    if (!(p > 0.0 && p < 1.0))
        throw InputError(std::string(what) + " must lie strictly between 0 and 1 (got " + num(p) + ")");
}

// The rms noise of one sensor (or receptor) of the model, validated.
double sensor_noise_rms(const NoiseModel& noise) {
    if (noise.kind == NoiseKind::receptors) {
        require_positive(noise.receptor_noise_V, "receptor noise");
        return noise.receptor_noise_V;
    }
    return channel_noise_rms(noise);
}

// d' from amplitudes |s_i| >= 0 (already absolute) and weights n_i (receptor counts,
// or 1): sqrt(sum n_i (|s_i|/sigma)^2), scaled by the largest ratio so that neither
// the squares overflow nor small ratios underflow before they are summed.
double weighted_index(const std::vector<double>& amplitude, const std::vector<double>& weight,
                      double sigma) {
    assert(amplitude.size() == weight.size());
    double largest = 0.0;
    for (std::size_t i = 0; i < amplitude.size(); ++i)
        if (weight[i] > 0.0) largest = std::max(largest, amplitude[i] / sigma);
    if (largest == 0.0 || std::isinf(largest)) return largest;  // inf: a ratio beyond range
    double sum = 0.0;
    for (std::size_t i = 0; i < amplitude.size(); ++i) {
        if (weight[i] == 0.0) continue;  // a panel without receptors contributes nothing
        const double r = (amplitude[i] / sigma) / largest;
        sum += weight[i] * r * r;
    }
    return largest * std::sqrt(sum);
}

// Validates the receptor counts against the model and returns the weights (counts for
// a receptors model, ones otherwise).
std::vector<double> sensor_weights(const NoiseModel& noise, std::size_t n_sensors,
                                   const std::vector<double>& receptors_per_sensor) {
    if (noise.kind != NoiseKind::receptors) {
        if (!receptors_per_sensor.empty())
            throw InputError("receptor counts are given for an amplifier noise model, which takes none");
        return std::vector<double>(n_sensors, 1.0);
    }
    if (receptors_per_sensor.size() != n_sensors)
        throw InputError("receptor counts are given for " + std::to_string(receptors_per_sensor.size()) +
                         " skin panels but the perturbation has " + std::to_string(n_sensors));
    for (std::size_t i = 0; i < n_sensors; ++i) {
        const double n = receptors_per_sensor[i];
        if (!(n >= 0.0) || !std::isfinite(n))
            throw InputError("receptor count of skin panel " + std::to_string(i) +
                             " must be non-negative and finite (got " + num(n) + ")");
    }
    return receptors_per_sensor;
}

}  // namespace

double noise_bandwidth_of_average(double integration_time_s) {
    require_positive(integration_time_s, "integration time");
    return 1.0 / (2.0 * integration_time_s);
}

double noise_bandwidth_of_rc_filter(double time_constant_s) {
    require_positive(time_constant_s, "lock-in time constant");
    return 1.0 / (4.0 * time_constant_s);
}

double channel_noise_rms(const NoiseModel& noise) {
    switch (noise.kind) {
        case NoiseKind::voltage_amplifier:
            require_positive(noise.voltage_noise_density_V_per_rtHz, "amplifier voltage noise density");
            break;
        case NoiseKind::current_amplifier:
            require_positive(noise.current_noise_density_A_per_rtHz, "amplifier current noise density");
            break;
        case NoiseKind::receptors:
            throw InputError("a receptor noise model has no amplifier channel noise");
    }
    require_positive(noise.noise_bandwidth_Hz, "noise bandwidth");
    const double density = noise.kind == NoiseKind::voltage_amplifier
                               ? noise.voltage_noise_density_V_per_rtHz
                               : noise.current_noise_density_A_per_rtHz;
    return density * std::sqrt(noise.noise_bandwidth_Hz);
}

double detectability_index(const NoiseModel& noise, const std::vector<double>& perturbation,
                           const std::vector<double>& receptors_per_sensor) {
    const double sigma = sensor_noise_rms(noise);
    const std::vector<double> weight = sensor_weights(noise, perturbation.size(), receptors_per_sensor);
    std::vector<double> amplitude(perturbation.size());
    for (std::size_t i = 0; i < perturbation.size(); ++i) {
        if (!std::isfinite(perturbation[i]))
            throw InputError("perturbation at sensor " + std::to_string(i) + " is not finite (got " +
                             num(perturbation[i]) + ")");
        amplitude[i] = std::abs(perturbation[i]);
    }
    return weighted_index(amplitude, weight, sigma);
}

double detectability_index(const NoiseModel& noise,
                           const std::vector<std::complex<double>>& perturbation,
                           const std::vector<double>& receptors_per_sensor) {
    std::vector<double> amplitude(perturbation.size());
    for (std::size_t i = 0; i < perturbation.size(); ++i) {
        if (!std::isfinite(perturbation[i].real()) || !std::isfinite(perturbation[i].imag()))
            throw InputError("perturbation at sensor " + std::to_string(i) + " is not finite");
        amplitude[i] = std::abs(perturbation[i]);  // hypot: no overflow of the squares
    }
    return detectability_index(noise, amplitude, receptors_per_sensor);
}

ReadingChange reading_change(std::complex<double> baseline, std::complex<double> perturbation) {
    ReadingChange c;
    const double a0 = std::abs(baseline);
    if (a0 == 0.0) {
        c.amplitude = std::abs(perturbation);
        c.phase_defined = false;
        return c;
    }
    // |v0 + dv| - |v0| = (2 Re(dv conj v0) + |dv|^2) / (|v0 + dv| + |v0|): no difference
    // of nearly equal numbers when dv is small.
    const double a1 = std::abs(baseline + perturbation);
    const double projection = (perturbation * std::conj(baseline)).real();
    const double dv = std::abs(perturbation);
    c.amplitude = (2.0 * projection + dv * dv) / (a1 + a0);
    // arg(1 + r), r = dv / v0: 1 + Re r stays near 1 for small r, and Im r is exact.
    const std::complex<double> r = perturbation / baseline;
    c.phase_rad = std::atan2(r.imag(), 1.0 + r.real());
    return c;
}

double ChannelIndex::total() const { return std::hypot(amplitude, phase); }

ChannelIndex channel_detectability(const NoiseModel& noise, const std::vector<std::complex<double>>& perturbation,
                                   const std::vector<std::complex<double>>& baseline,
                                   const std::vector<double>& receptors_per_sensor) {
    if (noise.channels == NoiseChannels::quadratures)
        throw InputError("amplitude and phase channels asked of a model that reads both quadratures");
    if (baseline.size() != perturbation.size())
        throw InputError("baseline readings are given for " + std::to_string(baseline.size()) +
                         " sensors but the perturbation has " + std::to_string(perturbation.size()));
    const bool phase = noise.channels == NoiseChannels::amplitude_and_phase;
    if (phase) require_positive(noise.phase_noise_rad, "phase noise");
    const double sigma = sensor_noise_rms(noise);
    const std::vector<double> weight = sensor_weights(noise, perturbation.size(), receptors_per_sensor);
    std::vector<double> amplitude(perturbation.size()), phase_change(perturbation.size());
    for (std::size_t i = 0; i < perturbation.size(); ++i) {
        const std::complex<double> v0 = baseline[i], dv = perturbation[i];
        if (!std::isfinite(dv.real()) || !std::isfinite(dv.imag()) || !std::isfinite(v0.real()) ||
            !std::isfinite(v0.imag()))
            throw InputError("perturbation or baseline at sensor " + std::to_string(i) + " is not finite");
        const ReadingChange c = reading_change(v0, dv);
        amplitude[i] = std::abs(c.amplitude);
        phase_change[i] = std::abs(c.phase_rad);  // 0 where undefined: that sensor adds nothing
    }
    ChannelIndex out;
    out.amplitude = weighted_index(amplitude, weight, sigma);
    if (phase) out.phase = weighted_index(phase_change, weight, noise.phase_noise_rad);
    return out;
}

double gaussian_tail(double x) { return 0.5 * std::erfc(x / std::sqrt(2.0)); }

double inverse_gaussian_tail(double p) {
    require_open_unit(p, "tail probability");
    if (p > 0.5) return -inverse_gaussian_tail(1.0 - p);  // 1 - p exact for p in [0.5, 1]
    if (p == 0.5) return 0.0;
    // Starting value: Abramowitz & Stegun 1964, eq. 26.2.23, for 0 < p <= 0.5.
    const double t = std::sqrt(-2.0 * std::log(p));
    double x = t - (2.515517 + t * (0.802853 + t * 0.010328)) /
                       (1.0 + t * (1.432788 + t * (0.189269 + t * 0.001308)));
    // Halley steps on f(x) = Q(x) - p, with f' = -phi(x), f'' = x phi(x):
    // u = (Q(x) - p) / phi(x) is the Newton step, and Halley's correction divides it by
    // 1 - x u / 2. From |error| < 4.5e-4 two steps reach rounding; a few more are
    // allowed and stop once the step is below the rounding of x.
    const double inv_sqrt_2pi = 0.3989422804014327;  // 1/sqrt(2 pi)
    for (int iter = 0; iter < 6; ++iter) {
        const double phi = inv_sqrt_2pi * std::exp(-0.5 * x * x);
        const double u = (gaussian_tail(x) - p) / phi;
        const double step = u / (1.0 - 0.5 * x * u);
        x += step;
        if (std::abs(step) <= 1e-15 * std::abs(x)) break;
    }
    return x;
}

double detection_probability(double snr, double false_alarm_probability) {
    require_open_unit(false_alarm_probability, "false alarm probability");
    if (!(snr >= 0.0))
        throw InputError("signal-to-noise ratio must be non-negative (got " + num(snr) + ")");
    return gaussian_tail(inverse_gaussian_tail(false_alarm_probability) - snr);
}

DetectionRange detection_range(const std::vector<double>& distances_m,
                               const std::vector<double>& detection_probability, double level) {
    require_open_unit(level, "detection probability level");
    if (distances_m.size() != detection_probability.size())
        throw InputError("detection range: " + std::to_string(distances_m.size()) + " distances but " +
                         std::to_string(detection_probability.size()) + " detection probabilities");
    for (std::size_t i = 0; i < distances_m.size(); ++i) {
        require_positive(distances_m[i], "distance");
        if (i > 0 && !(distances_m[i] > distances_m[i - 1]))
            throw InputError("distances must increase strictly (" + num(distances_m[i - 1]) + " m then " +
                             num(distances_m[i]) + " m)");
        const double pd = detection_probability[i];
        if (!std::isnan(pd) && !(pd >= 0.0 && pd <= 1.0))
            throw InputError("detection probability at distance " + num(distances_m[i]) +
                             " m lies outside [0, 1] (got " + num(pd) + ")");
    }

    // The computed points, in order of distance.
    std::vector<std::size_t> computed;
    for (std::size_t i = 0; i < distances_m.size(); ++i)
        if (!std::isnan(detection_probability[i])) computed.push_back(i);

    DetectionRange out;
    out.range_m = kNaN;
    out.bound_m = kNaN;
    if (computed.empty()) return out;  // no_data

    auto detectable = [&](std::size_t i) { return detection_probability[i] >= level; };
    // The last detectable computed point, and the count of downward crossings.
    std::ptrdiff_t last = -1;
    for (std::size_t k = 0; k < computed.size(); ++k) {
        if (detectable(computed[k])) last = static_cast<std::ptrdiff_t>(k);
        if (k + 1 < computed.size() && detectable(computed[k]) && !detectable(computed[k + 1]))
            ++out.downward_crossings;
    }
    if (last < 0) {
        out.status = RangeStatus::never;
        out.bound_m = distances_m[computed.front()];
        return out;
    }
    if (static_cast<std::size_t>(last) + 1 == computed.size()) {
        out.status = RangeStatus::beyond_sweep;
        out.bound_m = distances_m[computed.back()];
        return out;
    }
    // Bracket: a detectable point i and the next computed point j, not detectable.
    const std::size_t i = computed[static_cast<std::size_t>(last)];
    const std::size_t j = computed[static_cast<std::size_t>(last) + 1];
    const double pi = detection_probability[i], pj = detection_probability[j];
    assert(pi >= level && pj < level);
    const double t = (pi - level) / (pi - pj);  // in [0, 1): pi - pj > 0
    const double ln_r = std::log(distances_m[i]) + t * (std::log(distances_m[j]) - std::log(distances_m[i]));
    out.status = RangeStatus::crossed;
    out.range_m = t == 0.0 ? distances_m[i] : std::exp(ln_r);
    out.bound_m = out.range_m;
    return out;
}

}  // namespace murk
