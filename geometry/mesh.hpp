#pragma once
// A closed triangle surface: the only geometric object murk's solver sees.
//
// Conventions every layer relies on:
//  - lengths in metres;
//  - triangles list vertex indices counter-clockwise seen from outside, so that
//    (v1 - v0) x (v2 - v0) points out of the enclosed region;
//  - region[t] is a small integer tag per triangle (0 = untagged); region_names
//    maps a tag to a name where one is known (electrodes, skin zones).
#include "geometry/eigen_core.hpp"
#include <Eigen/Geometry>  // cross products
#include <array>
#include <string>
#include <vector>

namespace murk {

using Vec3 = Eigen::Vector3d;
using Triangle = std::array<int, 3>;

struct TriangleMesh {
    std::string name;
    std::vector<Vec3> vertices;
    std::vector<Triangle> triangles;
    std::vector<int> region;                // one tag per triangle
    std::vector<std::string> region_names;  // index = tag; may be shorter than max tag + 1

    std::size_t size() const { return triangles.size(); }
    const Vec3& corner(std::size_t t, int k) const { return vertices[triangles[t][k]]; }
    Vec3 centroid(std::size_t t) const { return (corner(t, 0) + corner(t, 1) + corner(t, 2)) / 3.0; }
    // (v1 - v0) x (v2 - v0): outward, with length twice the area.
    Vec3 area_vector2(std::size_t t) const { return (corner(t, 1) - corner(t, 0)).cross(corner(t, 2) - corner(t, 0)); }
    Vec3 normal(std::size_t t) const { return area_vector2(t).normalized(); }
    double area(std::size_t t) const { return 0.5 * area_vector2(t).norm(); }
};

}  // namespace murk
