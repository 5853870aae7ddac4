#include "cases/sweep/point_result.hpp"

#include <cmath>
#include <stdexcept>
#include <string>

namespace murk {

template <class S>
PointRating rate_perturbation(const SensorNoise& noise, const std::vector<S>& change, const std::vector<S>& baseline) {
    PointRating rating;
    if (noise.model.channels == NoiseChannels::quadratures) {
        rating.snr = detectability_index(noise.model, change, noise.receptors);
    } else {
        const std::vector<Complex> dv(change.begin(), change.end()), v0(baseline.begin(), baseline.end());
        rating.channels = channel_detectability(noise.model, dv, v0, noise.receptors);
        rating.snr = rating.channels.total();
    }
    rating.detection_probability = detection_probability(rating.snr, noise.false_alarm_probability);
    return rating;
}

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
        const PointRating rating = rate_perturbation(*baselines.noise, r.change, base);
        r.snr = rating.snr;
        r.detection_probability = rating.detection_probability;
    }
    return r;
}

template PointRating rate_perturbation(const SensorNoise&, const std::vector<double>&, const std::vector<double>&);
template PointRating rate_perturbation(const SensorNoise&, const std::vector<Complex>&, const std::vector<Complex>&);
template PointResult<double> computed_point(std::size_t, const Vec3&, std::vector<double>, PathCode,
                                            const SweepBaselines<double>&, std::size_t);
template PointResult<Complex> computed_point(std::size_t, const Vec3&, std::vector<Complex>, PathCode,
                                             const SweepBaselines<Complex>&, std::size_t);

}  // namespace murk
