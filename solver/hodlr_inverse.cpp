// The HODLR approximate inverse of hodlr_inverse.hpp: a node tree over the
// cluster tree cut at leaf_size, the region coupling each node's two children
// compressed by a randomized range finder on the operator's products with it,
// and the Woodbury factors built from the leaves up.
#include "solver/hodlr_inverse.hpp"

#include "geometry/internal_check.hpp"

#include <Eigen/LU>
#include <Eigen/QR>

#include <chrono>
#include <complex>
#include <random>
#include <type_traits>

#include <omp.h>

namespace murk {

namespace {

template <class S>
S standard_normal(std::mt19937_64& random, std::normal_distribution<double>& normal) {
    if constexpr (std::is_same_v<S, double>) {
        return normal(random);
    } else {
        const double re = normal(random);
        return S(re, normal(random));
    }
}

}  // namespace

// A stored factor, in the working precision or, when the options ask for it,
// in single precision: half the memory and half the memory traffic of a solve,
// which is bound by that traffic. Either way it is applied in the working
// precision, by chunks of rows converted as they are read, so the
// preconditioner stays one fixed linear operator (what right-preconditioned
// GMRES needs of it) and only its entries are rounded.
template <class S>
struct StoredFactor {
    using Single = std::conditional_t<std::is_same_v<S, double>, float, std::complex<float>>;
    MatrixX<S> full;
    Eigen::Matrix<Single, Eigen::Dynamic, Eigen::Dynamic> single;
    bool is_single = false;

    void store(MatrixX<S>&& a, bool in_single) {
        is_single = in_single;
        if (in_single) {
            single = a.template cast<Single>();
            full.resize(0, 0);
            // Freed here, not when the caller's variable ends: at the top node
            // that variable would otherwise hold its double copy (a hundred
            // megabytes) through the other side's sampling.
            a.resize(0, 0);
        } else {
            full = std::move(a);
            single.resize(0, 0);
        }
    }
    Eigen::Index rows() const { return is_single ? single.rows() : full.rows(); }
    Eigen::Index cols() const { return is_single ? single.cols() : full.cols(); }
    std::size_t bytes() const {
        return is_single ? sizeof(Single) * std::size_t(single.size()) : sizeof(S) * std::size_t(full.size());
    }
    // For a single-precision factor: calls f(first row, rows, column, segment in
    // the working precision) for the columns of consecutive chunks of rows, each
    // segment converted once into a buffer that stays in the first-level cache.
    // For one right-hand side this reads the factor once at float width, where
    // converting a whole chunk for a matrix product writes and reads it again at
    // double width.
    template <class F>
    void for_each_column_segment(F&& f) const {
        constexpr Eigen::Index kRows = 1024;
        VectorX<S> buffer(kRows);
        for (Eigen::Index i = 0; i < rows(); i += kRows) {
            const Eigen::Index h = std::min(kRows, rows() - i);
            for (Eigen::Index k = 0; k < cols(); ++k) {
                const Single* from = single.data() + k * single.rows() + i;
                for (Eigen::Index t = 0; t < h; ++t) buffer[t] = S(from[t]);
                f(i, h, k, buffer.head(h));
            }
        }
    }
    // Calls f(first row, rows, chunk in the working precision) for consecutive
    // chunks of rows that stay in cache: Eigen packs a product's left factor
    // before multiplying, and a factor of tens of megabytes packed whole costs a
    // second pass over memory.
    template <class F>
    void for_each_chunk(F&& f) const {
        const Eigen::Index bytes_per_row = Eigen::Index(sizeof(S)) * std::max<Eigen::Index>(1, cols());
        const Eigen::Index step = std::max<Eigen::Index>(64, (Eigen::Index(1) << 20) / bytes_per_row);
        MatrixX<S> converted;
        for (Eigen::Index i = 0; i < rows(); i += step) {
            const Eigen::Index h = std::min(step, rows() - i);
            if (is_single) {
                // A plain loop per column, which the compiler vectorizes; Eigen's
                // cast from float to double converts one entry at a time.
                converted.resize(h, cols());
                for (Eigen::Index j = 0; j < cols(); ++j) {
                    const Single* from = single.data() + j * single.rows() + i;
                    S* to = converted.data() + j * h;
                    for (Eigen::Index k = 0; k < h; ++k) to[k] = S(from[k]);
                }
                f(i, h, converted);
            } else {
                f(i, h, full.middleRows(i, h));
            }
        }
    }
};

template <class S>
struct HodlrInverse<S>::Impl {
    struct Node {
        Eigen::Index begin = 0, size = 0;  // positions in the cluster tree's order
        int first = -1, second = -1;       // children in `nodes`; -1 for a leaf
        int depth = 0;
        // The inverse of a leaf's dense block or of an inner node's core S, held
        // explicitly: applying it is one pass over it, where triangular solves
        // against LU factors take two and pack them first. The cores are small
        // and stay in the working precision.
        StoredFactor<S> leaf_inverse;
        MatrixX<S> core_inverse;
        StoredFactor<S> z1, z2, v1, v2;  // inner: Z_i = A_i^-1 U_i and V_i
        bool is_leaf() const { return first < 0; }
    };

    Eigen::Index n = 0;
    std::vector<Eigen::Index> order;
    std::vector<Node> nodes;
    HodlrStats stats;

    int add_node(const ClusterTree& tree, int tree_node, int depth, Eigen::Index leaf_size) {
        const ClusterTree::Node& t = tree.nodes[std::size_t(tree_node)];
        const int index = int(nodes.size());
        nodes.emplace_back();
        nodes.back().begin = t.begin;
        nodes.back().size = t.size();
        nodes.back().depth = depth;
        if (t.size() <= leaf_size || t.is_leaf()) return index;
        const int first = add_node(tree, t.first_child, depth + 1, leaf_size);
        const int second = add_node(tree, t.second_child, depth + 1, leaf_size);
        nodes[std::size_t(index)].first = first;
        nodes[std::size_t(index)].second = second;
        return index;
    }

    // u v^T approximating the matrix's `region` (m rows, c columns) to the
    // relative tolerance: a randomized range finder whose width doubles until
    // the truncation drops at least `oversampling` of its directions (or the
    // width reaches the cap). Returns whether it was capped.
    static bool compress(const TreeOperator<S>& matrix, const Region& region, const HodlrOptions& options,
                         unsigned seed, MatrixX<S>& u, MatrixX<S>& v) {
        constexpr Eigen::Index oversampling = 8;
        const Eigen::Index m = region.rows, c = region.cols;
        u.resize(m, 0);
        v.resize(c, 0);
        if (m == 0 || c == 0) return false;
        const Eigen::Index limit = std::min({m, c, options.max_rank + oversampling});
        Eigen::Index width = std::min<Eigen::Index>(32, limit);
        std::mt19937_64 random(seed);
        std::normal_distribution<double> normal;
        // At the top of the tree these samples are tens of thousands of rows
        // by hundreds of columns each (113 MB at 91,580 unknowns), so each is
        // freed or factored in place as soon as it is used, and about two are
        // held at once: the build's peak memory is the operator plus the
        // preconditioner plus these two.
        for (;;) {
            u.resize(0, 0);
            v.resize(0, 0);
            {
                MatrixX<S> y(m, width);
                {
                    MatrixX<S> omega(c, width);
                    for (Eigen::Index j = 0; j < width; ++j)
                        for (Eigen::Index i = 0; i < c; ++i) omega(i, j) = standard_normal<S>(random, normal);
                    matrix.region_product(region, omega, false, y);
                }
                const Eigen::HouseholderQR<Eigen::Ref<MatrixX<S>>> qr(y);
                u = qr.householderQ() * MatrixX<S>::Identity(m, width);
            }
            // A ~ Q Q^H A = Q (A^T conj(Q))^T; Q is conjugated in place and back,
            // not copied.
            v.resize(c, width);
            if constexpr (!std::is_same_v<S, double>) u = u.conjugate();
            matrix.region_product(region, u, true, v);
            if constexpr (!std::is_same_v<S, double>) u = u.conjugate();
            if (options.tolerance >= kGramTruncationFrom) truncate_orthonormal_gram(u, v, options.tolerance);
            else truncate_orthonormal(u, v, options.tolerance);
            if (u.cols() + oversampling <= width || width == limit) break;
            width = std::min(2 * width, limit);
        }
        if (u.cols() > options.max_rank) {
            u.conservativeResize(Eigen::NoChange, options.max_rank);
            v.conservativeResize(Eigen::NoChange, options.max_rank);
            return true;
        }
        return false;
    }

    // Up to this many right-hand sides a single-precision factor is applied a
    // column segment at a time (StoredFactor::for_each_column_segment); more
    // make the matrix product's blocking worth the converted chunk. Measured at
    // 91,580 unknowns (build/murk-bench-large): one column 0.20 s by segments
    // against 0.27 s by chunks; sixteen 1.01 s against 0.55 s.
    static constexpr Eigen::Index kSegmentColumns = 1;

    // y += a c (subtract: y -= a c)
    static void add_product(Eigen::Ref<MatrixX<S>> y, const StoredFactor<S>& a, const MatrixX<S>& c, bool subtract) {
        if (a.is_single && c.cols() <= kSegmentColumns) {
            a.for_each_column_segment([&](Eigen::Index i, Eigen::Index h, Eigen::Index k, const auto& segment) {
                for (Eigen::Index j = 0; j < c.cols(); ++j)
                    y.col(j).segment(i, h) += (subtract ? -c(k, j) : c(k, j)) * segment;
            });
            return;
        }
        a.for_each_chunk([&](Eigen::Index i, Eigen::Index h, const auto& chunk) {
            if (subtract) y.middleRows(i, h).noalias() -= chunk * c;
            else y.middleRows(i, h).noalias() += chunk * c;
        });
    }
    static void subtract_product(Eigen::Ref<MatrixX<S>> y, const StoredFactor<S>& a, const MatrixX<S>& c) {
        add_product(y, a, c, true);
    }
    // a^T y, summed over the chunks in order
    static MatrixX<S> transposed_product(const StoredFactor<S>& a, const Eigen::Ref<const MatrixX<S>>& y) {
        MatrixX<S> out = MatrixX<S>::Zero(a.cols(), y.cols());
        if (a.is_single && y.cols() <= kSegmentColumns) {
            a.for_each_column_segment([&](Eigen::Index i, Eigen::Index h, Eigen::Index k, const auto& segment) {
                // No conjugation (Eigen's dot would conjugate the first factor).
                for (Eigen::Index j = 0; j < y.cols(); ++j) out(k, j) += segment.cwiseProduct(y.col(j).segment(i, h)).sum();
            });
            return out;
        }
        a.for_each_chunk([&](Eigen::Index i, Eigen::Index h, const auto& chunk) {
            out.noalias() += chunk.transpose() * y.middleRows(i, h);
        });
        return out;
    }

    // x := M^-1 x (transposed: M^-T x) on the node's positions, in place.
    void solve_in_place(int index, Eigen::Ref<MatrixX<S>> x, bool transposed) const {
        const Node& node = nodes[std::size_t(index)];
        if (node.is_leaf()) {
            if (transposed) {
                x = transposed_product(node.leaf_inverse, x);
                return;
            }
            MatrixX<S> y = MatrixX<S>::Zero(x.rows(), x.cols());
            add_product(y, node.leaf_inverse, x, false);
            x = y;
            return;
        }
        const Eigen::Index n1 = nodes[std::size_t(node.first)].size, n2 = nodes[std::size_t(node.second)].size;
        const Eigen::Index r1 = node.z1.cols(), r2 = node.z2.cols();
        if (!transposed) {
            solve_children(node, x, false);
            if (r1 + r2 == 0) return;
            MatrixX<S> w(r1 + r2, x.cols());
            w.topRows(r1) = transposed_product(node.v1, x.bottomRows(n2));
            w.bottomRows(r2) = transposed_product(node.v2, x.topRows(n1));
            const MatrixX<S> c = node.core_inverse * w;
            subtract_product(x.topRows(n1), node.z1, c.topRows(r1));
            subtract_product(x.bottomRows(n2), node.z2, c.bottomRows(r2));
            return;
        }
        if (r1 + r2 > 0) {
            MatrixX<S> g(r1 + r2, x.cols());
            g.topRows(r1) = transposed_product(node.z1, x.topRows(n1));
            g.bottomRows(r2) = transposed_product(node.z2, x.bottomRows(n2));
            const MatrixX<S> c = node.core_inverse.transpose() * g;
            subtract_product(x.topRows(n1), node.v2, c.bottomRows(r2));
            subtract_product(x.bottomRows(n2), node.v1, c.topRows(r1));
        }
        solve_children(node, x, true);
    }

    // The two halves of diag(A_1, A_2)^-1 x are independent, so large ones run
    // as tasks of the enclosing team. `node` must be shared: a reference left
    // firstprivate, the task's default, would copy the node with all its factors.
    void solve_children(const Node& node, Eigen::Ref<MatrixX<S>> x, bool transposed) const {
        const Eigen::Index n1 = nodes[std::size_t(node.first)].size, n2 = nodes[std::size_t(node.second)].size;
#pragma omp task shared(x, node) if (node.size > 4096)
        solve_in_place(node.first, x.topRows(n1), transposed);
        solve_in_place(node.second, x.bottomRows(n2), transposed);
#pragma omp taskwait
    }

    void factor_leaf(Node& node, const TreeOperator<S>& matrix, bool single) {
        const MatrixX<S> dense = matrix.region_dense(Region{node.begin, node.size, node.begin, node.size});
        node.leaf_inverse.store(Eigen::PartialPivLU<MatrixX<S>>(dense).inverse(), single);
    }

    // Needs both children finished: Z_i are solves against them.
    bool factor_inner(Node& node, int index, const TreeOperator<S>& matrix, const HodlrOptions& options) {
        const Node& a = nodes[std::size_t(node.first)];
        const Node& c = nodes[std::size_t(node.second)];
        // One side at a time, each stored as soon as it is solved, so that the
        // top node holds one side's samples beside the other's stored factors.
        MatrixX<S> z1, z2, v1, v2;
        bool capped = compress(matrix, Region{a.begin, a.size, c.begin, c.size}, options, 2 * unsigned(index) + 1, z1, v1);
        solve_in_place(node.first, z1, false);
        const Eigen::Index r1 = z1.cols();
        node.z1.store(std::move(z1), options.single_precision);
        node.v1.store(std::move(v1), options.single_precision);
        capped |= compress(matrix, Region{c.begin, c.size, a.begin, a.size}, options, 2 * unsigned(index) + 2, z2, v2);
        solve_in_place(node.second, z2, false);
        const Eigen::Index r2 = z2.cols();
        // The core from the factors as stored where they are (V_1, Z_1), so that
        // what is applied is inverted as exactly as the rounding allows.
        MatrixX<S> core = MatrixX<S>::Identity(r1 + r2, r1 + r2);
        core.topRightCorner(r1, r2) = transposed_product(node.v1, z2);
        core.bottomLeftCorner(r2, r1) = transposed_product(node.z1, v2).transpose();
        node.z2.store(std::move(z2), options.single_precision);
        node.v2.store(std::move(v2), options.single_precision);
        if (r1 + r2 > 0) node.core_inverse = Eigen::PartialPivLU<MatrixX<S>>(core).inverse();
        return capped;
    }
};

template <class S>
HodlrInverse<S>::HodlrInverse(const TreeOperator<S>& matrix, const HodlrOptions& options) {
    MURK_CHECK(options.leaf_size >= 1 && options.tolerance > 0 && options.max_rank >= 0, "valid HODLR options");
    const auto start = std::chrono::steady_clock::now();
    auto impl = std::make_shared<Impl>();
    impl->n = matrix.size();
    impl->order = matrix.tree().order;
    if (impl->n > 0) impl->add_node(matrix.tree(), 0, 0, options.leaf_size);
    // From the deepest nodes up: the nodes of one depth are independent. Always
    // inside a parallel region, even for one node: Eigen then multiplies on one
    // thread, whose rounding does not depend on the team's size.
    int deepest = 0;
    for (const auto& node : impl->nodes) deepest = std::max(deepest, node.depth);
    std::exception_ptr failure;
    int capped = 0;
    for (int depth = deepest; depth >= 0 && !impl->nodes.empty(); --depth) {
        std::vector<int> level;
        for (std::size_t i = 0; i < impl->nodes.size(); ++i)
            if (impl->nodes[i].depth == depth) level.push_back(int(i));
#pragma omp parallel for schedule(dynamic, 1) reduction(+ : capped)
        for (std::size_t k = 0; k < level.size(); ++k) {
            try {
                auto& node = impl->nodes[std::size_t(level[k])];
                if (node.is_leaf()) impl->factor_leaf(node, matrix, options.single_precision);
                else capped += impl->factor_inner(node, level[k], matrix, options) ? 1 : 0;
            } catch (...) {
#pragma omp critical(murk_hodlr_failure)
                if (!failure) failure = std::current_exception();
            }
        }
        if (failure) std::rethrow_exception(failure);
    }

    HodlrStats& stats = impl->stats;
    stats.capped_blocks = capped;
    for (const auto& node : impl->nodes) {
        if (node.is_leaf()) {
            ++stats.leaves;
            stats.bytes += node.leaf_inverse.bytes();
        } else {
            stats.max_rank = std::max({stats.max_rank, int(node.z1.cols()), int(node.z2.cols())});
            stats.bytes += node.z1.bytes() + node.z2.bytes() + node.v1.bytes() + node.v2.bytes();
        }
    }
    stats.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    impl_ = std::move(impl);
}

template <class S>
MatrixX<S> HodlrInverse<S>::solve(const MatrixX<S>& x, bool transposed) const {
    const Impl& m = *impl_;
    MURK_CHECK(x.rows() == m.n, "one row per unknown of the matrix");
    if (m.n == 0) return x;
    MatrixX<S> x_p(m.n, x.cols());
    for (Eigen::Index p = 0; p < m.n; ++p) x_p.row(p) = x.row(m.order[std::size_t(p)]);
    // The tasks of solve_children need a team; inside one already they join it.
#pragma omp parallel if (!omp_in_parallel())
#pragma omp single
    m.solve_in_place(0, x_p, transposed);
    MatrixX<S> y(m.n, x.cols());
    for (Eigen::Index p = 0; p < m.n; ++p) y.row(m.order[std::size_t(p)]) = x_p.row(p);
    return y;
}

template <class S>
const HodlrStats& HodlrInverse<S>::stats() const {
    return impl_->stats;
}

template class HodlrInverse<double>;
template class HodlrInverse<Complex>;

}  // namespace murk
