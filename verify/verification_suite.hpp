#pragma once
// The checks of `murk verify`: murk against exact solutions (DEVELOPERS.md, "Physics and
// method" and "Adding a check to `murk verify`").
#include "solver/quadrature_options.hpp"
#include "verify/check_result.hpp"

#include <functional>
#include <vector>

namespace murk {

struct VerifyOptions {
    bool quick = false;           // coarse meshes, no refinement study
    QuadratureOptions quadrature;
};

// Runs every check in a fixed order; `report` is called after each row, so a
// caller can print as the suite goes.
std::vector<CheckResult> run_verification(const VerifyOptions& options,
                                          const std::function<void(const CheckResult&)>& report = {});

}  // namespace murk
