#pragma once
// Orientation predicates with exact signs for double inputs: a floating-point
// evaluation is trusted when it exceeds a forward error bound (the filter idea of
// Shewchuk 1997, "Adaptive precision floating-point arithmetic and fast robust
// geometric predicates"); otherwise the determinant is recomputed in exact rational
// arithmetic (Boost.Multiprecision cpp_rational), which happens only for (nearly)
// degenerate configurations.
#include "geometry/eigen_core.hpp"
#include "geometry/mesh.hpp"

namespace murk {

using Vec2 = Eigen::Vector2d;

// Sign (+1, 0, -1) of det[b - a, c - a]: +1 when a, b, c turn counter-clockwise.
int orient2d(const Vec2& a, const Vec2& b, const Vec2& c);

// Sign (+1, 0, -1) of det[a - d, b - d, c - d] = (a - d) . ((b - d) x (c - d)):
// +1 when d lies below the plane of a, b, c seen with a, b, c counter-clockwise
// (i.e. on the side opposite to (b - a) x (c - a)), 0 when coplanar.
int orient3d(const Vec3& a, const Vec3& b, const Vec3& c, const Vec3& d);

}  // namespace murk
