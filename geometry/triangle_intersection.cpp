#include "geometry/triangle_intersection.hpp"

#include "geometry/exact_predicates.hpp"

#include <algorithm>
#include <cmath>

namespace murk {
namespace {

// Axis-aligned projection of coplanar points dropping coordinate `drop`: an affine
// bijection of the common plane onto a coordinate plane (drop is the largest normal
// component, hence non-zero), so it preserves every incidence. Exact: no arithmetic.
Vec2 drop_axis(const Vec3& v, int drop) {
    return drop == 0 ? Vec2(v.y(), v.z()) : drop == 1 ? Vec2(v.z(), v.x()) : Vec2(v.x(), v.y());
}

// c on segment [a, b] given that a, b, c are collinear.
bool on_segment(const Vec2& a, const Vec2& b, const Vec2& c) {
    return std::min(a.x(), b.x()) <= c.x() && c.x() <= std::max(a.x(), b.x()) && std::min(a.y(), b.y()) <= c.y() &&
           c.y() <= std::max(a.y(), b.y());
}

bool segments_intersect_2d(const Vec2& a, const Vec2& b, const Vec2& c, const Vec2& d) {
    const int d1 = orient2d(c, d, a), d2 = orient2d(c, d, b);
    const int d3 = orient2d(a, b, c), d4 = orient2d(a, b, d);
    if (d1 * d2 < 0 && d3 * d4 < 0) return true;
    return (d1 == 0 && on_segment(c, d, a)) || (d2 == 0 && on_segment(c, d, b)) || (d3 == 0 && on_segment(a, b, c)) ||
           (d4 == 0 && on_segment(a, b, d));
}

bool point_in_triangle_2d(const Vec2& x, const Vec2& p, const Vec2& q, const Vec2& r) {
    const int o1 = orient2d(p, q, x), o2 = orient2d(q, r, x), o3 = orient2d(r, p, x);
    return (o1 >= 0 && o2 >= 0 && o3 >= 0) || (o1 <= 0 && o2 <= 0 && o3 <= 0);
}

bool coplanar_segment_triangle(const Vec3& a, const Vec3& b, const Vec3& p, const Vec3& q, const Vec3& r) {
    const Vec3 n = (q - p).cross(r - p).cwiseAbs();
    const int drop = n.x() >= n.y() && n.x() >= n.z() ? 0 : (n.y() >= n.z() ? 1 : 2);
    const Vec2 A = drop_axis(a, drop), B = drop_axis(b, drop);
    const Vec2 P = drop_axis(p, drop), Q = drop_axis(q, drop), R = drop_axis(r, drop);
    return point_in_triangle_2d(A, P, Q, R) || point_in_triangle_2d(B, P, Q, R) || segments_intersect_2d(A, B, P, Q) ||
           segments_intersect_2d(A, B, Q, R) || segments_intersect_2d(A, B, R, P);
}

// Projections of both triangles on `axis` are disjoint by more than their rounding
// error (a dot product of 3 terms errs by < 4 eps |axis| |x|); then they are disjoint.
bool separated_along(const Vec3& axis, const Vec3* P, const Vec3* Q, double scale) {
    const double margin = 1e-13 * axis.norm() * scale;
    double pmin = axis.dot(P[0]), pmax = pmin, qmin = axis.dot(Q[0]), qmax = qmin;
    for (int k = 1; k < 3; ++k) {
        const double pv = axis.dot(P[k]), qv = axis.dot(Q[k]);
        pmin = std::min(pmin, pv);
        pmax = std::max(pmax, pv);
        qmin = std::min(qmin, qv);
        qmax = std::max(qmax, qv);
    }
    return pmax + margin < qmin || qmax + margin < pmin;
}

bool clearly_separated(const Vec3* P, const Vec3* Q) {
    double scale = 0.0;
    for (int k = 0; k < 3; ++k) scale = std::max({scale, P[k].cwiseAbs().maxCoeff(), Q[k].cwiseAbs().maxCoeff()});
    const Vec3 np = (P[1] - P[0]).cross(P[2] - P[0]), nq = (Q[1] - Q[0]).cross(Q[2] - Q[0]);
    if (separated_along(np, P, Q, scale) || separated_along(nq, P, Q, scale)) return true;
    for (int i = 0; i < 3; ++i) {
        const Vec3 e = P[(i + 1) % 3] - P[i], f = Q[(i + 1) % 3] - Q[i];
        if (separated_along(np.cross(e), P, Q, scale) || separated_along(nq.cross(f), P, Q, scale)) return true;
        for (int j = 0; j < 3; ++j) {
            const Vec3 g = Q[(j + 1) % 3] - Q[j];
            if (separated_along(e.cross(g), P, Q, scale)) return true;
        }
    }
    return false;
}

}  // namespace

bool triangle_is_degenerate(const Vec3& a, const Vec3& b, const Vec3& c) {
    const double l2 = std::max({(b - a).squaredNorm(), (c - b).squaredNorm(), (a - c).squaredNorm()});
    const double twice_area = (b - a).cross(c - a).norm();
    return !(twice_area > 1e-12 * l2);
}

bool segment_intersects_triangle(const Vec3& a, const Vec3& b, const Vec3& p, const Vec3& q, const Vec3& r) {
    const int oa = orient3d(p, q, r, a), ob = orient3d(p, q, r, b);
    if (oa == 0 && ob == 0) return coplanar_segment_triangle(a, b, p, q, r);
    if (oa * ob > 0) return false;
    // The segment meets the plane in exactly one point; it lies in the closed triangle
    // iff the line ab passes the three edges on the same side (Pluecker signs).
    const int s1 = orient3d(a, b, p, q), s2 = orient3d(a, b, q, r), s3 = orient3d(a, b, r, p);
    return (s1 >= 0 && s2 >= 0 && s3 >= 0) || (s1 <= 0 && s2 <= 0 && s3 <= 0);
}

bool triangles_intersect(const Vec3& p0, const Vec3& p1, const Vec3& p2, const Vec3& q0, const Vec3& q1, const Vec3& q2) {
    const Vec3 P[3] = {p0, p1, p2}, Q[3] = {q0, q1, q2};
    if (clearly_separated(P, Q)) return false;
    // Quick exact rejection: one triangle strictly on one side of the other's plane.
    int above = 0, below = 0;
    for (const Vec3& v : Q) {
        const int o = orient3d(p0, p1, p2, v);
        above += o > 0;
        below += o < 0;
    }
    if (above == 3 || below == 3) return false;
    above = below = 0;
    for (const Vec3& v : P) {
        const int o = orient3d(q0, q1, q2, v);
        above += o > 0;
        below += o < 0;
    }
    if (above == 3 || below == 3) return false;
    for (int i = 0; i < 3; ++i) {
        if (segment_intersects_triangle(P[i], P[(i + 1) % 3], q0, q1, q2)) return true;
        if (segment_intersects_triangle(Q[i], Q[(i + 1) % 3], p0, p1, p2)) return true;
    }
    return false;
}

}  // namespace murk
