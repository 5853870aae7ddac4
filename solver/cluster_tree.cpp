// Geometric bisection of a point set into a binary cluster tree (Hackbusch 2015,
// "Hierarchical Matrices: Algorithms and Analysis", section 5.4).
#include "solver/cluster_tree.hpp"

#include "geometry/internal_check.hpp"

#include <algorithm>
#include <numeric>

namespace murk {

namespace {

void fit_box(const Eigen::Matrix3Xd& points, const std::vector<Eigen::Index>& order, ClusterTree::Node& node) {
    node.lo = points.col(order[node.begin]);
    node.hi = node.lo;
    for (Eigen::Index p = node.begin + 1; p < node.end; ++p) {
        node.lo = node.lo.cwiseMin(points.col(order[p]));
        node.hi = node.hi.cwiseMax(points.col(order[p]));
    }
}

// Reorders order[node.begin, node.end) into two non-empty parts and returns the
// position where the second begins: the points below the midpoint of the box's
// longest side come first. When that leaves a side empty (all points on one
// plane across that side, or all coinciding) the range is cut in half by
// position instead, so every split makes both children smaller and the tree
// always ends.
Eigen::Index split_position(const Eigen::Matrix3Xd& points, std::vector<Eigen::Index>& order,
                            const ClusterTree::Node& node) {
    Eigen::Index axis = 0;
    (node.hi - node.lo).maxCoeff(&axis);
    const double middle = 0.5 * (node.lo(axis) + node.hi(axis));
    const auto first = order.begin() + node.begin, last = order.begin() + node.end;
    const auto cut = std::partition(first, last, [&](Eigen::Index i) { return points(axis, i) < middle; });
    if (cut == first || cut == last) return node.begin + node.size() / 2;
    return node.begin + (cut - first);
}

}  // namespace

ClusterTree build_cluster_tree(const Eigen::Matrix3Xd& points, Eigen::Index leaf_size) {
    MURK_CHECK(leaf_size >= 1, "a cluster holds at least one point");
    ClusterTree tree;
    tree.order.resize(points.cols());
    std::iota(tree.order.begin(), tree.order.end(), Eigen::Index{0});
    if (points.cols() == 0) return tree;

    ClusterTree::Node root;
    root.begin = 0;
    root.end = points.cols();
    tree.nodes.push_back(root);
    // Nodes are split in the order they were made; children are appended, so a
    // single pass over the growing list visits every node once.
    for (std::size_t k = 0; k < tree.nodes.size(); ++k) {
        fit_box(points, tree.order, tree.nodes[k]);
        if (tree.nodes[k].size() <= leaf_size) continue;
        const Eigen::Index cut = split_position(points, tree.order, tree.nodes[k]);
        ClusterTree::Node first, second;
        first.begin = tree.nodes[k].begin;
        first.end = cut;
        second.begin = cut;
        second.end = tree.nodes[k].end;
        tree.nodes[k].first_child = int(tree.nodes.size());
        tree.nodes[k].second_child = int(tree.nodes.size()) + 1;
        tree.nodes.push_back(first);
        tree.nodes.push_back(second);
    }
    return tree;
}

double box_distance(const ClusterTree::Node& a, const ClusterTree::Node& b) {
    const Vec3 gap = (a.lo - b.hi).cwiseMax(b.lo - a.hi).cwiseMax(0.0);
    return gap.norm();
}

}  // namespace murk
