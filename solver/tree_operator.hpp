#pragma once
// What the HODLR approximate inverse (hodlr_inverse.hpp) needs of a matrix: a
// cluster tree over its unknowns, and products and dense copies of regions
// that are pairs of the tree's nodes. Two operators provide it: a hierarchical
// matrix (hmatrix.hpp) and the fixed part's system written as a sum of layer
// kernels (layer_operator.hpp).
#include "solver/bem_system.hpp"
#include "solver/cluster_tree.hpp"

namespace murk {

// Rows [row_begin, row_begin + rows) and columns [col_begin, col_begin + cols),
// positions in the tree's order.
struct Region {
    Eigen::Index row_begin = 0, rows = 0, col_begin = 0, cols = 0;
};

template <class S>
class TreeOperator {
public:
    virtual ~TreeOperator() = default;
    virtual Eigen::Index size() const = 0;
    // tree().order maps a position to the unknown's index in the caller's numbering.
    virtual const ClusterTree& tree() const = 0;
    // out = A(region) x (transposed: A(region)^T x, no conjugation); x has one row
    // per column of the region (transposed: per row), in tree order; out is sized
    // here. Called inside a parallel region, it may hand work to the team as tasks.
    virtual void region_product(const Region& region, const MatrixX<S>& x, bool transposed, MatrixX<S>& out) const = 0;
    // A(region) as a dense matrix.
    virtual MatrixX<S> region_dense(const Region& region) const = 0;
};

}  // namespace murk
