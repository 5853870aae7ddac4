#pragma once
// How the body's system was solved, written beside the results and printed for
// people (cases/RESULT_LAYOUT.md): the declared choice at the root of every
// result file, and with each solved system the solver it actually got.
#include "cases/output/hdf5_file.hpp"
#include "solver/fixed_part.hpp"
#include "solver/solver_options.hpp"

#include <cstddef>
#include <string>

namespace murk {

// What one system was solved with (FixedPart::report(), or a plain dense solve).
struct SystemSolverUsed {
    std::string solver = "dense";   // "dense" or "compressed"
    int iterations = 0;             // of its own solve; 0 for dense
    double compression_ratio = 1;   // stored / dense bytes of the operator
};

template <class S>
SystemSolverUsed solver_used(const FixedPart<S>& fixed) {
    const auto r = fixed.report();
    return {r.solver, r.baseline_iterations, r.compression_ratio};
}

// Root attributes: system_solver (as declared: auto, dense or compressed),
// dense_limit and, unless the choice is dense, compression_tolerance,
// iteration_tolerance and preconditioner_tolerance.
void write_solver_options(H5Group root, const SolverOptions& options);

// Attributes of a group holding a solved system: system_solver_used,
// system_iterations and, when compressed, compression_ratio.
void write_solver_used(H5Group group, const SystemSolverUsed& used);

// One line for people: "dense LU, 2,400 unknowns (solver = "auto", dense_limit =
// 8000)" or the compressed solver with its tolerances.
std::string solver_choice_text(const SolverOptions& options, std::size_t unknowns);

}  // namespace murk
