#include "cases/input/waveform.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

std::vector<Harmonic> harmonics_of_samples(const std::vector<double>& s) {
    const std::size_t n = s.size();
    std::vector<Harmonic> out;
    for (std::size_t order = 1; 2 * order <= n; ++order) {
        // The phase k * order / n reduced modulo one period before the angle is taken, so
        // that large products lose no digits.
        std::complex<double> sum = 0.0;
        for (std::size_t k = 0; k < n; ++k) {
            const double turn = double((k * order) % n) / double(n);
            sum += s[k] * std::polar(1.0, -2.0 * M_PI * turn);
        }
        const bool nyquist = 2 * order == n;
        const std::complex<double> c = sum * ((nyquist ? 1.0 : 2.0) / double(n));
        Harmonic h;
        h.order = int(order);
        h.amplitude = std::abs(c);
        h.phase_rad = h.amplitude > 0 ? std::arg(c) : 0.0;
        h.energy = nyquist ? h.amplitude * h.amplitude : 0.5 * h.amplitude * h.amplitude;
        out.push_back(h);
    }
    return out;
}

double samples_mean(const std::vector<double>& s) {
    double sum = 0;
    for (double v : s) sum += v;
    return s.empty() ? 0.0 : sum / double(s.size());
}

std::vector<double> waveform_samples(const std::vector<Harmonic>& harmonics, int count) {
    std::vector<double> out(std::size_t(count), 0.0);
    for (const Harmonic& h : harmonics)
        for (int k = 0; k < count; ++k) {
            const double turn = double((long long)k * h.order % count) / double(count);
            out[std::size_t(k)] += h.amplitude * std::cos(2.0 * M_PI * turn + h.phase_rad);
        }
    return out;
}

double waveform_rms(const WaveformSpec& w) { return std::sqrt(total_energy(w.harmonics)); }

double total_energy(const std::vector<Harmonic>& harmonics) {
    double e = 0;
    for (const Harmonic& h : harmonics) e += h.energy;
    return e;
}

std::vector<Harmonic> kept_harmonics(const WaveformSpec& w) {
    const double total = total_energy(w.harmonics);
    std::vector<Harmonic> kept;
    for (const Harmonic& h : w.harmonics)
        if ((h.order == 1 && h.amplitude > 0) || h.energy > w.energy_fraction * total) kept.push_back(h);
    return kept;
}

std::vector<double> synthesize_period(const std::vector<int>& orders, const std::vector<std::complex<double>>& phasors,
                                      int count) {
    std::vector<double> out(std::size_t(count), 0.0);
    for (std::size_t j = 0; j < orders.size(); ++j)
        for (int k = 0; k < count; ++k) {
            const double turn = double((long long)k * orders[j] % count) / double(count);
            out[std::size_t(k)] += (phasors[j] * std::polar(1.0, 2.0 * M_PI * turn)).real();
        }
    return out;
}

}  // namespace murk
