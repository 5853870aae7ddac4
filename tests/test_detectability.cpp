// Ideal-observer d', Neyman-Pearson detection probability and detection range.
// Expected values are computed here by hand or in closed form, each line naming its
// source; none is taken from the code under test.
#include "cases/detection/detectability.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <complex>
#include <limits>
#include <string>
#include <vector>

using murk::DetectionRange;
using murk::NoiseKind;
using murk::NoiseModel;
using murk::RangeStatus;

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

NoiseModel receptors(double sigma_V) {
    NoiseModel m;
    m.kind = NoiseKind::receptors;
    m.receptor_noise_V = sigma_V;
    return m;
}

NoiseModel voltage_amp(double e_n, double bandwidth_Hz) {
    NoiseModel m;
    m.kind = NoiseKind::voltage_amplifier;
    m.voltage_noise_density_V_per_rtHz = e_n;
    m.noise_bandwidth_Hz = bandwidth_Hz;
    return m;
}

NoiseModel current_amp(double i_n, double bandwidth_Hz) {
    NoiseModel m;
    m.kind = NoiseKind::current_amplifier;
    m.current_noise_density_A_per_rtHz = i_n;
    m.noise_bandwidth_Hz = bandwidth_Hz;
    return m;
}

// detectability_index on real amplitudes (a braced list alone would also match the
// complex overload).
double dprime(const NoiseModel& m, const std::vector<double>& s, const std::vector<double>& n = {}) {
    return murk::detectability_index(m, s, n);
}

// The message of the InputError thrown by f, or "" when none is thrown.
template <class F>
std::string error_of(F f) {
    try {
        f();
    } catch (const murk::InputError& e) {
        return e.what();
    }
    return "";
}

// A bad input gives one non-empty line.
template <class F>
void check_one_line_error(F f) {
    const std::string msg = error_of(f);
    CHECK(!msg.empty());
    CHECK(msg.find('\n') == std::string::npos);
}

// Q(x) straight from the C++ library (general-purpose reference library:
// P(N(0,1) > x) = erfc(x/sqrt 2)/2, the definition of erfc, A&S 1964 eq. 7.1.2 and 26.2.29).
double q_ref(double x) { return 0.5 * std::erfc(x / std::sqrt(2.0)); }

}  // namespace

TEST_CASE("detectability: one sensor gives |s|/sigma") {
    // Definition of d' for one Gaussian observation (Kay 1998, Vol. II, section 4.3.2).
    // Voltage amplifier: sigma = e_n sqrt(B) = 10 nV/sqrt(Hz) * sqrt(2.5 Hz).
    const double sigma = 10e-9 * std::sqrt(2.5);
    CHECK(dprime(voltage_amp(10e-9, 2.5), {-3e-6}) ==
          doctest::Approx(3e-6 / sigma).epsilon(1e-14));
    CHECK(murk::channel_noise_rms(voltage_amp(10e-9, 2.5)) == doctest::Approx(sigma).epsilon(1e-15));
    // Current amplifier: sigma = 2 pA/sqrt(Hz) * sqrt(100 Hz) = 20 pA; 1 nA signal: d' = 50.
    CHECK(dprime(current_amp(2e-12, 100.0), {1e-9}) == doctest::Approx(50.0).epsilon(1e-14));
    // One receptor on one panel: d' = |dV| / sigma_r = 1 uV / 0.1 uV = 10.
    CHECK(dprime(receptors(1e-7), {1e-6}, {1.0}) == doctest::Approx(10.0).epsilon(1e-14));
    // No signal, no detectability.
    CHECK(dprime(receptors(1e-7), {0.0, 0.0}, {3.0, 4.0}) == 0.0);
    CHECK(murk::detectability_index(voltage_amp(1e-9, 1.0), std::vector<double>{}) == 0.0);
}

TEST_CASE("detectability: complex perturbations use the modulus") {
    // |3 + 4i| uV = 5 uV (Pythagoras); sigma = 1 nV/sqrt(Hz) * sqrt(1 Hz) = 1 nV: d' = 5000.
    const std::vector<std::complex<double>> s{{3e-6, 4e-6}};
    CHECK(murk::detectability_index(voltage_amp(1e-9, 1.0), s) == doctest::Approx(5000.0).epsilon(1e-14));
    // A pure quadrature signal counts as much as an in-phase one of the same size.
    const std::vector<std::complex<double>> q{{0.0, -2e-6}};
    CHECK(murk::detectability_index(voltage_amp(1e-9, 1.0), q) == doctest::Approx(2000.0).epsilon(1e-14));
}

TEST_CASE("detectability: doubling the noise halves d' exactly") {
    // d' is inversely proportional to sigma (Kay 1998, Vol. II, section 4.4.1: d'^2 = s^T C^-1 s);
    // a factor 2 is exact in binary floating point, so equality is exact.
    const std::vector<double> s{1.3e-6, -0.4e-6, 2.9e-7, 0.0};
    const std::vector<double> n{3.0, 0.5, 12.25, 1.0};
    CHECK(dprime(receptors(2.0e-7), s, n) == dprime(receptors(1.0e-7), s, n) / 2.0);
    CHECK(dprime(voltage_amp(2 * 7e-9, 3.0), s) ==
          dprime(voltage_amp(7e-9, 3.0), s) / 2.0);
    // Four times the bandwidth doubles sigma = e_n sqrt(B): exact as well (sqrt of 4 B).
    CHECK(dprime(voltage_amp(7e-9, 12.0), s) ==
          dprime(voltage_amp(7e-9, 3.0), s) / 2.0);
}

TEST_CASE("detectability: d'^2 adds over sensors and scales with receptor count") {
    // Independent Gaussian noise: d'^2 = sum_i (s_i/sigma_i)^2 (Kay 1998, Vol. II, section 4.4.1).
    const NoiseModel amp = voltage_amp(5e-9, 0.5);
    const double d1 = dprime(amp, {2e-8});
    const double d2 = dprime(amp, {-7e-8});
    const double d12 = dprime(amp, {2e-8, -7e-8});
    CHECK(d12 * d12 == doctest::Approx(d1 * d1 + d2 * d2).epsilon(1e-14));
    // By hand: sigma = 5 nV * sqrt(0.5); d'^2 = (4e-16 + 49e-16) / (25e-18 * 0.5) = 424.
    CHECK(d12 * d12 == doctest::Approx(424.0).epsilon(1e-13));

    // n receptors on a panel see the same signal with independent noise: n times d'^2.
    const NoiseModel skin = receptors(3e-7);
    const double one = dprime(skin, {1e-6}, {1.0});
    CHECK(std::pow(dprime(skin, {1e-6}, {7.0}), 2) == doctest::Approx(7.0 * one * one).epsilon(1e-14));
    // Fractional counts (density x area) work the same: 2.5 receptors.
    CHECK(std::pow(dprime(skin, {1e-6}, {2.5}), 2) == doctest::Approx(2.5 * one * one).epsilon(1e-14));
    // Mixed panels, by hand: 4 (1 uV / 0.5 uV)^2 + 9 (0.5 uV / 0.5 uV)^2 + 0 (big / 0.5 uV)^2 = 16 + 9 = 25.
    CHECK(dprime(receptors(5e-7), {1e-6, -5e-7, 1.0}, {4.0, 9.0, 0.0}) ==
          doctest::Approx(5.0).epsilon(1e-14));
}

TEST_CASE("detectability: noise bandwidth of an average and of an RC filter") {
    // Brute-force check of B = integral_0^inf |H(f)|^2 df, with H(0) = 1, by the midpoint
    // rule on [0, F] plus the tail beyond F in closed form (definition of the equivalent
    // noise bandwidth: common practice).
    const double T = 0.2, tau = 0.05, F = 2000.0;
    const int n = 2000000;
    const double df = F / n;
    const double pi = 3.14159265358979323846;
    double boxcar = 0.0, rc = 0.0;
    for (int k = 0; k < n; ++k) {
        const double f = (k + 0.5) * df;
        const double a = pi * f * T;
        boxcar += std::pow(std::sin(a) / a, 2) * df;     // boxcar of duration T: |H| = |sinc(pi f T)|
        rc += df / (1.0 + std::pow(2 * pi * f * tau, 2));  // first-order low-pass
    }
    boxcar += 1.0 / (2.0 * pi * pi * T * T * F);  // tail: mean of sin^2 is 1/2, integral of 1/(pi f T)^2
    rc += 1.0 / (4.0 * pi * pi * tau * tau * F);  // tail: integral of 1/(2 pi f tau)^2
    CHECK(murk::noise_bandwidth_of_average(T) == doctest::Approx(boxcar).epsilon(1e-6));
    CHECK(murk::noise_bandwidth_of_rc_filter(tau) == doctest::Approx(rc).epsilon(1e-6));
    // By hand: 1/(2 * 0.2 s) = 2.5 Hz; 1/(4 * 0.05 s) = 5 Hz.
    CHECK(murk::noise_bandwidth_of_average(T) == doctest::Approx(2.5).epsilon(1e-15));
    CHECK(murk::noise_bandwidth_of_rc_filter(tau) == doctest::Approx(5.0).epsilon(1e-15));
}

TEST_CASE("detectability: Gaussian tail and its inverse") {
    // Q(0) = 1/2 by symmetry of the normal density.
    CHECK(murk::gaussian_tail(0.0) == 0.5);
    // Standard normal table values (Abramowitz & Stegun 1964, Table 26.1, from memory);
    // confirmed here against mpmath 1.3.0 at 40 digits (general-purpose reference library):
    // Q(1.6448536269514722) = 0.05000000000000005, Q^-1(1e-6) = 4.753424308822899,
    // Q^-1(1e-15) = 7.941345326170997, Q^-1(0.05) = 1.644853626951473, Q(1) = 0.15865525393145705.
    CHECK(murk::gaussian_tail(1.6448536269514722) == doctest::Approx(0.05).epsilon(1e-14));
    CHECK(murk::gaussian_tail(1.0) == doctest::Approx(0.15865525393145705).epsilon(1e-14));
    CHECK(murk::inverse_gaussian_tail(1e-6) == doctest::Approx(4.753424308822899).epsilon(1e-13));
    CHECK(murk::inverse_gaussian_tail(1e-15) == doctest::Approx(7.941345326170997).epsilon(1e-13));
    CHECK(murk::inverse_gaussian_tail(0.05) == doctest::Approx(1.644853626951473).epsilon(1e-13));
    // Symmetry Q(-x) = 1 - Q(x): the upper half of (0, 1) gives negative x.
    CHECK(murk::inverse_gaussian_tail(0.95) == doctest::Approx(-1.644853626951473).epsilon(1e-13));
    CHECK(murk::inverse_gaussian_tail(0.5) == 0.0);

    // Accuracy over p in [1e-15, 0.5] (and its mirror): the distance from x to the true
    // root, estimated to first order by Newton from std::erfc, (Q(x) - p) / phi(x),
    // stays below 1e-12 (absolute; x is at most about 8 here).
    const double inv_sqrt_2pi = 0.3989422804014327;  // 1/sqrt(2 pi)
    double worst = 0.0;
    for (double e = -15.0; e <= std::log10(0.5) + 1e-12; e += 0.01) {
        const double p = std::pow(10.0, e);
        for (double pp : {p, 1.0 - p}) {
            if (!(pp > 0.0 && pp < 1.0)) continue;
            const double x = murk::inverse_gaussian_tail(pp);
            const double phi = inv_sqrt_2pi * std::exp(-0.5 * x * x);
            const double residual = pp > 0.5 ? (1.0 - q_ref(-x)) - pp : q_ref(x) - pp;
            worst = std::max(worst, std::abs(residual) / phi);
        }
    }
    CHECK(worst < 1e-14);
    // Far tail: Q^-1(1e-300) still inverts (relative residual of the tail only).
    const double x300 = murk::inverse_gaussian_tail(1e-300);
    CHECK(q_ref(x300) == doctest::Approx(1e-300).epsilon(1e-12));
}

TEST_CASE("detectability: detection probability of the Neyman-Pearson detector") {
    // P_D = Q(Q^-1(P_FA) - d') (Kay 1998, Vol. II, section 4.3.2).
    // d' = 0: the detector is blind and detects as often as it false-alarms.
    for (double pfa : {1e-12, 1e-6, 0.01, 0.3, 0.5, 0.7}) {
        CHECK(murk::detection_probability(0.0, pfa) == doctest::Approx(pfa).epsilon(1e-12));
    }
    // P_FA = 1/2 puts the threshold at 0: P_D = Q(-1) = 1 - Q(1) = 0.841344746068543
    // (mpmath 1.3.0, general-purpose reference library).
    CHECK(murk::detection_probability(1.0, 0.5) == doctest::Approx(0.841344746068543).epsilon(1e-14));
    // P_FA = 0.05 and d' = Q^-1(0.05): the mean sits on the threshold, P_D = 1/2.
    CHECK(murk::detection_probability(1.6448536269514727, 0.05) == doctest::Approx(0.5).epsilon(1e-14));
    // Endless signal: certain detection.
    CHECK(murk::detection_probability(std::numeric_limits<double>::infinity(), 1e-6) == 1.0);

    // Monotone: P_D rises strictly with d' while the step is resolvable in double (below
    // 1 - 1e-10), and never falls.
    for (double pfa : {1e-9, 1e-3, 0.1}) {
        double previous = murk::detection_probability(0.0, pfa);
        for (double d = 0.05; d <= 20.0; d += 0.05) {
            const double pd = murk::detection_probability(d, pfa);
            if (previous < 1.0 - 1e-10) CHECK(pd > previous);
            CHECK(pd >= previous);
            CHECK(pd <= 1.0);
            previous = pd;
        }
        CHECK(previous == 1.0);
    }
}

TEST_CASE("detectability: range crossing interpolated in log distance") {
    // Level 0.5 between (0.04 m, 0.7) and (0.08 m, 0.3): t = (0.7 - 0.5)/(0.7 - 0.3) = 1/2,
    // ln r = ln 0.04 + (1/2) ln 2, r = 0.04 sqrt(2) = 0.0565685424949238 m (by hand).
    DetectionRange r = murk::detection_range({0.01, 0.02, 0.04, 0.08}, {0.99, 0.9, 0.7, 0.3}, 0.5);
    CHECK(r.status == RangeStatus::crossed);
    CHECK(r.range_m == doctest::Approx(0.0565685424949238).epsilon(1e-14));
    CHECK(r.bound_m == r.range_m);
    CHECK(r.downward_crossings == 1);

    // Missing points are skipped: the bracket is (0.02 m, 0.9) and (0.08 m, 0.1);
    // level 0.6: t = 0.3/0.8 = 0.375, r = 0.02 * 4^0.375 = 0.02 * 2^0.75 = 0.0336358566101486 m.
    r = murk::detection_range({0.01, 0.02, 0.03, 0.05, 0.08}, {0.99, 0.9, kNaN, kNaN, 0.1}, 0.6);
    CHECK(r.status == RangeStatus::crossed);
    CHECK(r.range_m == doctest::Approx(0.0336358566101486).epsilon(1e-14));

    // Not monotone: the last downward crossing counts, between (4 m, 0.7) and (5 m, 0.2):
    // t = 0.2/0.5 = 0.4, r = 4 * 1.25^0.4 = 4.37344829577311 m (by hand, checked with mpmath).
    r = murk::detection_range({1, 2, 3, 4, 5}, {0.9, 0.3, 0.8, 0.7, 0.2}, 0.5);
    CHECK(r.status == RangeStatus::crossed);
    CHECK(r.range_m == doctest::Approx(4.37344829577311).epsilon(1e-13));
    CHECK(r.downward_crossings == 2);

    // Exactly at the level: the level is met there, so the range is that distance.
    r = murk::detection_range({1, 2, 3}, {0.9, 0.5, 0.1}, 0.5);
    CHECK(r.status == RangeStatus::crossed);
    CHECK(r.range_m == 2.0);
}

TEST_CASE("detectability: range status beyond the sweep, never, no data") {
    // Detectable everywhere computed; the last point is missing, so the bound is 3 m.
    DetectionRange r = murk::detection_range({1, 2, 3, 4}, {0.99, 0.95, 0.9, kNaN}, 0.5);
    CHECK(r.status == RangeStatus::beyond_sweep);
    CHECK(std::isnan(r.range_m));
    CHECK(r.bound_m == 3.0);
    CHECK(r.downward_crossings == 0);
    // Detectable nowhere; the first point is missing, so the bound is 2 m.
    r = murk::detection_range({1, 2, 3, 4}, {kNaN, 0.4, 0.2, 0.1}, 0.5);
    CHECK(r.status == RangeStatus::never);
    CHECK(std::isnan(r.range_m));
    CHECK(r.bound_m == 2.0);
    // Nothing computed, or no distances at all.
    r = murk::detection_range({1, 2}, {kNaN, kNaN}, 0.5);
    CHECK(r.status == RangeStatus::no_data);
    CHECK(std::isnan(r.range_m));
    CHECK(std::isnan(r.bound_m));
    CHECK(murk::detection_range({}, {}, 0.5).status == RangeStatus::no_data);
    // A single computed point.
    CHECK(murk::detection_range({1}, {0.6}, 0.5).status == RangeStatus::beyond_sweep);
    CHECK(murk::detection_range({1}, {0.4}, 0.5).status == RangeStatus::never);
    // The codes written to /detection/status (cases/RESULT_LAYOUT.md).
    CHECK(static_cast<int>(RangeStatus::crossed) == 1);
    CHECK(static_cast<int>(RangeStatus::beyond_sweep) == 2);
    CHECK(static_cast<int>(RangeStatus::never) == 3);
}

TEST_CASE("detectability: bad inputs") {
    using murk::detection_probability;
    using murk::detection_range;
    // Probabilities outside (0, 1).
    for (double p : {0.0, 1.0, -0.1, 1.5, kNaN}) {
        check_one_line_error([&] { detection_probability(1.0, p); });
        check_one_line_error([&] { murk::inverse_gaussian_tail(p); });
        check_one_line_error([&] { detection_range({1, 2}, {0.9, 0.1}, p); });
    }
    // d' negative or NaN.
    check_one_line_error([] { detection_probability(-0.1, 0.01); });
    check_one_line_error([] { detection_probability(kNaN, 0.01); });
    // Noise levels.
    for (double bad : {0.0, -1e-9, kNaN, std::numeric_limits<double>::infinity()}) {
        check_one_line_error([&] { dprime(receptors(bad), {1e-6}, {1.0}); });
        check_one_line_error([&] { dprime(voltage_amp(bad, 1.0), {1e-6}); });
        check_one_line_error([&] { dprime(voltage_amp(1e-9, bad), {1e-6}); });
        check_one_line_error([&] { dprime(current_amp(bad, 1.0), {1e-9}); });
        check_one_line_error([&] { murk::noise_bandwidth_of_average(bad); });
        check_one_line_error([&] { murk::noise_bandwidth_of_rc_filter(bad); });
    }
    check_one_line_error([] { murk::channel_noise_rms(receptors(1e-7)); });
    // Receptor counts: missing, extra, negative, NaN; given to an amplifier.
    check_one_line_error([] { dprime(receptors(1e-7), {1e-6, 2e-6}, {1.0}); });
    check_one_line_error([] { dprime(receptors(1e-7), {1e-6}); });
    check_one_line_error([] { dprime(receptors(1e-7), {1e-6}, {-1.0}); });
    check_one_line_error([] { dprime(receptors(1e-7), {1e-6}, {kNaN}); });
    check_one_line_error([] { dprime(voltage_amp(1e-9, 1.0), {1e-6}, {1.0}); });
    // Non-finite perturbations.
    check_one_line_error([] { dprime(voltage_amp(1e-9, 1.0), {kNaN}); });
    check_one_line_error([] {
        murk::detectability_index(voltage_amp(1e-9, 1.0), std::vector<std::complex<double>>{{1e-6, kNaN}});
    });
    // Distance axis and probabilities.
    check_one_line_error([] { detection_range({1, 1}, {0.9, 0.1}, 0.5); });
    check_one_line_error([] { detection_range({2, 1}, {0.9, 0.1}, 0.5); });
    check_one_line_error([] { detection_range({0, 1}, {0.9, 0.1}, 0.5); });
    check_one_line_error([] { detection_range({1, kNaN}, {0.9, 0.1}, 0.5); });
    check_one_line_error([] { detection_range({1, 2}, {0.9, 1.1}, 0.5); });
    check_one_line_error([] { detection_range({1, 2}, {-0.1, 0.1}, 0.5); });
    check_one_line_error([] { detection_range({1, 2, 3}, {0.9, 0.1}, 0.5); });
}

// ---- amplitude and phase channels ------------------------------------------------

namespace {

using Cx = std::complex<double>;

NoiseModel with_channels(NoiseModel m, murk::NoiseChannels channels, double phase_noise_rad = 0.0) {
    m.channels = channels;
    m.phase_noise_rad = phase_noise_rad;
    return m;
}

}  // namespace

TEST_CASE("detectability: amplitude and phase change of a reading") {
    // Hand values from the polar form of V0 and V0 + dV.
    // A quarter turn of a small change: |1 + 1e-3 i| - 1 = sqrt(1 + 1e-6) - 1 and arg = atan(1e-3).
    murk::ReadingChange c = murk::reading_change(Cx(1.0, 0.0), Cx(0.0, 1e-3));
    CHECK(c.amplitude == doctest::Approx(std::sqrt(1.0 + 1e-6) - 1.0).epsilon(1e-9));
    CHECK(c.phase_rad == doctest::Approx(std::atan(1e-3)).epsilon(1e-14));
    CHECK(c.phase_defined);
    // A change in phase with the reading: amplitude only (2i -> 2.2i).
    c = murk::reading_change(Cx(0.0, 2.0), Cx(0.0, 0.2));
    CHECK(c.amplitude == doctest::Approx(0.2).epsilon(1e-14));
    CHECK(std::abs(c.phase_rad) < 1e-16);
    // A sign flip: same amplitude, half a turn.
    c = murk::reading_change(Cx(1.0, 0.0), Cx(-2.0, 0.0));
    CHECK(std::abs(c.amplitude) < 1e-16);
    CHECK(c.phase_rad == doctest::Approx(M_PI).epsilon(1e-15));
    // Tiny changes keep their digits: 1e-12 on 1 is 1e-12 (a plain difference of the
    // two amplitudes would keep about 4 of its 16 digits).
    c = murk::reading_change(Cx(1.0, 0.0), Cx(1e-12, 0.0));
    CHECK(c.amplitude == doctest::Approx(1e-12).epsilon(1e-12));
    // No baseline: the phase is undefined, the amplitude change is |dV| = 5.
    c = murk::reading_change(Cx(0.0, 0.0), Cx(3.0, -4.0));
    CHECK(!c.phase_defined);
    CHECK(c.amplitude == doctest::Approx(5.0).epsilon(1e-15));
}

TEST_CASE("detectability: a purely capacitive change is seen by the phase channel only") {
    // dV = i 1e-3 V0 (a phase shift of 1 mrad, no amplitude change to first order) on a
    // 1 mV reading; receptors of 1 uV amplitude noise and 1 mrad phase noise, one each.
    const std::vector<Cx> v0{{1e-3, 0.0}}, dv{{0.0, 1e-6}};
    const NoiseModel amplitude_only = with_channels(receptors(1e-6), murk::NoiseChannels::amplitude);
    const NoiseModel both = with_channels(receptors(1e-6), murk::NoiseChannels::amplitude_and_phase, 1e-3);
    const murk::ChannelIndex a = murk::channel_detectability(amplitude_only, dv, v0, {1.0});
    const murk::ChannelIndex b = murk::channel_detectability(both, dv, v0, {1.0});
    // Amplitude: |V0| (sqrt(1 + 1e-6) - 1) / 1 uV = 1e-3 * 5e-7 / 1e-6 = 5e-4 (second order only).
    CHECK(a.amplitude == doctest::Approx(5e-4).epsilon(1e-6));
    CHECK(a.phase == 0.0);
    // Phase: atan(1e-3) / 1e-3 = 1 - 1e-6 / 3 (Taylor series of atan).
    CHECK(b.phase == doctest::Approx(1.0 - 1e-6 / 3).epsilon(1e-12));
    CHECK(b.total() == doctest::Approx(std::hypot(5e-4, 1.0 - 1e-6 / 3)).epsilon(1e-12));
    // Detection: amplitude alone stays at the false-alarm rate; the phase raises P_D to
    // Q(Q^-1(1e-3) - 1) = Q(3.0902 - 1) (Kay 1998, section 4.3.2).
    const double pfa = 1e-3;
    CHECK(murk::detection_probability(a.total(), pfa) < 1.01 * pfa);
    CHECK(murk::detection_probability(b.total(), pfa) == doctest::Approx(q_ref(3.090232306167813 - b.total())).epsilon(1e-9));
    CHECK(murk::detection_probability(b.total(), pfa) > 10 * pfa);
}

TEST_CASE("detectability: phase noise sigma/|V0| reproduces the two-quadrature model") {
    // Plain additive noise sigma on both quadratures puts sigma on the amplitude and
    // sigma/|V0| on the phase (small-noise polar form, common practice); to first order
    // in dV the two models then give the same d' = |dV| / sigma = |3 + 4i| nV / 1 nV = 5.
    const std::vector<Cx> v0{{0.0, 1e-3}}, dv{{-4e-9, 3e-9}};  // dV in phase (3 nV) and in quadrature (4 nV)
    const NoiseModel quad = voltage_amp(1e-9, 1.0);
    CHECK(murk::detectability_index(quad, dv) == doctest::Approx(5.0).epsilon(1e-14));
    const NoiseModel polar = with_channels(quad, murk::NoiseChannels::amplitude_and_phase, 1e-9 / 1e-3);
    const murk::ChannelIndex c = murk::channel_detectability(polar, dv, v0);
    CHECK(c.amplitude == doctest::Approx(3.0).epsilon(1e-5));
    CHECK(c.phase == doctest::Approx(4.0).epsilon(1e-5));
    CHECK(c.total() == doctest::Approx(5.0).epsilon(1e-5));
}

TEST_CASE("detectability: channels add over receptors and skip an undefined phase") {
    // Two panels, 4 and 0 receptors: only the first counts, with weight 4 (d' doubles).
    const std::vector<Cx> v0{{1.0, 0.0}, {1.0, 0.0}}, dv{{0.0, 1e-3}, {0.0, 1.0}};
    const NoiseModel m = with_channels(receptors(1.0), murk::NoiseChannels::amplitude_and_phase, 1e-3);
    CHECK(murk::channel_detectability(m, dv, v0, {4.0, 0.0}).phase == doctest::Approx(2 * std::atan(1e-3) / 1e-3).epsilon(1e-12));
    // A sensor with no baseline adds its |dV| to the amplitude channel and nothing to the phase.
    const std::vector<Cx> zero{{0.0, 0.0}}, change{{0.0, 2.0}};
    const murk::ChannelIndex c = murk::channel_detectability(m, change, zero, {1.0});
    CHECK(c.amplitude == doctest::Approx(2.0).epsilon(1e-15));
    CHECK(c.phase == 0.0);
}

TEST_CASE("detectability: channel models refuse bad inputs") {
    const std::vector<Cx> v0{{1.0, 0.0}}, dv{{0.0, 1e-3}};
    // Both quadratures is not a channel model.
    check_one_line_error([&] { murk::channel_detectability(voltage_amp(1e-9, 1.0), dv, v0); });
    // The phase channel needs a positive, finite phase noise.
    for (double bad : {0.0, -1.0, kNaN, std::numeric_limits<double>::infinity()})
        check_one_line_error([&] {
            murk::channel_detectability(with_channels(voltage_amp(1e-9, 1.0), murk::NoiseChannels::amplitude_and_phase, bad),
                                        dv, v0);
        });
    // Sizes must match, values must be finite.
    const NoiseModel m = with_channels(voltage_amp(1e-9, 1.0), murk::NoiseChannels::amplitude);
    check_one_line_error([&] { murk::channel_detectability(m, dv, std::vector<Cx>{}); });
    check_one_line_error([&] { murk::channel_detectability(m, std::vector<Cx>{{kNaN, 0.0}}, v0); });
    check_one_line_error([&] { murk::channel_detectability(m, dv, std::vector<Cx>{{1.0, kNaN}}); });
}
