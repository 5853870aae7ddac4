#include "cases/sweep_runner.hpp"

#include "cases/detectability.hpp"
#include "cases/hdf5_file.hpp"
#include "cases/result_metadata.hpp"
#include "cases/scene_builder.hpp"
#include "cases/solve_output.hpp"
#include "cases/sweep_analysis.hpp"
#include "cases/sweep_axes.hpp"
#include "cases/sweep_point.hpp"
#include "cases/sweep_readings.hpp"
#include "cases/xdmf_writer.hpp"
#include "geometry/input_error.hpp"
#include "solver/bem_system.hpp"

#include <unistd.h>

#include <atomic>
#include <optional>
#include <chrono>
#include <exception>
#include <csignal>
#include <filesystem>
#include <cstdio>

namespace murk {

namespace {

std::atomic<bool> g_stop_requested{false};
extern "C" void request_stop(int) { g_stop_requested = true; }

using Clock = std::chrono::steady_clock;

constexpr std::uint8_t kNotComputed = 0, kComputed = 1, kMasked = 2;

// Progress on stderr: a live line on a terminal, a plain line every 10 s otherwise.
class Progress {
public:
    Progress(std::size_t total, std::size_t already, bool quiet)
        : total_(total), done_(already), start_done_(already), quiet_(quiet), tty_(isatty(STDERR_FILENO)) {}
    void point_done() {
        ++done_;
        if (quiet_) return;
        const double elapsed = std::chrono::duration<double>(Clock::now() - start_).count();
        if (!tty_ && elapsed - last_print_ < 10.0 && done_ < total_) return;
        last_print_ = elapsed;
        const double rate = (done_ - start_done_) / std::max(elapsed, 1e-9);
        const double left = rate > 0 ? (total_ - done_) / rate : 0.0;
        std::fprintf(stderr, "%spoints %zu/%zu, %.2f points/s, %.0f s left%s", tty_ ? "\r" : "", done_, total_,
                     rate, left, tty_ ? "   " : "\n");
        if (tty_ && done_ == total_) std::fprintf(stderr, "\n");
    }

private:
    std::size_t total_, done_, start_done_;
    bool quiet_, tty_;
    Clock::time_point start_ = Clock::now();
    double last_print_ = -1e9;
};

NoiseModel noise_model(const DetectionSpec& d) {
    NoiseModel m;
    switch (d.noise) {
        case DetectionSpec::Noise::receptors:
            m.kind = NoiseKind::receptors;
            m.receptor_noise_V = d.receptor_noise_V;
            break;
        case DetectionSpec::Noise::voltage_amplifier:
            m.kind = NoiseKind::voltage_amplifier;
            m.voltage_noise_density_V_per_rtHz = d.noise_density;
            m.noise_bandwidth_Hz = noise_bandwidth_of_average(d.integration_time_s);
            break;
        case DetectionSpec::Noise::current_amplifier:
            m.kind = NoiseKind::current_amplifier;
            m.current_noise_density_A_per_rtHz = d.noise_density;
            m.noise_bandwidth_Hz = noise_bandwidth_of_average(d.integration_time_s);
            break;
    }
    return m;
}

H5Shape with(const std::vector<std::size_t>& shape, std::initializer_list<hsize_t> tail = {}) {
    H5Shape s(shape.begin(), shape.end());
    s.insert(s.end(), tail);
    return s;
}

template <class S>
class SweepRun {
public:
    SweepRun(const CaseSpec& spec, const RunOptions& options) : spec_(spec), options_(options) {}

    RunOutcome run() {
        plan();
        solve_baselines();
        open_output();
        try {
            compute_points();
            if (!g_stop_requested) analyse_and_commit();
        } catch (...) {
            output_->suspend();  // keep every finished point for --resume
            throw;
        }
        if (g_stop_requested) {
            output_->suspend();
            std::fprintf(stderr,
                         "murk: interrupted; %zu of %zu points are kept in %s; run again with --resume to finish\n",
                         finished_, total_, H5Output::partial_path(options_.output_path).c_str());
            return RunOutcome::interrupted;
        }
        return RunOutcome::complete;
    }

private:
    // ---- stage: plan
    void plan() {
        sweep_ = *spec_.sweep;
        where_ = spec_.path + ":" + std::to_string(sweep_.line) + ": sweep";
        axes_ = sweep_axes(sweep_);
        shape_ = axis_shape(axes_);
        total_ = point_count(axes_);
        if (sweep_.objects.empty()) (void)swept_object_index(spec_, sweep_);
        if (find_axis(axes_, AxisKind::distance) >= 0 && sweep_.grid)
            throw InputError(where_ + ": a sweep moves the object either by distance or on a grid, not both");
    }

    // ---- stage: baseline, one per water conductivity
    void solve_baselines() {
        const int w = find_axis(axes_, AxisKind::water_conductivity);
        waters_ = w >= 0 ? axes_[w].values : std::vector<double>{spec_.water.conductivity_S_per_m};
        const QuadratureOptions quad = quadrature_options(spec_);
        for (double sigma : waters_) {
            CaseSpec s = spec_;
            s.water.conductivity_S_per_m = sigma;
            baseline_scenes_.push_back(build_scene<S>(s, false));
            baseline_solutions_.push_back(solve_scene(baseline_scenes_.back(), quad));
        }
        sensors_ = sensor_layout(spec_, baseline_scenes_.front(), where_);
        for (std::size_t w = 0; w < waters_.size(); ++w)
            baseline_readings_.push_back(sensor_readings(sensors_, baseline_scenes_[w], baseline_solutions_[w], quad));
        check_direction();
        if (sensors_.probes) {  // no body: distances are measured from the emitter
            const auto points = source_points(spec_.sources.front());
            reference_point_ = points.front().position;
        }
        if (spec_.detection) {
            noise_ = noise_model(*spec_.detection);
            if (sensors_.skin) {
                if (noise_.kind != NoiseKind::receptors)
                    throw InputError(where_ + ": a fish's skin needs the receptor noise model");
                receptors_ = receptors_per_panel();
            } else if (noise_.kind == NoiseKind::receptors) {
                throw InputError(where_ + ": electrodes and probes need an amplifier noise model");
            } else if ((sensors_.units == "A") != (noise_.kind == NoiseKind::current_amplifier)) {
                // A voltage noise density against currents (or the reverse) gives a ratio of unlike units.
                throw InputError(spec_.path + ":" + std::to_string(spec_.detection->line) + ": detection: " +
                                 (sensors_.units == "A"
                                      ? "the sensors are held at a potential and read currents: give "
                                        "amplifier_current_noise (A/sqrt(Hz)), not amplifier_noise"
                                      : "the sensors read voltages: give amplifier_noise (V/sqrt(Hz)), not "
                                        "amplifier_current_noise"));
            }
        }
    }

    // A distance sweep moves the object along sweep.direction; one that points
    // into the body (from the body point nearest the object) can place nothing.
    void check_direction() const {
        if (!sweep_.direction || sweep_.distance_m.empty() || baseline_scenes_.front().surfaces.empty()) return;
        std::size_t k = 0;
        if (sweep_.objects.empty()) k = swept_object_index(spec_, sweep_);
        else
            while (spec_.objects[k].name != sweep_.objects.front()) ++k;
        const ObjectSpec& o = spec_.objects[k];
        const Vec3 centre(o.position_m[0], o.position_m[1], o.position_m[2]);
        DistanceReference body;
        body.body = &baseline_scenes_.front().surfaces.front().mesh;
        const Vec3 out = centre - body.nearest_to(centre);
        const Vec3 d((*sweep_.direction)[0], (*sweep_.direction)[1], (*sweep_.direction)[2]);
        if (out.dot(d) <= 0.0)
            throw InputError(where_ + ".direction: points into the body from object '" + o.name +
                             "'; the object moves along it away from the body");
    }

    // Receptors on each skin panel: density times area, the density taken from
    // the zone (fraction of the length from the nose) that holds the centroid.
    std::vector<double> receptors_per_panel() const {
        const DetectionSpec& d = *spec_.detection;
        const FishSpec& fish = *spec_.fish;
        const Eigen::Matrix3d R = orientation_matrix(fish.orientation);
        const Vec3 position(fish.position_m[0], fish.position_m[1], fish.position_m[2]);
        // The fish frame has the tail at x = 0 and the nose at x = length; the case
        // places either the nose or the centre at `position`.
        const double anchor = fish.anchored_at_nose ? fish.length_m : 0.5 * fish.length_m;
        std::vector<double> n;
        for (std::size_t k = 0; k < sensors_.size(); ++k) {
            const double x = (R.transpose() * (sensors_.position[k] - position)).x() + anchor;
            const double from_nose = (fish.length_m - x) / fish.length_m;
            double density = d.receptor_density_per_m2;
            for (const ReceptorZone& z : d.receptor_zones)
                if (from_nose >= z.from_fraction && from_nose <= z.to_fraction) density = z.density_per_m2;
            n.push_back(density * sensors_.area[k]);
        }
        return n;
    }

    // ---- stage: open the result file (new, or the partial file of an interrupted run)
    void open_output() {
        const char* hint = "pass --force to replace it";
        if (options_.resume) {
            output_.emplace(H5Output::resume(options_.output_path, options_.force, hint));
            try {
                H5Group root = output_->root();
                if (root.string_attribute("case_sha256") != sha256_hex(spec_.text))
                    throw InputError(H5Output::partial_path(options_.output_path) +
                                     ": was started from a different case file; refusing to resume it with " +
                                     spec_.path);
                const auto status = root.read<std::uint8_t>("sweep/status");
                status_ = status.values;
            } catch (...) {
                output_->suspend();  // not ours to delete: the partial file keeps its finished points
                throw;
            }
            for (auto s : status_) finished_ += s != kNotComputed;
            return;
        }
        check_xdmf_file_name(std::filesystem::path(options_.output_path).filename().string());
        const std::string partial = H5Output::partial_path(options_.output_path);
        if (!options_.force && std::filesystem::exists(partial))
            throw InputError(partial + " holds the points of an interrupted run; pass --resume to finish it, "
                                       "or --force to start over");
        output_.emplace(options_.output_path, options_.force, hint);
        H5Group root = output_->root();
        write_result_metadata(root, spec_, options_.command_line,
                              "full boundary-element solve at every point (no approximation beyond the discretization)",
                              quadrature_options(spec_));
        if (!sensors_.probes) {
            const Surface<S>& body = baseline_scenes_.front().surfaces.front();
            const std::string body_name = surface_group_name(body.mesh.name);
            root.set_attribute("body", body_name);
            write_mesh(root.group("mesh/" + body_name), body.mesh);
            write_surface_values(root.group("baseline/" + body_name), body, baseline_solutions_.front().surfaces.front());
        }
        H5Group sweep = root.group("sweep");
        std::vector<H5Dataset> scales;
        for (const SweepAxis& a : axes_) {
            H5Dataset d = sweep.write(a.name, a.values, a.units, a.long_name);
            d.make_scale(a.name);
            scales.push_back(d);
        }
        if (!sweep_.objects.empty()) {
            std::string names;
            for (std::size_t k = 0; k < sweep_.objects.size(); ++k) names += (k ? "," : "") + sweep_.objects[k];
            sweep.dataset("object").set_attribute("object_names", names);
        }
        if (sweep_.grid) {
            H5Dataset u = sweep.dataset("grid_u");
            const auto v3 = [](const std::array<double, 3>& p) { return std::vector<double>(p.begin(), p.end()); };
            u.set_attribute("grid_origin", v3(sweep_.grid->origin_m));
            u.set_attribute("grid_u_direction", v3(sweep_.grid->u_direction));
            u.set_attribute("grid_v_direction", v3(sweep_.grid->v_direction));
        }
        std::vector<std::int32_t> sensor_index(sensors_.size());
        for (std::size_t k = 0; k < sensor_index.size(); ++k) sensor_index[k] = static_cast<std::int32_t>(k);
        H5Dataset sensor = sweep.write("sensor", sensor_index, "1",
                                       sensors_.skin ? "skin panel index"
                                                     : sensors_.probes ? "probe point index" : "sensor electrode index");
        sensor.make_scale("sensor");
        if (sensors_.skin && spec_.detection)
            sweep.write("receptors", receptors_, "1", "receptors on each skin panel (density times area)");
        if (sensors_.probes) {
            std::vector<double> xyz;
            for (const Vec3& x : sensors_.position) xyz.insert(xyz.end(), {x.x(), x.y(), x.z()});
            sweep.write("sensor_position", xyz, {hsize_t(sensors_.size()), 3}, "m", "probe point position");
        }
        if (!sensors_.skin) {
            std::string names;
            for (std::size_t k = 0; k < sensors_.names.size(); ++k) names += (k ? "," : "") + sensors_.names[k];
            sensor.set_attribute("sensor_names", names);
        }
        scales.push_back(sensor);
        sweep.write("baseline_reading", flatten(baseline_readings_),
                    {hsize_t(baseline_readings_.size()), hsize_t(sensors_.size())}, sensors_.units,
                    sensors_.skin ? "baseline transdermal voltage per skin panel, per water conductivity"
                                  : "baseline sensor reading, per water conductivity");

        const H5Layout chunked = H5Layout::compressed(4);
        const std::string kind = sensors_.skin ? "transdermal voltage" : "sensor reading";
        auto attach = [&](H5Dataset d, bool sensor_dim) {
            for (std::size_t a = 0; a < axes_.size(); ++a) d.attach_scale(scales[a], unsigned(a));
            if (sensor_dim) d.attach_scale(scales.back(), unsigned(axes_.size()));
        };
        attach(sweep.create_extendible<std::uint8_t>("status", with(shape_), "1",
                                                     "0 not computed, 1 computed, 2 masked (object would touch the body, "
                                                     "another object or the plane)", chunked), false);
        attach(sweep.create_extendible<S>("perturbation", with(shape_, {hsize_t(sensors_.size())}), sensors_.units,
                                          "change of the " + kind + " caused by the object", chunked), true);
        attach(sweep.create_extendible<double>("peak_perturbation", with(shape_), sensors_.units,
                                               "largest magnitude of the change over the sensors", chunked), false);
        attach(sweep.create_extendible<std::int32_t>("peak_sensor", with(shape_), "1",
                                                     "sensor index of the peak (-1 where masked)", chunked), false);
        attach(sweep.create_extendible<double>("peak_position", with(shape_, {3}), "m", "position of the peak sensor",
                                               chunked), false);
        attach(sweep.create_extendible<double>("object_position", with(shape_, {3}), "m", "object centre", chunked),
               false);
        if (sensors_.skin)
            attach(sweep.create_extendible<double>("image_width", with(shape_), "m",
                                                   "full width at half maximum of the electric image along the body axis "
                                                   "(resolution: one panel)", chunked), false);
        if (spec_.detection) {
            attach(sweep.create_extendible<double>("snr", with(shape_), "1",
                                                   "ideal-observer signal-to-noise ratio d' (amplitude)", chunked), false);
            H5Dataset pd = sweep.create_extendible<double>("detection_probability", with(shape_), "1",
                                                           "Neyman-Pearson detection probability", chunked);
            pd.set_attribute("probability_level", spec_.detection->probability_level);
            pd.set_attribute("false_alarm_probability", spec_.detection->false_alarm_probability);
            attach(pd, false);
        }
        status_.assign(total_, kNotComputed);
        output_->file().flush();
    }

    // What one point produced, before it is written.
    struct PointResult {
        std::vector<std::size_t> index;
        bool masked = false;
        Vec3 centre = Vec3::Zero();
        std::vector<S> change;
        ImageSummary image;
        double snr = 0, pd = 0;
    };

    // ---- stage: every point not yet computed. Points are independent: they run
    // in parallel, one point per thread (the solves inside run single-threaded,
    // as OpenMP does not nest by default), and each result is written under a
    // lock. Every point's arithmetic is the same whatever the thread count, so
    // the results do not depend on it.
    void compute_points() {
        Progress progress(total_, finished_, options_.quiet);
        const QuadratureOptions quad = quadrature_options(spec_);
        H5Group sweep = output_->root().open_group("sweep");
        std::vector<std::size_t> pending;
        for (std::size_t p = 0; p < total_; ++p)
            if (status_[p] == kNotComputed) pending.push_back(p);
        std::exception_ptr failure;
        std::atomic<bool> failed{false};
#pragma omp parallel for schedule(dynamic, 1)
        for (std::ptrdiff_t i = 0; i < std::ptrdiff_t(pending.size()); ++i) {
            if (g_stop_requested || failed) continue;
            try {
                const PointResult r = compute_point(pending[i], quad);
#pragma omp critical(murk_sweep_output)
                {
                    store_point(sweep, pending[i], r);
                    progress.point_done();
                }
            } catch (...) {
#pragma omp critical(murk_sweep_failure)
                if (!failure) failure = std::current_exception();
                failed = true;
            }
        }
        if (failure) std::rethrow_exception(failure);
    }

    PointResult compute_point(std::size_t p, const QuadratureOptions& quad) const {
        PointResult r;
        r.index = unflatten(p, axes_);
        const int water_axis = find_axis(axes_, AxisKind::water_conductivity);
        const std::size_t w = water_axis >= 0 ? r.index[water_axis] : 0;
        DistanceReference reference;
        if (sensors_.probes) reference.point = reference_point_;
        else reference.body = &baseline_scenes_[w].surfaces.front().mesh;
        PointSetup setup = configure_point(spec_, sweep_, axes_, r.index, reference);
        std::optional<Scene<S>> scene;
        if (!setup.masked) {
            try {
                scene = build_scene<S>(setup.spec, true);
            } catch (const InputError& e) {  // touches another object, or leaves the water
                setup.masked = true, setup.mask_reason = e.what();
            }
        }
        r.masked = setup.masked;
        if (r.masked) return r;
        r.centre = setup.object_centre;
        const Solution<S> solution = solve_scene(*scene, quad);
        r.change = sensor_readings(sensors_, *scene, solution, quad);
        for (std::size_t k = 0; k < r.change.size(); ++k) r.change[k] -= baseline_readings_[w][k];
        r.image = summarize_image(sensors_, r.change);
        if (spec_.detection) {
            r.snr = detectability_index(noise_, r.change, receptors_);
            r.pd = detection_probability(r.snr, spec_.detection->false_alarm_probability);
        }
        return r;
    }

    void store_point(H5Group& sweep, std::size_t p, const PointResult& r) {
        H5Shape offset(r.index.begin(), r.index.end()), count(r.index.size(), 1);
        if (r.masked) {
            // Masked: every real value stays NaN (the object has no valid place),
            // and the peak sensor is -1, which no sensor index can be.
            write(sweep, "peak_sensor", offset, count, {}, std::vector<std::int32_t>{-1});
            status_[p] = kMasked;
            ++masked_;
        } else {
            const Vec3 c = r.centre;
            write(sweep, "object_position", offset, count, {3}, std::vector<double>{c.x(), c.y(), c.z()});
            write(sweep, "perturbation", offset, count, {hsize_t(r.change.size())}, r.change);
            write(sweep, "peak_perturbation", offset, count, {}, std::vector<double>{r.image.peak});
            write(sweep, "peak_sensor", offset, count, {}, std::vector<std::int32_t>{std::int32_t(r.image.peak_sensor)});
            const Vec3 at = sensors_.position[r.image.peak_sensor];
            write(sweep, "peak_position", offset, count, {3}, std::vector<double>{at.x(), at.y(), at.z()});
            if (sensors_.skin) write(sweep, "image_width", offset, count, {}, std::vector<double>{r.image.width});
            if (spec_.detection) {
                write(sweep, "snr", offset, count, {}, std::vector<double>{r.snr});
                write(sweep, "detection_probability", offset, count, {}, std::vector<double>{r.pd});
            }
            status_[p] = kComputed;
        }
        // The status is written last and flushed: a point counts as done only
        // once all its values are on disk.
        write(sweep, "status", offset, count, {}, std::vector<std::uint8_t>{status_[p]});
        output_->file().flush();
        ++finished_;
    }

    // ---- stage: detection range and falloff, sidecar, commit
    void analyse_and_commit() {
        if (masked_ > 0 && masked_ == total_)
            std::fprintf(stderr, "murk: warning: every point of the sweep is masked (the object could not be placed "
                                 "clear of the body); check sweep.direction and the axes\n");
        H5Group root = output_->root();
        write_sweep_analysis(root, axes_, spec_.detection);
        const std::vector<XdmfAttribute> surface_fields =
            sensors_.probes ? std::vector<XdmfAttribute>{} : write_surface_magnitudes(root);
        output_->commit();
        if (sensors_.probes) {  // no surface to show
            if (!options_.quiet) std::printf("wrote %s (%zu points)\n", options_.output_path.c_str(), total_);
            return;
        }
        const Surface<S>& body = baseline_scenes_.front().surfaces.front();
        const std::string name = surface_group_name(body.mesh.name);
        const std::string h5_name = std::filesystem::path(options_.output_path).filename().string();
        write_xdmf_sidecar(xdmf_sidecar_path(options_.output_path), h5_name,
                           {{"/mesh/" + name, body.mesh.vertices.size(), body.mesh.size(), surface_fields}});
        if (!options_.quiet)
            std::printf("wrote %s (%zu points) and %s\n", options_.output_path.c_str(), total_,
                        xdmf_sidecar_path(options_.output_path).c_str());
    }

    // Real-valued panel fields of the body for the XDMF sidecar (ParaView reads
    // real cell data): the baseline and, for a fish, the electric image at the
    // point with the largest peak.
    std::vector<XdmfAttribute> write_surface_magnitudes(H5Group& root) {
        const Surface<S>& body = baseline_scenes_.front().surfaces.front();
        const SurfaceSolution<S>& base = baseline_solutions_.front().surfaces.front();
        const std::string group = "/baseline/" + surface_group_name(body.mesh.name);
        std::vector<XdmfAttribute> fields;
        std::vector<double> values;
        for (Eigen::Index k = 0; k < base.outer_potential.size(); ++k) values.push_back(std::abs(base.outer_potential(k)));
        root.write(group + "/outer_potential_magnitude", values, "V", "magnitude of the baseline water-side potential");
        fields.push_back({"baseline |potential| (V)", group + "/outer_potential_magnitude"});
        if (!sensors_.skin) return fields;
        values.clear();
        for (Eigen::Index k = 0; k < base.outer_potential.size(); ++k)
            values.push_back(std::abs(base.inner_potential(k) - base.outer_potential(k)));
        root.write(group + "/transdermal_voltage_magnitude", values, "V", "magnitude of the baseline transdermal voltage");
        fields.push_back({"baseline |transdermal voltage| (V)", group + "/transdermal_voltage_magnitude"});

        const std::vector<double> peak = root.read<double>("sweep/peak_perturbation").values;
        std::size_t best = total_;
        for (std::size_t p = 0; p < total_; ++p)
            if (status_[p] == kComputed && (best == total_ || peak[p] > peak[best])) best = p;
        if (best == total_) return fields;
        const std::vector<std::size_t> index = unflatten(best, axes_);
        H5Shape offset(index.begin(), index.end()), count(index.size(), 1);
        offset.push_back(0), count.push_back(sensors_.size());
        const std::vector<S> image = root.dataset("sweep/perturbation").read_slab<S>(offset, count);
        values.clear();
        for (const S& v : image) values.push_back(std::abs(v));
        H5Dataset strongest = root.write("sweep/strongest_image", values, "V",
                                         "magnitude of the electric image at the sweep point with the largest peak");
        strongest.set_attribute("point", static_cast<std::int64_t>(best));
        fields.push_back({"strongest electric image |dV| (V)", "/sweep/strongest_image"});
        return fields;
    }

    template <class T>
    static void write(H5Group& sweep, const char* name, const H5Shape& offset, const H5Shape& count,
                      std::initializer_list<hsize_t> tail, const std::vector<T>& values) {
        H5Shape o = offset, c = count;
        for (hsize_t t : tail) o.push_back(0), c.push_back(t);
        sweep.dataset(name).write_slab(o, c, values);
    }

    static std::vector<S> flatten(const std::vector<std::vector<S>>& rows) {
        std::vector<S> out;
        for (const auto& r : rows) out.insert(out.end(), r.begin(), r.end());
        return out;
    }

    const CaseSpec& spec_;
    const RunOptions& options_;
    SweepSpec sweep_;
    std::string where_;
    std::vector<SweepAxis> axes_;
    std::vector<std::size_t> shape_;
    std::size_t total_ = 0, finished_ = 0, masked_ = 0;
    std::vector<double> waters_;
    std::vector<Scene<S>> baseline_scenes_;
    std::vector<Solution<S>> baseline_solutions_;
    std::vector<std::vector<S>> baseline_readings_;
    SensorLayout sensors_;
    NoiseModel noise_;
    std::vector<double> receptors_;
    Vec3 reference_point_ = Vec3::Zero();
    std::optional<H5Output> output_;
    std::vector<std::uint8_t> status_;
};

}  // namespace

void install_stop_handlers() {
    std::signal(SIGINT, request_stop);
    std::signal(SIGTERM, request_stop);
}

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options) {
    if (!spec.sweep) throw InputError(spec.path + ": murk run needs a [sweep] section (murk solve runs one configuration)");
    if (case_needs_complex(spec)) return SweepRun<Complex>(spec, options).run();
    return SweepRun<double>(spec, options).run();
}

}  // namespace murk
