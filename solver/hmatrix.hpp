#pragma once
// A hierarchical matrix (H-matrix): a square matrix whose rows and columns both
// belong to points in space, stored block by block over a cluster tree. Blocks
// of clusters far apart compared with their size (the standard admissibility
// condition min(diam) <= eta * dist) hold a smooth kernel and are stored as low
// rank products U V^T, found by adaptive cross approximation from a few of their
// rows and columns and then recompressed; the other blocks are stored dense
// (Bebendorf 2008, "Hierarchical Matrices"; Hackbusch 2015, "Hierarchical
// Matrices: Algorithms and Analysis"). Memory and a product with a vector cost
// about N log N instead of N^2.
//
// The matrix is never formed: `entries` computes any sub-block on request. It is
// called from several threads at once and must be safe to call so.
#include "solver/bem_system.hpp"
#include "solver/cluster_tree.hpp"
#include "solver/tree_operator.hpp"

#include <functional>
#include <memory>
#include <vector>

namespace murk {

// Fills out (rows.size() x cols.size(), already sized) with A(rows[i], cols[j]).
// Indices are the caller's (original) numbering.
template <class S>
using BlockEntries =
    std::function<void(const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols, MatrixX<S>& out)>;

struct HMatrixOptions {
    Eigen::Index leaf_size = 64;  // largest cluster that is not split
    double eta = 2.0;             // admissible when min(diam) <= eta * dist
    double tolerance = 1e-8;      // relative accuracy of every low-rank block (Frobenius)
};

struct HMatrixStats {
    std::size_t dense_blocks = 0, low_rank_blocks = 0;
    std::size_t bytes = 0;       // stored entries of all blocks
    int max_rank = 0;
    double mean_rank = 0;        // over low-rank blocks
    double build_seconds = 0;
    double compression() const;  // bytes / bytes of the dense matrix (filled in by HMatrix)
    double dense_bytes = 0;
};

// A stored block: rows row_begin.. and columns col_begin.. are positions in the
// cluster tree's order. A low-rank block is u * v^T (transpose, no conjugation),
// a dense one is `dense`.
template <class S>
struct HMatrixBlock {
    Eigen::Index row_begin = 0, rows = 0, col_begin = 0, cols = 0;
    bool low_rank = false;
    MatrixX<S> dense, u, v;
};

// Truncates u v^T in place to the fewest terms whose dropped singular values
// have a Frobenius norm of at most `tolerance` times the whole product's
// (QR of both factors, then an SVD of the small core).
template <class S>
void recompress_low_rank(MatrixX<S>& u, MatrixX<S>& v, double tolerance);
// The same truncation when q has orthonormal columns already (q^H q = I, as a
// range finder's basis has): only v is factored, in place, so that no more than
// one further matrix of v's size is held.
template <class S>
void truncate_orthonormal(MatrixX<S>& q, MatrixX<S>& v, double tolerance);
// The same truncation for loose tolerances (kGramTruncationFrom and above),
// holding nothing beyond q and v: the singular values are the square roots of
// the eigenvalues of the small Gram matrix v^H v, and q and v are multiplied in
// place by its kept eigenvectors. Squaring the singular values limits them to
// about 1e-8 of the largest (double rounding, 1e-16, under the root), so this
// is for tolerances well above that, as a preconditioner's are.
constexpr double kGramTruncationFrom = 1e-6;
template <class S>
void truncate_orthonormal_gram(MatrixX<S>& q, MatrixX<S>& v, double tolerance);

template <class S>
class HMatrix : public TreeOperator<S> {
public:
    // Rows and columns are both numbered by the columns of `points` (row i and
    // column i lie at points.col(i)).
    HMatrix(const Eigen::Matrix3Xd& points, const BlockEntries<S>& entries, const HMatrixOptions& options);
    // On a tree built already (options.leaf_size unused), so that several
    // matrices over the same points share one block structure.
    HMatrix(ClusterTree tree, const BlockEntries<S>& entries, const HMatrixOptions& options);

    Eigen::Index size() const override;
    // y = A x and y = A^T x (transpose, no conjugation), in the original numbering.
    VectorX<S> apply(const VectorX<S>& x) const;
    VectorX<S> apply_transposed(const VectorX<S>& x) const;
    // The same for every column of x at once (each stored block read once).
    MatrixX<S> apply(const MatrixX<S>& x) const;
    MatrixX<S> apply_transposed(const MatrixX<S>& x) const;
    // The whole matrix (for tests on small sizes).
    MatrixX<S> to_dense() const;
    const ClusterTree& tree() const override;
    // Products and copies of any region (TreeOperator); the stored blocks that
    // meet it contribute their overlapping parts.
    void region_product(const Region& region, const MatrixX<S>& x, bool transposed, MatrixX<S>& out) const override;
    MatrixX<S> region_dense(const Region& region) const override;
    const HMatrixStats& stats() const;
    // The stored blocks, which tile the matrix; each lies inside one pair of
    // cluster-tree nodes that the block tree visited (for tests and reports).
    const std::vector<HMatrixBlock<S>>& blocks() const;

private:
    struct Impl;
    std::shared_ptr<const Impl> impl_;
};

extern template void recompress_low_rank(MatrixX<double>&, MatrixX<double>&, double);
extern template void recompress_low_rank(MatrixX<Complex>&, MatrixX<Complex>&, double);
extern template void truncate_orthonormal(MatrixX<double>&, MatrixX<double>&, double);
extern template void truncate_orthonormal(MatrixX<Complex>&, MatrixX<Complex>&, double);
extern template void truncate_orthonormal_gram(MatrixX<double>&, MatrixX<double>&, double);
extern template void truncate_orthonormal_gram(MatrixX<Complex>&, MatrixX<Complex>&, double);
extern template class HMatrix<double>;
extern template class HMatrix<Complex>;

}  // namespace murk
