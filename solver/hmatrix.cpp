// The hierarchical matrix of hmatrix.hpp: block tree by the standard
// admissibility condition, dense near-field blocks, far-field blocks by adaptive
// cross approximation with a guard against stopping early, then recompressed by
// a truncated SVD (Bebendorf 2008, "Hierarchical Matrices", chapters 1 and 3;
// Grasedyck 2005, "Adaptive recompression of H-matrices for BEM", Computing 74;
// Hackbusch 2015, "Hierarchical Matrices: Algorithms and Analysis").
#include "geometry/eigen_core.hpp"
#include "solver/hmatrix.hpp"

#include "geometry/internal_check.hpp"

#include <Eigen/QR>
#include <Eigen/Eigenvalues>
#include <Eigen/SVD>

#include <chrono>
#include <cmath>
#include <exception>
#include <limits>
#include <random>

#include <omp.h>

namespace murk {

double HMatrixStats::compression() const { return dense_bytes > 0 ? double(bytes) / dense_bytes : 0.0; }

namespace {

template <class S>
using Block = HMatrixBlock<S>;

// The leaves of the block tree over (row node, column node).
template <class S>
void collect_blocks(const ClusterTree& tree, int t, int s, double eta, std::vector<Block<S>>& blocks) {
    const ClusterTree::Node& a = tree.nodes[t];
    const ClusterTree::Node& b = tree.nodes[s];
    const double distance = box_distance(a, b);
    const bool admissible = distance > 0 && std::min(a.diameter(), b.diameter()) <= eta * distance;
    if (admissible || a.is_leaf() || b.is_leaf()) {
        Block<S> block;
        block.row_begin = a.begin;
        block.rows = a.size();
        block.col_begin = b.begin;
        block.cols = b.size();
        block.low_rank = admissible;
        blocks.push_back(std::move(block));
        return;
    }
    for (int ta : {a.first_child, a.second_child})
        for (int sb : {b.first_child, b.second_child}) collect_blocks(tree, ta, sb, eta, blocks);
}

// Adaptive cross approximation with partial pivoting (Bebendorf 2008, section
// 3.4): the block A (m x n) is approached by a sum of crosses u_k v_k^T, each made
// from one row and one column of the remainder R_k = A - S_k, the row chosen
// where the last column was largest. Made reliable for collocation matrices,
// whose blocks may have zero rows, zero columns or be entirely zero:
//  - a row is never used twice; a row whose remainder is (numerically) zero gives
//    no cross, and the search moves on to another unused row;
//  - the usual stop, |u_k| |v_k| <= tol |S_k|_F, and every zero row, is only
//    accepted after the remainder has been sampled on a few random unused rows
//    and columns and their estimate of |R_k|_F also meets the tolerance (the
//    same aim as the reference row and column of ACA+, Grasedyck 2005); if it
//    does not, the largest sampled entry's row is the next pivot row.
// An entirely zero block thus ends with rank 0 after a handful of rows and
// columns. Returns false when the rank would exceed three quarters of
// min(m, n): the block is then cheaper dense. (The cross approximation's rank
// overshoots the recompressed one, so a block whose crosses pass half its size
// can still recompress to less; fill() decides by the recompressed rank.)
template <class S>
class CrossApproximation {
public:
    CrossApproximation(const BlockEntries<S>& entries, std::vector<Eigen::Index> rows, std::vector<Eigen::Index> cols,
                       double tolerance, unsigned seed)
        : entries_(entries), rows_(std::move(rows)), cols_(std::move(cols)), tolerance_(tolerance), random_(seed) {
        const Eigen::Index m = Eigen::Index(rows_.size()), n = Eigen::Index(cols_.size());
        max_rank_ = 3 * std::min(m, n) / 4;
        u_.resize(m, max_rank_ + 1);
        v_.resize(n, max_rank_ + 1);
        row_used_.assign(std::size_t(m), false);
        col_used_.assign(std::size_t(n), false);
    }

    bool run() {
        Eigen::Index next_row = 0;  // the first row of the block (Bebendorf 2008)
        while (next_row >= 0) {
            const VectorX<S> row = remainder_row(next_row);
            row_used_[std::size_t(next_row)] = true;
            const Eigen::Index j = largest_unused(row, col_used_);
            if (j < 0 || std::abs(row(j)) <= zero_level()) {
                next_row = row_to_continue();
                continue;
            }
            const VectorX<S> col = remainder_col(j);
            col_used_[std::size_t(j)] = true;
            if (rank_ == max_rank_) return false;
            add_cross(col / row(j), row);
            const VectorX<S> u = u_.col(rank_ - 1);
            if (u.norm() * v_.col(rank_ - 1).norm() <= tolerance_ * std::sqrt(approximant_norm2_))
                next_row = row_to_continue();
            else
                next_row = largest_unused(u, row_used_);
        }
        return true;
    }

    Eigen::Index rank() const { return rank_; }
    MatrixX<S> u() const { return u_.leftCols(rank_); }
    MatrixX<S> v() const { return v_.leftCols(rank_); }

private:
    static constexpr int samples = 3;  // random rows and as many columns per check

    VectorX<S> remainder_row(Eigen::Index i) {
        MatrixX<S> out(1, Eigen::Index(cols_.size()));
        entries_({rows_[std::size_t(i)]}, cols_, out);
        note_scale(out);
        return out.row(0).transpose() - v_.leftCols(rank_) * u_.row(i).head(rank_).transpose();
    }
    VectorX<S> remainder_col(Eigen::Index j) {
        MatrixX<S> out(Eigen::Index(rows_.size()), 1);
        entries_(rows_, {cols_[std::size_t(j)]}, out);
        note_scale(out);
        return out.col(0) - u_.leftCols(rank_) * v_.row(j).head(rank_).transpose();
    }
    void note_scale(const MatrixX<S>& values) {
        if (values.size() > 0) scale_ = std::max(scale_, values.cwiseAbs().maxCoeff());
    }
    // Below this an entry of the remainder is rounding noise of the entries seen.
    double zero_level() const { return 64 * std::numeric_limits<double>::epsilon() * scale_; }

    static Eigen::Index largest_unused(const VectorX<S>& values, const std::vector<bool>& used) {
        Eigen::Index best = -1;
        double best_value = -1;
        for (Eigen::Index i = 0; i < values.size(); ++i)
            if (!used[std::size_t(i)] && std::abs(values(i)) > best_value) {
                best = i;
                best_value = std::abs(values(i));
            }
        return best;
    }

    void add_cross(const VectorX<S>& u, const VectorX<S>& v) {
        // |S_k|_F^2 = |S_{k-1}|_F^2 + 2 Re sum_l (u_k^H u_l)(v_k^H v_l) + |u_k|^2 |v_k|^2
        double cross_terms = 0;
        for (Eigen::Index l = 0; l < rank_; ++l)
            cross_terms += std::real(u.dot(u_.col(l)) * v.dot(v_.col(l)));
        approximant_norm2_ = std::max(0.0, approximant_norm2_ + 2 * cross_terms + u.squaredNorm() * v.squaredNorm());
        u_.col(rank_) = u;
        v_.col(rank_) = v;
        ++rank_;
    }

    static std::vector<Eigen::Index> unused(const std::vector<bool>& used) {
        std::vector<Eigen::Index> list;
        for (std::size_t i = 0; i < used.size(); ++i)
            if (!used[i]) list.push_back(Eigen::Index(i));
        return list;
    }
    std::vector<Eigen::Index> pick(std::vector<Eigen::Index> from) {
        const std::size_t count = std::min<std::size_t>(samples, from.size());
        for (std::size_t k = 0; k < count; ++k) {
            std::uniform_int_distribution<std::size_t> draw(k, from.size() - 1);
            std::swap(from[k], from[draw(random_)]);
        }
        from.resize(count);
        return from;
    }

    // The stopping check: -1 when the remainder sampled on random unused rows and
    // columns is within the tolerance (or no unused row or column is left), else
    // the unused row through the largest sampled entry.
    Eigen::Index row_to_continue() {
        const std::vector<Eigen::Index> free_rows = unused(row_used_), free_cols = unused(col_used_);
        if (free_rows.empty() || free_cols.empty()) return -1;
        double largest = 0, row_estimate2 = 0, col_estimate2 = 0;
        Eigen::Index best_row = -1;
        const std::vector<Eigen::Index> sample_rows = pick(free_rows), sample_cols = pick(free_cols);
        for (Eigen::Index i : sample_rows) {
            const VectorX<S> row = remainder_row(i);
            row_estimate2 += row.squaredNorm();
            const Eigen::Index j = largest_unused(row, col_used_);
            if (std::abs(row(j)) > largest) {
                largest = std::abs(row(j));
                best_row = i;
            }
        }
        for (Eigen::Index j : sample_cols) {
            const VectorX<S> col = remainder_col(j);
            col_estimate2 += col.squaredNorm();
            const Eigen::Index i = largest_unused(col, row_used_);
            if (i >= 0 && std::abs(col(i)) > largest) {
                largest = std::abs(col(i));
                best_row = i;
            }
        }
        // The remainder lives on the unused rows and columns only (it vanishes on
        // the pivot rows and columns): scale the samples' share up to all of them.
        const double estimate2 =
            std::max(row_estimate2 * double(free_rows.size()) / double(sample_rows.size()),
                     col_estimate2 * double(free_cols.size()) / double(sample_cols.size()));
        if (largest <= zero_level()) return -1;
        if (std::sqrt(estimate2) <= tolerance_ * std::sqrt(approximant_norm2_)) return -1;
        return best_row;
    }

    const BlockEntries<S>& entries_;
    std::vector<Eigen::Index> rows_, cols_;
    double tolerance_;
    std::mt19937 random_;
    Eigen::Index max_rank_ = 0, rank_ = 0;
    MatrixX<S> u_, v_;
    std::vector<bool> row_used_, col_used_;
    double approximant_norm2_ = 0, scale_ = 0;
};

}  // namespace

// Recompression of u v^T (Bebendorf 2008, section 1.1.5; Grasedyck 2005): with
// u = Q_u R_u and v = Q_v R_v, the SVD R_u R_v^T = W Sigma Z^H gives
// u v^T = (Q_u W Sigma)(Q_v conj(Z))^T. Truncation rule: keep the fewest singular
// values r such that the dropped ones satisfy
// sqrt(sum_{l>r} sigma_l^2) <= tolerance * sqrt(sum_l sigma_l^2),
// i.e. the same relative Frobenius accuracy the cross approximation aims at.
namespace {

// The rank that keeps all but a relative Frobenius share `tolerance` of the
// singular values `sigma` (descending).
Eigen::Index kept_rank(const Eigen::VectorXd& sigma, double tolerance) {
    const double total2 = sigma.squaredNorm();
    Eigen::Index r = sigma.size();
    double dropped2 = 0;
    while (r > 0 && dropped2 + sigma(r - 1) * sigma(r - 1) <= tolerance * tolerance * total2) {
        dropped2 += sigma(r - 1) * sigma(r - 1);
        --r;
    }
    return r;
}

// a := a m (m has no more columns than a), by chunks of rows so that beyond a
// only one chunk is held; shrinking a's columns afterwards reallocates in place.
template <class S>
void multiply_in_place(MatrixX<S>& a, const MatrixX<S>& m) {
    constexpr Eigen::Index chunk = 256;
    const Eigen::Index r = m.cols();
    for (Eigen::Index i = 0; i < a.rows(); i += chunk) {
        const Eigen::Index h = std::min(chunk, a.rows() - i);
        const MatrixX<S> rows = a.middleRows(i, h) * m;
        a.block(i, 0, h, r) = rows;
    }
    a.conservativeResize(Eigen::NoChange, r);
}

}  // namespace

template <class S>
void recompress_low_rank(MatrixX<S>& u, MatrixX<S>& v, double tolerance) {
    const Eigen::Index k = u.cols();
    if (k == 0) return;
    const Eigen::HouseholderQR<MatrixX<S>> qr_u(u), qr_v(v);
    const MatrixX<S> q_u = qr_u.householderQ() * MatrixX<S>::Identity(u.rows(), k);
    const MatrixX<S> q_v = qr_v.householderQ() * MatrixX<S>::Identity(v.rows(), k);
    const MatrixX<S> r_u = qr_u.matrixQR().topRows(k).template triangularView<Eigen::Upper>();
    const MatrixX<S> r_v = qr_v.matrixQR().topRows(k).template triangularView<Eigen::Upper>();
    const Eigen::BDCSVD<MatrixX<S>> svd(r_u * r_v.transpose(), Eigen::ComputeFullU | Eigen::ComputeFullV);
    const Eigen::VectorXd& sigma = svd.singularValues();
    const Eigen::Index r = kept_rank(sigma, tolerance);
    u = q_u * (svd.matrixU().leftCols(r) * sigma.head(r).asDiagonal());
    v = q_v * svd.matrixV().leftCols(r).conjugate();
}

template <class S>
void truncate_orthonormal(MatrixX<S>& q, MatrixX<S>& v, double tolerance) {
    const Eigen::Index k = q.cols();
    if (k == 0) return;
    // v = Q_v R_v in place; then q v^T = q R_v^T Q_v^T, and only the small
    // R_v^T needs its SVD. The new factors are Q_v [V_r; 0], applied as
    // reflections to a matrix of the new v's size, and q U_r Sigma_r, formed
    // in place by chunks of rows: beyond q and v only the new v is held.
    Eigen::HouseholderQR<Eigen::Ref<MatrixX<S>>> qr_v(v);
    const MatrixX<S> r_v = qr_v.matrixQR().topRows(k).template triangularView<Eigen::Upper>();
    const Eigen::BDCSVD<MatrixX<S>> svd(r_v.transpose(), Eigen::ComputeFullU | Eigen::ComputeFullV);
    const Eigen::VectorXd& sigma = svd.singularValues();
    const Eigen::Index r = kept_rank(sigma, tolerance);
    MatrixX<S> v_new = MatrixX<S>::Zero(v.rows(), r);
    v_new.topRows(k) = svd.matrixV().leftCols(r).conjugate();
    v_new.applyOnTheLeft(qr_v.householderQ());
    v = std::move(v_new);
    multiply_in_place(q, MatrixX<S>(svd.matrixU().leftCols(r) * sigma.head(r).asDiagonal()));
}

template <class S>
void truncate_orthonormal_gram(MatrixX<S>& q, MatrixX<S>& v, double tolerance) {
    MURK_CHECK(tolerance >= kGramTruncationFrom, "the Gram truncation is for loose tolerances only");
    const Eigen::Index k = q.cols();
    if (k == 0) return;
    // v^H v = W Lambda W^H (eigenvalues ascending); v's singular values, which
    // are q v^T's, are sqrt(Lambda). Keeping the r largest:
    // q v^T ~ q (v W_r W_r^H)^T = (q conj(W_r)) (v W_r)^T.
    const Eigen::SelfAdjointEigenSolver<MatrixX<S>> eigen(MatrixX<S>(v.adjoint() * v));
    Eigen::VectorXd sigma(k);
    MatrixX<S> w(k, k);
    for (Eigen::Index i = 0; i < k; ++i) {
        sigma(i) = std::sqrt(std::max(0.0, eigen.eigenvalues()(k - 1 - i)));
        w.col(i) = eigen.eigenvectors().col(k - 1 - i);
    }
    const Eigen::Index r = kept_rank(sigma, tolerance);
    multiply_in_place(v, MatrixX<S>(w.leftCols(r)));
    multiply_in_place(q, MatrixX<S>(w.leftCols(r).conjugate()));
}

template <class S>
struct HMatrix<S>::Impl {
    Eigen::Index n = 0;
    ClusterTree tree;
    std::vector<Block<S>> blocks;
    HMatrixStats stats;

    std::vector<Eigen::Index> original(Eigen::Index begin, Eigen::Index count) const {
        return {tree.order.begin() + begin, tree.order.begin() + begin + count};
    }

    void fill(Block<S>& block, const BlockEntries<S>& entries, double tolerance) const {
        const std::vector<Eigen::Index> rows = original(block.row_begin, block.rows);
        const std::vector<Eigen::Index> cols = original(block.col_begin, block.cols);
        if (block.low_rank) {
            const unsigned seed = unsigned(block.row_begin * 7919 + block.col_begin);
            CrossApproximation<S> aca(entries, rows, cols, tolerance, seed);
            if (aca.run()) {
                block.u = aca.u();
                block.v = aca.v();
                recompress_low_rank(block.u, block.v, tolerance);
                if (block.u.cols() * (block.rows + block.cols) < block.rows * block.cols) return;
                block.u.resize(0, 0);
                block.v.resize(0, 0);
            }
            block.low_rank = false;
        }
        block.dense.resize(block.rows, block.cols);
        entries(rows, cols, block.dense);
    }

    // Blocks whose output rows (as_transpose: output columns) meet each of
    // kChunks fixed ranges of the tree's numbering, in block order.
    static constexpr Eigen::Index kChunks = 64;
    std::vector<std::vector<std::size_t>> chunk_blocks[2];
    Eigen::Index chunk_begin(Eigen::Index c) const { return n * c / kChunks; }

    void index_chunks() {
        for (int t = 0; t < 2; ++t) {
            chunk_blocks[t].assign(std::size_t(kChunks), {});
            for (std::size_t b = 0; b < blocks.size(); ++b) {
                const Eigen::Index begin = t ? blocks[b].col_begin : blocks[b].row_begin;
                const Eigen::Index end = begin + (t ? blocks[b].cols : blocks[b].rows);
                for (Eigen::Index c = 0; c < kChunks; ++c)
                    if (begin < chunk_begin(c + 1) && chunk_begin(c) < end) chunk_blocks[t][std::size_t(c)].push_back(b);
            }
        }
    }

    // A x (or A^T x when transposed) for every column of x, in the tree's
    // numbering inside. Deterministic whatever the threads: first every
    // low-rank block's small product V^T x (its own slot), then each fixed
    // range of output rows sums its blocks' contributions in block order, so
    // every output entry is added up in the same order on every run. (Summing
    // per-thread partial results would make the last bits depend on which
    // thread took which block, and a sweep's points must not depend on that.)
    // out += a in. For a few columns, one column at a time: Eigen multiplies a
    // matrix by several columns with its blocked matrix-matrix kernel, which
    // packs the factor first, and for two columns that cost 1.9 times one
    // column (0.037 against 0.020 s for a layer kernel of 18,600 panels,
    // 0.5 GiB); column by column each block is read from memory once and
    // reused from cache.
    template <class Out, class A, class In>
    static void add_product(Out&& out, const A& a, const In& in) {
        constexpr Eigen::Index kColumnwise = 4;
        if (in.cols() <= kColumnwise)
            for (Eigen::Index j = 0; j < in.cols(); ++j) out.col(j).noalias() += a * in.col(j);
        else
            out.noalias() += a * in;
    }

    MatrixX<S> product(const MatrixX<S>& x, bool transposed) const {
        const Eigen::Index m = x.cols();
        MatrixX<S> x_p(n, m), y_p = MatrixX<S>::Zero(n, m);
        for (Eigen::Index p = 0; p < n; ++p) x_p.row(p) = x.row(tree.order[std::size_t(p)]);
        std::vector<MatrixX<S>> inner(blocks.size());
#pragma omp parallel for schedule(dynamic, 16)
        for (std::size_t b = 0; b < blocks.size(); ++b) {
            const Block<S>& block = blocks[b];
            if (!block.low_rank) continue;
            const Eigen::Index in_begin = transposed ? block.row_begin : block.col_begin;
            const Eigen::Index in_size = transposed ? block.rows : block.cols;
            inner[b].setZero((transposed ? block.u : block.v).cols(), m);
            add_product(inner[b], (transposed ? block.u : block.v).transpose(), x_p.middleRows(in_begin, in_size));
        }
        const auto& lists = chunk_blocks[transposed ? 1 : 0];
#pragma omp parallel for schedule(dynamic, 1)
        for (Eigen::Index c = 0; c < kChunks; ++c) {
            const Eigen::Index lo = chunk_begin(c), hi = chunk_begin(c + 1);
            for (const std::size_t b : lists[std::size_t(c)]) {
                const Block<S>& block = blocks[b];
                const Eigen::Index out_begin = transposed ? block.col_begin : block.row_begin;
                const Eigen::Index out_size = transposed ? block.cols : block.rows;
                const Eigen::Index from = std::max(lo, out_begin), to = std::min(hi, out_begin + out_size);
                auto out = y_p.middleRows(from, to - from);
                if (block.low_rank)
                    add_product(out, (transposed ? block.v : block.u).middleRows(from - out_begin, to - from), inner[b]);
                else if (transposed)
                    add_product(out, block.dense.middleCols(from - out_begin, to - from).transpose(),
                                x_p.middleRows(block.row_begin, block.rows));
                else
                    add_product(out, block.dense.middleRows(from - out_begin, to - from),
                                x_p.middleRows(block.col_begin, block.cols));
            }
        }
        MatrixX<S> y(n, m);
        for (Eigen::Index p = 0; p < n; ++p) y.row(tree.order[std::size_t(p)]) = y_p.row(p);
        return y;
    }
};

template <class S>
HMatrix<S>::HMatrix(const Eigen::Matrix3Xd& points, const BlockEntries<S>& entries, const HMatrixOptions& options)
    : HMatrix(build_cluster_tree(points, options.leaf_size), entries, options) {}

template <class S>
HMatrix<S>::HMatrix(ClusterTree tree, const BlockEntries<S>& entries, const HMatrixOptions& options) {
    MURK_CHECK(options.eta > 0 && options.tolerance > 0, "valid compression options");
    const auto start = std::chrono::steady_clock::now();
    auto impl = std::make_shared<Impl>();
    impl->n = Eigen::Index(tree.order.size());
    impl->tree = std::move(tree);
    if (impl->n > 0) collect_blocks(impl->tree, 0, 0, options.eta, impl->blocks);
    impl->index_chunks();

    // `entries` may throw; an exception cannot leave a parallel region, so the
    // first one is kept and thrown after it.
    std::exception_ptr failure;
#pragma omp parallel for schedule(dynamic)
    for (std::size_t b = 0; b < impl->blocks.size(); ++b) {
        try {
            impl->fill(impl->blocks[b], entries, options.tolerance);
        } catch (...) {
#pragma omp critical(murk_hmatrix_failure)
            if (!failure) failure = std::current_exception();
        }
    }
    if (failure) std::rethrow_exception(failure);

    HMatrixStats& stats = impl->stats;
    double rank_sum = 0;
    for (const Block<S>& block : impl->blocks) {
        if (block.low_rank) {
            ++stats.low_rank_blocks;
            stats.bytes += std::size_t(block.u.size() + block.v.size()) * sizeof(S);
            stats.max_rank = std::max(stats.max_rank, int(block.u.cols()));
            rank_sum += double(block.u.cols());
        } else {
            ++stats.dense_blocks;
            stats.bytes += std::size_t(block.dense.size()) * sizeof(S);
        }
    }
    stats.mean_rank = stats.low_rank_blocks > 0 ? rank_sum / double(stats.low_rank_blocks) : 0.0;
    stats.dense_bytes = double(impl->n) * double(impl->n) * double(sizeof(S));
    stats.build_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    impl_ = std::move(impl);
}

template <class S>
Eigen::Index HMatrix<S>::size() const {
    return impl_->n;
}

template <class S>
VectorX<S> HMatrix<S>::apply(const VectorX<S>& x) const {
    MURK_CHECK(x.size() == impl_->n, "the vector has one entry per row");
    return impl_->product(x, false);
}

template <class S>
MatrixX<S> HMatrix<S>::apply(const MatrixX<S>& x) const {
    MURK_CHECK(x.rows() == impl_->n, "the vectors have one entry per row");
    return impl_->product(x, false);
}

template <class S>
MatrixX<S> HMatrix<S>::apply_transposed(const MatrixX<S>& x) const {
    MURK_CHECK(x.rows() == impl_->n, "the vectors have one entry per column");
    return impl_->product(x, true);
}

template <class S>
VectorX<S> HMatrix<S>::apply_transposed(const VectorX<S>& x) const {
    MURK_CHECK(x.size() == impl_->n, "the vector has one entry per column");
    return impl_->product(x, true);
}

template <class S>
MatrixX<S> HMatrix<S>::to_dense() const {
    const Impl& m = *impl_;
    MatrixX<S> a(m.n, m.n);
    for (const Block<S>& block : m.blocks) {
        const MatrixX<S> values = block.low_rank ? MatrixX<S>(block.u * block.v.transpose()) : block.dense;
        for (Eigen::Index j = 0; j < block.cols; ++j)
            for (Eigen::Index i = 0; i < block.rows; ++i)
                a(m.tree.order[std::size_t(block.row_begin + i)], m.tree.order[std::size_t(block.col_begin + j)]) =
                    values(i, j);
    }
    return a;
}

template <class S>
const ClusterTree& HMatrix<S>::tree() const {
    return impl_->tree;
}

namespace {
// The part of [begin, begin + size) inside [lo, lo + count): its first position and length (<= 0: none).
struct Overlap {
    Eigen::Index from = 0, length = 0;
};
Overlap overlap(Eigen::Index begin, Eigen::Index size, Eigen::Index lo, Eigen::Index count) {
    const Eigen::Index from = std::max(begin, lo), to = std::min(begin + size, lo + count);
    return {from, to - from};
}
}  // namespace

template <class S>
void HMatrix<S>::region_product(const Region& region, const MatrixX<S>& x, bool transposed, MatrixX<S>& out) const {
    const std::vector<Block<S>>& blocks = impl_->blocks;
    MURK_CHECK(x.rows() == (transposed ? region.rows : region.cols), "one row of x per column of the region");
    std::vector<std::size_t> list;
    for (std::size_t b = 0; b < blocks.size(); ++b)
        if (overlap(blocks[b].row_begin, blocks[b].rows, region.row_begin, region.rows).length > 0 &&
            overlap(blocks[b].col_begin, blocks[b].cols, region.col_begin, region.cols).length > 0)
            list.push_back(b);
    out.setZero(transposed ? region.cols : region.rows, x.cols());
    // Chunks of columns are tasks for the enclosing team (the other threads pick
    // them up while they wait); the chunks do not depend on the threads, and
    // each output column is summed in block order, so neither does the result.
    constexpr Eigen::Index chunk = 16;
    const Eigen::Index k = x.cols();
#pragma omp taskloop grainsize(1) shared(blocks, list, x, out, region)
    for (Eigen::Index c0 = 0; c0 < k; c0 += chunk) {
        const Eigen::Index width = std::min(chunk, k - c0);
        for (const std::size_t b : list) {
            const Block<S>& block = blocks[b];
            const Overlap r = overlap(block.row_begin, block.rows, region.row_begin, region.rows);
            const Overlap c = overlap(block.col_begin, block.cols, region.col_begin, region.cols);
            const Eigen::Index bi = r.from - block.row_begin, bj = c.from - block.col_begin;
            const Eigen::Index ri = r.from - region.row_begin, rj = c.from - region.col_begin;
            if (!transposed) {
                const auto in = x.block(rj, c0, c.length, width);
                auto to = out.block(ri, c0, r.length, width);
                if (block.low_rank)
                    to.noalias() += block.u.middleRows(bi, r.length) * (block.v.middleRows(bj, c.length).transpose() * in);
                else
                    to.noalias() += block.dense.block(bi, bj, r.length, c.length) * in;
            } else {
                const auto in = x.block(ri, c0, r.length, width);
                auto to = out.block(rj, c0, c.length, width);
                if (block.low_rank)
                    to.noalias() += block.v.middleRows(bj, c.length) * (block.u.middleRows(bi, r.length).transpose() * in);
                else
                    to.noalias() += block.dense.block(bi, bj, r.length, c.length).transpose() * in;
            }
        }
    }
}

template <class S>
MatrixX<S> HMatrix<S>::region_dense(const Region& region) const {
    MatrixX<S> a = MatrixX<S>::Zero(region.rows, region.cols);
    for (const Block<S>& block : impl_->blocks) {
        const Overlap r = overlap(block.row_begin, block.rows, region.row_begin, region.rows);
        const Overlap c = overlap(block.col_begin, block.cols, region.col_begin, region.cols);
        if (r.length <= 0 || c.length <= 0) continue;
        const Eigen::Index bi = r.from - block.row_begin, bj = c.from - block.col_begin;
        auto to = a.block(r.from - region.row_begin, c.from - region.col_begin, r.length, c.length);
        if (block.low_rank) to.noalias() = block.u.middleRows(bi, r.length) * block.v.middleRows(bj, c.length).transpose();
        else to = block.dense.block(bi, bj, r.length, c.length);
    }
    return a;
}

template <class S>
const HMatrixStats& HMatrix<S>::stats() const {
    return impl_->stats;
}

template <class S>
const std::vector<HMatrixBlock<S>>& HMatrix<S>::blocks() const {
    return impl_->blocks;
}

template void recompress_low_rank(MatrixX<double>&, MatrixX<double>&, double);
template void recompress_low_rank(MatrixX<Complex>&, MatrixX<Complex>&, double);
template void truncate_orthonormal(MatrixX<double>&, MatrixX<double>&, double);
template void truncate_orthonormal(MatrixX<Complex>&, MatrixX<Complex>&, double);
template void truncate_orthonormal_gram(MatrixX<double>&, MatrixX<double>&, double);
template void truncate_orthonormal_gram(MatrixX<Complex>&, MatrixX<Complex>&, double);
template class HMatrix<double>;
template class HMatrix<Complex>;

}  // namespace murk
