// `murk verify`: the validation table. One row per check, then the line
// "N passed, M failed"; exit status 1 when anything failed.
#include "tools/murk/commands.hpp"
#include "verify/verification_suite.hpp"

#include <chrono>
#include <cstdio>

namespace murk::cli {

namespace {

void print_row(const CheckResult& r) {
    std::printf("%-4s %-46s %-48s %13.6g %13.6g %9.2e %s%-7.1e %6d\n", r.passed() ? "ok" : "FAIL", r.name.c_str(),
                r.source.c_str(), r.reference, r.computed, r.relative_error, r.absolute ? "abs " : "rel ",
                r.tolerance, r.panels);
    if (r.convergence.size() > 1) {
        std::printf("     refinement:");
        for (std::size_t i = 0; i < r.convergence.size(); ++i) {
            std::printf("  %d panels %.2e", r.convergence[i].panels, r.convergence[i].error);
            if (i > 0) std::printf(" (order %.2f)", observed_order(r.convergence[i - 1], r.convergence[i]));
        }
        std::printf("\n");
    }
    std::fflush(stdout);
}

}  // namespace

int verify_command(const VerifyArgs& args) {
    VerifyOptions options;
    options.quick = args.quick;
    options.quadrature.near_ratio = args.near_ratio;
    options.quadrature.far_ratio = args.far_ratio;
    std::printf("murk verify (%s): boundary elements against exact solutions\n",
                args.quick ? "quick, coarse meshes" : "full, with refinement study");
    std::printf("quadrature: closed form below %g panel diameters, 7-point rule below %g, centroid beyond\n",
                options.quadrature.near_ratio, options.quadrature.far_ratio);
    std::printf("%-4s %-46s %-48s %13s %13s %9s %-11s %6s\n", "", "check", "source", "reference", "computed",
                "error", "tolerance", "panels");
    const auto start = std::chrono::steady_clock::now();
    const auto rows = run_verification(options, print_row);
    int passed = 0, failed = 0;
    for (const auto& r : rows) (r.passed() ? passed : failed)++;
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    std::printf("time: %.1f s\n", seconds);
    std::printf("%d passed, %d failed\n", passed, failed);
    return failed == 0 ? 0 : 1;
}

}  // namespace murk::cli
