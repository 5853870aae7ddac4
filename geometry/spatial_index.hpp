#pragma once
// Boost.Geometry R-trees over panel bounding boxes: the one spatial index of the
// geometry layer (self-intersection, clearance). Built with the packing (STR bulk
// loading) constructor, O(n log n), and queried in O(log n + k).
#include "geometry/mesh.hpp"

#include <boost/geometry.hpp>
#include <boost/geometry/index/rtree.hpp>
#include <cstddef>
#include <utility>

namespace murk {

namespace bg = boost::geometry;
namespace bgi = boost::geometry::index;

using BgPoint = bg::model::point<double, 3, bg::cs::cartesian>;
using BgBox = bg::model::box<BgPoint>;
using PanelBox = std::pair<BgBox, std::size_t>;  // bounding box, panel index
using PanelTree = bgi::rtree<PanelBox, bgi::rstar<16>>;

inline BgPoint to_bg(const Vec3& v) { return BgPoint(v.x(), v.y(), v.z()); }

// Smallest axis-aligned box holding panel t.
BgBox panel_box(const TriangleMesh& mesh, std::size_t t);

// Smallest axis-aligned box holding every vertex used by a panel (empty mesh: a
// degenerate box at the origin).
BgBox mesh_box(const TriangleMesh& mesh);

// R-tree of all panel boxes of `mesh`.
PanelTree build_panel_tree(const TriangleMesh& mesh);

}  // namespace murk
