#pragma once
// The fixed part's system as a compressed operator with a preconditioned
// iterative solve, for bodies too large for a dense LU (solver_options.hpp says
// when). The matrix is split as
//     [ H  B ] [x_panels    ]
//     [ C  D ] [x_electrodes]
// H (panel unknowns) is stored as its layer kernels, one hierarchical matrix
// each over the panels (layer_operator.hpp, from system_entries.hpp); the
// electrodes' columns B and rows [C D]
// (and a tank's reference unknown and row, solver/tank.hpp) are a thin dense
// border. Solves are restarted GMRES (gmres.hpp), right-preconditioned by an
// approximate inverse of H (hodlr_inverse.hpp: dense leaves of at most
// `preconditioner_block` unknowns, one low-rank block between the halves of
// every larger cluster, accurate to options.preconditioner_tolerance), identity
// on the electrodes: 4 or 5 iterations reach 1e-8 at every size measured. Transposed solves (lead fields) use the transposed operator
// and preconditioner. Read-only after construction: any number of threads may
// solve at once.
#include "solver/bem_system.hpp"
#include "solver/gmres.hpp"
#include "solver/hodlr_inverse.hpp"
#include "solver/layer_operator.hpp"
#include "solver/solver_options.hpp"

#include <Eigen/LU>
#include <memory>
#include <vector>

namespace murk {

template <class S>
class CompressedSystem {
public:
    CompressedSystem(const Scene<S>& scene, const QuadratureOptions& quadrature, const SolverOptions& options);

    Eigen::Index size() const { return size_; }
    const VectorX<S>& rhs() const { return rhs_; }
    // A^-1 b (transposed: A^-T b) for every column of b, to
    // options.iteration_tolerance; `iterations` (optional) receives the most any
    // column took. Not converging within max_iterations is an InternalError (a
    // preconditioner that fails on a checked scene is a defect, not bad input).
    // `tolerance` > 0 replaces options.iteration_tolerance for this call.
    MatrixX<S> solve_columns(const MatrixX<S>& b, bool transposed, int* iterations = nullptr,
                             double tolerance = 0) const;
    // A x (transposed: A^T x) for every column of x.
    MatrixX<S> apply(const MatrixX<S>& x, bool transposed = false) const;
    // M^-1 x (transposed: M^-T x) for every column of x: the preconditioner on
    // the panel unknowns, the identity on the electrodes'.
    MatrixX<S> precondition(const MatrixX<S>& x, bool transposed) const;

    std::size_t bytes() const;                     // operator, border and preconditioner
    const HMatrixStats& operator_stats() const { return h_->stats(); }
    double entries_seconds() const { return entries_seconds_; }        // row sums, border, right-hand side
    double compression_seconds() const { return compression_seconds_; }
    double preconditioner_seconds() const { return preconditioner_seconds_; }
    const HodlrStats& preconditioner_stats() const { return preconditioner_->stats(); }
    // The preconditioner alone, on the panel unknowns (for benchmarks).
    const HodlrInverse<S>& preconditioner() const { return *preconditioner_; }
    Eigen::Index panel_unknowns() const { return panels_; }

    // Panels per leaf of the layer kernels' cluster tree (at most).
    static constexpr Eigen::Index kernel_leaf_panels = 32;
    // Unknowns per dense leaf of the preconditioner (at most).
    static constexpr Eigen::Index preconditioner_block = 512;
    // The preconditioner's factors are stored in single precision (half the
    // memory) from this preconditioner_tolerance up.
    static constexpr double kSinglePrecisionFrom = 1e-5;

private:
    static constexpr int kRestart = 30;
    static constexpr std::size_t kBasisBytes = std::size_t(1) << 30;

    SolverOptions options_;
    Eigen::Index size_ = 0, panels_ = 0;
    std::unique_ptr<LayerOperator<S>> h_;
    MatrixX<S> electrode_columns_;  // panels x electrodes
    MatrixX<S> electrode_rows_;     // electrodes x all unknowns
    VectorX<S> rhs_;
    std::unique_ptr<HodlrInverse<S>> preconditioner_;
    double entries_seconds_ = 0, compression_seconds_ = 0, preconditioner_seconds_ = 0;
};

extern template class CompressedSystem<double>;
extern template class CompressedSystem<Complex>;

}  // namespace murk
