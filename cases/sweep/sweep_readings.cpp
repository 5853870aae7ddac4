#include "cases/sweep/sweep_readings.hpp"

#include "geometry/input_error.hpp"
#include "solver/bem_system.hpp"

#include <Eigen/Eigenvalues>
#include <cmath>

namespace murk {

template <class S>
SensorLayout sensor_layout(const CaseSpec& spec, const Scene<S>& baseline, const std::string& where) {
    SensorLayout layout;
    if (!spec.fish && !spec.robot) {
        layout.probes = true;
        layout.units = "V";
        for (const ProbePoint& p : spec.probe_points) {
            layout.position.push_back(Vec3(p.position_m[0], p.position_m[1], p.position_m[2]));
            layout.names.push_back(p.label);
        }
        return layout;
    }
    const Surface<S>& body = baseline.surfaces.front();
    if (body.kind == InterfaceKind::membrane) {
        layout.skin = true;
        layout.units = "V";
        for (std::size_t t = 0; t < body.mesh.size(); ++t) {
            layout.position.push_back(body.mesh.centroid(t));
            layout.area.push_back(body.mesh.area(t));
        }
        // Long axis: the principal direction of largest spread of the vertices.
        Vec3 mean = Vec3::Zero();
        for (const Vec3& v : body.mesh.vertices) mean += v;
        mean /= double(body.mesh.vertices.size());
        Eigen::Matrix3d cov = Eigen::Matrix3d::Zero();
        for (const Vec3& v : body.mesh.vertices) cov += (v - mean) * (v - mean).transpose();
        Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d> eig(cov);
        layout.body_axis = eig.eigenvectors().col(2);
        return layout;
    }
    bool voltage = false, current = false;
    for (std::size_t e = 0; e < baseline.electrodes.size(); ++e) {
        const ElectrodeDrive d = baseline.electrodes[e].drive;
        if (d != ElectrodeDrive::floating && d != ElectrodeDrive::fixed_potential) continue;
        // A perfectly conducting object that stays carries a floating electrode too; it is no sensor.
        if (baseline.electrodes[e].name.rfind(kObjectElectrodePrefix, 0) == 0) continue;
        (d == ElectrodeDrive::floating ? voltage : current) = true;
        layout.electrodes.push_back(static_cast<int>(e));
        layout.names.push_back(baseline.electrodes[e].name);
        Vec3 centre = Vec3::Zero();
        double area = 0;
        for (std::size_t t = 0; t < body.mesh.size(); ++t)
            if (body.panel_electrode[t] == static_cast<int>(e))
                centre += body.mesh.area(t) * body.mesh.centroid(t), area += body.mesh.area(t);
        layout.position.push_back(centre / area);
    }
    if (layout.electrodes.empty()) throw InputError(where + ": the robot has no sensor electrodes to read");
    if (voltage && current)
        throw InputError(where + ": a sweep reads one kind of sensor; this robot has both floating "
                                 "(voltage) and fixed-potential (current) sensors");
    layout.units = voltage ? "V" : "A";
    if (spec.sweep && spec.sweep->electrode_pairs) {
        if (layout.electrodes.size() < 2) throw InputError(where + ": pairs of sensor electrodes need at least two sensors");
        layout.pairs = true;
        std::vector<std::string> names;
        std::vector<Vec3> position;
        for (std::size_t k = 0; k + 1 < layout.electrodes.size(); ++k) {
            names.push_back(layout.names[k + 1] + "-" + layout.names[k]);
            position.push_back(0.5 * (layout.position[k] + layout.position[k + 1]));
        }
        layout.names = names;
        layout.position = position;
    }
    return layout;
}

template <class S>
std::vector<S> sensor_readings(const SensorLayout& sensors, const Scene<S>& scene, const Solution<S>& solution,
                               const QuadratureOptions& quad) {
    std::vector<S> out;
    if (sensors.probes) {
        Eigen::Matrix3Xd points(3, sensors.size());
        for (std::size_t k = 0; k < sensors.size(); ++k) points.col(k) = sensors.position[k];
        const auto phi = potential_at(scene, solution, points, quad);
        return std::vector<S>(phi.data(), phi.data() + phi.size());
    }
    if (sensors.skin) {
        const auto& skin = solution.surfaces.front();
        for (Eigen::Index k = 0; k < skin.outer_potential.size(); ++k)
            out.push_back(skin.inner_potential(k) - skin.outer_potential(k));
        return out;
    }
    for (int e : sensors.electrodes)
        out.push_back(sensors.units == "V" ? solution.electrode_potential[e] : solution.electrode_current[e]);
    if (sensors.pairs) {
        std::vector<S> differences;
        for (std::size_t k = 0; k + 1 < out.size(); ++k) differences.push_back(out[k + 1] - out[k]);
        return differences;
    }
    return out;
}

template <class S>
ImageSummary summarize_image(const SensorLayout& sensors, const std::vector<S>& change) {
    ImageSummary s;
    for (std::size_t k = 0; k < change.size(); ++k)
        if (std::abs(change[k]) > s.peak) s.peak = std::abs(change[k]), s.peak_sensor = k;
    if (!sensors.skin || s.peak == 0) return s;
    double lo = INFINITY, hi = -INFINITY;
    for (std::size_t k = 0; k < change.size(); ++k)
        if (std::abs(change[k]) >= 0.5 * s.peak) {
            const double x = sensors.position[k].dot(sensors.body_axis);
            lo = std::min(lo, x), hi = std::max(hi, x);
        }
    s.width = hi - lo;
    return s;
}

template SensorLayout sensor_layout(const CaseSpec&, const Scene<double>&, const std::string&);
template SensorLayout sensor_layout(const CaseSpec&, const Scene<Complex>&, const std::string&);
template std::vector<double> sensor_readings(const SensorLayout&, const Scene<double>&, const Solution<double>&,
                                             const QuadratureOptions&);
template std::vector<Complex> sensor_readings(const SensorLayout&, const Scene<Complex>&, const Solution<Complex>&,
                                              const QuadratureOptions&);
template ImageSummary summarize_image(const SensorLayout&, const std::vector<double>&);
template ImageSummary summarize_image(const SensorLayout&, const std::vector<Complex>&);

}  // namespace murk
