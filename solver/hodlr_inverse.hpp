#pragma once
// An approximate inverse of a matrix stored over a cluster tree (a tree
// operator, tree_operator.hpp: a hierarchical matrix, hmatrix.hpp, or the
// fixed part's layer kernels, layer_operator.hpp), used as the preconditioner
// of the compressed solve: the matrix is coarsened to a hierarchically
// off-diagonal low-rank (HODLR) form over the same cluster tree
// and that form is inverted exactly by the Sherman-Morrison-Woodbury formula,
// node by node from the leaves up (Ambikasaran and Darve 2013, "An O(N log N)
// fast direct solver for partial hierarchically semi-separable matrices",
// J. Sci. Comput. 57).
//
// At a node t with children t1, t2 the matrix is
//     A_t = [ A_1        U_1 V_1^T ]  =  K + U W^T,   K = diag(A_1, A_2),
//           [ U_2 V_2^T  A_2       ]
// each off-diagonal block truncated to the given relative accuracy (a
// randomized range finder on the operator's products with the block, Halko, Martinsson
// and Tropp 2011, "Finding structure with randomness", SIAM Review 53, then the
// truncation of hmatrix.hpp). With Z_i = A_i^-1 U_i,
//     A_t^-1 = K^-1 - Z S^-1 W^T K^-1,   S = [ I          V_1^T Z_2 ]
//                                            [ V_2^T Z_1  I         ],
// and the leaves (clusters of at most `leaf_size` unknowns) are dense, inverted
// explicitly (one pass to apply, where LU solves take two). A
// solve costs about (leaf_size + 4 r log2(n / leaf_size)) n operations for
// ranks r. Loose accuracy gives a cheap preconditioner; tight accuracy makes
// it nearly the inverse, so that the iterative solve needs one or two steps.
// With no off-diagonal part at all (rank 0) it is block Jacobi on the leaves.
//
// Read-only after construction: any number of threads may solve at once.
// Deterministic: the random test matrices are seeded by node, and no sum
// depends on the threads.
#include "solver/hmatrix.hpp"
#include "solver/tree_operator.hpp"

#include <memory>

namespace murk {

struct HodlrOptions {
    Eigen::Index leaf_size = 512;  // clusters of at most this many unknowns are dense
    double tolerance = 1e-2;       // relative Frobenius accuracy of each off-diagonal block
    // An off-diagonal block is cut at this rank whatever its accuracy. At
    // 91,580 unknowns and tolerance 1e-4 the top blocks reach 386-392; cut at
    // 300 (five blocks cut) the iterations stayed at 4-5 and the set-up peak
    // fell by 0.2 GiB (build/murk-bench-large, 2026-12-04).
    Eigen::Index max_rank = 300;
    // Store the leaves' inverses and the Z and V factors in single precision
    // (half the memory; still applied in the working precision). Rounding them
    // adds a relative error of about 1e-7, so only for tolerances well above it.
    bool single_precision = false;
};

struct HodlrStats {
    std::size_t leaves = 0;
    std::size_t bytes = 0;  // leaf inverses and the Z and V factors, as stored
    int max_rank = 0;       // largest off-diagonal rank kept
    int capped_blocks = 0;  // off-diagonal blocks cut at max_rank before reaching the tolerance
    double seconds = 0;
};

template <class S>
class HodlrInverse {
public:
    HodlrInverse(const TreeOperator<S>& matrix, const HodlrOptions& options);
    // M^-1 x (transposed: M^-T x, no conjugation) for every column of x, in the
    // matrix's original numbering.
    MatrixX<S> solve(const MatrixX<S>& x, bool transposed) const;
    const HodlrStats& stats() const;

private:
    struct Impl;
    std::shared_ptr<const Impl> impl_;
};

extern template class HodlrInverse<double>;
extern template class HodlrInverse<Complex>;

}  // namespace murk
