#include "solver/image_series.hpp"

#include "geometry/input_error.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace murk {

namespace {

const Eigen::Matrix3d kFlipZ = Eigen::Vector3d(1.0, 1.0, -1.0).asDiagonal();

// sum over m >= first of 1 / (step (m + offset))^p: explicit terms, then the
// Euler-Maclaurin remainder of the rest (its error is far below double precision).
double power_tail(double step, double offset, int first, int p) {
    auto f = [&](double m) { return std::pow(step * (m + offset), -p); };
    constexpr int kExplicit = 2000;
    double sum = 0.0;
    for (int m = first; m < first + kExplicit; ++m) sum += f(m);
    const double k = first + kExplicit, a = step * (k + offset);
    const double integral = std::pow(a, 1 - p) / (step * (p - 1));
    const double derivative = -p * step * std::pow(a, -p - 1);
    return sum + integral + 0.5 * f(k) - derivative / 12.0;
}

// A pair of images at +-L of weight w standing for the pairs at +-L_m (m >= first,
// L_m = step (m + offset)) of weight 1 each: same quadratic and quartic terms.
struct EquivalentPair {
    double distance;
    double weight;
};
EquivalentPair equivalent_pair(double step, double offset, int first) {
    const double s2 = power_tail(step, offset, first, 3), s4 = power_tail(step, offset, first, 5);
    const double l = std::sqrt(s2 / s4);
    return {l, s2 * l * l * l};
}

// The series with M explicit pairs per family (two planes).
template <class S>
ImageSeries<S> two_plane_series(double s, double b, S r, int m) {
    const double h = s - b;
    ImageSeries<S> out;
    out.bounds = {BoundingPlane{Vec3(0, 0, s), Vec3::UnitZ()}, BoundingPlane{Vec3(0, 0, b), -Vec3::UnitZ()}};
    auto add = [&](const Eigen::Matrix3d& linear, double shift_z, S weight, double distance_to_subtract) {
        if (weight == S(0)) return;
        out.terms.push_back({linear, Vec3(0, 0, shift_z), weight});
        if (distance_to_subtract > 0.0) out.constant += weight / S(distance_to_subtract);
    };
    const bool insulating = r == S(1);
    S rk = S(1);
    for (int k = 1; k <= m; ++k) {  // translations, weight r^k
        rk *= r;
        add(Eigen::Matrix3d::Identity(), 2.0 * k * h, rk, insulating ? 2.0 * k * h : 0.0);
        add(Eigen::Matrix3d::Identity(), -2.0 * k * h, rk, insulating ? 2.0 * k * h : 0.0);
    }
    if (insulating) {
        // Reflections 2s + 2jH - z, j = -M .. M-1: pairs +-(2m+1)H about the mid-plane.
        for (int j = -m; j < m; ++j) add(kFlipZ, 2.0 * s + 2.0 * j * h, S(1), std::abs(2 * j + 1) * h);
        const EquivalentPair t = equivalent_pair(2.0 * h, 0.0, m + 1);
        add(Eigen::Matrix3d::Identity(), t.distance, S(t.weight), t.distance);
        add(Eigen::Matrix3d::Identity(), -t.distance, S(t.weight), t.distance);
        const EquivalentPair f = equivalent_pair(2.0 * h, 0.5, m);
        add(kFlipZ, s + b + f.distance, S(f.weight), f.distance);
        add(kFlipZ, s + b - f.distance, S(f.weight), f.distance);
    } else {
        S rj = S(1);
        add(kFlipZ, 2.0 * s, S(1), 0.0);
        for (int j = 1; j <= m; ++j) {  // reflections, weight r^|j|
            rj *= r;
            add(kFlipZ, 2.0 * s + 2.0 * j * h, rj, 0.0);
            add(kFlipZ, 2.0 * s - 2.0 * j * h, rj, 0.0);
        }
    }
    return out;
}

struct SamplePair {
    Vec3 x, y;
};

// Pairs of points between the planes: levels at, between and near the planes,
// horizontal separations from none to the reach.
std::vector<SamplePair> sample_pairs(double s, double b, double reach) {
    const double h = s - b;
    std::vector<SamplePair> out;
    const std::vector<double> rho = {0.0, 0.25 * h, 0.5 * reach, reach};
    for (double r : rho) {
        const std::vector<double> z = r == 0.0 ? std::vector<double>{b + 0.05 * h, b + 0.5 * h, s - 0.05 * h}
                                               : std::vector<double>{b, b + 0.5 * h, s};
        for (double zx : z)
            for (double zy : z)
                if (r > 0.0 || zx != zy) out.push_back({Vec3(r, 0, zx), Vec3(0, 0, zy)});
    }
    return out;
}

std::string number(double v) {
    std::ostringstream o;
    o.precision(3);
    o << v;
    return o.str();
}

}  // namespace

template <class S>
ImageSeries<S> plane_images(const BoundingPlane& plane, S weight) {
    ImageSeries<S> out;
    out.bounds = {plane};
    const Vec3 n = plane.normal;
    FieldImage<S> image;
    image.linear = Eigen::Matrix3d::Identity() - 2.0 * n * n.transpose();
    image.shift = 2.0 * plane.point.dot(n) * n;
    image.weight = weight;
    if (weight != S(0)) out.terms.push_back(image);
    return out;
}

template <class S>
S reflection_coefficient(S sigma_water, S sigma_bottom) {
    return (sigma_water - sigma_bottom) / (sigma_water + sigma_bottom);
}

template <class S>
S image_kernel(const ImageSeries<S>& series, const Vec3& x, const Vec3& y) {
    S k = -series.constant;
    for (const FieldImage<S>& t : series.terms) k += t.weight / (t.of(x) - y).norm();
    return k;
}

template <class S>
ImageSeries<S> layer_images(const WaterLayer& layer, S bottom_reflection) {
    if (!layer.surface_z && !layer.bottom_z) throw InputError("water layer: no plane given");
    if (!layer.bottom_z) return plane_images(BoundingPlane{Vec3(0, 0, *layer.surface_z), Vec3::UnitZ()}, S(1));
    if (!layer.surface_z)
        return plane_images(BoundingPlane{Vec3(0, 0, *layer.bottom_z), -Vec3::UnitZ()}, bottom_reflection);
    const double s = *layer.surface_z, b = *layer.bottom_z, h = s - b;
    if (!(h > 0.0)) throw InputError("water layer: the surface must lie above the bottom");
    if (!(layer.tolerance > 0.0 && layer.tolerance < 1.0))
        throw InputError("water layer: the image tolerance must lie between 0 and 1");
    const double r_abs = std::abs(bottom_reflection);
    if (!(r_abs <= 1.0) || (r_abs == 1.0 && bottom_reflection != S(1)))
        throw InputError("water layer: the bottom's reflection coefficient must be 1 or less than 1 in magnitude");
    const bool insulating = bottom_reflection == S(1);
    const double reach = std::max(layer.reach, 0.25 * h);
    const double far = std::sqrt(reach * reach + h * h);
    const std::vector<SamplePair> samples = sample_pairs(s, b, reach);

    // The reference: the same series far longer (insulating: error ~ 1/M^6 of the
    // equivalent pairs; sediment: geometric, |r|^M far below the tolerance).
    int reference_pairs = 2000;
    if (!insulating && r_abs > 0.0)
        reference_pairs = std::min(200000, int(std::ceil(std::log(1e-4 * layer.tolerance) / std::log(r_abs))) + 10);
    if (!insulating && r_abs == 0.0) reference_pairs = 1;
    const ImageSeries<S> reference = two_plane_series(s, b, bottom_reflection, reference_pairs);
    std::vector<S> exact;
    for (const SamplePair& p : samples) exact.push_back(image_kernel(reference, p.x, p.y));

    const int max_pairs = (kMaxImages - 4) / 4;
    for (int m = 1; m <= max_pairs; ++m) {
        ImageSeries<S> series = two_plane_series(s, b, bottom_reflection, m);
        double worst = 0.0;
        for (std::size_t i = 0; i < samples.size(); ++i)
            worst = std::max(worst, std::abs(image_kernel(series, samples[i].x, samples[i].y) - exact[i]));
        if (worst * far <= layer.tolerance) {
            series.tolerance = layer.tolerance;
            series.reach = reach;
            return series;
        }
    }
    throw InputError("the image series of water " + number(h) + " m deep with a bottom reflection coefficient of " +
                     "magnitude " + number(r_abs) + " needs more than " + std::to_string(kMaxImages) +
                     " images to reach a relative error of " + number(layer.tolerance) + " over " + number(reach) +
                     " m");
}

template ImageSeries<double> plane_images(const BoundingPlane&, double);
template ImageSeries<Complex> plane_images(const BoundingPlane&, Complex);
template ImageSeries<double> layer_images(const WaterLayer&, double);
template ImageSeries<Complex> layer_images(const WaterLayer&, Complex);
template double reflection_coefficient(double, double);
template Complex reflection_coefficient(Complex, Complex);
template double image_kernel(const ImageSeries<double>&, const Vec3&, const Vec3&);
template Complex image_kernel(const ImageSeries<Complex>&, const Vec3&, const Vec3&);

}  // namespace murk
