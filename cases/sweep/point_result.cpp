#include "cases/sweep/point_result.hpp"

#include <cmath>
#include <stdexcept>
#include <string>

namespace murk {

template <class S>
PointResult<S> computed_point(std::size_t point, const Vec3& centre, std::vector<S> reading, PathCode path,
                              const SweepBaselines<S>& baselines, std::size_t water) {
    PointResult<S> r;
    r.point = point;
    r.centre = centre;
    r.path = path;
    r.change = std::move(reading);
    const std::vector<S>& base = baselines.waters[water].readings;
    for (std::size_t k = 0; k < r.change.size(); ++k) {
        r.change[k] -= base[k];
        // Nothing that is not a number is written: the run stops, keeping what is done.
        if (!std::isfinite(std::abs(r.change[k])))
            throw std::runtime_error("sweep point " + std::to_string(point) + " gave a value that is not finite at "
                                     "sensor " + std::to_string(k) + "; the case's quantities are out of the range "
                                     "the solver can represent");
    }
    r.image = summarize_image(baselines.sensors, r.change);
    if (baselines.noise) {
        r.snr = detectability_index(baselines.noise->model, r.change, baselines.noise->receptors);
        r.detection_probability = detection_probability(r.snr, baselines.noise->false_alarm_probability);
    }
    return r;
}

template PointResult<double> computed_point(std::size_t, const Vec3&, std::vector<double>, PathCode,
                                            const SweepBaselines<double>&, std::size_t);
template PointResult<Complex> computed_point(std::size_t, const Vec3&, std::vector<Complex>, PathCode,
                                             const SweepBaselines<Complex>&, std::size_t);

}  // namespace murk
