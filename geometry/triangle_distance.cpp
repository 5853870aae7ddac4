#include "geometry/triangle_distance.hpp"

#include "geometry/triangle_intersection.hpp"

#include <algorithm>
#include <cmath>

namespace murk {
namespace {

Vec3 closest_point_on_segment(const Vec3& p, const Vec3& a, const Vec3& b) {
    const Vec3 ab = b - a;
    const double len2 = ab.squaredNorm();
    if (len2 == 0.0) return a;
    const double t = std::clamp((p - a).dot(ab) / len2, 0.0, 1.0);
    return a + t * ab;
}

}  // namespace

Vec3 closest_point_on_triangle(const Vec3& p, const Vec3& a, const Vec3& b, const Vec3& c) {
    if (triangle_is_degenerate(a, b, c)) {
        // No plane: the closed point set is the union of the edges.
        const Vec3 x[3] = {closest_point_on_segment(p, a, b), closest_point_on_segment(p, b, c), closest_point_on_segment(p, c, a)};
        int best = 0;
        for (int k = 1; k < 3; ++k)
            if ((x[k] - p).squaredNorm() < (x[best] - p).squaredNorm()) best = k;
        return x[best];
    }
    const Vec3 ab = b - a, ac = c - a, ap = p - a;
    const double d1 = ab.dot(ap), d2 = ac.dot(ap);
    if (d1 <= 0.0 && d2 <= 0.0) return a;
    const Vec3 bp = p - b;
    const double d3 = ab.dot(bp), d4 = ac.dot(bp);
    if (d3 >= 0.0 && d4 <= d3) return b;
    const double vc = d1 * d4 - d3 * d2;
    if (vc <= 0.0 && d1 >= 0.0 && d3 <= 0.0) return a + d1 / (d1 - d3) * ab;
    const Vec3 cp = p - c;
    const double d5 = ab.dot(cp), d6 = ac.dot(cp);
    if (d6 >= 0.0 && d5 <= d6) return c;
    const double vb = d5 * d2 - d1 * d6;
    if (vb <= 0.0 && d2 >= 0.0 && d6 <= 0.0) return a + d2 / (d2 - d6) * ac;
    const double va = d3 * d6 - d5 * d4;
    if (va <= 0.0 && d4 - d3 >= 0.0 && d5 - d6 >= 0.0) return b + (d4 - d3) / ((d4 - d3) + (d5 - d6)) * (c - b);
    const double sum = va + vb + vc;  // > 0: the panel is not degenerate
    return a + (vb / sum) * ab + (vc / sum) * ac;
}

double point_triangle_distance(const Vec3& p, const Vec3& a, const Vec3& b, const Vec3& c) {
    return (closest_point_on_triangle(p, a, b, c) - p).norm();
}

double segment_segment_distance(const Vec3& p0, const Vec3& p1, const Vec3& q0, const Vec3& q1) {
    const Vec3 d1 = p1 - p0, d2 = q1 - q0, r = p0 - q0;
    const double a = d1.squaredNorm(), e = d2.squaredNorm(), f = d2.dot(r);
    double s = 0.0, t = 0.0;
    if (a == 0.0 && e == 0.0) return r.norm();
    if (a == 0.0) {
        t = std::clamp(f / e, 0.0, 1.0);
    } else {
        const double c = d1.dot(r);
        if (e == 0.0) {
            s = std::clamp(-c / a, 0.0, 1.0);
        } else {
            const double b = d1.dot(d2), denom = a * e - b * b;
            // Parallel segments (denom ~ 0): any s works; start from s = 0.
            s = denom > 1e-14 * a * e ? std::clamp((b * f - c * e) / denom, 0.0, 1.0) : 0.0;
            t = (b * s + f) / e;
            if (t < 0.0) {
                t = 0.0;
                s = std::clamp(-c / a, 0.0, 1.0);
            } else if (t > 1.0) {
                t = 1.0;
                s = std::clamp((b - c) / a, 0.0, 1.0);
            }
        }
    }
    return ((p0 + s * d1) - (q0 + t * d2)).norm();
}

double triangle_triangle_distance(const Vec3& p0, const Vec3& p1, const Vec3& p2, const Vec3& q0, const Vec3& q1,
                                  const Vec3& q2) {
    const Vec3 P[3] = {p0, p1, p2}, Q[3] = {q0, q1, q2};
    if (!triangle_is_degenerate(p0, p1, p2) && !triangle_is_degenerate(q0, q1, q2) && triangles_intersect(p0, p1, p2, q0, q1, q2))
        return 0.0;
    double d = INFINITY;
    for (int i = 0; i < 3; ++i) {
        d = std::min(d, point_triangle_distance(P[i], q0, q1, q2));
        d = std::min(d, point_triangle_distance(Q[i], p0, p1, p2));
        for (int j = 0; j < 3; ++j) d = std::min(d, segment_segment_distance(P[i], P[(i + 1) % 3], Q[j], Q[(j + 1) % 3]));
    }
    return d;
}

}  // namespace murk
