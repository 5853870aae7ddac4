#include "cases/sweep/sweep_output.hpp"

#include "cases/output/image_attributes.hpp"
#include "cases/output/coordinates.hpp"
#include "cases/output/result_layout.hpp"
#include "cases/output/result_metadata.hpp"
#include "cases/output/surface_output.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/dipole_check.hpp"
#include "cases/sweep/moved_boundary.hpp"
#include "cases/sweep/result_finish.hpp"
#include "cases/sweep/sweep_analysis.hpp"
#include "cases/sweep/waveform_synthesis.hpp"
#include "geometry/input_error.hpp"

#include <algorithm>
#include <filesystem>
#include <limits>
#include <optional>

namespace murk {

namespace {

const char* kExistsHint = "pass --force to replace it";

const char* method_name(SweepMethod m) {
    switch (m) {
        case SweepMethod::exact: return "exact";
        case SweepMethod::dipole: return "dipole";
        case SweepMethod::automatic: return "auto";
        case SweepMethod::full: return "full";
    }
    return "";
}

std::string method_description(SweepMethod m) {
    switch (m) {
        case SweepMethod::exact:
            return "exact: body factored once, object coupled by GMRES at every point (no approximation beyond the "
                   "discretization)";
        case SweepMethod::dipole:
            return "dipole: every point by the induced-dipole path (object replaced by its polarization tensor times the "
                   "baseline field); a sample re-solved exactly, see /sweep/dipole_check";
        case SweepMethod::automatic:
            return "auto: induced-dipole path where the object is small against its distance, exact path elsewhere; "
                   "see /sweep/path and /sweep/dipole_check";
        case SweepMethod::full:
            return "full boundary-element solve at every point (no approximation beyond the discretization)";
    }
    return "";
}

H5Shape with(const std::vector<std::size_t>& shape, std::initializer_list<hsize_t> tail = {}) {
    H5Shape s(shape.begin(), shape.end());
    s.insert(s.end(), tail);
    return s;
}

template <class T>
void write_at(H5Group& sweep, const char* name, const std::vector<std::size_t>& index,
              std::initializer_list<hsize_t> tail, const std::vector<T>& values) {
    H5Shape o(index.begin(), index.end()), c(index.size(), 1);
    for (hsize_t t : tail) o.push_back(0), c.push_back(t);
    sweep.dataset(name).write_slab(o, c, values);
}

template <class S>
std::vector<S> flatten(const std::vector<std::vector<S>>& rows) {
    std::vector<S> out;
    for (const auto& r : rows) out.insert(out.end(), r.begin(), r.end());
    return out;
}

// Where the moved boundary lies at each value of a boundary-distance axis: what a reader
// needs to place that plane or tank by hand. A plane's height (attribute plane_z), or the
// moved wall's coordinate (wall_x or wall_y, with the wall's side in `wall`).
void write_boundary_positions(H5Dataset axis, const CaseSpec& spec, const SweepPlan& plan, const TriangleMesh& body) {
    std::vector<double> at;
    for (std::size_t k = 0; k < plan.boundary_distances.size(); ++k)  // the boundary index is innermost
        at.push_back(*moved_boundary_position(spec, plan, k, body));
    if (plan.sweep.moved != MovedBoundary::wall) {
        axis.set_attribute("plane_z", at);
        return;
    }
    const std::string name = plan.sweep.wall_axis == 0 ? "x" : "y";
    axis.set_attribute("wall", std::string(plan.sweep.wall_sign > 0 ? "+" : "-") + name);
    axis.set_attribute("wall_" + name, at);
}

}  // namespace

double DipoleCheck::largest() const {
    return discrepancy.empty() ? 0.0 : *std::max_element(discrepancy.begin(), discrepancy.end());
}

template <class S>
SweepFile<S>::SweepFile(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
                        const SweepBaselines<S>& baselines)
    : spec_(&spec), options_(options), plan_(&plan), baselines_(&baselines) {
    check_xdmf_file_name(std::filesystem::path(options.output_path).filename().string());
    output_.emplace(options.output_path, options.force, kExistsHint, writing_path(options.output_path));
    create_datasets();
}

template <class S>
void SweepFile<S>::create_datasets() {
    const CaseSpec& spec = *spec_;
    const SweepPlan& plan = *plan_;
    const SweepBaselines<S>& base = *baselines_;
    const SensorLayout& sensors = base.sensors;
    H5Group root = output_->root();
    write_result_metadata(root, spec, options_.command_line, method_description(plan.sweep.method),
                          quadrature_options(spec));
    // The water's bounds: the first water's images (with a sediment bottom and a
    // water axis each water has its own reflection coefficient, and may need
    // another count of images for the same tolerance).
    if (!base.waters.empty()) write_image_attributes(root, water_bounds_summary(base.waters.front().scene().images));
    root.set_attribute("sweep_method", std::string(method_name(plan.sweep.method)));
    if (plan.sweep.method != SweepMethod::full) root.set_attribute("coupling_tolerance", plan.sweep.coupling_tolerance);
    if (plan.sweep.method == SweepMethod::automatic) root.set_attribute("dipole_accuracy", plan.sweep.dipole_accuracy);
    if (options_.share_count > 1) {  // a part of a job array: which share it holds (murk merge checks)
        root.set_attribute("share_index", std::int64_t(options_.share_index + 1));
        root.set_attribute("share_count", std::int64_t(options_.share_count));
    }
    if (!sensors.probes) {
        const Surface<S>& body = base.waters.front().scene().surfaces.front();
        const std::string body_name = surface_group_name(body.mesh.name);
        root.set_attribute("body", body_name);
        write_mesh(root.group("mesh/" + body_name), body.mesh);
        write_surface_values(root.group("baseline/" + body_name), body, base.waters.front().solution.surfaces.front());
    }
    if (spec.waveform) write_signal_group(root, *spec.waveform);
    // Every dimension of /sweep is a coordinate in /sweep (cases/output/coordinates.hpp).
    using namespace layout;
    H5Group sweep = root.group(kSweep);
    write_solver_used(sweep, base.solver_used);  // the fixed part's solver, beside the root's declared choice
    std::vector<std::string> axis_names;
    std::string axes_attribute;
    for (const SweepAxis& a : plan.axes) {
        sweep.write_coordinate(a.name, a.values, a.units, a.long_name);
        axis_names.push_back(a.name);
        axes_attribute += (axes_attribute.empty() ? "" : " ") + a.name;
    }
    // The axes in their order: what a reader (murk merge) needs to rebuild the point index.
    sweep.set_attribute("axes", axes_attribute);
    if (!plan.sweep.alternatives.empty()) {
        // The alternative axis holds indices into alternative_names; as CF flags, xarray and ncdump show the names.
        std::string names, words;
        std::vector<double> codes;
        for (std::size_t k = 0; k < plan.sweep.alternatives.size(); ++k) {
            names += (k ? "," : "") + plan.sweep.alternatives[k];
            std::string word = plan.sweep.alternatives[k];
            std::replace(word.begin(), word.end(), ' ', '_');
            words += (k ? " " : "") + word;
            codes.push_back(double(k));
        }
        sweep.dataset("alternative").set_attribute(kAlternativeNames, names);
        sweep.dataset("alternative").set_flags(codes, words);
    }
    if (plan.sweep.grid) {
        H5Dataset u = sweep.dataset("grid_u");
        const auto v3 = [](const std::array<double, 3>& p) { return std::vector<double>(p.begin(), p.end()); };
        u.set_attribute("grid_origin", v3(plan.sweep.grid->origin_m));
        u.set_attribute("grid_u_direction", v3(plan.sweep.grid->u_direction));
        u.set_attribute("grid_v_direction", v3(plan.sweep.grid->v_direction));
    }
    index_coordinate(sweep, kSensor, sensors.size(),
                     sensors.skin ? "skin panel index" : sensors.probes ? "probe point index" : "sensor electrode index");
    xyz_coordinate(sweep);
    if (!sensors.skin) {
        std::string names;
        for (std::size_t k = 0; k < sensors.names.size(); ++k) names += (k ? "," : "") + sensors.names[k];
        sweep.dataset(kSensor).set_attribute(kSensorNames, names);
    }
    if (sensors.skin && base.noise)
        sweep.write("receptors", base.noise->receptors, "1", "receptors on each skin panel (density times area)")
            .label_dimensions({kSensor});
    if (sensors.probes) {
        std::vector<double> xyz;
        for (const Vec3& x : sensors.position) xyz.insert(xyz.end(), {x.x(), x.y(), x.z()});
        sweep.write("sensor_position", xyz, {hsize_t(sensors.size()), 3}, "m", "probe point position")
            .label_dimensions({kSensor, kXyz});
    }
    // Without a water_conductivity axis, the baseline's one water conductivity is a coordinate
    // of its own, so that baseline_reading has the same dimensions either way.
    if (plan.axis(AxisKind::water_conductivity) < 0)
        sweep.write_coordinate(kWater, plan.waters, "S m-1", "conductivity of the water");
    // One baseline per fixed part: per water conductivity, and per frequency when there is a frequency axis.
    std::vector<std::vector<S>> readings;
    for (const WaterBaseline<S>& w : base.waters) readings.push_back(w.readings);
    const bool per_frequency = !plan.frequencies.empty();
    H5Shape baseline_shape{hsize_t(plan.waters.size()), hsize_t(sensors.size())};
    std::vector<std::string> baseline_dims{kWater, kSensor};
    if (per_frequency) {
        baseline_shape.insert(baseline_shape.begin() + 1, hsize_t(plan.frequencies.size()));
        baseline_dims.insert(baseline_dims.begin() + 1, "frequency");
    }
    std::string per = per_frequency ? "per water conductivity and frequency" : "per water conductivity";
    if (const int d = plan.axis(AxisKind::boundary_distance); d >= 0) {  // innermost of the fixed axes
        baseline_shape.insert(baseline_shape.end() - 1, hsize_t(plan.boundary_distances.size()));
        baseline_dims.insert(baseline_dims.end() - 1, plan.axes[d].name);
        per += (per_frequency ? ", " : " and ") + std::string("boundary distance");
        write_boundary_positions(sweep.dataset(plan.axes[d].name), spec, plan, base.waters.front().scene().surfaces.front().mesh);
    }
    sweep.write("baseline_reading", flatten(readings), baseline_shape, sensors.units,
                sensors.skin ? "baseline transdermal voltage per skin panel, " + per : "baseline sensor reading, " + per)
        .label_dimensions(baseline_dims);

    const std::vector<std::size_t>& shape = plan.shape;
    const H5Layout chunked = H5Layout::compressed(4);
    const std::string kind = sensors.skin ? "transdermal voltage" : "sensor reading";
    std::vector<std::string> with_sensor = axis_names, with_xyz = axis_names;
    with_sensor.push_back(kSensor);
    with_xyz.push_back(kXyz);
    // A per-point dataset, filled with "not computed" (NaN, or the given code) until its point is written.
    auto per_point = [&](auto zero, const char* name, const H5Shape& dataset_shape, const std::string& units,
                         const std::string& long_name, const H5Layout& layout, const std::vector<std::string>& dims,
                         std::optional<decltype(zero)> fill = std::nullopt) {
        H5Dataset d = sweep.create_filled<decltype(zero)>(name, dataset_shape, units, long_name, layout, fill);
        d.label_dimensions(dims);
        return d;
    };
    const auto coded = [&](const char* name, const std::string& long_name, const FlagTable& flags) {
        per_point(std::uint8_t{}, name, with(shape), "1", long_name, chunked, axis_names).set_flags(flags.values, flags.meanings);
    };
    coded(kStatus, "what happened at the point (see mask_reason for masked points)", flags_of<PointStatus>());
    coded(kMaskReason, "why the point is masked: the object had no valid place", flags_of<MaskReason>());
    // One chunk per point: a point's values are written (and compressed) once,
    // never by reading back and recompressing a chunk shared with other points.
    H5Shape one_point(shape.size(), 1);
    one_point.push_back(hsize_t(sensors.size()));
    per_point(S{}, "perturbation", with(shape, {hsize_t(sensors.size())}), sensors.units,
              "change of the " + kind + " caused by the object", H5Layout::compressed(1, one_point), with_sensor);
    per_point(double{}, kPeakPerturbation, with(shape), sensors.units, "largest magnitude of the change over the sensors",
              chunked, axis_names);
    // -1 (no sensor) until written, and for masked points: 0 is a sensor.
    per_point(std::int32_t{}, "peak_sensor", with(shape), "1", "sensor index of the peak (-1 where masked or not computed)",
              chunked, axis_names, std::optional<std::int32_t>(-1));
    per_point(double{}, "peak_position", with(shape, {3}), "m", "position of the peak sensor", chunked, with_xyz);
    per_point(double{}, "object_position", with(shape, {3}), "m", "object centre", chunked, with_xyz);
    if (sensors.skin)
        per_point(double{}, "image_width", with(shape), "m",
                  "full width at half maximum of the electric image along the body axis (resolution: one panel)",
                  chunked, axis_names);
    if (base.noise) {
        per_point(double{}, "snr", with(shape), "1", "ideal-observer signal-to-noise ratio d' (amplitude)", chunked,
                  axis_names);
        H5Dataset pd = per_point(double{}, "detection_probability", with(shape), "1",
                                 "Neyman-Pearson detection probability", chunked, axis_names);
        pd.set_attribute("probability_level", base.noise->probability_level);
        pd.set_attribute("false_alarm_probability", base.noise->false_alarm_probability);
    }
    if (spec.frequency_Hz) {
        per_point(double{}, "amplitude_change", with(shape), sensors.units,
                  "change of the amplitude of the peak sensor's reading, |V0 + dV| - |V0|", chunked, axis_names);
        per_point(double{}, "phase_change", with(shape), "rad",
                  "change of the phase of the peak sensor's reading, arg((V0 + dV) / V0)", chunked, axis_names);
    }
    if (base.noise && base.noise->model.channels != NoiseChannels::quadratures) {
        per_point(double{}, "snr_amplitude", with(shape), "1", "d' of the amplitude channel", chunked, axis_names);
        per_point(double{}, "snr_phase", with(shape), "1", "d' of the phase channel (0 when the phase is not read)",
                  chunked, axis_names);
    }
    coded(kPath, "path that computed the point", flags_of<PathCode>());
    status_.assign(plan.total, PointStatus::not_computed);
    // As the datasets are filled: NaN, -1 for the peak sensor, 0 for the codes.
    const std::size_t n = plan.total;
    const double nan = std::numeric_limits<double>::quiet_NaN();
    values_.object_position.assign(3 * n, nan);
    values_.peak.assign(n, nan);
    values_.peak_position.assign(3 * n, nan);
    if (sensors.skin) values_.image_width.assign(n, nan);
    if (base.noise) values_.snr.assign(n, nan), values_.detection_probability.assign(n, nan);
    if (spec.frequency_Hz) values_.amplitude_change.assign(n, nan), values_.phase_change.assign(n, nan);
    if (base.noise && base.noise->model.channels != NoiseChannels::quadratures)
        values_.snr_amplitude.assign(n, nan), values_.snr_phase.assign(n, nan);
    values_.peak_sensor.assign(n, -1);
    values_.mask_reason.assign(n, 0);
    values_.path.assign(n, 0);
}

template <class S>
void SweepFile<S>::write_point_values() {
    H5Group sweep = output_->root().open_group("sweep");
    auto whole = [&](const char* name, const auto& values) {
        if (values.empty()) return;
        const H5Dataset d = sweep.dataset(name);
        d.write_slab(H5Shape(d.shape().size(), 0), d.shape(), values);
    };
    std::vector<std::uint8_t> status(status_.size());
    for (std::size_t p = 0; p < status_.size(); ++p) status[p] = std::uint8_t(status_[p]);
    whole("object_position", values_.object_position);
    whole("peak_perturbation", values_.peak);
    whole("peak_sensor", values_.peak_sensor);
    whole("peak_position", values_.peak_position);
    whole("image_width", values_.image_width);
    whole("snr", values_.snr);
    whole("detection_probability", values_.detection_probability);
    whole("amplitude_change", values_.amplitude_change);
    whole("phase_change", values_.phase_change);
    whole("snr_amplitude", values_.snr_amplitude);
    whole("snr_phase", values_.snr_phase);
    whole("mask_reason", values_.mask_reason);
    whole("path", values_.path);
    whole("status", status);
}

template <class S>
void SweepFile<S>::write_point(const PointResult<S>& r) {
    H5Group sweep = output_->root().open_group("sweep");
    const std::vector<std::size_t> index = plan_->index_of(r.point);
    const SensorLayout& sensors = baselines_->sensors;
    const std::size_t p = r.point;
    PointStatus status = PointStatus::computed;
    if (r.mask != MaskReason::none) {
        // Masked: every real value stays NaN (the object has no valid place),
        // and the peak sensor is -1, which no sensor index can be.
        values_.mask_reason[p] = std::uint8_t(r.mask);
        status = PointStatus::masked;
    } else {
        write_at(sweep, "perturbation", index, {hsize_t(r.change.size())}, r.change);
        const Vec3 at = sensors.position[r.image.peak_sensor];
        for (int k = 0; k < 3; ++k) {
            values_.object_position[3 * p + k] = r.centre[k];
            values_.peak_position[3 * p + k] = at[k];
        }
        values_.peak[p] = r.image.peak;
        values_.peak_sensor[p] = std::int32_t(r.image.peak_sensor);
        if (sensors.skin) values_.image_width[p] = r.image.width;
        if (baselines_->noise) {
            values_.snr[p] = r.snr;
            values_.detection_probability[p] = r.detection_probability;
        }
        write_channel_values(r, index);
    }
    status_[p] = status;
    values_.path[p] = std::uint8_t(r.path);
}

template <class S>
void SweepFile<S>::write_channel_values(const PointResult<S>& r, const std::vector<std::size_t>& index) {
    const std::vector<S>& base = baselines_->waters[plan_->water_of(index)].readings;
    const std::size_t p = r.point;
    if (!values_.amplitude_change.empty()) {
        const std::size_t k = r.image.peak_sensor;
        const ReadingChange c = reading_change(Complex(base[k]), Complex(r.change[k]));
        values_.amplitude_change[p] = c.amplitude;
        values_.phase_change[p] = c.phase_defined ? c.phase_rad : std::numeric_limits<double>::quiet_NaN();
    }
    if (!values_.snr_amplitude.empty()) {
        // The same arithmetic as the point's own rating (computed_point), so the parts match its d'.
        const PointRating rating = rate_perturbation(*baselines_->noise, r.change, base);
        values_.snr_amplitude[p] = rating.channels.amplitude;
        values_.snr_phase[p] = rating.channels.phase;
    }
}

template <class S>
void SweepFile<S>::set_history(const std::vector<std::string>& lines) {
    std::string text;
    for (const std::string& line : lines) text += (text.empty() ? "" : "\n") + line;
    if (!text.empty()) output_->root().set_attribute("history", text);
}

void write_dipole_check(const H5Group& root, const DipoleCheck& c, std::optional<double> dipole_accuracy) {
    using layout::kCheckPoint;
    H5Group check = root.group(std::string(layout::kSweep) + "/" + layout::kDipoleCheck);
    // The checked points' flat indices are the coordinate of the group's one dimension.
    check.write_coordinate(kCheckPoint, c.points, "1",
                           "flat index (C order over the sweep axes) of a dipole point re-solved exactly");
    H5Dataset d = check.write(layout::kDiscrepancy, c.discrepancy, "1",
                              "max over sensors |dipole - exact| / max over sensors |exact| at that point");
    d.label_dimensions({kCheckPoint});
    check.write("size_to_distance", c.size_to_distance, "1",
                "object half-extent / distance of its centre from the nearest surface that stays, source or probe")
        .label_dimensions({kCheckPoint})
        .set_fill_value(std::numeric_limits<double>::quiet_NaN());
    d.set_attribute("max_discrepancy", c.largest());
    if (dipole_accuracy) d.set_attribute("dipole_accuracy", *dipole_accuracy);
}

template <class S>
void SweepFile<S>::write_dipole_check(const DipoleCheck& c, const SweepSpec& sweep) {
    murk::write_dipole_check(output_->root(), c,
                     sweep.method == SweepMethod::automatic ? std::optional<double>(sweep.dipole_accuracy) : std::nullopt);
}

template <class S>
void SweepFile<S>::commit(double peak_memory_MiB, bool whole, const std::function<void()>& once_named) {
    write_point_values();
    H5Group root = output_->root();
    const std::vector<XdmfSurface> surfaces = whole ? finish_result(root) : std::vector<XdmfSurface>{};
    root.set_attribute("peak_memory_MiB", peak_memory_MiB);
    // The sidecar before the result's name: a run stopped between the two then
    // still has its journal, and its resume writes both again; the other way
    // round it would leave a finished result that no resume gives a sidecar.
    commit_with_sidecar(*output_, surfaces, once_named);
    if (!options_.quiet)
        std::printf("wrote %s (%zu points)%s%s\n", options_.output_path.c_str(), plan_->total,
                    surfaces.empty() ? "" : " and ", surfaces.empty() ? "" : xdmf_sidecar_path(options_.output_path).c_str());
}

template <class S>
void write_result_from_journal(const CaseSpec& spec, const RunOptions& options, const SweepPlan& plan,
                               const SweepBaselines<S>& baselines, const PointJournal& journal,
                               double peak_memory_MiB, const std::function<void()>& once_named) {
    SweepFile<S> file(spec, options, plan, baselines);
    file.set_history(journal.history());
    for (std::size_t p = 0; p < plan.total; ++p)
        if (journal.has(p)) file.write_point(journal.template read<S>(p));
    // In point order, as a run that was never interrupted lists them.
    if (!journal.checks().empty()) file.write_dipole_check(dipole_check_of(journal), plan.sweep);
    file.commit(peak_memory_MiB, journal.header().share_count == 1, once_named);
}

template class SweepFile<double>;
template class SweepFile<Complex>;
template void write_result_from_journal(const CaseSpec&, const RunOptions&, const SweepPlan&,
                                        const SweepBaselines<double>&, const PointJournal&, double,
                                        const std::function<void()>&);
template void write_result_from_journal(const CaseSpec&, const RunOptions&, const SweepPlan&,
                                        const SweepBaselines<Complex>&, const PointJournal&, double,
                                        const std::function<void()>&);

}  // namespace murk
