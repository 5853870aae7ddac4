#pragma once
// Exact intersection tests between closed triangles and segments in 3-D, built only on
// the exact orientation predicates, so touching counts as intersecting and no
// tolerance is involved.
#include "geometry/mesh.hpp"

namespace murk {

// True when the closed segment [a, b] and the closed triangle (p, q, r) share a point.
// The triangle must not be degenerate (non-zero area); a == b is allowed.
bool segment_intersects_triangle(const Vec3& a, const Vec3& b, const Vec3& p, const Vec3& q, const Vec3& r);

// True when the closed triangles (p0, p1, p2) and (q0, q1, q2) share a point.
// Neither may be degenerate. A floating-point separating-axis test with a safe margin
// settles the common well-separated case; otherwise two triangles meet exactly when an
// edge of one meets the other (the edge-crossing argument: the boundary of the
// intersection set lies on an edge of one of them), tested exactly.
bool triangles_intersect(const Vec3& p0, const Vec3& p1, const Vec3& p2, const Vec3& q0, const Vec3& q1, const Vec3& q2);

// True when the panel (a, b, c) has zero area or is so thin (twice its area below
// 1e-12 of its longest edge squared) that its plane is undefined in double precision.
bool triangle_is_degenerate(const Vec3& a, const Vec3& b, const Vec3& c);

}  // namespace murk
