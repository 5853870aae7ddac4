#pragma once
// Symmetric quadrature rules on a triangle, in barycentric coordinates, with
// weights that sum to one (multiply by the panel area).
//
//  - centroid rule: exact for polynomials of degree 1.
//  - 7-point rule of Radon (1948), as tabulated by Stroud (1971, "Approximate
//    calculation of multiple integrals", formula T2:5-1): exact for degree 5.
#include <array>
#include <vector>

namespace murk {

struct TriangleRule {
    std::vector<std::array<double, 3>> point;  // barycentric (l0, l1, l2)
    std::vector<double> weight;                // sums to 1
};

const TriangleRule& centroid_rule();
const TriangleRule& radon7_rule();

}  // namespace murk
