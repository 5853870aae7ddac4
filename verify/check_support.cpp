#include "verify/check_support.hpp"

#include <cmath>

namespace murk {

double observed_order(const CheckResult::Level& coarse, const CheckResult::Level& fine) {
    // error ~ h^p with h ~ panels^(-1/2)
    return std::log(coarse.error / fine.error) / (0.5 * std::log(double(fine.panels) / coarse.panels));
}

namespace verification {

std::vector<int> refinement_levels(const VerifyOptions& options) {
    if (options.quick) return {3};
    return {2, 3, 4};
}

CheckResult refine(CheckResult row, const VerifyOptions& options,
                   const std::function<LevelValue(int level)>& at_level) {
    for (int level : refinement_levels(options)) {
        const LevelValue v = at_level(level);
        row.computed = v.computed;
        row.reference = v.reference;
        row.relative_error = v.error;
        row.panels = v.panels;
        row.convergence.push_back({v.panels, v.error});
    }
    if (options.quick) row.convergence.clear();
    return row;
}

}  // namespace verification
}  // namespace murk
