#pragma once
// How well the readings can locate a target: the Fisher information of the
// readings about the target's parameters theta (position, and optionally size and
// contrast) and the Cramér-Rao lower bound on the covariance of any unbiased
// estimate of theta.
//
// Model: y = dV(theta) + n, n Gaussian with zero mean and covariance C that does
// not depend on theta. Then (Kay 1993, "Fundamentals of Statistical Signal
// Processing, Volume I: Estimation Theory", section 3.9, eq. 3.31, the general
// Gaussian case; the CRLB theorem is section 3.7, Theorem 3.2)
//   J(theta) = G^T C^-1 G,   G = d dV / d theta (readings x parameters),
//   cov(theta_hat) >= J^-1 (in the positive semidefinite sense).
// For a linear model y = H theta + n the bound is attained by the least-squares
// estimator weighted by C^-1 (Kay 1993, section 4.5, Theorem 4.2). Section and
// equation numbers are from memory; the formulas are the standard ones.
//
// Complex readings (lock-in phasors) with independent noise of the same rms in
// both quadratures are passed as two real readings each (real and imaginary part,
// each with that rms): as_real_readings below.
#include "geometry/eigen_core.hpp"

#include <cstdint>
#include <vector>

namespace murk {

// J = G^T C^-1 G. gradient: readings x parameters; noise_covariance: readings x
// readings, symmetric positive definite. Throws InputError for mismatched sizes,
// non-finite entries or a covariance that is not positive definite.
Eigen::MatrixXd fisher_information(const Eigen::MatrixXd& gradient, const Eigen::MatrixXd& noise_covariance);
// The same for independent noise: noise_rms one standard deviation (> 0) per reading
// (a name of its own: an Eigen expression would convert to either argument type).
Eigen::MatrixXd fisher_information_independent(const Eigen::MatrixXd& gradient, const Eigen::VectorXd& noise_rms);

// Codes as the design output writes them.
enum class BoundStatus : std::uint8_t {
    ok = 0,               // J invertible and well conditioned
    ill_conditioned = 1,  // J invertible, but its scaled condition number exceeds max_condition:
                          // the bound is given but some combination of parameters is barely informed
    singular = 2,         // J numerically singular (or zero): some combination of parameters is not
                          // informed at all; the bound is unbounded (reported as +infinity)
};

struct BoundOptions {
    int position_parameters = 3;  // the first this many parameters are the position (2 for a planar problem)
    double max_condition = 1e8;   // of the scaled information matrix, beyond which a point is ill_conditioned
};

// The bound at one point. Never NaN: where J is singular every standard deviation
// and semi-axis is +infinity (the sentinel for "unbounded"); `axes` then holds
// the eigenvectors of the position block of J, the last one the least informed
// direction.
struct LocalizationBound {
    BoundStatus status = BoundStatus::singular;
    // Condition number of D^-1/2 J D^-1/2, D = diag(J): independent of the units of
    // the parameters; +infinity when singular.
    double condition = 0;
    Eigen::MatrixXd covariance;          // J^-1 (parameters^2); +infinity entries when singular
    Eigen::VectorXd standard_deviation;  // sqrt(diag J^-1), one per parameter
    // Error ellipsoid of the position (1 standard deviation; for a probability P
    // multiply by the square root of the chi-squared quantile of P with
    // position_parameters degrees of freedom): the eigen-decomposition of the
    // position block of J^-1, which accounts for the other parameters being unknown.
    Eigen::VectorXd semi_axes;  // descending
    Eigen::MatrixXd axes;       // unit columns, one per semi-axis
};

LocalizationBound localization_bound(const Eigen::MatrixXd& information, const BoundOptions& options = {});

// The bound over a grid of target points with independent noise. gradient: one
// matrix per parameter, readings x points (as TargetResponse holds it);
// noise_rms per reading. A point lies within the accuracy when its status is not
// singular and its largest position semi-axis (the 1-standard-deviation error in
// the worst direction) is at most accuracy_m.
struct BoundMap {
    std::vector<BoundStatus> status;     // per point
    Eigen::VectorXd condition;           // per point (+infinity when singular)
    Eigen::MatrixXd standard_deviation;  // parameters x points (+infinity when singular)
    Eigen::MatrixXd semi_axes;           // position_parameters x points, descending
    Eigen::MatrixXd axes;                // position_parameters^2 x points: the axes, column-major
    std::vector<std::uint8_t> within_accuracy;  // 1 where the bound meets accuracy_m
    std::size_t points_within = 0;
    double volume_within_m3 = 0;  // points_within x cell_volume_m3
};

BoundMap localization_bound_map(const std::vector<Eigen::MatrixXd>& gradient, const Eigen::VectorXd& noise_rms,
                                double accuracy_m, double cell_volume_m3, const BoundOptions& options = {});

// Complex readings as real ones: rows [Re; Im] of each matrix (2 x readings rows,
// reading k's real part in row k and its imaginary part in row readings + k), and
// each rms repeated.
Eigen::MatrixXd as_real_readings(const Eigen::MatrixXcd& readings);
Eigen::VectorXd as_real_noise(const Eigen::VectorXd& noise_rms);

}  // namespace murk
