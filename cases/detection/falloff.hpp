#pragma once
// How fast the peak perturbation p(d) falls with the object's distance d: the local
// exponent d ln p / d ln d at each distance, a least-squares power law over a range of
// distances, and the check against the fourth-power rule of thumb (a point source and
// an induced dipole give p ~ d^-4, "doubling the distance leaves one sixteenth":
// common practice, see DEVELOPERS.md, "Physics and method"). These feed /falloff/* in
// cases/RESULT_LAYOUT.md.
//
// Inputs shared by all functions: distances_m strictly increasing, > 0 and finite (the
// sweep's distance axis); peak one value per distance (V, A or any positive quantity).
// A peak that is NaN (not computed, masked), infinite, zero or negative has no
// logarithm: that point is skipped, never an error. Bad distances or a size mismatch
// throw InputError.
#include <cstdint>
#include <vector>

namespace murk {

// ---- local exponent ------------------------------------------------------------

enum class ExponentStatus : std::uint8_t {
    ok = 0,
    unusable_point = 1,  // this point's peak is NaN, infinite or <= 0
    no_neighbours = 2,   // usable, but fewer than two usable points in all
};

struct LocalExponents {
    std::vector<double> exponent;         // d ln p / d ln d; NaN where status != ok
    std::vector<ExponentStatus> status;   // one per distance
};

// Local exponent at every distance. With x = ln d and y = ln p over the usable points
// only (unusable ones are skipped, so a point's neighbours are the nearest usable
// points on either side): the derivative at x_i of the parabola through three
// neighbouring usable points, centred (i-1, i, i+1) inside and one-sided (the first or
// last three) at the ends; with only two usable points, the slope between them.
// Exact (to rounding) when ln p is a quadratic in ln d, hence for every power law
// p = C d^b. Otherwise second-order: on a log grid of step h the error is about
// (h^2/6)|y'''| inside and (h^2/3)|y'''| at the ends (Taylor expansion of the
// three-point Lagrange derivative; common practice). On a non-uniform grid it reduces to
// the plain centred difference only where the two steps are equal.
LocalExponents local_exponents(const std::vector<double>& distances_m, const std::vector<double>& peak);

// ---- power-law fit -------------------------------------------------------------

enum class FitStatus : std::uint8_t {
    ok = 0,
    too_few_points = 1,  // fewer than 3 usable points in the range: no slope error
};

struct PowerLawFit {
    FitStatus status = FitStatus::too_few_points;
    int n_points = 0;                  // usable points in the fit
    // The values below are NaN unless status == ok.
    double exponent = 0.0;             // b in ln p = a + b ln d
    double exponent_std_error = 0.0;   // standard error of b: sqrt(SSR/(n-2) / Sxx)
    double log_coefficient = 0.0;      // a = ln C, with d in m
    double fit_from_m = 0.0;           // nearest distance used (m)
    double fit_to_m = 0.0;             // farthest distance used (m)
    double r_squared = 0.0;            // 1 - SSR/SST; 1 when SST = 0 (all ln p equal)
};

// Ordinary least squares of ln p = a + b ln d over the usable points with
// from_m <= d <= to_m (textbook simple linear regression; slope standard error with
// n - 2 degrees of freedom). Computed about the means, so exact power laws come back
// to rounding. Needs at least 3 usable points (2 would fit exactly with no error
// estimate). Throws InputError, besides the shared checks, unless
// 0 <= from_m <= to_m, from_m finite (to_m may be +inf: 0 to +inf takes every point).
PowerLawFit fit_power_law(const std::vector<double>& distances_m, const std::vector<double>& peak,
                          double from_m, double to_m);

// The default fit, over the far part of the sweep: the farthest half of the usable
// points, rounded up, and never fewer than 3 (so 3 of 3 to 6 usable points, 4 of 7).
// Why the far half: near the body the exponent drifts with distance (an elongated body
// makes it shallower); the far points are where a single power law holds, and half of
// them keeps the slope stable against noise. Needs at least 3 usable points.
PowerLawFit fit_far_power_law(const std::vector<double>& distances_m, const std::vector<double>& peak);

// ---- fourth-power rule of thumb ------------------------------------------------

enum class FourthPower : std::uint8_t {
    no = 0,       // |local exponent + 4| > tolerance
    yes = 1,      // |local exponent + 4| <= tolerance
    unknown = 2,  // no local exponent at this point (its status is not ok)
};

// Per point: whether the local exponent lies within tolerance of -4 (default 0.5, as
// /falloff/near_fourth_power). Throws InputError unless tolerance >= 0 and finite.
std::vector<FourthPower> near_fourth_power(const LocalExponents& local, double tolerance = 0.5);

}  // namespace murk
