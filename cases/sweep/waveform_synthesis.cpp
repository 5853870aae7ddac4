#include "cases/sweep/waveform_synthesis.hpp"

#include "cases/output/result_layout.hpp"
#include "geometry/input_error.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdio>
#include <limits>
#include <sstream>

namespace murk {

namespace {

using C = std::complex<double>;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string synthesize_text(const WaveformSpec& w) {
    std::string text = w.synthesize_all ? "all" : "";
    for (std::size_t p : w.synthesize_points) text += (text.empty() ? "" : " ") + std::to_string(p);
    if (w.synthesize_peak) text += (text.empty() ? "" : " ") + std::string("peak");
    return text.empty() ? "default" : text;
}

// What /signal says about the harmonics, read back.
struct SignalInFile {
    double fundamental_Hz = 0, rms = 0;
    int samples = 0;
    std::vector<int> orders;     // kept, by increasing order
    std::vector<C> weights;      // a exp(i phase) / rms of each kept harmonic
    std::string synthesize;
};

SignalInFile read_signal(const H5Group& root) {
    const H5Group signal = root.open_group("signal");
    SignalInFile s;
    s.fundamental_Hz = signal.double_attribute("fundamental_frequency");
    s.rms = signal.double_attribute("waveform_rms");
    s.samples = int(signal.int_attribute("synthesis_samples"));
    s.synthesize = signal.string_attribute("synthesize");
    const std::vector<std::int32_t> order = signal.read<std::int32_t>("harmonic").values;
    const std::vector<double> amplitude = signal.read<double>("amplitude").values;
    const std::vector<double> phase = signal.read<double>("phase").values;
    const std::vector<std::uint8_t> kept = signal.read<std::uint8_t>("kept").values;
    for (std::size_t k = 0; k < order.size(); ++k)
        if (kept[k]) {
            s.orders.push_back(order[k]);
            s.weights.push_back(std::polar(amplitude[k] / s.rms, phase[k]));
        }
    return s;
}

}  // namespace

double phase_peak_ratio(const std::vector<double>& x) {
    const auto [lo, hi] = std::minmax_element(x.begin(), x.end());
    if (x.empty() || !(*lo < 0.0) || !(*hi > 0.0)) return kNaN;
    return *hi / -*lo;
}

void check_synthesis_size(const CaseSpec& spec, std::size_t positions, std::size_t sensors) {
    if (!spec.waveform || !spec.waveform->synthesize_all) return;
    const double values = double(positions) * double(sensors) * double(spec.waveform->synthesis_samples);
    if (values > double(kMaxSynthesisValues))
        throw InputError(spec.path + ":" + std::to_string(spec.waveform->line) + ": signal.synthesize: \"all\" would write " +
                         std::to_string(positions) + " positions x " + std::to_string(sensors) + " sensors x " +
                         std::to_string(spec.waveform->synthesis_samples) + " samples, more than " +
                         std::to_string(kMaxSynthesisValues) + " values; list positions or write \"peak\"");
}

std::string describe_kept_harmonics(const WaveformSpec& w) {
    const double total = total_energy(w.harmonics);
    const std::vector<Harmonic> kept = kept_harmonics(w);
    double kept_energy = 0;
    std::ostringstream out;
    out << "murk: waveform: " << kept.size() << " of " << w.harmonics.size() << " harmonics solved (energy_fraction "
        << w.energy_fraction << "):";
    for (const Harmonic& h : kept) {
        kept_energy += h.energy;
        char one[96];
        std::snprintf(one, sizeof one, " %d (%.4g Hz, %.3g)", h.order, h.order * w.fundamental_Hz, h.energy / total);
        out << one;
    }
    char left[96];
    std::snprintf(left, sizeof left, "; energy left out %.3g\n", (total - kept_energy) / total);
    out << left;
    return out.str();
}

void write_signal_group(const H5Group& root, const WaveformSpec& w) {
    const H5Group signal = root.group("signal");
    const double rms = waveform_rms(w);
    const double total = total_energy(w.harmonics);
    const std::vector<Harmonic> kept = kept_harmonics(w);
    signal.set_attribute("form", w.form == WaveformSpec::Form::samples ? "samples" : "harmonics");
    signal.set_attribute("fundamental_frequency", w.fundamental_Hz);
    signal.set_attribute("energy_fraction", w.energy_fraction);
    signal.set_attribute("waveform_rms", rms);
    signal.set_attribute("synthesis_samples", std::int64_t(w.synthesis_samples));
    signal.set_attribute("synthesize", synthesize_text(w));
    signal.set_attribute("scaling", "the emitter's given (rms) values are the waveform's rms over one period: at time t "
                                    "the emitter carries its value times w(t) / waveform_rms");
    std::vector<std::int32_t> order;
    std::vector<double> amplitude, phase, share;
    std::vector<std::uint8_t> solved;
    double kept_energy = 0;
    for (const Harmonic& h : w.harmonics) {
        order.push_back(h.order);
        amplitude.push_back(h.amplitude);
        phase.push_back(h.phase_rad);
        share.push_back(h.energy / total);
        const bool in = std::any_of(kept.begin(), kept.end(), [&](const Harmonic& k) { return k.order == h.order; });
        solved.push_back(in);
        if (in) kept_energy += h.energy;
    }
    signal.set_attribute("energy_left_out", (total - kept_energy) / total);
    signal.write_coordinate("harmonic", order, "1", "order of the harmonic (multiple of the fundamental frequency)");
    signal.write("amplitude", amplitude, "1", "amplitude a of the harmonic a cos(2 pi n f0 t + phase), waveform's units")
        .label_dimensions({"harmonic"});
    signal.write("phase", phase, "rad", "phase of the harmonic").label_dimensions({"harmonic"});
    signal.write("energy_share", share, "1", "share of the waveform's mean square the harmonic carries")
        .label_dimensions({"harmonic"});
    signal.write("kept", solved, "1", "whether murk solved the harmonic (its share exceeds energy_fraction, or it is the fundamental)")
        .label_dimensions({"harmonic"})
        .set_flags(std::vector<std::uint8_t>{0, 1}, "left_out solved");
    const int n = w.synthesis_samples;
    std::vector<double> time = std::vector<double>(std::size_t(n)), as_solved = waveform_samples(kept, n), whole = waveform_samples(w.harmonics, n);
    for (int k = 0; k < n; ++k) time[std::size_t(k)] = k / (n * w.fundamental_Hz);
    for (double& v : as_solved) v /= rms;
    for (double& v : whole) v /= rms;
    signal.write_coordinate("time", time, "s", "time from the start of the period");
    signal.write("emitter_waveform", as_solved, "1", "the emitter's waveform over one period from the solved harmonics, "
                                                     "relative to its given rms value")
        .label_dimensions({"time"});
    signal.write("emitter_waveform_all_harmonics", whole, "1",
                 "the emitter's waveform over one period from every harmonic, relative to its given rms value")
        .label_dimensions({"time"});
}

void write_waveform_synthesis(const H5Group& root, const std::vector<SweepAxis>& axes) {
    if (!root.exists("signal")) return;
    const SignalInFile signal = read_signal(root);
    const H5Group sweep = root.open_group(layout::kSweep);
    const int f = find_axis(axes, AxisKind::frequency);
    const int w = find_axis(axes, AxisKind::water_conductivity);
    if (f < 0 || axes[f].values.size() != signal.orders.size())
        throw InputError(root.file_name() + ": /signal's solved harmonics do not match the frequency axis of /sweep");
    const std::size_t harmonics = signal.orders.size();
    // The map's positions: every axis but frequency, in C order.
    std::vector<SweepAxis> others;
    std::vector<std::string> dims;
    for (std::size_t a = 0; a < axes.size(); ++a)
        if (int(a) != f) others.push_back(axes[a]), dims.push_back(axes[a].name);
    const std::size_t positions = point_count(others);
    const H5Dataset perturbation = sweep.dataset("perturbation");
    const std::size_t sensors = std::size_t(perturbation.shape().back());
    const std::vector<std::uint8_t> status = sweep.read<std::uint8_t>(layout::kStatus).values;
    const H5Dataset baseline_set = sweep.dataset("baseline_reading");
    const std::vector<C> baseline = baseline_set.read<C>().values;  // (water, frequency[, gap], sensor)
    const std::size_t fundamental =
        std::size_t(std::find(signal.orders.begin(), signal.orders.end(), 1) - signal.orders.begin());
    const int n = signal.samples;

    // The flat point of a position at harmonic j.
    auto point_of = [&](std::size_t position, std::size_t j) {
        const std::vector<std::size_t> index = unflatten(position, others);
        std::size_t p = 0;
        for (std::size_t a = 0, o = 0; a < axes.size(); ++a)
            p = p * axes[a].values.size() + (int(a) == f ? j : index[o++]);
        return p;
    };
    auto water_of = [&](std::size_t position) {
        if (w < 0) return std::size_t(0);
        return unflatten(position, others)[std::size_t(w < f ? w : w - 1)];
    };
    // With a boundary-distance axis (after frequency among the fixed axes) the baselines
    // are per (water, frequency, gap).
    const int d = find_axis(axes, AxisKind::boundary_distance);
    const std::size_t gaps = d >= 0 ? axes[std::size_t(d)].values.size() : 1;
    auto gap_of = [&](std::size_t position) {
        if (d < 0) return std::size_t(0);
        return unflatten(position, others)[std::size_t(d < f ? d : d - 1)];
    };
    // The phasors of a position's perturbation and local baseline per harmonic, or false when
    // one of its points is not computed.
    auto phasors = [&](std::size_t position, std::vector<std::vector<C>>& p, std::vector<std::vector<C>>& b) {
        p.assign(harmonics, {});
        b.assign(harmonics, {});
        for (std::size_t j = 0; j < harmonics; ++j) {
            const std::size_t point = point_of(position, j);
            if (status[point] != std::uint8_t(PointStatus::computed)) return false;
            const std::vector<std::size_t> index = unflatten(point, axes);
            H5Shape offset(index.begin(), index.end()), count(index.size(), 1);
            offset.push_back(0), count.push_back(sensors);
            p[j] = perturbation.read_slab<C>(offset, count);
            const std::size_t row = ((water_of(position) * harmonics + j) * gaps + gap_of(position)) * sensors;
            b[j].assign(baseline.begin() + std::ptrdiff_t(row), baseline.begin() + std::ptrdiff_t(row + sensors));
            for (std::size_t s = 0; s < sensors; ++s) p[j][s] *= signal.weights[j], b[j][s] *= signal.weights[j];
        }
        return true;
    };
    // exp(2 pi i n_j k / N) once for all sensors and positions: the same numbers
    // synthesize_period computes, a table instead of a sine per sample.
    std::vector<C> turns(harmonics * std::size_t(n));
    for (std::size_t j = 0; j < harmonics; ++j)
        for (int k = 0; k < n; ++k)
            turns[j * std::size_t(n) + std::size_t(k)] =
                std::polar(1.0, 2.0 * M_PI * (double((long long)k * signal.orders[j] % n) / double(n)));
    auto period = [&](const std::vector<std::vector<C>>& x, std::size_t s) {
        std::vector<double> out(std::size_t(n), 0.0);
        for (std::size_t j = 0; j < harmonics; ++j)
            for (std::size_t k = 0; k < std::size_t(n); ++k) out[k] += (x[j][s] * turns[j * std::size_t(n) + k]).real();
        return out;
    };

    std::vector<double> amplitude(positions * sensors, kNaN), phase(positions * sensors, kNaN),
        shift(positions * sensors, kNaN), ratio_change(positions * sensors, kNaN), peak(positions, kNaN);
    std::vector<std::vector<C>> p, b;
    for (std::size_t q = 0; q < positions; ++q) {
        if (!phasors(q, p, b)) continue;
        double largest = 0;
        for (std::size_t s = 0; s < sensors; ++s) {
            const std::size_t at = q * sensors + s;
            if (fundamental < harmonics) {
                const C p1 = p[fundamental][s], b1 = b[fundamental][s];
                amplitude[at] = std::abs(p1) / std::sqrt(2.0);  // rms, as every amplitude murk writes
                phase[at] = std::arg(p1);
                shift[at] = std::arg((b1 + p1) / b1);
            }
            const std::vector<double> dp = period(p, s);
            std::vector<double> local = period(b, s);
            const double before = phase_peak_ratio(local);
            for (int k = 0; k < n; ++k) local[std::size_t(k)] += dp[std::size_t(k)];
            ratio_change[at] = phase_peak_ratio(local) - before;
            for (double v : dp) largest = std::max(largest, std::abs(v));
        }
        peak[q] = largest;
    }
    H5Shape shape;
    for (const SweepAxis& a : others) shape.push_back(a.values.size());
    H5Shape with_sensor = shape;
    with_sensor.push_back(sensors);
    std::vector<std::string> dims_sensor = dims;
    dims_sensor.push_back(layout::kSensor);
    const std::string units = perturbation.string_attribute("units");
    const H5Layout compressed = H5Layout::compressed(4);
    sweep.write("fundamental_amplitude", amplitude, with_sensor, units,
                "rms amplitude of the perturbation's component at the waveform's fundamental frequency", compressed)
        .label_dimensions(dims_sensor);
    sweep.write("fundamental_phase", phase, with_sensor, "rad",
                "phase of the perturbation at the fundamental (exp(+i omega t) convention, relative to the emitter's cos)",
                compressed)
        .label_dimensions(dims_sensor);
    sweep.write("fundamental_phase_shift", shift, with_sensor, "rad",
                "phase of the local waveform's fundamental with the object less that without it", compressed)
        .label_dimensions(dims_sensor);
    sweep.write("peak_ratio_change", ratio_change, with_sensor, "1",
                "change of the ratio positive peak / |negative peak| of the local waveform over one period caused by the "
                "object (NaN where the local waveform lacks a phase)",
                compressed)
        .label_dimensions(dims_sensor);

    // The positions whose waveform is written.
    std::vector<std::size_t> chosen;
    std::istringstream words(signal.synthesize);
    std::size_t best = positions;
    for (std::size_t q = 0; q < positions; ++q)
        if (!std::isnan(peak[q]) && (best == positions || peak[q] > peak[best])) best = q;
    const bool all = signal.synthesize == "all" ||
                     (signal.synthesize == "default" && double(positions) * double(sensors) * n <= double(kDefaultSynthesisValues));
    if (all) {
        for (std::size_t q = 0; q < positions; ++q) chosen.push_back(q);
    } else {
        for (std::string word; words >> word;) {
            if (word == "peak" || word == "default") {
                if (best < positions) chosen.push_back(best);
            } else {
                chosen.push_back(std::stoull(word));
            }
        }
    }
    std::sort(chosen.begin(), chosen.end());
    chosen.erase(std::unique(chosen.begin(), chosen.end()), chosen.end());
    sweep.set_attribute("waveform_peak_position", best < positions ? std::int64_t(best) : std::int64_t(-1));
    if (chosen.empty()) return;
    std::vector<std::int64_t> chosen_ids(chosen.begin(), chosen.end());
    sweep.write_coordinate("waveform_position", chosen_ids, "1",
                           "flat index (C order over the sweep axes other than frequency) of a position whose waveform is written");
    const H5Group signal_group = root.open_group("signal");
    sweep.write_coordinate("time", signal_group.read<double>("time").values, "s", "time from the start of the period");
    std::vector<double> waves(chosen.size() * sensors * std::size_t(n), kNaN);
    for (std::size_t c = 0; c < chosen.size(); ++c) {
        if (!phasors(chosen[c], p, b)) continue;
        for (std::size_t s = 0; s < sensors; ++s) {
            const std::vector<double> dp = period(p, s);
            std::copy(dp.begin(), dp.end(), waves.begin() + std::ptrdiff_t((c * sensors + s) * std::size_t(n)));
        }
    }
    sweep.write("waveform_perturbation", waves, {hsize_t(chosen.size()), hsize_t(sensors), hsize_t(n)}, units,
                "the perturbation's instantaneous value over one period synthesized from the solved harmonics", compressed)
        .label_dimensions({"waveform_position", layout::kSensor, "time"});
}

}  // namespace murk
