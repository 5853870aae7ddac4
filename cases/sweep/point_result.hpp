#pragma once
// What one sweep point produced, as the result file stores it: where the object
// was (or why it had no place), the perturbation at every sensor, its peak and
// width, and how detectable it is.
#include "cases/output/result_layout.hpp"
#include "cases/sweep/sweep_baseline.hpp"
#include "cases/sweep/sweep_readings.hpp"

#include <vector>

namespace murk {

template <class S>
struct PointResult {
    std::size_t point = 0;  // flat index
    MaskReason mask = MaskReason::none;
    Vec3 centre = Vec3::Zero();  // object centre
    std::vector<S> change;       // reading minus baseline, per sensor
    ImageSummary image;
    double snr = 0, detection_probability = 0;
    PathCode path = PathCode::none;
};

// How detectable a perturbation is under the noise model: d' and P_D, and for a
// model that reads amplitude (and phase) changes, the d' of each channel (zero for a
// model that reads both quadratures). `baseline` is the sensors' baseline reading.
struct PointRating {
    double snr = 0, detection_probability = 0;
    ChannelIndex channels;
};
template <class S>
PointRating rate_perturbation(const SensorNoise& noise, const std::vector<S>& change, const std::vector<S>& baseline);

// A computed point: the readings with the object, less the water's baseline
// readings, summarized (peak, image width) and, with a noise model, rated.
template <class S>
PointResult<S> computed_point(std::size_t point, const Vec3& centre, std::vector<S> reading, PathCode path,
                              const SweepBaselines<S>& baselines, std::size_t water);

// A masked point: no values, only the reason.
template <class S>
PointResult<S> masked_point(std::size_t point, MaskReason reason) {
    PointResult<S> r;
    r.point = point;
    r.mask = reason;
    return r;
}

extern template PointRating rate_perturbation(const SensorNoise&, const std::vector<double>&, const std::vector<double>&);
extern template PointRating rate_perturbation(const SensorNoise&, const std::vector<Complex>&, const std::vector<Complex>&);
extern template PointResult<double> computed_point(std::size_t, const Vec3&, std::vector<double>, PathCode,
                                                   const SweepBaselines<double>&, std::size_t);
extern template PointResult<Complex> computed_point(std::size_t, const Vec3&, std::vector<Complex>, PathCode,
                                                    const SweepBaselines<Complex>&, std::size_t);

}  // namespace murk
