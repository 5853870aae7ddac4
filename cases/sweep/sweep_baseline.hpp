#pragma once
// Stage `baselines` of murk run: per water conductivity, the fixed part (the
// sensing body and every object the sweep does not move) assembled and factored
// once, its solution and what the sensors read from it. A point's perturbation
// is its reading minus this baseline reading: the change the moving object
// causes in the scene that stays. Also the sensors themselves and the noise
// model that turns a perturbation into a detection probability.
#include "cases/detection/detectability.hpp"
#include "cases/input/case_spec.hpp"
#include "cases/output/solver_attributes.hpp"
#include "cases/sweep/sweep_plan.hpp"
#include "cases/sweep/sweep_readings.hpp"
#include "solver/dipole_path.hpp"
#include "solver/fixed_part.hpp"

#include <memory>
#include <optional>
#include <vector>

namespace murk {

template <class S>
struct WaterBaseline {
    std::unique_ptr<FixedPart<S>> fixed;  // factored; null for method "full"
    Scene<S> unfactored;                  // the fixed part's scene when it is not factored
    Solution<S> solution;
    std::vector<S> readings;              // the sensors' baseline readings
    std::unique_ptr<LeadFields<S>> leads;  // dipole path with a few electrode sensors

    const Scene<S>& scene() const { return fixed ? fixed->scene() : unfactored; }
};

// The noise model of [detection], with what it needs per sensor.
struct SensorNoise {
    NoiseModel model;
    std::vector<double> receptors;  // fish: receptors per skin panel; empty otherwise
    double false_alarm_probability = 0;
    double probability_level = 0;
};

template <class S>
struct SweepBaselines {
    std::vector<WaterBaseline<S>> waters;  // one per fixed part: (water, frequency) pairs, plan.fixed_count()
    SensorLayout sensors;
    std::optional<SensorNoise> noise;      // with [detection]
    double assembly_seconds = 0, factor_seconds = 0;
    std::size_t factor_bytes = 0;          // the largest fixed part's factors
    // The solver of the fixed parts (all waters have the same size, so the same
    // solver), with the most iterations any water's own solve took; dense LU for
    // method "full", which factors nothing.
    SystemSolverUsed solver_used;
};

// The fixed part's scene for each (water, frequency) pair of the plan (meshed and checked, not
// assembled): the body and the objects that stay.
template <class S>
std::vector<Scene<S>> fixed_scenes(const CaseSpec& spec, const SweepPlan& plan);

// Assembles and factors each fixed scene with the case's solver options (solves
// it densely, for method "full"), and
// reads the sensors (sensor_layout of the first scene). Refuses (InputError,
// naming the case line) noise models that do not fit the sensors.
template <class S>
SweepBaselines<S> solve_baselines(const CaseSpec& spec, const SweepPlan& plan, std::vector<Scene<S>> scenes,
                                  SensorLayout sensors, const QuadratureOptions& quad);

extern template std::vector<Scene<double>> fixed_scenes(const CaseSpec&, const SweepPlan&);
extern template std::vector<Scene<Complex>> fixed_scenes(const CaseSpec&, const SweepPlan&);
extern template SweepBaselines<double> solve_baselines(const CaseSpec&, const SweepPlan&, std::vector<Scene<double>>,
                                                       SensorLayout, const QuadratureOptions&);
extern template SweepBaselines<Complex> solve_baselines(const CaseSpec&, const SweepPlan&, std::vector<Scene<Complex>>,
                                                        SensorLayout, const QuadratureOptions&);

}  // namespace murk
