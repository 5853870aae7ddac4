#pragma once
// A binary cluster tree over points (the panel centroids of a system's rows and
// columns): every node is a contiguous range of a permutation of the points and
// carries the bounding box of its points; a node of more than `leaf_size`
// points is split in two at the midpoint of its box's longest side (geometric
// bisection, Hackbusch 2015, "Hierarchical Matrices: Algorithms and Analysis",
// section 5.4). The hierarchical matrix of hmatrix.hpp is built on it.
#include "geometry/eigen_core.hpp"
#include "geometry/mesh.hpp"

#include <vector>

namespace murk {

struct ClusterTree {
    struct Node {
        Eigen::Index begin = 0, end = 0;  // positions in `order`
        Vec3 lo = Vec3::Zero(), hi = Vec3::Zero();  // bounding box of the node's points
        int first_child = -1, second_child = -1;     // -1: a leaf
        Eigen::Index size() const { return end - begin; }
        bool is_leaf() const { return first_child < 0; }
        double diameter() const { return (hi - lo).norm(); }
    };
    std::vector<Eigen::Index> order;  // position -> index of the point
    std::vector<Node> nodes;          // nodes[0] is the root
};

// The tree of `points` (one column per point); leaf_size >= 1.
ClusterTree build_cluster_tree(const Eigen::Matrix3Xd& points, Eigen::Index leaf_size);

// Euclidean distance between the bounding boxes of two nodes (0 when they overlap).
double box_distance(const ClusterTree::Node& a, const ClusterTree::Node& b);

}  // namespace murk
