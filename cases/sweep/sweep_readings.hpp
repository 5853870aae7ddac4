#pragma once
// What the sensors read at one sweep point, as a change from the baseline: the
// transdermal voltage of every skin panel of a fish, or the reading of every
// sensor electrode of a robot (potential of a floating sensor, current of a
// fixed-potential sensor), or, in a case without a body, the potential at every
// probe point. Plus the peak and the image width.
#include "cases/input/case_spec.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/scene.hpp"

#include <string>
#include <vector>

namespace murk {

struct SensorLayout {
    bool skin = false;                   // fish: one sensor per skin panel
    bool probes = false;                 // no body: one sensor per probe point
    std::vector<int> electrodes;         // robot: sensor electrode indices
    bool pairs = false;                  // robot: channel k reads electrode k+1 minus electrode k
    std::vector<std::string> names;      // robot: sensor names
    std::string units;                   // "V" or "A"
    std::vector<Vec3> position;          // panel centroid, or electrode centre
    std::vector<double> area;            // skin panel area (m2); empty for robots
    Vec3 body_axis = Vec3::UnitX();      // long axis of the body (image width)
    std::size_t size() const { return position.size(); }
};

// Sensors of the case: the body's (surface 0 of the baseline scene), or the
// probe points when the case has no body. A robot with no sensor electrodes, or
// with both voltage and current sensors, is an InputError (one map holds one
// kind of reading).
// With spec.sweep->electrode_pairs a robot's channels are the differences of
// neighbouring sensor electrodes (in case order), as a differential amplifier reads them.
template <class S>
SensorLayout sensor_layout(const CaseSpec& spec, const Scene<S>& baseline, const std::string& where);

template <class S>
std::vector<S> sensor_readings(const SensorLayout& sensors, const Scene<S>& scene, const Solution<S>& solution,
                               const QuadratureOptions& quad);

struct ImageSummary {
    double peak = 0;          // largest |change|
    std::size_t peak_sensor = 0;
    double width = 0;         // m, full width at half maximum along the body axis (skin only)
};

// Full width at half maximum: the extent along the body axis of the skin panels
// whose |change| is at least half the peak (on every side of the body).
template <class S>
ImageSummary summarize_image(const SensorLayout& sensors, const std::vector<S>& change);

}  // namespace murk
