#pragma once
// Closed-form integrals of the Laplace Green's function over a flat triangle
// carrying a constant density. These are the near-field kernels of the solver:
// exact (to rounding) at any distance, including on the triangle's plane.
//
//   G(x, y)       = 1 / (4 pi |x - y|)
//   dG/dn_y(x, y) = n . (x - y) / (4 pi |x - y|^3),  n the triangle's unit normal
//                   (from the counter-clockwise vertex order).
#include "geometry/mesh.hpp"
#include "solver/triangle_rules.hpp"

#include <cmath>

namespace murk {

// Single layer: integral over the triangle (p0, p1, p2) of G(x, y) dS_y.
// Valid for every x, including points in the plane, on an edge or at a vertex.
// Edge-by-edge formula of Wilton, Rao, Glisson, Schaubert, Al-Bundak & Butler
// (1984, "Potential integrals for uniform and linear source distributions on
// polygonal and polyhedral domains", IEEE Trans. Antennas Propag. 32:276).
// Relative accuracy about 1e-13 away from the triangle, 1e-11 at its edges.
double single_layer_triangle(const Vec3& x, const Vec3& p0, const Vec3& p1, const Vec3& p2);

// Double layer: integral over the triangle of dG/dn_y(x, y) dS_y = -Omega / (4 pi),
// Omega the signed solid angle the triangle subtends at x (positive when x lies
// behind the triangle, opposite its normal). Formula of van Oosterom & Strackee
// (1983, "The solid angle of a plane triangle", IEEE Trans. Biomed. Eng. 30:125).
// Valid for x off the triangle; on the triangle's own plane outside it gives 0.
// For x inside the triangle (a panel's own centroid) the principal value is 0
// and callers must use that instead.
double double_layer_triangle(const Vec3& x, const Vec3& p0, const Vec3& p1, const Vec3& p2);

// Both layers of a flat triangle with unit normal n and the given area, by
// Radon's 7-point rule (triangle_rules.hpp): the far-field kernel. Relative
// error below about 1e-5 for x farther than three triangle diameters.
struct LayerValues {
    double single = 0.0;
    double dbl = 0.0;
};

inline LayerValues radon7_layers(const Vec3& x, const Vec3& p0, const Vec3& p1, const Vec3& p2, const Vec3& n,
                                 double area) {
    const TriangleRule& rule = radon7_rule();
    LayerValues v;
    for (std::size_t q = 0; q < rule.weight.size(); ++q) {
        const auto& l = rule.point[q];
        const Vec3 r = x - (l[0] * p0 + l[1] * p1 + l[2] * p2);
        const double inv_r = 1.0 / r.norm();
        v.single += rule.weight[q] * inv_r;
        v.dbl += rule.weight[q] * n.dot(r) * inv_r * inv_r * inv_r;
    }
    const double scale = area / (4.0 * M_PI);
    v.single *= scale;
    v.dbl *= scale;
    return v;
}

}  // namespace murk
