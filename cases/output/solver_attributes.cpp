#include "cases/output/solver_attributes.hpp"

#include <cstdint>
#include <cstdio>

namespace murk {

void write_solver_options(H5Group root, const SolverOptions& options) {
    root.set_attribute("system_solver", solver_name(options.choice));
    root.set_attribute("dense_limit", std::int64_t(options.dense_limit));
    if (options.choice == SystemSolver::dense) return;  // the tolerances mean nothing to a dense LU
    root.set_attribute("compression_tolerance", options.compression_tolerance);
    root.set_attribute("iteration_tolerance", options.iteration_tolerance);
    root.set_attribute("preconditioner_tolerance", options.preconditioner_tolerance);
}

void write_solver_used(H5Group group, const SystemSolverUsed& used) {
    group.set_attribute("system_solver_used", used.solver);
    group.set_attribute("system_iterations", std::int64_t(used.iterations));
    if (used.solver == "compressed") group.set_attribute("compression_ratio", used.compression_ratio);
}

std::string solver_choice_text(const SolverOptions& options, std::size_t unknowns) {
    char buf[320];
    if (uses_compression(options, unknowns))
        std::snprintf(buf, sizeof buf,
                      "compressed operator with an iterative solve, %zu unknowns (solver = \"%s\", dense_limit = %zu, "
                      "compression_tolerance = %g, iteration_tolerance = %g, preconditioner_tolerance = %g)",
                      unknowns, solver_name(options.choice), options.dense_limit, options.compression_tolerance,
                      options.iteration_tolerance, options.preconditioner_tolerance);
    else
        std::snprintf(buf, sizeof buf, "dense LU, %zu unknowns (solver = \"%s\", dense_limit = %zu)", unknowns,
                      solver_name(options.choice), options.dense_limit);
    return buf;
}

}  // namespace murk
