// The emitter's waveform (cases/input/waveform.hpp) and the [signal] and [sweep] keys that
// give it (cases/input/case_reader.cpp): harmonics from samples, Parseval, the kept harmonics,
// synthesis, the frequency and permittivity axes in their place, and the refusals.
// References: the discrete Fourier transform and Parseval's theorem for it (any signal
// processing text, e.g. Oppenheim & Schafer 2010, "Discrete-Time Signal Processing", 3rd ed.,
// sec. 8.5 and 8.7; common practice); the sample values below are written out by hand.
#include "cases/input/case_reader.hpp"
#include "cases/input/waveform.hpp"
#include "cases/sweep/sweep_axes.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "cases/sweep/waveform_synthesis.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

using namespace murk;

namespace {

// A biphasic pulse over one period of 16 samples: a positive phase, a deeper negative one,
// rest; the sum is zero by construction (1 + 2 + 1 = 4 = 0.5 + 1.5 + 1.5 + 0.5).
const std::vector<double> kPulse = {0, 1, 2, 1, 0, -0.5, -1.5, -1.5, -0.5, 0, 0, 0, 0, 0, 0, 0};

std::string with_signal(const std::string& signal, const std::string& sweep = "distance = [\"5 mm\", \"1 cm\"]\n") {
    return "title = \"t\"\n"
           "[water]\nconductivity = \"100 uS/cm\"\n"
           "[[source]]\nform = \"point\"\nposition = [\"0 mm\", \"0 mm\", \"0 mm\"]\ncurrent = \"10 uA\"\n"
           "[[probe]]\nname = \"p\"\nform = \"point\"\nposition = [\"0 mm\", \"0 mm\", \"1 mm\"]\n"
           "[[object]]\nname = \"s\"\nshape = \"sphere\"\nradius = \"2 mm\"\nposition = [\"1 cm\", \"0 mm\", \"0 mm\"]\n"
           "conductivity = \"1 S/m\"\n"
           "[signal]\n" + signal +
           "[sweep]\nobject = \"s\"\ndirection = [1, 0, 0]\n" + sweep;
}

std::string error_of(const std::string& text) {
    try {
        read_case_text(text, "case.toml");
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

int line_of(const std::string& text, const std::string& needle) {
    const auto pos = text.find(needle);
    REQUIRE(pos != std::string::npos);
    return 1 + int(std::count(text.begin(), text.begin() + long(pos), '\n'));
}

// The refusal names the file, the line of `needle`, the key and says `words`.
void check_refused(const std::string& text, const std::string& needle, const std::string& key, const std::string& words) {
    const std::string m = error_of(text);
    INFO(m);
    CHECK(m.find("case.toml:" + std::to_string(line_of(text, needle)) + ": " + key) == 0);
    CHECK(m.find(words) != std::string::npos);
    CHECK(m.find('\n') == std::string::npos);
}

}  // namespace

TEST_CASE("waveform: a sampled cosine gives its one harmonic, amplitude and phase") {
    // s_k = 0.7 cos(2 pi 3 k / 12 + 0.4): by the definition of the DFT, harmonic 3 only.
    std::vector<double> s(12);
    for (int k = 0; k < 12; ++k) s[k] = 0.7 * std::cos(2 * M_PI * 3 * k / 12.0 + 0.4);
    const std::vector<Harmonic> h = harmonics_of_samples(s);
    REQUIRE(h.size() == 6);  // orders 1 .. N/2
    for (const Harmonic& one : h) {
        CAPTURE(one.order);
        if (one.order == 3) {
            CHECK(one.amplitude == doctest::Approx(0.7).epsilon(1e-14));
            CHECK(one.phase_rad == doctest::Approx(0.4).epsilon(1e-13));
        } else {
            CHECK(one.amplitude < 1e-15);
        }
    }
}

TEST_CASE("waveform: Parseval for the harmonics of samples, and the samples rebuilt from them") {
    // Parseval (Oppenheim & Schafer, sec. 8.5): (1/N) sum s_k^2 = mean^2 + sum of the harmonics'
    // mean squares, a^2/2 each, a^2 at the Nyquist order of an even N.
    for (const std::vector<double>& s : {kPulse, std::vector<double>{0.3, -1.2, 2.5, -0.1, -1.5}}) {
        const std::vector<Harmonic> h = harmonics_of_samples(s);
        double mean_square = 0;
        for (double v : s) mean_square += v * v / double(s.size());
        const double mean = samples_mean(s);
        CHECK(mean * mean + total_energy(h) == doctest::Approx(mean_square).epsilon(1e-14));
        // The inverse transform gives the samples back (the mean added).
        const std::vector<double> back = waveform_samples(h, int(s.size()));
        for (std::size_t k = 0; k < s.size(); ++k) CHECK(back[k] + mean == doctest::Approx(s[k]).epsilon(1e-13));
    }
    // Odd N has no Nyquist term: orders 1 .. 2 for 5 samples.
    CHECK(harmonics_of_samples({0.3, -1.2, 2.5, -0.1, -1.5}).size() == 2);
}

TEST_CASE("waveform: the kept harmonics, the fundamental always among them") {
    WaveformSpec w;
    w.form = WaveformSpec::Form::harmonics;
    // energies 0.5, 0.02, 0.00005 (a^2/2): shares 0.9615, 0.03846, 0.0000962
    w.harmonics = {{1, 1.0, 0.0, 0.5}, {3, 0.2, 0.0, 0.02}, {5, 0.01, 0.0, 0.00005}};
    w.energy_fraction = 1e-3;
    std::vector<Harmonic> kept = kept_harmonics(w);
    REQUIRE(kept.size() == 2);
    CHECK(kept[0].order == 1);
    CHECK(kept[1].order == 3);
    w.energy_fraction = 0.5;  // only the fundamental's share, 0.96, is above
    CHECK(kept_harmonics(w).size() == 1);
    w.harmonics[0] = {1, 0.01, 0.0, 0.00005};  // a weak fundamental is solved all the same
    w.energy_fraction = 0.1;
    kept = kept_harmonics(w);
    REQUIRE(kept.size() == 2);
    CHECK(kept[0].order == 1);
    CHECK(kept[1].order == 3);
}

TEST_CASE("waveform: synthesis of phasors and the phase peak ratio") {
    // Re (2 exp(i pi/2)) exp(i 2 pi k / 4) at k = 0..3: 2 cos(pi/2 + pi k/2) = 0, -2, 0, 2.
    const std::vector<double> x = synthesize_period({1}, {std::polar(2.0, M_PI / 2)}, 4);
    CHECK(x[0] == doctest::Approx(0).scale(1));
    CHECK(x[1] == doctest::Approx(-2));
    CHECK(x[2] == doctest::Approx(0).scale(1));
    CHECK(x[3] == doctest::Approx(2));
    CHECK(phase_peak_ratio(kPulse) == doctest::Approx(2.0 / 1.5));
    CHECK(std::isnan(phase_peak_ratio({0, 1, 2})));  // one phase only
    // The rms of the pulse: sum of squares 1 + 4 + 1 + 0.25 + 2.25 + 2.25 + 0.25 = 11 over 16 samples.
    WaveformSpec w;
    w.form = WaveformSpec::Form::samples;
    w.samples = kPulse;
    w.harmonics = harmonics_of_samples(kPulse);
    CHECK(waveform_rms(w) == doctest::Approx(std::sqrt(11.0 / 16.0)).epsilon(1e-14));
}

TEST_CASE("signal: harmonics and samples read, the frequency axis made of the kept harmonics") {
    const CaseSpec a = read_case_text(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = 1, amplitude = 1 },"
                                                  " { order = 3, amplitude = 0.2, phase = \"90 deg\" }]\n"),
                                      "case.toml");
    REQUIRE(a.waveform);
    CHECK(!a.frequency_Hz);
    CHECK(a.waveform->fundamental_Hz == 1000.0);
    REQUIRE(a.waveform->harmonics.size() == 2);
    CHECK(a.waveform->harmonics[1].phase_rad == doctest::Approx(M_PI / 2));
    CHECK(a.waveform->synthesis_samples == 64);
    const SweepPlan plan = plan_sweep(a);
    // the frequency axis holds 1 and 3 kHz, after water (none) and before the distance axis
    REQUIRE(plan.axes.size() == 2);
    CHECK(plan.axes[0].kind == AxisKind::frequency);
    CHECK(plan.axes[0].values == std::vector<double>{1000.0, 3000.0});
    CHECK(plan.fixed_count() == 2);
    CHECK(plan.total == 4);

    std::string pulse = "frequency = \"500 Hz\"\nenergy_fraction = 1e-12\nsamples = [";
    for (std::size_t k = 0; k < kPulse.size(); ++k) pulse += (k ? ", " : "") + std::to_string(kPulse[k]);
    const CaseSpec b = read_case_text(with_signal(pulse + "]\n"), "case.toml");
    REQUIRE(b.waveform);
    CHECK(b.waveform->synthesis_samples == 16);
    CHECK(b.waveform->harmonics.size() == 8);
}

TEST_CASE("sweep: frequency and permittivity axes in their place, a fixed part per water and frequency") {
    const CaseSpec c = read_case_text(
        with_signal("", "distance = [\"5 mm\", \"1 cm\"]\nwater_conductivity = [\"100 uS/cm\", \"200 uS/cm\", \"300 uS/cm\"]\n"
                        "frequency = [\"100 Hz\", \"1 kHz\"]\npermittivity = [1, 1e5]\n"),
        "case.toml");
    const SweepPlan plan = plan_sweep(c);
    std::vector<std::string> names;
    for (const SweepAxis& a : plan.axes) names.push_back(a.name);
    CHECK(names == std::vector<std::string>{"water_conductivity", "frequency", "permittivity", "distance"});
    CHECK(plan.fixed_count() == 6);
    // water 2 (300 uS/cm), frequency 1 (1 kHz): fixed part 2 x 2 + 1 = 5
    CHECK(plan.water_of({2, 1, 0, 1}) == 5);
    CHECK(plan.fixed_water(5) == doctest::Approx(0.03));
    CHECK(*plan.fixed_frequency(5, std::nullopt) == 1000.0);
    CHECK(*plan.fixed_frequency(4, std::nullopt) == 100.0);
}

TEST_CASE("signal and sweep: bad waveforms and axes refused with file, line and key") {
    check_refused(with_signal("frequency = \"1 kHz\"\nsamples = [0, nan, 0]\n"), "nan", "signal.samples[2]", "finite");
    check_refused(with_signal("frequency = \"1 kHz\"\nsamples = [1]\n"), "samples", "signal.samples", "from 2 to");
    check_refused(with_signal("frequency = \"1 kHz\"\nsamples = [1, 0.5, -1]\n"), "samples", "signal.samples", "zero mean");
    // A cosine of four samples with its closing sample repeated: refused for the repeat,
    // not for the mean of 0.2 that the repeat causes.
    check_refused(with_signal("frequency = \"1 kHz\"\nsamples = [1, 0, -1, 0, 1]\n"), "samples", "signal.samples",
                  "the last sample repeats the first (1)");
    // A biphasic pulse padded with zeros begins and ends at zero, and is accepted.
    CHECK_NOTHROW(read_case_text(with_signal("frequency = \"1 kHz\"\nsamples = [0, 1, -1, 0]\n"), "case.toml"));
    check_refused(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = 0, amplitude = 1 }]\n"), "harmonics",
                  "signal.harmonics[1].order", "at least 1");
    check_refused(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = -2, amplitude = 1 }]\n"), "harmonics",
                  "signal.harmonics[1].order", "at least 1");
    check_refused(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = 1, amplitude = -1 }]\n"), "harmonics",
                  "signal.harmonics[1].amplitude", "negative");
    check_refused(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = 1, amplitude = 1 }, { order = 9, amplitude = 1 }]\n"
                              "synthesis_samples = 16\n"),
                  "synthesis_samples", "signal.synthesis_samples", "Nyquist");
    check_refused(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = 1, amplitude = 1 }]\nenergy_fraction = 1\n"),
                  "energy_fraction", "signal.energy_fraction", "between 0 and 1");
    check_refused(with_signal("frequency = \"1 kHz\"\nharmonics = [{ order = 1, amplitude = 1 }]\nenergy_fraction = 0\n"),
                  "energy_fraction", "signal.energy_fraction", "between 0 and 1");
    check_refused(with_signal("frequency = \"1 kHz\"\n", "distance = [\"5 mm\"]\nfrequency = [\"1 kHz\"]\n"),
                  "frequency = [", "sweep.frequency", "already has one frequency");
    check_refused(with_signal("", "distance = [\"5 mm\"]\nfrequency = [\"0 Hz\", \"1 kHz\"]\n"), "frequency = [",
                  "sweep.frequency[1]", "positive");
    check_refused(with_signal("", "distance = [\"5 mm\"]\nfrequency = [\"-1 kHz\"]\n"), "frequency = [", "sweep.frequency[1]",
                  "positive");
    check_refused(with_signal("", "distance = [\"5 mm\"]\nfrequency = [\"inf Hz\"]\n"), "frequency = [", "sweep.frequency[1]", "");
    check_refused(with_signal("", "distance = [\"5 mm\"]\npermittivity = [2, 80]\n"), "permittivity = [",
                  "sweep.permittivity", "only at a frequency");
}

TEST_CASE("sweep: a permittivity axis refused for an insulating object") {
    std::string text = with_signal("", "distance = [\"5 mm\"]\nfrequency = [\"1 kHz\"]\npermittivity = [2, 80]\n");
    const std::string conducting = "conductivity = \"1 S/m\"\n";
    text.replace(text.find(conducting), conducting.size(), "conductivity = \"insulator\"\n");
    const CaseSpec c = read_case_text(text, "case.toml");
    std::string m;
    try {
        plan_sweep(c);
    } catch (const InputError& e) {
        m = e.what();
    }
    INFO(m);
    CHECK(m.find("case.toml:" + std::to_string(line_of(text, "[sweep]")) + ": sweep.permittivity") == 0);
    CHECK(m.find("insulator") != std::string::npos);
}
