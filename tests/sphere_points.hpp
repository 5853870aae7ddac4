#pragma once
// Nearly uniform points on the unit sphere, for the tests of the compressed
// operators: the Fibonacci lattice (Gonzalez 2010, "Measurement of areas on a
// sphere using Fibonacci and latitude-longitude lattices", Mathematical
// Geosciences 42).
#include "geometry/eigen_core.hpp"

#include <cmath>

namespace murk::fixtures {

inline Eigen::Matrix3Xd fibonacci_sphere(Eigen::Index n) {
    constexpr double pi = 3.14159265358979323846;
    Eigen::Matrix3Xd points(3, n);
    const double golden_angle = pi * (3 - std::sqrt(5.0));
    for (Eigen::Index i = 0; i < n; ++i) {
        const double z = 1 - (2 * double(i) + 1) / double(n);
        const double rho = std::sqrt(1 - z * z);
        points.col(i) << rho * std::cos(golden_angle * double(i)), rho * std::sin(golden_angle * double(i)), z;
    }
    return points;
}

}  // namespace murk::fixtures
