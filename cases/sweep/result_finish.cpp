#include "cases/sweep/result_finish.hpp"

#include "cases/output/result_layout.hpp"
#include "cases/output/surface_output.hpp"
#include "cases/sweep/sweep_analysis.hpp"
#include "cases/sweep/waveform_synthesis.hpp"
#include "geometry/input_error.hpp"

#include <complex>
#include <filesystem>
#include <sstream>

namespace murk {

namespace {

AxisKind kind_of(const std::string& name, const std::string& file) {
    static const std::pair<const char*, AxisKind> kinds[] = {
        {"water_conductivity", AxisKind::water_conductivity}, {"frequency", AxisKind::frequency},
        {"surface_distance", AxisKind::boundary_distance},     {"bottom_distance", AxisKind::boundary_distance},
        {"wall_distance", AxisKind::boundary_distance},
        {"alternative", AxisKind::alternative},                {"permittivity", AxisKind::permittivity},
        {"conductivity", AxisKind::conductivity},             {"size", AxisKind::size},
        {"distance", AxisKind::distance},                     {"grid_u", AxisKind::grid_u},
        {"grid_v", AxisKind::grid_v}};
    for (const auto& [n, k] : kinds)
        if (name == n) return k;
    throw InputError(file + ": /sweep names an axis '" + name + "' that murk does not know");
}

// The sensor values at one point, as magnitudes or signed values of their own type.
template <class S>
void write_strongest(H5Group& sweep, const std::vector<std::size_t>& shape, std::size_t best, std::size_t sensors) {
    std::vector<std::size_t> index(shape.size());
    for (std::size_t k = shape.size(), p = best; k-- > 0;) index[k] = p % shape[k], p /= shape[k];
    H5Shape offset(index.begin(), index.end()), count(index.size(), 1);
    offset.push_back(0), count.push_back(sensors);
    const std::vector<S> image = sweep.dataset("perturbation").read_slab<S>(offset, count);
    sweep.write("strongest_image", image, "V", "electric image at the sweep point with the largest peak")
        .label_dimensions({layout::kSensor})
        .set_attribute("point", static_cast<std::int64_t>(best));
}

}  // namespace

std::vector<SweepAxis> axes_in_file(const H5Group& root) {
    const std::string file = root.file_name();
    const H5Group sweep = root.open_group(layout::kSweep);
    if (!sweep.has_attribute("axes")) throw InputError(file + ": /sweep does not list its axes (not a murk run result)");
    std::vector<SweepAxis> axes;
    std::istringstream names(sweep.string_attribute("axes"));
    for (std::string name; names >> name;) {
        const H5Dataset d = sweep.dataset(name);
        axes.push_back({kind_of(name, file), name, d.string_attribute("units"), d.string_attribute("long_name"),
                        d.read<double>().values});
    }
    return axes;
}

std::vector<XdmfSurface> finish_result(H5Group root) {
    const std::vector<SweepAxis> axes = axes_in_file(root);
    H5Group sweep = root.open_group(layout::kSweep);
    std::optional<DetectionSpec> detection;
    if (sweep.exists("detection_probability")) {
        const H5Dataset pd = sweep.dataset("detection_probability");
        detection.emplace();
        detection->probability_level = pd.double_attribute("probability_level");
        detection->false_alarm_probability = pd.double_attribute("false_alarm_probability");
    }
    write_sweep_analysis(root, axes, detection);
    write_waveform_synthesis(root, axes);  // with a [signal] waveform only
    if (!root.has_attribute("body")) return {};  // no surface to show
    const std::string body = root.string_attribute("body");
    const H5Group baseline = root.group("baseline/" + body);
    std::vector<XdmfAttribute> fields = sidecar_fields(baseline, "outer_potential", "baseline potential", layout::kPanel);
    const H5Dataset triangles = root.dataset("mesh/" + body + "/triangles");
    const H5Dataset vertices = root.dataset("mesh/" + body + "/vertices");
    XdmfSurface surface{"/mesh/" + body, std::size_t(vertices.shape()[0]), std::size_t(triangles.shape()[0]), {}};
    if (baseline.exists(layout::kTransdermal)) {  // a fish: its skin's image is worth showing
        for (XdmfAttribute& a : sidecar_fields(baseline, layout::kTransdermal, "baseline transdermal voltage", layout::kPanel))
            fields.push_back(a);
        const std::vector<std::uint8_t> status = sweep.read<std::uint8_t>(layout::kStatus).values;
        const std::vector<double> peak = sweep.read<double>(layout::kPeakPerturbation).values;
        std::size_t best = peak.size();
        for (std::size_t p = 0; p < peak.size(); ++p)
            if (status[p] == std::uint8_t(PointStatus::computed) && (best == peak.size() || peak[p] > peak[best])) best = p;
        if (best < peak.size()) {
            std::vector<std::size_t> shape;
            for (const SweepAxis& a : axes) shape.push_back(a.values.size());
            const std::size_t sensors = std::size_t(sweep.dataset(layout::kSensor).shape()[0]);
            if (sweep.dataset("perturbation").kind() == H5Kind::complex)
                write_strongest<std::complex<double>>(sweep, shape, best, sensors);
            else
                write_strongest<double>(sweep, shape, best, sensors);
            for (XdmfAttribute& a : sidecar_fields(sweep, "strongest_image", "strongest electric image dV", layout::kSensor))
                fields.push_back(a);
        }
    }
    surface.cell_attributes = fields;
    return {surface};
}

}  // namespace murk
