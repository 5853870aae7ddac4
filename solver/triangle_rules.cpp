#include "solver/triangle_rules.hpp"

#include <cmath>

namespace murk {

const TriangleRule& centroid_rule() {
    static const TriangleRule rule{{{1.0 / 3, 1.0 / 3, 1.0 / 3}}, {1.0}};
    return rule;
}

const TriangleRule& radon7_rule() {
    static const TriangleRule rule = [] {
        const double s = std::sqrt(15.0);
        const double a = (6.0 - s) / 21.0, b = (6.0 + s) / 21.0;
        const double wa = (155.0 - s) / 1200.0, wb = (155.0 + s) / 1200.0;
        TriangleRule r;
        r.point = {{1.0 / 3, 1.0 / 3, 1.0 / 3},
                   {a, a, 1 - 2 * a}, {a, 1 - 2 * a, a}, {1 - 2 * a, a, a},
                   {b, b, 1 - 2 * b}, {b, 1 - 2 * b, b}, {1 - 2 * b, b, b}};
        r.weight = {9.0 / 40, wa, wa, wa, wb, wb, wb};
        return r;
    }();
    return rule;
}

}  // namespace murk
