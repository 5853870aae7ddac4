#include "verify/verification_suite.hpp"

#include "verify/check_support.hpp"

namespace murk {

std::vector<CheckResult> run_verification(const VerifyOptions& options,
                                          const std::function<void(const CheckResult&)>& report) {
    std::vector<CheckResult> rows;
    const auto add = [&](CheckResult row) {
        if (report) report(row);
        rows.push_back(std::move(row));
    };
    check_sphere_in_uniform_field(options, add);
    check_maxwell_wagner_sphere(options, add);
    check_sphere_beside_point_source(options, add);
    check_membrane_sphere(options, add);
    check_membrane_capacitance(options, add);
    check_spheroids(options, add);
    check_reciprocity(options, add);
    check_insulating_plane(options, add);
    check_shallow_water(options, add);
    check_ring_pair_resistance(options, add);
    check_compressed_sphere(options, add);
    return rows;
}

}  // namespace murk
