#include "geometry/electrode_hulls.hpp"

#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"
#include "geometry/regions.hpp"
#include "geometry/shapes.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <utility>
#include <string>

namespace murk {
namespace {

constexpr double kPi = 3.14159265358979323846;

// The edge size in force: the caller's, or the rule's; never above the spacing.
double edge_size_for(double target_edge, std::optional<double> edge_size, double spacing) {
    if (edge_size) require_positive_length(*edge_size, "electrode edge size");
    return std::min(edge_size ? *edge_size : kElectrodeEdgeFraction * target_edge, spacing);
}

// Refuses a ring that is empty or reaches beyond [lo, hi], the hull's extent.
void require_rings_on(const std::vector<AxialBand>& rings, double lo, double hi) {
    for (std::size_t k = 0; k < rings.size(); ++k) {
        const AxialBand& b = rings[k];
        const std::string what = "ring " + std::to_string(k + 1) + " (from " + shape_number(b.from) + " m to " + shape_number(b.to) + " m)";
        if (!(std::isfinite(b.from) && std::isfinite(b.to) && b.from < b.to)) throw InputError(what + " is empty");
        if (b.from < lo || b.to > hi)
            throw InputError(what + " reaches beyond the hull, which spans " + shape_number(lo) + " m to " + shape_number(hi) + " m along x");
    }
}

// Sorted, without repeats closer than `tol`.
std::vector<double> sorted_unique(std::vector<double> v, double tol) {
    std::sort(v.begin(), v.end());
    std::vector<double> out;
    for (double x : v)
        if (out.empty() || x - out.back() > tol) out.push_back(x);
    return out;
}

// Positions of `breaks` (sorted, unique, first and last the ends) filled in by
// graded_positions between each pair.
std::vector<double> fill_between(const std::vector<double>& breaks, const std::vector<double>& edges, double spacing,
                                 double edge_size) {
    std::vector<double> out{breaks.front()};
    for (std::size_t i = 0; i + 1 < breaks.size(); ++i) {
        std::vector<double> part = graded_positions(breaks[i], breaks[i + 1], edges, spacing, edge_size);
        if (part.size() == 2) part.insert(part.begin() + 1, 0.5 * (breaks[i] + breaks[i + 1]));
        out.insert(out.end(), part.begin() + 1, part.end());
    }
    return out;
}

// Area of the polygonal band between two rings of n vertices at the same angles
// (radii ra, rb, axial distance dx): n planar isosceles trapezoids whose parallel
// sides are the chords 2 r sin(pi/n), at distance sqrt(dx^2 + cos^2(pi/n) (rb - ra)^2)
// (the chords' midpoints lie at radius r cos(pi/n)). ra = 0 is a tip's fan.
double polygon_band_area(int n, double ra, double rb, double dx) {
    const double s = std::sin(kPi / n), c = std::cos(kPi / n);
    return n * (ra + rb) * s * std::hypot(dx, c * (rb - ra));
}

// Area of the polygonal surface between stations `first` and `last` (indices).
double stations_area(int n, const std::vector<double>& x, const std::vector<double>& rho, std::size_t first,
                     std::size_t last) {
    double a = 0.0;
    for (std::size_t i = first; i < last; ++i) a += polygon_band_area(n, rho[i], rho[i + 1], x[i + 1] - x[i]);
    return a;
}

}  // namespace

std::vector<double> graded_positions(double a, double b, const std::vector<double>& edges, double spacing,
                                     double edge_size) {
    MURK_CHECK(a < b && spacing > 0.0 && edge_size > 0.0, "callers pass an interval and positive sizes");
    // Points at equal steps (at most 1) of the integral of 1 / wanted, where wanted is
    // `spacing`, or f (edge_size + (g - 1) d) at a distance d from the nearest edge
    // (g the growth). With f = ln g / (g - 1), a unit step from distance d is
    // edge_size + (g - 1) d long: the steps from an edge are edge_size, g edge_size, g^2 edge_size, ...
    // until they reach `spacing` (the step that meets the cap is at most spacing / f).
    const double g = kElectrodeEdgeGrowth, f = std::log(g) / (g - 1.0);
    auto wanted = [&](double s) {
        double d = std::numeric_limits<double>::infinity();
        for (double e : edges) d = std::min(d, std::abs(s - e));
        return std::min(spacing, f * (edge_size + (g - 1.0) * d));
    };
    // The integral by the trapezoid rule on a grid much finer than the smallest step.
    const int samples = static_cast<int>(std::min(1e6, std::ceil(16.0 * (b - a) / std::min(edge_size, b - a)))) + 1;
    std::vector<double> cumulative(samples + 1, 0.0);
    const double h = (b - a) / samples;
    for (int i = 0; i < samples; ++i)
        cumulative[i + 1] = cumulative[i] + 0.5 * h * (1.0 / wanted(a + i * h) + 1.0 / wanted(a + (i + 1) * h));
    const int steps = std::max(1, static_cast<int>(std::ceil(cumulative.back() * (1.0 - 1e-9))));
    std::vector<double> out{a};
    int i = 0;
    for (int k = 1; k < steps; ++k) {
        const double target = cumulative.back() * k / steps;
        while (cumulative[i + 1] < target) ++i;
        const double t = (target - cumulative[i]) / (cumulative[i + 1] - cumulative[i]);
        out.push_back(a + (i + t) * h);
    }
    out.push_back(b);
    return out;
}

double capsule_band_area(double radius, double cylinder_length, const AxialBand& band) {
    const double half = 0.5 * cylinder_length + radius;
    const double width = std::min(band.to, half) - std::max(band.from, -half);
    return width > 0.0 ? 2.0 * kPi * radius * width : 0.0;
}

double box_band_area(const Vec3& size, const AxialBand& band) {
    const double half = 0.5 * size.x();
    const double width = std::min(band.to, half) - std::max(band.from, -half);
    if (!(width > 0.0)) return 0.0;
    const int ends = (band.from <= -half ? 1 : 0) + (band.to >= half ? 1 : 0);
    return 2.0 * (size.y() + size.z()) * width + ends * size.y() * size.z();
}

TriangleMesh make_capsule_with_rings(double radius, double cylinder_length, double target_edge,
                                     const std::vector<AxialBand>& rings, std::optional<double> edge_size) {
    require_positive_length(radius, "capsule radius");
    require_positive_length(target_edge, "capsule target edge");
    if (!(std::isfinite(cylinder_length) && cylinder_length >= 0.0))
        throw InputError("capsule cylinder length must be zero or a positive length, got " + shape_number(cylinder_length));
    const double r = radius, h = 0.5 * cylinder_length, quarter = 0.5 * kPi * r;
    require_rings_on(rings, -h - r, h + r);
    // Meridian arc length s from the left tip: the stations are graded in s, so
    // that the caps get panels of the same size as the cylinder.
    const double total = 2.0 * quarter + cylinder_length;
    // The angle from a tip, phi = acos(1 - d / r) for a point d from it along the
    // axis, written as 2 asin(sqrt(d / 2r)), which stays accurate near the tip.
    auto s_of_x = [&](double x) {
        if (x < -h) return 2.0 * r * std::asin(std::sqrt(std::clamp((x + h + r) / (2.0 * r), 0.0, 1.0)));
        if (x <= h) return quarter + (x + h);
        return total - 2.0 * r * std::asin(std::sqrt(std::clamp((h + r - x) / (2.0 * r), 0.0, 1.0)));
    };
    auto x_of_s = [&](double s) {
        if (s < quarter) return -h - r * std::cos(s / r);
        if (s <= quarter + cylinder_length) return -h + (s - quarter);
        return h + r * std::cos((total - s) / r);
    };
    const double spacing = std::min(kGridSpacingFactor * target_edge, 0.5 * quarter);  // >= 2 bands per cap
    const double edge = edge_size_for(target_edge, edge_size, spacing);
    const double tol = 1e-9 * total;
    std::vector<double> edges_s, edges_x;
    for (const AxialBand& b : rings)
        for (double x : {b.from, b.to}) edges_x.push_back(x), edges_s.push_back(s_of_x(x));
    std::vector<double> breaks = edges_s;
    for (double s : {0.0, quarter, quarter + cylinder_length, total}) breaks.push_back(s);
    breaks = sorted_unique(breaks, tol);
    const std::vector<double> stations_s = fill_between(breaks, edges_s, spacing, edge);

    const double n_theta_d = std::max(8.0, std::ceil(2.0 * kPi * r / spacing));
    const double panels = 2.0 * n_theta_d * static_cast<double>(stations_s.size());
    if (!(panels <= static_cast<double>(kMaxGeneratedPanels)))
        throw InputError("capsule: target edge too small, the mesh would need about " + shape_number(panels) + " panels");
    const int n = static_cast<int>(n_theta_d);
    const std::size_t m = stations_s.size() - 1;  // stations 0 and m are the tips
    std::vector<double> x(m + 1), rho(m + 1, 0.0), rho_true(m + 1, 0.0);
    std::size_t left = 0, right = m;  // first and last station of the cylinder (the equator for a sphere)
    for (std::size_t i = 0; i <= m; ++i) {
        const double s = stations_s[i];
        x[i] = x_of_s(s);
        for (std::size_t k = 0; k < edges_s.size(); ++k)
            if (std::abs(s - edges_s[k]) <= tol) x[i] = edges_x[k];  // ring edges exactly where asked
        rho_true[i] = s < quarter ? r * std::sin(s / r) : s <= quarter + cylinder_length ? r : r * std::sin((total - s) / r);
        if (std::abs(s - quarter) <= tol) left = i;
        if (std::abs(s - quarter - cylinder_length) <= tol) right = i;
    }
    // Area rule (header). Every station starts on the polygon of the true perimeter
    // (radius kappa times the true one), which makes the cylinder's bands exact. On
    // the caps the polygonal meridian cuts corners, so each segment between two
    // neighbouring breaks (ring edges, junctions, tips) gets its stations inside
    // moved out by t w_i, w_i a bump that vanishes at the segment's ends (at a tip,
    // where the radius is 0 anyway, a ramp), with t found by bisection so that the
    // segment has its true area 2 pi r dx (Archimedes). The breaks keep their
    // radii, so the segments are independent and every ring, a union of segments,
    // has its true area.
    const double kappa = (kPi / n) / std::sin(kPi / n);
    for (std::size_t i = 0; i <= m; ++i) rho[i] = kappa * rho_true[i];
    std::vector<std::size_t> break_at;
    for (std::size_t i = 0; i <= m; ++i)
        for (double b : breaks)
            if (std::abs(stations_s[i] - b) <= tol) {
                break_at.push_back(i);
                break;
            }
    for (std::size_t k = 0; k + 1 < break_at.size(); ++k) {
        const std::size_t first = break_at[k], last = break_at[k + 1];
        if (first >= left && last <= right) continue;  // cylinder: exact already
        const double want = 2.0 * kPi * r * (x[last] - x[first]);
        const std::vector<double> base(rho.begin() + first, rho.begin() + last + 1);
        auto weight = [&](std::size_t i) {
            const double u = (stations_s[i] - stations_s[first]) / (stations_s[last] - stations_s[first]);
            return first == 0 ? 1.0 - u : last == m ? u : std::sin(kPi * u);
        };
        auto excess = [&](double t) {
            for (std::size_t i = first + 1; i < last; ++i) rho[i] = base[i - first] * (1.0 + t * weight(i));
            return stations_area(n, x, rho, first, last) - want;
        };
        // The root nearest t = 0: the corners cut are small, so is t; far from 0
        // the area is not monotonic in t (a deep bump lengthens the meridian).
        const bool below = excess(0.0) < 0.0;
        double lo = 0.0, hi = below ? 1e-3 : -1e-3;
        while ((excess(hi) < 0.0) == below) {
            MURK_CHECK(std::abs(hi) < 0.3, "a cap segment's area is reached by moving its stations a little");
            lo = hi, hi *= 2.0;
        }
        for (int it = 0; it < 100 && std::abs(hi - lo) > 1e-15; ++it) {
            const double mid = 0.5 * (lo + hi);
            ((excess(mid) < 0.0) == below ? lo : hi) = mid;
        }
        excess(0.5 * (lo + hi));
    }
    TriangleMesh mesh = make_loft(x, rho, rho, n);
    mesh.name = "capsule";
    mesh.region.assign(mesh.size(), 0);
    return mesh;
}

TriangleMesh make_box_with_rings(const Vec3& size, double target_edge, const std::vector<AxialBand>& rings,
                                 std::optional<double> edge_size) {
    for (int d = 0; d < 3; ++d) require_positive_length(size[d], std::string("box size ") + "xyz"[d]);
    require_positive_length(target_edge, "box target edge");
    const double half = 0.5 * size.x();
    require_rings_on(rings, -half, half);
    const double spacing = kGridSpacingFactor * target_edge;
    const double edge = edge_size_for(target_edge, edge_size, spacing);
    std::vector<double> edges;
    for (const AxialBand& b : rings) edges.push_back(b.from), edges.push_back(b.to);
    std::vector<double> breaks = edges;
    breaks.push_back(-half);
    breaks.push_back(half);
    std::array<std::vector<double>, 3> lines;
    lines[0] = fill_between(sorted_unique(breaks, 1e-9 * size.x()), edges, spacing, edge);
    for (int d = 1; d < 3; ++d) lines[d] = graded_positions(-0.5 * size[d], 0.5 * size[d], {}, spacing, edge);
    return make_box_on_lines(lines);
}

TriangleMesh make_two_ring_capsule(double radius, double overall_length, double panel_size, const AxialBand& first,
                                   const AxialBand& second, std::optional<double> edge_size) {
    TriangleMesh mesh =
        make_capsule_with_rings(radius, overall_length - 2.0 * radius, panel_size, {first, second}, edge_size);
    for (const auto& [name, band] : {std::pair{"ring 1", first}, std::pair{"ring 2", second}})
        tag_band(mesh, add_region(mesh, name), Vec3::Zero(), Vec3::UnitX(), band.from, band.to);
    return mesh;
}

}  // namespace murk
