#pragma once
// How the fixed part's system is solved: a dense LU, or a compressed
// (hierarchical-matrix) operator with a preconditioned iterative solve. Dense is
// exact to rounding and fastest for small bodies; its memory grows as the square
// of the unknowns and its time as the cube, so large bodies are compressed.
// Declared, printed and written to every result file, like QuadratureOptions.
#include <cstddef>
#include <string>

namespace murk {

enum class SystemSolver { automatic, dense, compressed };

struct SolverOptions {
    SystemSolver choice = SystemSolver::automatic;
    // automatic: dense up to this many unknowns, compressed above.
    std::size_t dense_limit = 16000;
    // Relative accuracy of each compressed block (adaptive cross approximation
    // stopped, and then recompressed, at this fraction of the block's norm).
    double compression_tolerance = 1e-7;
    // The iterative solve stops at this relative residual |b - A x| / |b|.
    double iteration_tolerance = 1e-10;
    // Relative accuracy of the off-diagonal blocks of the preconditioner's
    // approximate inverse (hodlr_inverse.hpp): tighter costs more set-up and
    // memory and saves iterations.
    double preconditioner_tolerance = 1e-4;
    int max_iterations = 400;
};

// Whether a system of `unknowns` unknowns is compressed under `options`.
inline bool uses_compression(const SolverOptions& options, std::size_t unknowns) {
    return options.choice == SystemSolver::compressed ||
           (options.choice == SystemSolver::automatic && unknowns > options.dense_limit);
}

inline const char* solver_name(SystemSolver s) {
    return s == SystemSolver::dense ? "dense" : s == SystemSolver::compressed ? "compressed" : "auto";
}

}  // namespace murk
