#pragma once
// Euclidean distances between points, segments and triangles in 3-D (closest-feature
// method, as in Ericson 2005, "Real-Time Collision Detection", ch. 5). Accurate to
// rounding; degenerate triangles are handled as their edges.
#include "geometry/mesh.hpp"

namespace murk {

// Closest point of the closed triangle (a, b, c) to p (Voronoi-region method).
Vec3 closest_point_on_triangle(const Vec3& p, const Vec3& a, const Vec3& b, const Vec3& c);

double point_triangle_distance(const Vec3& p, const Vec3& a, const Vec3& b, const Vec3& c);

// Distance between the closed segments [p0, p1] and [q0, q1]; either may be a point.
double segment_segment_distance(const Vec3& p0, const Vec3& p1, const Vec3& q0, const Vec3& q1);

// Distance between two closed triangles: 0 when they intersect (exact test for
// non-degenerate triangles), otherwise the least of the 6 vertex-triangle and 9
// edge-edge distances, which is where the minimum of two disjoint triangles lies.
double triangle_triangle_distance(const Vec3& p0, const Vec3& p1, const Vec3& p2, const Vec3& q0, const Vec3& q1,
                                  const Vec3& q2);

}  // namespace murk
