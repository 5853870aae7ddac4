#include "cases/sweep/sweep_analysis.hpp"

#include "cases/detection/detectability.hpp"
#include "cases/detection/falloff.hpp"
#include "cases/output/result_layout.hpp"

#include <cmath>
#include <limits>
#include <string>
#include <type_traits>

namespace murk {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The points of one line along the distance axis: first flat index and stride.
struct Lines {
    std::vector<std::size_t> starts;   // flat index of each line's first point
    std::size_t stride = 1, length = 0;
    H5Shape other_shape;               // shape of the axes other than distance
};

Lines distance_lines(const std::vector<SweepAxis>& axes, int d) {
    Lines lines;
    for (std::size_t a = d + 1; a < axes.size(); ++a) lines.stride *= axes[a].values.size();
    lines.length = axes[d].values.size();
    const std::size_t total = point_count(axes);
    for (std::size_t p = 0; p < total; ++p)
        if ((p / lines.stride) % lines.length == 0) lines.starts.push_back(p);
    for (std::size_t a = 0; a < axes.size(); ++a)
        if (int(a) != d) lines.other_shape.push_back(axes[a].values.size());
    // A sweep over distance alone has one line: its fit is a scalar (no dimensions).
    return lines;
}

std::vector<double> gather(const std::vector<double>& values, const Lines& lines, std::size_t start) {
    std::vector<double> out(lines.length);
    for (std::size_t k = 0; k < lines.length; ++k) out[k] = values[start + k * lines.stride];
    return out;
}

// Copies of the sweep axes as coordinates of `group`: netCDF-4 readers look for a
// dimension's coordinate in the dataset's own group and its parents, never in a sibling such
// as /sweep. The copy keeps the attributes that name the object axis's values.
void copy_axes(const H5Group& root, const H5Group& group, const std::vector<SweepAxis>& axes) {
    using namespace layout;
    for (const SweepAxis& a : axes) {
        const H5Dataset copy = group.write_coordinate(a.name, a.values, a.units, a.long_name);
        const H5Dataset original = root.dataset(std::string(kSweep) + "/" + a.name);
        if (original.has_attribute(kAlternativeNames)) copy.set_attribute(kAlternativeNames, original.string_attribute(kAlternativeNames));
        if (original.has_attribute(kFlagValues))
            copy.set_flags(original.double_array_attribute(kFlagValues), original.string_attribute(kFlagMeanings));
    }
}

// The names of `axes` but `skip`: the dimensions of a dataset over the other axes.
std::vector<std::string> names_but(const std::vector<SweepAxis>& axes, int skip) {
    std::vector<std::string> names;
    for (std::size_t a = 0; a < axes.size(); ++a)
        if (int(a) != skip) names.push_back(axes[a].name);
    return names;
}

}  // namespace

void write_sweep_analysis(H5Group& root, const std::vector<SweepAxis>& axes, const std::optional<DetectionSpec>& detection) {
    const int d = find_axis(axes, AxisKind::distance);
    if (d < 0) {
        root.set_attribute("analysis_note", "no distance axis: no detection range and no falloff fit");
        return;
    }
    const Lines lines = distance_lines(axes, d);
    const std::vector<double>& distances = axes[d].values;
    const std::vector<double> peak = root.read<double>("sweep/peak_perturbation").values;
    const std::vector<std::size_t> shape = axis_shape(axes);
    const H5Shape full(shape.begin(), shape.end());
    const std::size_t n_lines = lines.starts.size();

    // Falloff of the peak perturbation.
    std::vector<double> local(peak.size(), kNaN), exponent(n_lines), error(n_lines), from(n_lines), to(n_lines),
        r2(n_lines);
    std::vector<std::uint8_t> fourth(peak.size(), std::uint8_t(FourthPower::unknown));
    std::vector<std::int32_t> used(n_lines);
    for (std::size_t l = 0; l < n_lines; ++l) {
        const std::vector<double> line = gather(peak, lines, lines.starts[l]);
        const LocalExponents le = local_exponents(distances, line);
        const std::vector<FourthPower> near4 = near_fourth_power(le, 0.5);
        for (std::size_t k = 0; k < lines.length; ++k) {
            local[lines.starts[l] + k * lines.stride] = le.exponent[k];
            fourth[lines.starts[l] + k * lines.stride] = std::uint8_t(near4[k]);
        }
        const PowerLawFit fit = fit_far_power_law(distances, line);
        exponent[l] = fit.exponent, error[l] = fit.exponent_std_error, from[l] = fit.fit_from_m, to[l] = fit.fit_to_m;
        r2[l] = fit.r_squared, used[l] = fit.n_points;
    }
    H5Group falloff = root.group(layout::kFalloff);
    copy_axes(root, falloff, axes);
    // Real results are NaN where they do not exist (no usable points, no crossing): marked as
    // missing (_FillValue) for netCDF readers.
    auto put = [&](H5Group& g, const char* name, const auto& values, const H5Shape& shape, const char* units,
                   const char* long_name, int skip) {
        H5Dataset ds = g.write(name, values, shape, units, long_name);
        ds.label_dimensions(names_but(axes, skip));
        if constexpr (std::is_same_v<typename std::decay_t<decltype(values)>::value_type, double>) ds.set_fill_value(kNaN);
        return ds;
    };
    put(falloff, "local_exponent", local, full, "1", "local exponent d ln(peak) / d ln(distance)", -1);
    const FlagTable fourth_flags = flags_of<FourthPower>();
    put(falloff, "near_fourth_power", fourth, full, "1",
        "whether |local exponent + 4| <= 0.5 (fourth-power rule of thumb)", -1)
        .set_flags(fourth_flags.values, fourth_flags.meanings);
    put(falloff, "exponent", exponent, lines.other_shape, "1", "least-squares exponent over the far half of the usable distances (at least 3)", d);
    put(falloff, "exponent_std_error", error, lines.other_shape, "1", "standard error of the fitted exponent", d);
    put(falloff, "fit_from", from, lines.other_shape, "m", "nearest distance in the fit", d);
    put(falloff, "fit_to", to, lines.other_shape, "m", "farthest distance in the fit", d);
    put(falloff, "r_squared", r2, lines.other_shape, "1", "coefficient of determination of the fit", d);
    put(falloff, "points_in_fit", used, lines.other_shape, "1", "points used in the fit", d);

    if (!detection) {
        root.set_attribute("analysis_note", "no [detection] section: no signal-to-noise ratio or detection range");
        return;
    }
    const std::vector<double> pd = root.read<double>("sweep/detection_probability").values;
    std::vector<double> range(n_lines);
    std::vector<std::uint8_t> status(n_lines);
    for (std::size_t l = 0; l < n_lines; ++l) {
        const DetectionRange r = detection_range(distances, gather(pd, lines, lines.starts[l]), detection->probability_level);
        range[l] = r.status == RangeStatus::crossed ? r.range_m : kNaN;
        status[l] = std::uint8_t(r.status);
    }
    H5Group det = root.group(layout::kDetection);
    det.set_attribute("probability_level", detection->probability_level);
    det.set_attribute("false_alarm_probability", detection->false_alarm_probability);
    std::vector<SweepAxis> others;
    for (std::size_t a = 0; a < axes.size(); ++a)
        if (int(a) != d) others.push_back(axes[a]);
    copy_axes(root, det, others);
    put(det, layout::kRange, range, lines.other_shape, "m",
        "distance at which the detection probability falls below the level (NaN: see status)", d);
    const FlagTable status_flags = flags_of<RangeStatus>();
    put(det, layout::kStatus, status, lines.other_shape, "1",
        "where the detection probability crosses the level: inside the sweep, beyond it (detectable at every "
        "distance swept), never (at no distance swept), or no point computed", d)
        .set_flags(status_flags.values, status_flags.meanings);
}

}  // namespace murk
