#include "verify/check_support.hpp"

#include <cmath>
#include <map>
#include <utility>

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

void add_amplitude_and_phase(const CheckResult& amplitude, const std::string& phase_name,
                             const std::string& phase_quantity, std::complex<double> reference,
                             const VerifyOptions& options,
                             const std::function<std::complex<double>(int level, int& panels)>& computed_at,
                             const std::function<void(CheckResult)>& add) {
    // One computation per level serves both rows.
    std::map<int, std::pair<std::complex<double>, int>> computed;
    const auto at = [&](int level, int& panels) {
        auto it = computed.find(level);
        if (it == computed.end()) {
            int n = 0;
            const std::complex<double> value = computed_at(level, n);
            it = computed.emplace(level, std::make_pair(value, n)).first;
        }
        panels = it->second.second;
        return it->second.first;
    };
    add(refine(amplitude, options, [&](int level) {
        LevelValue v;
        v.computed = std::abs(at(level, v.panels));
        v.reference = std::abs(reference);
        v.error = relative_error(v.computed, v.reference);
        return v;
    }));
    CheckResult phase = amplitude;
    phase.name = phase_name;
    phase.quantity = phase_quantity;
    phase.absolute = true;  // radians
    add(refine(phase, options, [&](int level) {
        LevelValue v;
        v.computed = std::arg(at(level, v.panels));
        v.reference = std::arg(reference);
        v.error = std::abs(v.computed - v.reference);
        return v;
    }));
}

}  // namespace verification
}  // namespace murk
