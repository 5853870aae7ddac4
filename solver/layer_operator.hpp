#pragma once
// The panel part of a scene's system (system_entries.hpp) stored as its layer
// kernels: each kernel between panels is one hierarchical matrix (hmatrix.hpp)
// over one shared cluster tree of the panel centroids, and the system's
// entries are combinations of them, row by row and column by column
// (SystemEntries::UnknownRole), plus a constant on each panel's own unknowns.
//
// Why: a two-sided surface has two unknowns per panel, and its four blocks of
// panels x panels are all made of the same two kernels (single and double
// layer). Compressed as one matrix over the unknowns, every far block stores
// the ranks of both kernels on rows and columns twice as long; stored per
// kernel, each is held once, at half the length. Without images and with one
// surface (a fish alone in open water) there are two kernels; otherwise four
// (the interior equations see neither images nor other surfaces).
//
// The cluster tree over the unknowns (tree()) is the panels' tree with each
// panel's unknowns side by side, so every node is a set of whole panels and a
// region of the system is the same region of every kernel: this is how the
// HODLR preconditioner (hodlr_inverse.hpp) sees the operator.
//
// Read-only after construction; any number of threads may apply it at once.
#include "solver/hmatrix.hpp"
#include "solver/system_entries.hpp"
#include "solver/tree_operator.hpp"

#include <vector>

namespace murk {

template <class S>
class LayerOperator : public TreeOperator<S> {
public:
    LayerOperator(const SystemEntries<S>& entries, const HMatrixOptions& options);

    Eigen::Index size() const override { return Eigen::Index(panel_of_.size()); }
    const ClusterTree& tree() const override { return tree_; }
    void region_product(const Region& region, const MatrixX<S>& x, bool transposed, MatrixX<S>& out) const override;
    MatrixX<S> region_dense(const Region& region) const override;

    // A x (transposed: A^T x) for every column of x, in the unknowns' numbering.
    MatrixX<S> apply(const MatrixX<S>& x, bool transposed) const;
    MatrixX<S> to_dense() const;  // for tests on small sizes
    // Summed over the kernels; dense_bytes is the whole panel part's, dense.
    const HMatrixStats& stats() const { return stats_; }
    std::size_t kernels() const { return kernels_.size(); }

private:
    // One kernel's share of the system: row_weight[u] * K(panel(u), panel(w)) * col_weight[w].
    struct Term {
        std::size_t kernel = 0;
        VectorX<S> row_weight, col_weight;  // per unknown, in the unknowns' numbering
    };
    struct DiagonalEntry {
        Eigen::Index row = 0, col = 0;
        S value = S(0);
    };
    // The region's panels (a region of whole panels; checked).
    Region panel_region(const Region& region) const;
    // A term's nonzero weights over a range of positions: each one's offset in
    // the range and its panel's offset from first_panel. gather sums a column
    // over the range's unknowns into a column over its panels, scatter spreads
    // one back; both walk memory in order.
    struct Spread {
        std::vector<Eigen::Index> offset, panel;
        std::vector<S> weight;
        template <class In, class Out>
        void gather(const In& x, Out&& w) const {
            for (std::size_t i = 0; i < weight.size(); ++i) w(panel[i]) += weight[i] * x(offset[i]);
        }
        template <class In, class Out>
        void scatter(const In& z, Out&& y) const {
            for (std::size_t i = 0; i < weight.size(); ++i) y(offset[i]) += weight[i] * z(panel[i]);
        }
    };
    Spread spread(const VectorX<S>& weights, Eigen::Index begin, Eigen::Index count, Eigen::Index first_panel) const;

    std::vector<HMatrix<S>> kernels_;
    std::vector<std::vector<std::size_t>> terms_of_kernel_;
    std::vector<Term> terms_;
    std::vector<DiagonalEntry> diagonal_;
    std::vector<Eigen::Index> panel_of_;                // unknown -> panel
    std::vector<std::vector<Eigen::Index>> unknowns_;   // panel -> its unknowns
    ClusterTree panel_tree_, tree_;
    std::vector<Eigen::Index> first_unknown_position_;  // panel position -> its first unknown's position (+ end)
    std::vector<Eigen::Index> panel_position_;          // unknown position -> its panel's position
    std::vector<Eigen::Index> position_;                // unknown -> its position
    HMatrixStats stats_;
};

extern template class LayerOperator<double>;
extern template class LayerOperator<Complex>;

}  // namespace murk
