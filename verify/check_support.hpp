#pragma once
// Shared pieces of the verification checks: scene builders for single objects
// and the refinement loop that turns a per-level computation into a CheckResult.
#include "geometry/mesh.hpp"
#include "solver/bem_system.hpp"
#include "verify/check_result.hpp"
#include "verify/verification_suite.hpp"

#include <complex>
#include <functional>
#include <string>

namespace murk::verification {

// Relative error of a (possibly complex) computed value against a reference.
template <class S>
double relative_error(S computed, S reference) {
    return std::abs(computed - reference) / std::abs(reference);
}

// Mesh refinement levels: the number of times the icosahedron is subdivided
// (3 -> 1280 panels, 4 -> 5120). Quick runs use one coarse level.
std::vector<int> refinement_levels(const VerifyOptions& options);

// What one level of a check computes.
struct LevelValue {
    double computed = 0, reference = 0, error = 0;
    int panels = 0;
};

// Runs `at_level` on every refinement level and reports the finest.
CheckResult refine(CheckResult row, const VerifyOptions& options, const std::function<LevelValue(int level)>& at_level);

// A complex quantity checked as two rows from one computation per level: its
// amplitude (relative error, `amplitude` as given) and its phase in radians
// (absolute error, same tolerance, named `phase_name` and `phase_quantity`).
// The frequency checks (Maxwell-Wagner sphere, membrane capacitance) use it.
void add_amplitude_and_phase(const CheckResult& amplitude, const std::string& phase_name,
                             const std::string& phase_quantity, std::complex<double> reference,
                             const VerifyOptions& options,
                             const std::function<std::complex<double>(int level, int& panels)>& computed_at,
                             const std::function<void(CheckResult)>& add);

// A single closed surface in a scene with the given interface.
template <class S>
Surface<S> contact_surface(TriangleMesh mesh, S sigma_in) {
    Surface<S> s;
    s.mesh = std::move(mesh);
    s.kind = InterfaceKind::contact;
    s.inner_conductivity = sigma_in;
    return s;
}

template <class S>
Surface<S> sealed_surface(TriangleMesh mesh, int electrode) {
    Surface<S> s;
    s.panel_electrode.assign(mesh.size(), electrode);
    s.mesh = std::move(mesh);
    s.kind = InterfaceKind::sealed;
    return s;
}

}  // namespace murk::verification

namespace murk {
// The check families, one file each.
void check_sphere_in_uniform_field(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_sphere_beside_point_source(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_membrane_sphere(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_spheroids(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_reciprocity(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_insulating_plane(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_shallow_water(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_ring_pair_resistance(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_compressed_sphere(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_maxwell_wagner_sphere(const VerifyOptions&, const std::function<void(CheckResult)>& add);
void check_membrane_capacitance(const VerifyOptions&, const std::function<void(CheckResult)>& add);
}  // namespace murk
