#pragma once
// The exact solve of a sweep point: a factored fixed part (the body) plus a few
// moving surfaces (the object), without re-assembling or re-factoring the body.
//
// With the unknowns split into fixed (F) and moving (M) ones,
//   A_FF x_F + C_FM x_M = b_F
//   C_MF x_F + A_MM x_M = b_M,
// and x0 = A_FF^-1 b_F the fixed part's own solution, the moving unknowns solve
// the Schur-complement system
//   (A_MM - C_MF A_FF^-1 C_FM) x_M = b_M - C_MF x0,   then x_F = x0 - A_FF^-1 C_FM x_M.
// It is solved by GMRES with A_MM^-1 as right preconditioner: the operator is
// then I - C_MF A_FF^-1 C_FM A_MM^-1, the identity less the object's field
// reflected by the body back onto the object, which is small unless the object
// nearly touches the body, so a few iterations reach 1e-10. Each iteration is
// one triangular solve against the stored body factors (memory-bound, about
// 2 n^2 flops) and two products with the coupling blocks; a batch of points
// shares those solves (solve_coupled_together). Forming the Schur
// complement instead needs A_FF^-1 C_FM, a solve with one right-hand side per
// moving unknown (hundreds), which measured slower (tools/bench_sweep.cpp).
//
// On a compressed fixed part (compressed_system.hpp) a solve against the body
// is itself a preconditioned GMRES of 4-5 steps, and nesting it inside the
// Schur GMRES would pay those steps for every outer one. There each point's
// whole perturbation system
//   [ A_FF  C_FM ] [ x_F - x0 ]   [ 0             ]
//   [ C_MF  A_MM ] [ x_M      ] = [ b_M - C_MF x0 ]
// is solved by one GMRES instead, right-preconditioned by the body's own
// approximate inverse and A_MM^-1: about as many steps as the body alone needs
// (5 at 1e-10), each one blocked product with the body's operator and one with
// its preconditioner for the batch. Its tolerance is the smaller of the
// coupling's and the body's iteration_tolerance, relative to the right-hand
// side above.
//
// Nothing is approximated beyond the discretization: the coupling blocks are
// the same entries the full system has (same quadrature rules and ratios), and
// the result equals the full dense solve up to the GMRES tolerance.
#include "solver/fixed_part.hpp"
#include "solver/gmres.hpp"

#include <Eigen/LU>
#include <vector>

namespace murk {

// The moving surfaces' own diagonal block, factored. It depends only on their
// shapes, sizes, orientations and materials (and the water), not on where they
// are, unless an insulating plane is present (its images move with them); so a
// sweep that only moves an object keeps one MovingBlock for every position.
template <class S>
struct MovingBlock {
    Eigen::Index size = 0;
    Eigen::PartialPivLU<MatrixX<S>> lu;
};

template <class S>
MovingBlock<S> factor_moving_block(const Scene<S>& scene, const std::vector<std::size_t>& moving,
                                   const QuadratureOptions& options);

struct CouplingOptions {
    double tolerance = 1e-10;  // GMRES relative residual of the coupling system
    // Two or three suffice unless the object nearly touches the body
    // (tools/bench_sweep.cpp); a sweep's exact path re-solves a point that
    // has not converged after these as its whole scene.
    int max_iterations = 80;
};

template <class S>
struct CoupledSolution {
    Solution<S> solution;  // the whole scene, as solve_scene would give it
    GmresResult gmres;
};

// `scene` must be fixed.scene() with the surfaces listed in `moving` (and the
// electrodes on them) added, everything else in the same order; a mismatch of
// sizes is a murk::InternalError (geometry/internal_check.hpp). When GMRES does not converge the solution is
// still returned, and gmres.converged says so.
template <class S>
CoupledSolution<S> solve_coupled(const Scene<S>& scene, const std::vector<std::size_t>& moving,
                                 const FixedPart<S>& fixed, const MovingBlock<S>& block,
                                 const QuadratureOptions& options, const CouplingOptions& coupling);

// One point of a batch: its scene (the fixed part's with `moving` added, as for
// solve_coupled) and the moving surfaces' factored block.
template <class S>
struct CoupledProblem {
    const Scene<S>* scene = nullptr;
    std::vector<std::size_t> moving;
    const MovingBlock<S>* block = nullptr;
};

// Several points against one fixed part, their GMRES iterations in step so that
// each step's solves against the body's factors are one blocked solve (reading
// the factors once for the batch). Each point's result depends only on the batch
// it was solved in (its members and their order), not on threads or timing.
// solve_coupled is the batch of one.
template <class S>
std::vector<CoupledSolution<S>> solve_coupled_together(const std::vector<CoupledProblem<S>>& problems,
                                                       const FixedPart<S>& fixed, const QuadratureOptions& options,
                                                       const CouplingOptions& coupling);

}  // namespace murk
