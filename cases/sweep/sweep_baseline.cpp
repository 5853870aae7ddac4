#include "cases/sweep/sweep_baseline.hpp"

#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/moved_boundary.hpp"
#include "geometry/input_error.hpp"
#include "solver/bem_system.hpp"

#include <cmath>

namespace murk {

namespace {

// Dipole points read electrode sensors through lead fields (reciprocity) when
// there are at most this many: murk-bench measured 0.09 ms per point for 4
// sensors against 2.4 ms for the blocked solve on its 5,856-unknown body, after
// 0.04 s of set-up (one transposed solve per sensor). Skin panels (thousands of
// sensors) and probe points always use the blocked solve.
constexpr std::size_t kLeadFieldSensors = 64;

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

NoiseChannels noise_channels(const DetectionSpec& d) {
    switch (d.channels) {
        case DetectionSpec::Channels::quadratures: return NoiseChannels::quadratures;
        case DetectionSpec::Channels::amplitude: return NoiseChannels::amplitude;
        case DetectionSpec::Channels::amplitude_and_phase: return NoiseChannels::amplitude_and_phase;
    }
    return NoiseChannels::quadratures;
}

// Receptors on each skin panel: density times area, the density taken from the
// zone (fraction of the length from the nose) that holds the centroid.
std::vector<double> receptors_per_panel(const CaseSpec& spec, const SensorLayout& sensors) {
    const DetectionSpec& d = *spec.detection;
    const FishSpec& fish = *spec.fish;
    const Eigen::Matrix3d R = orientation_matrix(fish.orientation);
    const Vec3 position(fish.position_m[0], fish.position_m[1], fish.position_m[2]);
    // The fish frame has the tail at x = 0 and the nose at x = length; the case
    // places either the nose or the centre at `position`.
    const double anchor = fish.anchored_at_nose ? fish.length_m : 0.5 * fish.length_m;
    std::vector<double> n;
    for (std::size_t k = 0; k < sensors.size(); ++k) {
        const double x = (R.transpose() * (sensors.position[k] - position)).x() + anchor;
        const double from_nose = (fish.length_m - x) / fish.length_m;
        double density = d.receptor_density_per_m2;
        for (const ReceptorZone& z : d.receptor_zones)
            if (from_nose >= z.from_fraction && from_nose <= z.to_fraction) density = z.density_per_m2;
        n.push_back(density * sensors.area[k]);
    }
    return n;
}

SensorNoise sensor_noise(const CaseSpec& spec, const SweepPlan& plan, const SensorLayout& sensors) {
    const DetectionSpec& d = *spec.detection;
    SensorNoise noise;
    noise.model = noise_model(d);
    noise.model.channels = noise_channels(d);
    // The reader requires a frequency with the phase channel: a jitter t shifts the phase by 2 pi f t.
    noise.model.phase_noise_rad =
        d.timing_jitter_s > 0.0 ? 2.0 * M_PI * spec.frequency_Hz.value_or(0.0) * d.timing_jitter_s : d.phase_noise_rad;
    noise.false_alarm_probability = d.false_alarm_probability;
    noise.probability_level = d.probability_level;
    if (sensors.skin) {
        if (noise.model.kind != NoiseKind::receptors)
            throw InputError(plan.where + ": a fish's skin needs the receptor noise model");
        noise.receptors = receptors_per_panel(spec, sensors);
    } else if (noise.model.kind == NoiseKind::receptors) {
        throw InputError(plan.where + ": electrodes and probes need an amplifier noise model");
    } else if ((sensors.units == "A") != (noise.model.kind == NoiseKind::current_amplifier)) {
        // A voltage noise density against currents (or the reverse) gives a ratio of unlike units.
        throw InputError(spec.path + ":" + std::to_string(d.line) + ": detection: " +
                         (sensors.units == "A"
                              ? "the sensors are held at a potential and read currents: give "
                                "amplifier_current_noise (A/sqrt(Hz)), not amplifier_noise"
                              : "the sensors read voltages: give amplifier_noise (V/sqrt(Hz)), not "
                                "amplifier_current_noise"));
    }
    return noise;
}

// The electrode sensors' readings as rows acting on the fixed part's unknowns:
// a floating sensor's potential, or the current of one held at a potential
// (sigma_w times the area-weighted sum of q over its panels); pairs as differences.
template <class S>
MatrixX<S> readout_matrix(const SensorLayout& sensors, const FixedPart<S>& fixed) {
    const SystemLayout& layout = fixed.layout();
    const Scene<S>& scene = fixed.scene();
    MatrixX<S> r = MatrixX<S>::Zero(static_cast<Eigen::Index>(sensors.electrodes.size()), fixed.size());
    for (std::size_t k = 0; k < sensors.electrodes.size(); ++k) {
        const int e = sensors.electrodes[k];
        if (sensors.units == "V") {
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
    if (!sensors.pairs) return r;
    MatrixX<S> d(r.rows() - 1, r.cols());
    for (Eigen::Index k = 0; k + 1 < r.rows(); ++k) d.row(k) = r.row(k + 1) - r.row(k);
    return d;
}

}  // namespace

template <class S>
std::vector<Scene<S>> fixed_scenes(const CaseSpec& spec, const SweepPlan& plan) {
    CaseSpec fixed_case = spec;  // once per run: the case with only the objects that stay
    fixed_case.objects = plan.still;
    // A boundary-distance axis measures from the body: mesh the fixed part in unbounded water
    // first, which also refuses what is wrong without the planes and walls in its own words.
    TriangleMesh body;
    if (!plan.boundary_distances.empty()) {
        CaseSpec unbounded = fixed_case;
        unbounded.water.surface.reset(), unbounded.water.bottom.reset(), unbounded.tank.reset();
        body = build_scene<S>(unbounded, true).surfaces.front().mesh;
    }
    std::vector<Scene<S>> scenes;
    for (std::size_t k = 0; k < plan.fixed_count(); ++k) {  // per (water, frequency, boundary distance)
        fixed_case.water = fixed_water_bounds(spec, plan, k, body);
        fixed_case.tank = fixed_tank(spec, plan, k, body);
        fixed_case.water.conductivity_S_per_m = plan.fixed_water(k);
        fixed_case.frequency_Hz = plan.fixed_frequency(k, spec.frequency_Hz);
        if (plan.boundary_distances.empty()) {
            scenes.push_back(build_scene<S>(fixed_case, true));
            continue;
        }
        try {  // what fails now is the moved boundary cutting the body, an object that stays or a source
            scenes.push_back(build_scene<S>(fixed_case, true));
        } catch (const InputError& e) {
            // The builder names the moved boundary by the axis's key, which the prefix already names.
            std::string why = e.what();
            const std::string key = plan.where + "." + plan.axes[plan.axis(AxisKind::boundary_distance)].name + ": ";
            if (why.rfind(key, 0) == 0) why.erase(0, key.size());
            throw InputError(boundary_value_where(plan, k) + ": " +
                             (plan.sweep.moved == MovedBoundary::wall ? "the tank" : "this plane") +
                             " cannot be placed: " + why);
        }
    }
    return scenes;
}

template <class S>
SweepBaselines<S> solve_baselines(const CaseSpec& spec, const SweepPlan& plan, std::vector<Scene<S>> scenes,
                                  SensorLayout sensors, const QuadratureOptions& quad) {
    SweepBaselines<S> out;
    const SweepMethod method = plan.sweep.method;
    const bool dipoles = method == SweepMethod::dipole || method == SweepMethod::automatic;
    const SolverOptions solver = solver_options(spec);
    for (Scene<S>& scene : scenes) {
        WaterBaseline<S> w;
        if (method == SweepMethod::full) {
            w.solution = solve_scene(scene, quad);
            w.unfactored = std::move(scene);
        } else {
            w.fixed = std::make_unique<FixedPart<S>>(std::move(scene), quad, solver);
            w.solution = w.fixed->solution();
            out.assembly_seconds += w.fixed->assembly_seconds();
            out.factor_seconds += w.fixed->factor_seconds();
            out.factor_bytes = std::max(out.factor_bytes, w.fixed->factor_bytes());
            const SystemSolverUsed used = solver_used(*w.fixed);
            const int most = std::max(out.solver_used.iterations, used.iterations);
            out.solver_used = used;
            out.solver_used.iterations = most;
        }
        out.waters.push_back(std::move(w));
    }
    out.sensors = std::move(sensors);
    for (WaterBaseline<S>& w : out.waters) {
        w.readings = sensor_readings(out.sensors, w.scene(), w.solution, quad);
        if (dipoles && !out.sensors.skin && !out.sensors.probes && out.sensors.size() <= kLeadFieldSensors)
            w.leads = std::make_unique<LeadFields<S>>(*w.fixed, readout_matrix(out.sensors, *w.fixed));
    }
    if (spec.detection) out.noise = sensor_noise(spec, plan, out.sensors);
    return out;
}

template std::vector<Scene<double>> fixed_scenes(const CaseSpec&, const SweepPlan&);
template std::vector<Scene<Complex>> fixed_scenes(const CaseSpec&, const SweepPlan&);
template SweepBaselines<double> solve_baselines(const CaseSpec&, const SweepPlan&, std::vector<Scene<double>>,
                                                SensorLayout, const QuadratureOptions&);
template SweepBaselines<Complex> solve_baselines(const CaseSpec&, const SweepPlan&, std::vector<Scene<Complex>>,
                                                 SensorLayout, const QuadratureOptions&);

}  // namespace murk
