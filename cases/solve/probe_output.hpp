#pragma once
// Potential and field at the case's probe points, without and with the objects
// and their difference, written as
//   /probes/<name>/position          (shape..., 3) m
//   /probes/<name>/{baseline,perturbed,difference}_potential   (shape...) V
//   /probes/<name>/{baseline,perturbed,difference}_field       (shape..., 3) V m-1
// with the shape of each probe (point {1}, line {n}, grid {n_along, n_across}), over the
// probe's coordinates in its group: point (index), or along (and across) in m from its
// first point, and xyz.
#include "cases/input/case_spec.hpp"
#include "cases/output/hdf5_file.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/scene.hpp"

namespace murk {

template <class S>
struct ProbeValues {
    std::vector<S> potential;             // one per probe point
    std::vector<std::array<S, 3>> field;  // one per probe point
};

template <class S>
ProbeValues<S> evaluate_probes(const CaseSpec& spec, const Scene<S>& scene, const Solution<S>& solution,
                               const QuadratureOptions& quad);

template <class S>
void write_probes(H5Group& root, const CaseSpec& spec, const ProbeValues<S>& baseline, const ProbeValues<S>& perturbed);

}  // namespace murk
