#pragma once
// One row of `murk verify`: a computed quantity against its published reference.
#include <string>
#include <vector>

namespace murk {

struct CheckResult {
    std::string name;       // short, unique
    std::string source;     // where the reference comes from
    std::string quantity;   // what is compared, with its unit
    double reference = 0;   // magnitude where the quantity is complex
    double computed = 0;
    double relative_error = 0;
    double tolerance = 0;   // pass when relative_error <= tolerance
    bool absolute = false;  // the error column is |computed - reference| (a slope), not relative
    int panels = 0;         // panels on the finest surface of the check
    bool passed() const { return relative_error <= tolerance; }

    // Refinement study (full run only): panels per surface and relative error.
    struct Level { int panels; double error; };
    std::vector<Level> convergence;
};

// Observed order of convergence between two levels, in powers of the panel size
// h ~ panels^(-1/2).
double observed_order(const CheckResult::Level& coarse, const CheckResult::Level& fine);

}  // namespace murk
