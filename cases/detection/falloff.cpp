// Local exponent, power-law fit and fourth-power check of the peak perturbation versus
// distance; the contracts and sources are in falloff.hpp.
#include "cases/detection/falloff.hpp"

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

// The shared checks of falloff.hpp: sizes match, distances positive, finite and
// strictly increasing.
void check_axis(const std::vector<double>& distances_m, const std::vector<double>& peak) {
    if (distances_m.size() != peak.size())
        throw InputError("falloff: " + std::to_string(distances_m.size()) + " distances but " +
                         std::to_string(peak.size()) + " peak values");
    for (std::size_t i = 0; i < distances_m.size(); ++i) {
        const double d = distances_m[i];
        if (!(d > 0.0) || !std::isfinite(d))
            throw InputError("falloff: distance must be positive and finite (got " + num(d) + " m)");
        if (i > 0 && !(d > distances_m[i - 1]))
            throw InputError("falloff: distances must increase strictly (" + num(distances_m[i - 1]) +
                             " m then " + num(d) + " m)");
    }
}

// A peak has a logarithm: finite and positive (NaN fails both tests).
bool usable(double p) { return p > 0.0 && std::isfinite(p); }

// Derivative at x0 of the parabola through (xa,ya), (xb,yb), (xc,yc) (distinct x):
// the sum of y times the derivative of each Lagrange basis polynomial at x0.
double parabola_slope(double x0, double xa, double ya, double xb, double yb, double xc, double yc) {
    const double la = ((x0 - xb) + (x0 - xc)) / ((xa - xb) * (xa - xc));
    const double lb = ((x0 - xa) + (x0 - xc)) / ((xb - xa) * (xb - xc));
    const double lc = ((x0 - xa) + (x0 - xb)) / ((xc - xa) * (xc - xb));
    return ya * la + yb * lb + yc * lc;
}

// Least squares of y on x (x not all equal, n >= 3), about the means.
PowerLawFit regress(const std::vector<double>& x, const std::vector<double>& y, double from_m,
                    double to_m) {
    const std::size_t n = x.size();
    assert(n >= 3 && y.size() == n);
    double mx = 0.0, my = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        mx += x[i];
        my += y[i];
    }
    mx /= static_cast<double>(n);
    my /= static_cast<double>(n);
    double sxx = 0.0, sxy = 0.0, syy = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        sxx += (x[i] - mx) * (x[i] - mx);
        sxy += (x[i] - mx) * (y[i] - my);
        syy += (y[i] - my) * (y[i] - my);
    }
    assert(sxx > 0.0);  // distances strictly increasing
    PowerLawFit fit;
    fit.status = FitStatus::ok;
    fit.n_points = static_cast<int>(n);
    fit.exponent = sxy / sxx;
    fit.log_coefficient = my - fit.exponent * mx;
    double ssr = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        const double r = (y[i] - my) - fit.exponent * (x[i] - mx);
        ssr += r * r;
    }
    fit.exponent_std_error = std::sqrt(ssr / static_cast<double>(n - 2) / sxx);
    fit.r_squared = syy > 0.0 ? 1.0 - ssr / syy : 1.0;  // syy = 0: every ln p equal, fit exact
    fit.fit_from_m = from_m;
    fit.fit_to_m = to_m;
    return fit;
}

PowerLawFit too_few(int n_points) {
    PowerLawFit fit;
    fit.status = FitStatus::too_few_points;
    fit.n_points = n_points;
    fit.exponent = fit.exponent_std_error = fit.log_coefficient = kNaN;
    fit.fit_from_m = fit.fit_to_m = fit.r_squared = kNaN;
    return fit;
}

// Fit over the usable points whose indices are listed (in increasing order).
PowerLawFit fit_indices(const std::vector<double>& distances_m, const std::vector<double>& peak,
                        const std::vector<std::size_t>& used) {
    if (used.size() < 3) return too_few(static_cast<int>(used.size()));
    std::vector<double> x, y;
    for (std::size_t i : used) {
        x.push_back(std::log(distances_m[i]));
        y.push_back(std::log(peak[i]));
    }
    return regress(x, y, distances_m[used.front()], distances_m[used.back()]);
}

}  // namespace

LocalExponents local_exponents(const std::vector<double>& distances_m, const std::vector<double>& peak) {
    check_axis(distances_m, peak);
    const std::size_t n = distances_m.size();
    std::vector<std::size_t> u;  // usable indices
    for (std::size_t i = 0; i < n; ++i)
        if (usable(peak[i])) u.push_back(i);

    LocalExponents out;
    out.exponent.assign(n, kNaN);
    out.status.assign(n, ExponentStatus::unusable_point);
    for (std::size_t i : u) out.status[i] = ExponentStatus::no_neighbours;
    if (u.size() < 2) return out;

    auto x = [&](std::size_t k) { return std::log(distances_m[u[k]]); };
    auto y = [&](std::size_t k) { return std::log(peak[u[k]]); };
    const std::size_t m = u.size();
    for (std::size_t k = 0; k < m; ++k) {
        double slope;
        if (m == 2) {
            slope = (y(1) - y(0)) / (x(1) - x(0));
        } else {
            // The three usable points around k: centred inside, shifted inward at the ends.
            const std::size_t a = k == 0 ? 0 : (k == m - 1 ? m - 3 : k - 1);
            slope = parabola_slope(x(k), x(a), y(a), x(a + 1), y(a + 1), x(a + 2), y(a + 2));
        }
        out.exponent[u[k]] = slope;
        out.status[u[k]] = ExponentStatus::ok;
    }
    return out;
}

PowerLawFit fit_power_law(const std::vector<double>& distances_m, const std::vector<double>& peak,
                          double from_m, double to_m) {
    check_axis(distances_m, peak);
    if (!(from_m >= 0.0) || std::isinf(from_m) || !(to_m >= from_m))
        throw InputError("falloff fit range must satisfy 0 <= from <= to (got from " + num(from_m) +
                         " m, to " + num(to_m) + " m)");
    std::vector<std::size_t> used;
    for (std::size_t i = 0; i < distances_m.size(); ++i)
        if (usable(peak[i]) && distances_m[i] >= from_m && distances_m[i] <= to_m) used.push_back(i);
    return fit_indices(distances_m, peak, used);
}

PowerLawFit fit_far_power_law(const std::vector<double>& distances_m, const std::vector<double>& peak) {
    check_axis(distances_m, peak);
    std::vector<std::size_t> u;
    for (std::size_t i = 0; i < distances_m.size(); ++i)
        if (usable(peak[i])) u.push_back(i);
    const std::size_t keep = std::min(u.size(), std::max<std::size_t>(3, (u.size() + 1) / 2));
    const std::vector<std::size_t> far(u.end() - static_cast<std::ptrdiff_t>(keep), u.end());
    return fit_indices(distances_m, peak, far);
}

std::vector<FourthPower> near_fourth_power(const LocalExponents& local, double tolerance) {
    if (!(tolerance >= 0.0) || !std::isfinite(tolerance))
        throw InputError("fourth-power tolerance must be non-negative and finite (got " + num(tolerance) + ")");
    assert(local.exponent.size() == local.status.size());
    std::vector<FourthPower> out(local.status.size(), FourthPower::unknown);
    for (std::size_t i = 0; i < out.size(); ++i)
        if (local.status[i] == ExponentStatus::ok)
            out[i] = std::abs(local.exponent[i] + 4.0) <= tolerance ? FourthPower::yes : FourthPower::no;
    return out;
}

}  // namespace murk
