#pragma once
// Panel geometry in struct-of-arrays form, the layout the assembly loops want:
// corners, centroids, unit normals, areas and diameters (longest edge) of every
// triangle of a mesh, in metres.
#include "geometry/eigen_core.hpp"
#include "geometry/mesh.hpp"

namespace murk {

struct PanelSet {
    Eigen::Matrix3Xd p0, p1, p2;
    Eigen::Matrix3Xd centroid;
    Eigen::Matrix3Xd normal;
    Eigen::VectorXd area;
    Eigen::VectorXd diameter;

    explicit PanelSet(const TriangleMesh& mesh);
    Eigen::Index size() const { return area.size(); }
};

}  // namespace murk
