#include "cases/sweep/sweep_runner.hpp"

#include "cases/detection/detectability.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/output/result_metadata.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/output/surface_output.hpp"
#include "cases/sweep/sweep_analysis.hpp"
#include "cases/sweep/sweep_axes.hpp"
#include "cases/sweep/sweep_point.hpp"
#include "cases/sweep/sweep_readings.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "geometry/input_error.hpp"
#include "geometry/triangle_distance.hpp"
#include "solver/bem_system.hpp"
#include "solver/coupled_solve.hpp"
#include "solver/dipole_path.hpp"
#include "solver/polarization.hpp"

#include <sys/resource.h>
#include <unistd.h>

#include <map>
#include <memory>
#include <mutex>

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
// Which path produced a point (sweep/path).
constexpr std::uint8_t kNoPath = 0, kExactPath = 1, kDipolePath = 2, kFullPath = 3;
// Dipole points are answered in blocks of this many right-hand sides: a fixed
// size, so that every point's arithmetic is the same for any thread count.
constexpr std::size_t kDipoleBatch = 128;

// The automatic switch. A dipole point's relative error was measured at about
// 0.085 x (object half-extent / centre distance to the body) in
// tests/test_dipole_path.cpp (1.7 % at 5 radii, 0.9 % at 10, 0.4 % at 20) and
// up to 0.12 x on the coarse cases/examples/fish_map.toml (its worst checked
// point); the dipole path is taken where that ratio is at most accuracy / 0.12.
constexpr double kDipoleErrorPerRatio = 0.12;

// Dipole points read electrode sensors through lead fields (reciprocity) when
// there are at most this many: murk-bench measured 0.09 ms per point for 4
// sensors against 2.4 ms for the blocked solve on its 5,856-unknown body, after
// 0.04 s of set-up (one transposed solve per sensor). Skin panels (thousands of
// sensors) and probe points always use the blocked solve.
constexpr std::size_t kLeadFieldSensors = 64;

double peak_memory_MiB() {
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    return usage.ru_maxrss / 1024.0;  // Linux reports KiB
}

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
                   "baseline field); a sample re-solved exactly, see /sweep/path_check";
        case SweepMethod::automatic:
            return "auto: induced-dipole path where the object is small against its distance, exact path elsewhere; "
                   "see /sweep/path and /sweep/path_check";
        case SweepMethod::full:
            return "full boundary-element solve at every point (no approximation beyond the discretization)";
    }
    return "";
}

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
        const auto start = Clock::now();
        auto since_start = [&] { return std::chrono::duration<double>(Clock::now() - start).count(); };
        plan();
        solve_baselines();
        open_output();
        stats_.setup_seconds = since_start();
        try {
            compute_points();
            const double before_checks = since_start();
            if (!g_stop_requested) check_dipole_points();
            stats_.check_seconds = since_start() - before_checks;
            if (!g_stop_requested) analyse_and_commit();
            stats_.wall_seconds = since_start();
        } catch (...) {
            output_->suspend();  // keep every finished point for --resume
            throw;
        }
        stats_.peak_memory_MiB = peak_memory_MiB();
        for (std::uint8_t p : path_) {
            stats_.exact_points += p == kExactPath;
            stats_.dipole_points += p == kDipolePath;
            stats_.full_points += p == kFullPath;
        }
        if (!options_.quiet) print_stats();
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
    void print_stats() const {
        const RunStats& t = stats_;
        if (sweep_.method != SweepMethod::full)
            std::fprintf(stderr, "murk: body system: assembly %.2f s, factorization %.2f s, factors %.0f MiB\n",
                         t.assembly_seconds, t.factor_seconds, t.factor_bytes / 1048576.0);
        std::fprintf(stderr,
                     "murk: points: %zu exact, %zu dipole, %zu full re-solve (%zu fell back from exact); "
                     "exact and full %.2f s, dipole %.2f s\n",
                     t.exact_points, t.dipole_points, t.full_points, std::size_t(t.fallbacks), t.point_seconds,
                     t.dipole_seconds);
        if (t.checked > 0)
            std::fprintf(stderr, "murk: %zu dipole points re-solved exactly: largest discrepancy %.3g\n", t.checked,
                         t.max_discrepancy);
        std::fprintf(stderr, "murk: peak memory %.0f MiB\n", t.peak_memory_MiB);
    }

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
        const std::vector<ObjectSpec> still = static_objects();
        for (double sigma : waters_) {
            CaseSpec s = spec_;
            s.water.conductivity_S_per_m = sigma;
            baseline_scenes_.push_back(build_scene<S>(s, false));
            if (sweep_.method == SweepMethod::full) {
                baseline_solutions_.push_back(solve_scene(baseline_scenes_.back(), quad));
                continue;
            }
            // The fixed part: the body and every object the sweep does not move.
            // Without such objects it is the baseline itself, factored once for both.
            s.objects = still;
            fixed_.push_back(std::make_unique<FixedPart<S>>(
                still.empty() ? baseline_scenes_.back() : build_scene<S>(s, true), quad));
            stats_.assembly_seconds += fixed_.back()->assembly_seconds();
            stats_.factor_seconds += fixed_.back()->factor_seconds();
            stats_.factor_bytes = std::max(stats_.factor_bytes, fixed_.back()->factor_bytes());
            baseline_solutions_.push_back(still.empty() ? fixed_.back()->solution()
                                                        : solve_scene(baseline_scenes_.back(), quad));
        }
        sensors_ = sensor_layout(spec_, baseline_scenes_.front(), where_);
        for (std::size_t w = 0; w < waters_.size(); ++w)
            baseline_readings_.push_back(sensor_readings(sensors_, baseline_scenes_[w], baseline_solutions_[w], quad));
        const bool dipoles = sweep_.method == SweepMethod::dipole || sweep_.method == SweepMethod::automatic;
        for (std::size_t w = 0; w < fixed_.size(); ++w) {
            fixed_readings_.push_back(sensor_readings(sensors_, fixed_[w]->scene(), fixed_[w]->solution(), quad));
            if (dipoles && !sensors_.skin && !sensors_.probes && sensors_.size() <= kLeadFieldSensors)
                leads_.push_back(std::make_unique<LeadFields<S>>(*fixed_[w], readout_matrix(*fixed_[w])));
        }
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

    // The electrode sensors' readings as rows acting on the fixed part's unknowns:
    // a floating sensor's potential, or the current of one held at a potential
    // (sigma_w times the area-weighted sum of q over its panels); pairs as differences.
    MatrixX<S> readout_matrix(const FixedPart<S>& fixed) const {
        const SystemLayout& layout = fixed.layout();
        const Scene<S>& scene = fixed.scene();
        MatrixX<S> r = MatrixX<S>::Zero(static_cast<Eigen::Index>(sensors_.electrodes.size()), fixed.size());
        for (std::size_t k = 0; k < sensors_.electrodes.size(); ++k) {
            const int e = sensors_.electrodes[k];
            if (sensors_.units == "V") {
                r(k, layout.electrode_offset + e) = S(1);
                continue;
            }
            for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
                if (layout.surfaces[s].two_sided) continue;
                for (std::size_t t = 0; t < scene.surfaces[s].mesh.size(); ++t)
                    if (scene.surfaces[s].panel_electrode[t] == e)
                        r(k, layout.surfaces[s].offset + static_cast<Eigen::Index>(t)) =
                            scene.water_conductivity * scene.surfaces[s].mesh.area(t);
            }
        }
        if (!sensors_.pairs) return r;
        MatrixX<S> d(r.rows() - 1, r.cols());
        for (Eigen::Index k = 0; k + 1 < r.rows(); ++k) d.row(k) = r.row(k + 1) - r.row(k);
        return d;
    }

    // Objects that stay where they are at every point: all but the swept one
    // (or, with an object axis, all but its alternatives).
    std::vector<ObjectSpec> static_objects() const {
        std::vector<ObjectSpec> still;
        const std::string swept = sweep_.objects.empty() ? spec_.objects[swept_object_index(spec_, sweep_)].name : "";
        for (const ObjectSpec& o : spec_.objects) {
            const bool moves = sweep_.objects.empty()
                                   ? o.name == swept
                                   : std::find(sweep_.objects.begin(), sweep_.objects.end(), o.name) != sweep_.objects.end();
            if (!moves) still.push_back(o);
        }
        return still;
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
                if (!root.exists("sweep/path"))
                    throw InputError(H5Output::partial_path(options_.output_path) +
                                     ": was written by an earlier murk that did not record each point's path; "
                                     "start over with --force");
                path_ = root.read<std::uint8_t>("sweep/path").values;
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
        write_result_metadata(root, spec_, options_.command_line, method_description(sweep_.method),
                              quadrature_options(spec_));
        root.set_attribute("sweep_method", std::string(method_name(sweep_.method)));
        if (sweep_.method != SweepMethod::full) root.set_attribute("coupling_tolerance", sweep_.coupling_tolerance);
        if (sweep_.method == SweepMethod::automatic) root.set_attribute("dipole_accuracy", sweep_.dipole_accuracy);
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
        // One chunk per point: a point's values are written (and compressed) once,
        // never by reading back and recompressing a chunk shared with other points.
        H5Shape one_point(shape_.size(), 1);
        one_point.push_back(hsize_t(sensors_.size()));
        attach(sweep.create_extendible<S>("perturbation", with(shape_, {hsize_t(sensors_.size())}), sensors_.units,
                                          "change of the " + kind + " caused by the object",
                                          H5Layout::compressed(4, one_point)), true);
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
        attach(sweep.create_extendible<std::uint8_t>("path", with(shape_), "1",
                                                     "path that computed the point: 0 none (masked or not computed), 1 exact "
                                                     "(factored body, coupled object), 2 induced dipole, 3 full re-solve",
                                                     chunked), false);
        status_.assign(total_, kNotComputed);
        path_.assign(total_, kNoPath);
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
        std::uint8_t path = kNoPath;
    };

    // A point left for the induced-dipole path, with what that path needs.
    struct DipoleRequest {
        std::size_t point = 0;
        std::size_t water = 0;
        Vec3 centre = Vec3::Zero();
        double ratio = 0;  // object half-extent / distance of its centre from the fixed part
        Matrix3<S> tensor;
    };

    // ---- stage: every point not yet computed. Points are independent: exact
    // and full points run in parallel, one point per thread (the solves inside
    // run single-threaded, as OpenMP does not nest by default); dipole points
    // then run in fixed blocks of kDipoleBatch, one block per thread. Each result
    // is written under a lock. Every point's arithmetic is the same whatever the
    // thread count, so the results do not depend on it (bit for bit).
    void compute_points() {
        Progress progress(total_, finished_, options_.quiet);
        const QuadratureOptions quad = quadrature_options(spec_);
        H5Group sweep = output_->root().open_group("sweep");
        std::vector<std::size_t> pending;
        for (std::size_t p = 0; p < total_; ++p)
            if (status_[p] == kNotComputed) pending.push_back(p);
        std::vector<std::optional<DipoleRequest>> requests(pending.size());
        ratio_.resize(total_, std::numeric_limits<double>::quiet_NaN());
        const auto t0 = Clock::now();
        run_parallel(pending.size(), [&](std::size_t i) {
            PointResult r = compute_point(pending[i], quad, requests[i]);
            if (requests[i]) return;  // answered below, with the other dipole points
#pragma omp critical(murk_sweep_output)
            {
                store_point(sweep, pending[i], r);
                progress.point_done();
            }
        });
        stats_.point_seconds += std::chrono::duration<double>(Clock::now() - t0).count();

        for (const auto& q : requests)
            if (q) ratio_[q->point] = q->ratio;

        // Dipole points, grouped by water (each has its own fixed part), in blocks.
        std::vector<std::vector<DipoleRequest>> batches;
        for (std::size_t w = 0; w < waters_.size(); ++w) {
            std::vector<DipoleRequest> batch;
            for (const auto& q : requests)
                if (q && q->water == w) {
                    batch.push_back(*q);
                    if (batch.size() == kDipoleBatch) batches.push_back(std::move(batch)), batch.clear();
                }
            if (!batch.empty()) batches.push_back(std::move(batch));
        }
        const auto t1 = Clock::now();
        run_parallel(batches.size(), [&](std::size_t b) {
            std::vector<PointResult> results = compute_dipole_batch(batches[b], quad);
#pragma omp critical(murk_sweep_output)
            for (std::size_t k = 0; k < results.size(); ++k) {
                store_point(sweep, batches[b][k].point, results[k]);
                progress.point_done();
            }
        });
        stats_.dipole_seconds += std::chrono::duration<double>(Clock::now() - t1).count();
    }

    // body(i) for i < count on all threads; stops early on a stop request; the
    // first exception is rethrown here.
    template <class Body>
    void run_parallel(std::size_t count, Body body) {
        std::exception_ptr failure;
        std::atomic<bool> failed{false};
#pragma omp parallel for schedule(dynamic, 1)
        for (std::ptrdiff_t i = 0; i < std::ptrdiff_t(count); ++i) {
            if (g_stop_requested || failed) continue;
            try {
                body(static_cast<std::size_t>(i));
            } catch (...) {
#pragma omp critical(murk_sweep_failure)
                if (!failure) failure = std::current_exception();
                failed = true;
            }
        }
        if (failure) std::rethrow_exception(failure);
    }

    // Index of the swept object's surface in a point's scene.
    static std::size_t moving_surface(const Scene<S>& scene, const CaseSpec& point_spec) {
        const std::string& name = point_spec.objects[swept_object_index(point_spec, *point_spec.sweep)].name;
        for (std::size_t s = 0; s < scene.surfaces.size(); ++s)
            if (scene.surfaces[s].mesh.name == name) return s;
        throw std::logic_error("sweep point: the swept object is not in its scene");
    }

    // Axis indices that change the object itself or the water, not where the
    // object is: points that share them share the object's own block and its
    // polarization tensor. With an insulating plane the object's block holds
    // its images, which move with it: then every point has its own.
    std::vector<std::size_t> object_key(const std::vector<std::size_t>& index, bool position_too) const {
        std::vector<std::size_t> key;
        for (std::size_t a = 0; a < axes_.size(); ++a) {
            const AxisKind k = axes_[a].kind;
            const bool position = k == AxisKind::distance || k == AxisKind::grid_u || k == AxisKind::grid_v;
            key.push_back(position && !position_too ? 0 : index[a]);
        }
        return key;
    }

    // The swept object of a point alone in unbounded water, centred on the
    // origin, meshed as in the point's own scene.
    static Scene<S> object_alone(const CaseSpec& point_spec) {
        CaseSpec alone = point_spec;
        alone.fish.reset(), alone.robot.reset(), alone.water.plane.reset();
        alone.sources.clear(), alone.probes.clear(), alone.probe_points.clear();
        ObjectSpec object = point_spec.objects[swept_object_index(point_spec, *point_spec.sweep)];
        object.panel_size_m = object_panel_size(point_spec, object);
        object.position_m = {0.0, 0.0, 0.0};
        alone.objects = {object};
        return build_scene<S>(alone, true);
    }

    std::shared_ptr<const MovingBlock<S>> moving_block(const std::vector<std::size_t>& index, const CaseSpec& point_spec,
                                                       const Scene<S>& scene, std::size_t moving,
                                                       const QuadratureOptions& quad) {
        if (scene.plane) return std::make_shared<const MovingBlock<S>>(factor_moving_block(scene, {moving}, quad));
        const std::vector<std::size_t> key = object_key(index, false);
        {
            std::lock_guard<std::mutex> lock(cache_mutex_);
            const auto it = blocks_.find(key);
            if (it != blocks_.end()) return it->second;
        }
        // Factored from the object alone at the origin, not at the point that
        // asks first: the same block whichever point (and thread) that is.
        auto block = std::make_shared<const MovingBlock<S>>(factor_moving_block(object_alone(point_spec), {0}, quad));
        std::lock_guard<std::mutex> lock(cache_mutex_);
        return blocks_.emplace(key, block).first->second;
    }

    PointResult compute_point(std::size_t p, const QuadratureOptions& quad, std::optional<DipoleRequest>& dipole,
                              std::optional<SweepMethod> force = std::nullopt) {
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
        const SweepMethod method = force.value_or(sweep_.method);
        const std::size_t moving = method == SweepMethod::full ? 0 : moving_surface(*scene, setup.spec);
        const double ratio =
            method == SweepMethod::dipole || method == SweepMethod::automatic ? size_to_distance(*scene, moving, w) : 0.0;
        if (method == SweepMethod::dipole ||
            (method == SweepMethod::automatic && ratio <= sweep_.dipole_accuracy / kDipoleErrorPerRatio)) {
            dipole = DipoleRequest{p, w, r.centre, ratio, polarization(r.index, setup.spec, *scene, moving, quad)};
            return r;
        }
        Solution<S> solution;
        if (method == SweepMethod::full) {
            solution = solve_scene(*scene, quad);
            r.path = kFullPath;
        } else {
            const auto block = moving_block(r.index, setup.spec, *scene, moving, quad);
            CoupledSolution<S> coupled = solve_coupled(*scene, {moving}, *fixed_[w], *block, quad,
                                                       CouplingOptions{sweep_.coupling_tolerance, 80});
            if (coupled.gmres.converged) {
                solution = std::move(coupled.solution);
                r.path = kExactPath;
            } else {  // an object almost touching the body: fall back on the full solve
                solution = solve_scene(*scene, quad);
                r.path = kFullPath;
                ++stats_.fallbacks;
            }
        }
        finish_point(r, sensor_readings(sensors_, *scene, solution, quad), w);
        return r;
    }

    void finish_point(PointResult& r, std::vector<S> reading, std::size_t w) const {
        r.change = std::move(reading);
        for (std::size_t k = 0; k < r.change.size(); ++k) r.change[k] -= baseline_readings_[w][k];
        r.image = summarize_image(sensors_, r.change);
        if (spec_.detection) {
            r.snr = detectability_index(noise_, r.change, receptors_);
            r.pd = detection_probability(r.snr, spec_.detection->false_alarm_probability);
        }
    }

    // What the automatic switch compares: the object's half-extent over the
    // distance from its centre to the nearest fixed surface, water source or probe point.
    double size_to_distance(const Scene<S>& scene, std::size_t moving, std::size_t w) const {
        const TriangleMesh& object = scene.surfaces[moving].mesh;
        Vec3 centre = Vec3::Zero();
        for (const Vec3& v : object.vertices) centre += v;
        centre /= double(object.vertices.size());
        double half_extent = 0;
        for (const Vec3& v : object.vertices) half_extent = std::max(half_extent, (v - centre).norm());
        double distance = INFINITY;
        for (const auto& surface : fixed_[w]->scene().surfaces)
            for (std::size_t t = 0; t < surface.mesh.size(); ++t)
                distance = std::min(distance, point_triangle_distance(centre, surface.mesh.corner(t, 0),
                                                                      surface.mesh.corner(t, 1), surface.mesh.corner(t, 2)));
        for (const auto& src : fixed_[w]->scene().sources) distance = std::min(distance, (src.position - centre).norm());
        if (sensors_.probes)
            for (const Vec3& x : sensors_.position) distance = std::min(distance, (x - centre).norm());
        return half_extent / distance;
    }

    // Polarization tensor of the object at this point: closed form for a plain
    // sphere, spheroid or ellipsoid, boundary elements once per key otherwise.
    Matrix3<S> polarization(const std::vector<std::size_t>& index, const CaseSpec& point_spec, const Scene<S>& scene,
                            std::size_t moving, const QuadratureOptions& quad) {
        const std::vector<std::size_t> key = object_key(index, false);
        {
            std::lock_guard<std::mutex> lock(cache_mutex_);
            const auto it = tensors_.find(key);
            if (it != tensors_.end()) return it->second;
        }
        const std::optional<Matrix3<S>> closed = closed_form_polarization(point_spec, scene, moving);
        // Computed from the object alone at the origin, like its block: the same
        // tensor whichever point asks first.
        const Matrix3<S> m = closed ? *closed : computed_polarization(object_alone(point_spec), 0, quad);
        std::lock_guard<std::mutex> lock(cache_mutex_);
        return tensors_.emplace(key, m).first->second;
    }

    // The exact tensor of a homogeneous sphere, spheroid or ellipsoid (no
    // membrane), with the conductivities the scene builder gave its surface.
    static std::optional<Matrix3<S>> closed_form_polarization(const CaseSpec& point_spec, const Scene<S>& scene,
                                                             std::size_t moving) {
        const ObjectSpec& o = point_spec.objects[swept_object_index(point_spec, *point_spec.sweep)];
        const ShapeSpec& shape = o.shape;
        if (o.membrane || (shape.kind != ShapeKind::sphere && shape.kind != ShapeKind::spheroid &&
                           shape.kind != ShapeKind::ellipsoid))
            return std::nullopt;
        const Eigen::Vector3d semi = shape.kind == ShapeKind::sphere
                                         ? Eigen::Vector3d::Constant(shape.radius_m)
                                         : Eigen::Vector3d(shape.semi_axes_m[0], shape.semi_axes_m[1], shape.semi_axes_m[2]);
        const Eigen::Matrix3d axes = orientation_matrix(o.orientation);
        const Surface<S>& surface = scene.surfaces[moving];
        switch (o.material) {
            case Material::conductor: return Matrix3<S>(conducting_ellipsoid_polarization(semi, axes).cast<S>());
            case Material::insulator: return ellipsoid_polarization<S>(semi, axes, S(0), scene.water_conductivity);
            case Material::conducting:
                return ellipsoid_polarization<S>(semi, axes, surface.inner_conductivity, scene.water_conductivity);
        }
        return std::nullopt;
    }

    // One block of dipole points (same water): the baseline field at every
    // centre, the dipoles it induces, one blocked solve against the fixed part.
    std::vector<PointResult> compute_dipole_batch(const std::vector<DipoleRequest>& batch, const QuadratureOptions& quad) const {
        const FixedPart<S>& fixed = *fixed_[batch.front().water];
        Eigen::Matrix3Xd centres(3, batch.size());
        for (std::size_t k = 0; k < batch.size(); ++k) centres.col(k) = batch[k].centre;
        const Eigen::Matrix<S, 3, Eigen::Dynamic> field = baseline_field(fixed, centres, quad);
        std::vector<PointDipole<S>> dipoles;
        for (std::size_t k = 0; k < batch.size(); ++k)
            dipoles.push_back({batch[k].centre, batch[k].tensor * field.col(k)});
        const std::size_t w = batch.front().water;
        const LeadFields<S>* lead = leads_.empty() ? nullptr : leads_[w].get();
        const MatrixX<S> x = lead ? MatrixX<S>() : unknowns_with_dipoles(fixed, dipoles);
        const MatrixX<S> change = lead ? lead->readings_change(dipoles) : MatrixX<S>();
        std::vector<PointResult> results;
        for (std::size_t k = 0; k < batch.size(); ++k) {
            PointResult r;
            r.index = unflatten(batch[k].point, axes_);
            r.centre = batch[k].centre;
            r.path = kDipolePath;
            std::vector<S> reading;
            if (lead) {  // reciprocity: the fixed part's reading plus L b(dipole)
                reading = fixed_readings_[w];
                for (std::size_t i = 0; i < reading.size(); ++i) reading[i] += change(static_cast<Eigen::Index>(i), k);
                finish_point(r, std::move(reading), w);
                results.push_back(std::move(r));
                continue;
            }
            const Solution<S> solution = unpack_solution(fixed.scene(), fixed.layout(), VectorX<S>(x.col(k)));
            if (sensors_.probes) {  // the dipole's own potential reaches the probes directly
                Scene<S> with_dipole = fixed.scene();
                with_dipole.dipoles.push_back(dipoles[k]);
                reading = sensor_readings(sensors_, with_dipole, solution, quad);
            } else {
                reading = sensor_readings(sensors_, fixed.scene(), solution, quad);
            }
            finish_point(r, std::move(reading), batch[k].water);
            results.push_back(std::move(r));
        }
        return results;
    }

    // The dipole points to re-solve: half of them where the object is largest
    // against its distance (where the dipole path errs most), the rest spread
    // evenly over the others in sweep order.
    std::vector<std::size_t> check_sample(const std::vector<std::size_t>& dipole_points) const {
        const std::size_t n = std::min<std::size_t>(dipole_points.size(), std::size_t(sweep_.check_points));
        std::vector<std::size_t> by_ratio;
        for (std::size_t p : dipole_points)
            if (!ratio_.empty() && !std::isnan(ratio_[p])) by_ratio.push_back(p);
        std::stable_sort(by_ratio.begin(), by_ratio.end(), [&](std::size_t a, std::size_t b) { return ratio_[a] > ratio_[b]; });
        std::vector<std::size_t> sample(by_ratio.begin(), by_ratio.begin() + std::min(by_ratio.size(), (n + 1) / 2));
        std::vector<std::size_t> rest;
        for (std::size_t p : dipole_points)
            if (std::find(sample.begin(), sample.end(), p) == sample.end()) rest.push_back(p);
        const std::size_t m = n - sample.size();
        for (std::size_t k = 0; k < m; ++k) sample.push_back(rest[(2 * k + 1) * rest.size() / (2 * m)]);
        std::sort(sample.begin(), sample.end());
        return sample;
    }

    // ---- stage: re-solve a sample of the dipole points by the exact path and
    // write the measured discrepancy: max over sensors of |dipole - exact|
    // divided by max over sensors of |exact|, per sampled point.
    void check_dipole_points() {
        if (sweep_.method != SweepMethod::dipole && sweep_.method != SweepMethod::automatic) return;
        H5Group sweep = output_->root().open_group("sweep");
        if (sweep.exists("path_check")) {  // done by the interrupted run this one resumes, after its last point
            const H5Dataset d = sweep.dataset("path_check/discrepancy");
            stats_.checked = d.shape().empty() ? 0 : d.shape()[0];
            stats_.max_discrepancy = d.double_attribute("max_discrepancy");
            return;
        }
        std::vector<std::size_t> dipole_points;
        for (std::size_t p = 0; p < total_; ++p)
            if (path_[p] == kDipolePath) dipole_points.push_back(p);
        const std::vector<std::size_t> sample = check_sample(dipole_points);
        std::vector<double> ratios;
        for (std::size_t p : sample) ratios.push_back(ratio_.empty() ? std::numeric_limits<double>::quiet_NaN() : ratio_[p]);
        const std::size_t sensors = sensors_.size();
        std::vector<double> discrepancy(sample.size());
        const QuadratureOptions quad = quadrature_options(spec_);
        run_parallel(sample.size(), [&](std::size_t k) {
            std::optional<DipoleRequest> unused;
            const PointResult exact = compute_point(sample[k], quad, unused, SweepMethod::exact);
            std::vector<S> dipole(sensors);
            const std::vector<std::size_t> index = unflatten(sample[k], axes_);
            H5Shape offset(index.begin(), index.end()), count(index.size(), 1);
            offset.push_back(0), count.push_back(sensors);
#pragma omp critical(murk_sweep_output)
            dipole = sweep.dataset("perturbation").template read_slab<S>(offset, count);
            double diff = 0, size = 0;
            for (std::size_t i = 0; i < sensors; ++i)
                diff = std::max(diff, std::abs(dipole[i] - exact.change[i])), size = std::max(size, std::abs(exact.change[i]));
            discrepancy[k] = size > 0 ? diff / size : 0.0;
        });
        if (g_stop_requested) return;
        H5Group check = sweep.group("path_check");
        std::vector<std::int64_t> points(sample.begin(), sample.end());
        check.write("point", points, "1", "flat index (C order over the sweep axes) of a dipole point re-solved exactly");
        H5Dataset d = check.write("discrepancy", discrepancy, "1",
                                  "max over sensors |dipole - exact| / max over sensors |exact| at that point");
        check.write("size_to_distance", ratios, "1",
                    "object half-extent / distance of its centre from the body (NaN: computed by an earlier, "
                    "interrupted run)");
        stats_.checked = sample.size();
        stats_.max_discrepancy = discrepancy.empty() ? 0.0 : *std::max_element(discrepancy.begin(), discrepancy.end());
        d.set_attribute("max_discrepancy", stats_.max_discrepancy);
        if (sweep_.method == SweepMethod::automatic) d.set_attribute("accuracy_target", sweep_.dipole_accuracy);
        if (sweep_.method == SweepMethod::automatic && stats_.max_discrepancy > sweep_.dipole_accuracy)
            std::fprintf(stderr,
                         "murk: warning: the dipole points re-solved exactly differ by up to %.3g, more than "
                         "dipole_accuracy = %.3g; lower dipole_accuracy or use method = \"exact\"\n",
                         stats_.max_discrepancy, sweep_.dipole_accuracy);
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
        path_[p] = r.path;
        write(sweep, "path", offset, count, {}, std::vector<std::uint8_t>{r.path});
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
        root.set_attribute("peak_memory_MiB", peak_memory_MiB());
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
    std::vector<std::uint8_t> path_;
    std::vector<double> ratio_;  // per point: size_to_distance of dipole points computed in this run
    std::vector<std::unique_ptr<FixedPart<S>>> fixed_;  // per water conductivity; empty for method full
    std::vector<std::unique_ptr<LeadFields<S>>> leads_;  // per water, for a few electrode sensors
    std::vector<std::vector<S>> fixed_readings_;          // the fixed part's own readings, per water
    std::mutex cache_mutex_;
    std::map<std::vector<std::size_t>, std::shared_ptr<const MovingBlock<S>>> blocks_;
    std::map<std::vector<std::size_t>, Matrix3<S>> tensors_;

public:
    RunStats stats_;
};

}  // namespace

void install_stop_handlers() {
    std::signal(SIGINT, request_stop);
    std::signal(SIGTERM, request_stop);
}

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options, RunStats* stats) {
    if (!spec.sweep) throw InputError(spec.path + ": murk run needs a [sweep] section (murk solve runs one configuration)");
    auto go = [&](auto&& run) {
        const RunOutcome outcome = run.run();
        if (stats) *stats = run.stats_;
        return outcome;
    };
    if (case_needs_complex(spec)) return go(SweepRun<Complex>(spec, options));
    return go(SweepRun<double>(spec, options));
}

}  // namespace murk
