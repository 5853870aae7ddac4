// Local exponent, power-law fit and fourth-power check of the peak perturbation versus
// distance. Expected values come from closed forms of the test data or hand
// arithmetic shown beside each check.
#include "cases/detection/falloff.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

using murk::ExponentStatus;
using murk::FitStatus;
using murk::FourthPower;
using murk::LocalExponents;
using murk::PowerLawFit;

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

// n distances spaced evenly in ln d from d0 to d1.
std::vector<double> log_grid(double d0, double d1, int n) {
    std::vector<double> d(n);
    for (int i = 0; i < n; ++i) d[i] = d0 * std::pow(d1 / d0, static_cast<double>(i) / (n - 1));
    return d;
}

std::vector<double> power_law(const std::vector<double>& d, double c, double b) {
    std::vector<double> p;
    for (double x : d) p.push_back(c * std::pow(x, b));
    return p;
}

template <class F>
void check_one_line_error(F f) {
    std::string msg;
    try {
        f();
    } catch (const murk::InputError& e) {
        msg = e.what();
    }
    CHECK(!msg.empty());
    CHECK(msg.find('\n') == std::string::npos);
}

// Local exponent of p = d^-3 + d^-5 in closed form (given in the brief; with x = ln d it
// is -4 + tanh x).
double two_law_exponent(double d) {
    return -(3 * std::pow(d, -3) + 5 * std::pow(d, -5)) / (std::pow(d, -3) + std::pow(d, -5));
}

// Largest error of the local exponents of d^-3 + d^-5 on an n-point log grid over
// [0.1, 10], and whether each point stayed within its truncation bound: with h the log
// step and y = ln p, y''' = -2 sech^2(x) tanh(x), |y'''| <= 4/(3 sqrt 3) (maximum at
// tanh^2 x = 1/3); the three-point derivative errs by about (h^2/6)|y'''| centred and
// (h^2/3)|y'''| one-sided (Taylor expansion; common practice). A margin of 10% covers
// the higher-order terms.
double two_law_max_error(int n, bool& within_bound) {
    const std::vector<double> d = log_grid(0.1, 10.0, n);
    std::vector<double> p;
    for (double x : d) p.push_back(std::pow(x, -3) + std::pow(x, -5));
    const LocalExponents le = murk::local_exponents(d, p);
    const double h = std::log(100.0) / (n - 1);
    const double y3 = 4.0 / (3.0 * std::sqrt(3.0));
    double worst = 0.0;
    within_bound = true;
    for (int i = 0; i < n; ++i) {
        REQUIRE(le.status[i] == ExponentStatus::ok);
        const double err = std::abs(le.exponent[i] - two_law_exponent(d[i]));
        const bool end = i == 0 || i == n - 1;
        const double bound = 1.1 * h * h * y3 / (end ? 3.0 : 6.0);
        if (err > bound) within_bound = false;
        worst = std::max(worst, err);
    }
    return worst;
}

}  // namespace

TEST_CASE("falloff: exact power laws are recovered") {
    // p = C d^-4: ln p is linear in ln d, every local exponent is -4 and the fit exact.
    const std::vector<double> d = log_grid(0.01, 0.2, 15);
    const std::vector<double> p = power_law(d, 2.5e-3, -4.0);
    const LocalExponents le = murk::local_exponents(d, p);
    for (std::size_t i = 0; i < d.size(); ++i) {
        CHECK(le.status[i] == ExponentStatus::ok);
        CHECK(le.exponent[i] == doctest::Approx(-4.0).epsilon(1e-12));
    }
    const PowerLawFit fit = murk::fit_far_power_law(d, p);
    CHECK(fit.status == FitStatus::ok);
    CHECK(fit.exponent == doctest::Approx(-4.0).epsilon(1e-12));
    CHECK(fit.log_coefficient == doctest::Approx(std::log(2.5e-3)).epsilon(1e-12));
    CHECK(fit.r_squared == doctest::Approx(1.0).epsilon(1e-12));
    CHECK(fit.exponent_std_error < 1e-12);

    // p = d^-3.2 on an irregular grid: still exact (the parabola through three points of
    // a straight line is that line).
    const std::vector<double> g{0.003, 0.0041, 0.007, 0.0072, 0.011, 0.02, 0.05, 0.051, 0.09};
    const std::vector<double> q = power_law(g, 7.0e-9, -3.2);
    const LocalExponents lq = murk::local_exponents(g, q);
    for (std::size_t i = 0; i < g.size(); ++i) CHECK(lq.exponent[i] == doctest::Approx(-3.2).epsilon(1e-12));
    const PowerLawFit fq = murk::fit_power_law(g, q, 0.0, std::numeric_limits<double>::infinity());
    CHECK(fq.status == FitStatus::ok);
    CHECK(fq.n_points == 9);
    CHECK(fq.exponent == doctest::Approx(-3.2).epsilon(1e-12));
    CHECK(fq.r_squared == doctest::Approx(1.0).epsilon(1e-12));
    CHECK(fq.fit_from_m == 0.003);
    CHECK(fq.fit_to_m == 0.09);
}

TEST_CASE("falloff: sum of two power laws, second-order local exponent") {
    bool within41 = false, within81 = false;
    const double e41 = two_law_max_error(41, within41);
    const double e81 = two_law_max_error(81, within81);
    CHECK(within41);
    CHECK(within81);
    // Halving the log step divides the error by about 4 (second order).
    CHECK(e41 / e81 == doctest::Approx(4.0).epsilon(0.1));
    // Sanity of the closed form itself: at d = 1 the two laws weigh equally, exponent -4.
    CHECK(two_law_exponent(1.0) == -4.0);
}

TEST_CASE("falloff: least-squares fit statistics by hand") {
    // d = 1, e, e^2 (ln d = 0, 1, 2) and ln p = 0, -3, -8. By hand: mean x = 1,
    // mean y = -11/3, Sxx = 2, Sxy = -8, slope -4, intercept -11/3 + 4 = 1/3;
    // residuals -1/3, 2/3, -1/3, SSR = 2/3; SST = (121 + 4 + 169)/9 = 98/3;
    // R^2 = 1 - (2/3)/(98/3) = 48/49; standard error sqrt(SSR/(n-2)/Sxx) = sqrt(1/3).
    const double e = std::exp(1.0);
    const std::vector<double> d{1.0, e, e * e};
    const std::vector<double> p{1.0, std::exp(-3.0), std::exp(-8.0)};
    const PowerLawFit fit = murk::fit_power_law(d, p, 0.5, 10.0);
    CHECK(fit.status == FitStatus::ok);
    CHECK(fit.n_points == 3);
    CHECK(fit.exponent == doctest::Approx(-4.0).epsilon(1e-13));
    CHECK(fit.log_coefficient == doctest::Approx(1.0 / 3.0).epsilon(1e-13));
    CHECK(fit.r_squared == doctest::Approx(48.0 / 49.0).epsilon(1e-13));
    CHECK(fit.r_squared < 1.0);
    CHECK(fit.exponent_std_error == doctest::Approx(std::sqrt(1.0 / 3.0)).epsilon(1e-13));
    CHECK(fit.fit_from_m == 1.0);
    CHECK(fit.fit_to_m == doctest::Approx(e * e).epsilon(1e-15));
}

TEST_CASE("falloff: the default fit uses the far half") {
    // 10 points: the far 5 follow 3e-9 d^-4 exactly, the near 5 are disturbed; the default
    // fit must see only the far 5 (from d[5] to d[9]) and so be exact.
    const std::vector<double> d = log_grid(0.005, 0.1, 10);
    std::vector<double> p = power_law(d, 3e-9, -4.0);
    const double disturb[5] = {0.5, 1.7, 0.9, 1.3, 0.8};
    for (int i = 0; i < 5; ++i) p[i] *= disturb[i];
    PowerLawFit fit = murk::fit_far_power_law(d, p);
    CHECK(fit.status == FitStatus::ok);
    CHECK(fit.n_points == 5);
    CHECK(fit.fit_from_m == d[5]);
    CHECK(fit.fit_to_m == d[9]);
    CHECK(fit.exponent == doctest::Approx(-4.0).epsilon(1e-12));
    CHECK(fit.r_squared == doctest::Approx(1.0).epsilon(1e-12));
    // Over all points the disturbance shows: R^2 below 1.
    const PowerLawFit all = murk::fit_power_law(d, p, d.front(), d.back());
    CHECK(all.n_points == 10);
    CHECK(all.r_squared < 0.999);
    // 7 usable points: ceil(7/2) = 4; 5 usable points: at least 3.
    const std::vector<double> d7(d.begin(), d.begin() + 7);
    CHECK(murk::fit_far_power_law(d7, std::vector<double>(p.begin(), p.begin() + 7)).n_points == 4);
    const std::vector<double> d5(d.begin(), d.begin() + 5);
    CHECK(murk::fit_far_power_law(d5, std::vector<double>(p.begin(), p.begin() + 5)).n_points == 3);
}

TEST_CASE("falloff: masked and non-positive points are skipped") {
    const std::vector<double> d = log_grid(0.01, 0.1, 9);
    std::vector<double> p = power_law(d, 1e-10, -4.0);
    p[0] = kNaN;
    p[3] = 0.0;
    p[4] = -1e-3;
    p[8] = std::numeric_limits<double>::infinity();
    const LocalExponents le = murk::local_exponents(d, p);
    for (int i : {0, 3, 4, 8}) {
        CHECK(le.status[i] == ExponentStatus::unusable_point);
        CHECK(std::isnan(le.exponent[i]));
    }
    for (int i : {1, 2, 5, 6, 7}) {
        CHECK(le.status[i] == ExponentStatus::ok);
        CHECK(le.exponent[i] == doctest::Approx(-4.0).epsilon(1e-12));
    }
    // Usable: 1, 2, 5, 6, 7 -> the far half is 5, 6, 7.
    const PowerLawFit fit = murk::fit_far_power_law(d, p);
    CHECK(fit.status == FitStatus::ok);
    CHECK(fit.n_points == 3);
    CHECK(fit.fit_from_m == d[5]);
    CHECK(fit.fit_to_m == d[7]);
    CHECK(fit.exponent == doctest::Approx(-4.0).epsilon(1e-12));

    // The neighbours of a point are the nearest usable ones: with the middle of
    // ln p = {0, ?, -2, -3} at ln d = {0, 1, 2, 3} masked, the point at ln d = 2 takes
    // the parabola through (0, 0), (2, -2), (3, -3) = the line y = -x: slope -1 (by hand).
    const double e = std::exp(1.0);
    const LocalExponents gap = murk::local_exponents({1.0, e, e * e, e * e * e},
                                                     {1.0, kNaN, std::exp(-2.0), std::exp(-3.0)});
    CHECK(gap.exponent[2] == doctest::Approx(-1.0).epsilon(1e-13));
}

TEST_CASE("falloff: too few points") {
    const std::vector<double> d{0.01, 0.02, 0.04, 0.08};
    // Two usable points: each local exponent is the two-point slope; no fit.
    // By hand: p falls from 1 to 1/4096 = 2^-12 over 0.01 -> 0.08 = 2^3 times farther:
    // slope ln(2^-12)/ln(2^3) = -4.
    const std::vector<double> p{1.0, kNaN, kNaN, 1.0 / 4096.0};
    const LocalExponents le = murk::local_exponents(d, p);
    for (int i : {0, 3}) {
        CHECK(le.status[i] == ExponentStatus::ok);
        CHECK(le.exponent[i] == doctest::Approx(-4.0).epsilon(1e-13));
    }
    CHECK(le.status[1] == ExponentStatus::unusable_point);
    PowerLawFit fit = murk::fit_far_power_law(d, p);
    CHECK(fit.status == FitStatus::too_few_points);
    CHECK(fit.n_points == 2);
    CHECK(std::isnan(fit.exponent));
    CHECK(std::isnan(fit.r_squared));
    // A range holding only two usable points.
    fit = murk::fit_power_law(d, power_law(d, 1.0, -4.0), 0.015, 0.05);
    CHECK(fit.status == FitStatus::too_few_points);
    CHECK(fit.n_points == 2);
    // One usable point: no neighbours; none: every point unusable.
    const LocalExponents one = murk::local_exponents(d, {kNaN, 1.0, kNaN, kNaN});
    CHECK(one.status[1] == ExponentStatus::no_neighbours);
    CHECK(std::isnan(one.exponent[1]));
    CHECK(one.status[0] == ExponentStatus::unusable_point);
    const LocalExponents none = murk::local_exponents({}, {});
    CHECK(none.exponent.empty());
    CHECK(murk::fit_far_power_law({}, {}).status == FitStatus::too_few_points);
}

TEST_CASE("falloff: fourth-power rule of thumb") {
    // Rule of thumb: p ~ d^-4 (common practice; DEVELOPERS.md, "Physics and method").
    LocalExponents le;
    le.exponent = {-4.5, -3.49, -4.2, kNaN, -4.0};
    le.status = {ExponentStatus::ok, ExponentStatus::ok, ExponentStatus::ok, ExponentStatus::unusable_point,
                 ExponentStatus::ok};
    // |-4.5 + 4| = 0.5 exactly (binary): on the boundary, inside.
    std::vector<FourthPower> c = murk::near_fourth_power(le);
    CHECK(c == std::vector<FourthPower>{FourthPower::yes, FourthPower::no, FourthPower::yes, FourthPower::unknown,
                                        FourthPower::yes});
    c = murk::near_fourth_power(le, 0.1);
    CHECK(c == std::vector<FourthPower>{FourthPower::no, FourthPower::no, FourthPower::no, FourthPower::unknown,
                                        FourthPower::yes});
    // The two-law falloff d^-3 + d^-5 has exponent -4 + tanh(ln d): within 0.5 of -4
    // where |tanh(ln d)| <= 0.5, i.e. |ln d| <= atanh(0.5) = 0.5493 (d in [0.577, 1.732]).
    const std::vector<double> d = log_grid(0.1, 10.0, 81);
    std::vector<double> p;
    for (double x : d) p.push_back(std::pow(x, -3) + std::pow(x, -5));
    const std::vector<FourthPower> near = murk::near_fourth_power(murk::local_exponents(d, p));
    for (std::size_t i = 0; i < d.size(); ++i) {
        const double margin = std::abs(std::abs(std::log(d[i])) - std::atanh(0.5));
        if (margin < 0.01) continue;  // too close to the edge for a finite-difference exponent
        CHECK((near[i] == FourthPower::yes) == (std::abs(std::log(d[i])) < std::atanh(0.5)));
    }
    for (double bad : {-0.1, kNaN, std::numeric_limits<double>::infinity()})
        check_one_line_error([&] { murk::near_fourth_power(le, bad); });
}

TEST_CASE("falloff: bad inputs") {
    const std::vector<double> p{1.0, 0.5, 0.25};
    check_one_line_error([&] { murk::local_exponents({1, 2}, p); });
    check_one_line_error([&] { murk::local_exponents({1, 1, 2}, p); });
    check_one_line_error([&] { murk::local_exponents({3, 2, 1}, p); });
    check_one_line_error([&] { murk::local_exponents({0, 1, 2}, p); });
    check_one_line_error([&] { murk::local_exponents({1, 2, kNaN}, p); });
    check_one_line_error([&] { murk::fit_far_power_law({1, 2}, p); });
    check_one_line_error([&] { murk::fit_power_law({1, 2, 3}, p, 2.0, 1.0); });
    check_one_line_error([&] { murk::fit_power_law({1, 2, 3}, p, -1.0, 3.0); });
    check_one_line_error([&] { murk::fit_power_law({1, 2, 3}, p, kNaN, 3.0); });
    check_one_line_error([&] { murk::fit_power_law({1, 2, 3}, p, 1.0, kNaN); });
}
