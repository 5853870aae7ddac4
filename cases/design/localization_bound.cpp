// Fisher information and the Cramér-Rao bound; contracts and sources in
// localization_bound.hpp.
#include "cases/design/localization_bound.hpp"

#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"

#include <Eigen/Cholesky>
#include <Eigen/Eigenvalues>
#include <Eigen/SVD>
#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

namespace murk {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

void require_finite(const Eigen::MatrixXd& m, const char* what) {
    if (!m.allFinite()) throw InputError(std::string(what) + " holds a value that is not finite");
}

}  // namespace

Eigen::MatrixXd fisher_information(const Eigen::MatrixXd& gradient, const Eigen::MatrixXd& noise_covariance) {
    if (noise_covariance.rows() != gradient.rows() || noise_covariance.cols() != gradient.rows())
        throw InputError("noise covariance is " + std::to_string(noise_covariance.rows()) + " x " +
                         std::to_string(noise_covariance.cols()) + " but there are " +
                         std::to_string(gradient.rows()) + " readings");
    require_finite(gradient, "the readings' gradient");
    require_finite(noise_covariance, "the noise covariance");
    if ((noise_covariance - noise_covariance.transpose()).norm() > 1e-12 * noise_covariance.norm())
        throw InputError("the noise covariance is not symmetric");
    const Eigen::LLT<Eigen::MatrixXd> llt(noise_covariance);
    if (llt.info() != Eigen::Success) throw InputError("the noise covariance is not positive definite");
    // J = (L^-1 G)^T (L^-1 G), C = L L^T: symmetric by construction.
    const Eigen::MatrixXd w = llt.matrixL().solve(gradient);
    return w.transpose() * w;
}

Eigen::MatrixXd fisher_information_independent(const Eigen::MatrixXd& gradient, const Eigen::VectorXd& noise_rms) {
    if (noise_rms.size() != gradient.rows())
        throw InputError("noise is given for " + std::to_string(noise_rms.size()) + " readings but there are " +
                         std::to_string(gradient.rows()));
    require_finite(gradient, "the readings' gradient");
    for (Eigen::Index k = 0; k < noise_rms.size(); ++k)
        if (!(noise_rms(k) > 0) || !std::isfinite(noise_rms(k)))
            throw InputError("the noise rms of reading " + std::to_string(k) + " must be positive and finite");
    const Eigen::MatrixXd w = noise_rms.cwiseInverse().asDiagonal() * gradient;
    return w.transpose() * w;
}

LocalizationBound localization_bound(const Eigen::MatrixXd& information, const BoundOptions& options) {
    const Eigen::Index n = information.rows();
    const Eigen::Index np = options.position_parameters;
    MURK_CHECK(information.cols() == n, "an information matrix is square");
    MURK_CHECK(np >= 1 && np <= n, "the position is among the parameters");
    MURK_CHECK(information.allFinite(), "the information is finite (fisher_information checks its inputs)");
    LocalizationBound out;
    out.covariance = Eigen::MatrixXd::Constant(n, n, kInf);
    out.standard_deviation = Eigen::VectorXd::Constant(n, kInf);
    out.semi_axes = Eigen::VectorXd::Constant(np, kInf);
    out.condition = kInf;
    {  // fallback axes: the position block of J, least informed direction last
        const Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> e(information.topLeftCorner(np, np));
        out.axes = e.eigenvectors().rowwise().reverse();
    }
    // Scaled by its diagonal so that the condition number does not depend on the
    // units of the parameters (metres, ratios).
    const Eigen::VectorXd d = information.diagonal();
    if (!(d.minCoeff() > 0)) return out;  // a parameter with no information at all
    const Eigen::VectorXd s = d.cwiseSqrt().cwiseInverse();
    const Eigen::MatrixXd scaled = s.asDiagonal() * information * s.asDiagonal();
    const Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(scaled);
    const double lo = eig.eigenvalues()(0), hi = eig.eigenvalues()(n - 1);
    // Numerically singular: the smallest eigenvalue is within rounding of zero.
    if (!(lo > 64 * std::numeric_limits<double>::epsilon() * double(n) * hi)) return out;
    out.condition = hi / lo;
    out.status = out.condition > options.max_condition ? BoundStatus::ill_conditioned : BoundStatus::ok;
    const Eigen::MatrixXd& v = eig.eigenvectors();
    const Eigen::MatrixXd scaled_inverse = v * eig.eigenvalues().cwiseInverse().asDiagonal() * v.transpose();
    out.covariance = s.asDiagonal() * scaled_inverse * s.asDiagonal();
    out.covariance = 0.5 * (out.covariance + out.covariance.transpose());
    out.standard_deviation = out.covariance.diagonal().cwiseMax(0.0).cwiseSqrt();
    // The position block is B B^T with B = (S V Lambda^-1/2) restricted to its first np rows,
    // so the semi-axes are B's singular values and the axes its left singular vectors. Not
    // from an eigen-decomposition of the block itself: when one direction is far less
    // informed than the others and lies along a coordinate axis (which the diagonal scaling
    // hides from the condition number), that block spans dozens of orders of magnitude and
    // its small eigenvalues drown in rounding (they came out 0). B is a well-conditioned
    // matrix with scaled rows, whose singular values two-sided Jacobi with a pivoted QR
    // computes to high relative accuracy (Demmel & Veselic 1992, "Jacobi's method is more
    // accurate than QR", SIAM J. Matrix Anal. Appl. 13:1204-1245).
    const Eigen::MatrixXd b =
        (s.asDiagonal() * v * eig.eigenvalues().cwiseSqrt().cwiseInverse().asDiagonal()).topRows(np);
    const Eigen::JacobiSVD<Eigen::MatrixXd, Eigen::FullPivHouseholderQRPreconditioner> svd(b, Eigen::ComputeFullU);
    // Within the position block every parameter is a length, so the block's own spread
    // means something whatever the scaling above: a direction informed (a_max/a_min)^2
    // times less than another, when it lies along a coordinate axis, leaves the scaled
    // condition number near 1 (measured: 1e19 m semi-axes beside millimetres, marked ok).
    // So the condition is the larger of the two, and a spread beyond rounding is singular.
    const Eigen::VectorXd a = svd.singularValues();  // descending
    const double spread = a(np - 1) > 0 ? (a(0) / a(np - 1)) * (a(0) / a(np - 1)) : kInf;
    if (!(spread * 64 * std::numeric_limits<double>::epsilon() * double(np) < 1)) {
        LocalizationBound singular;
        singular.covariance = out.covariance.setConstant(kInf);
        singular.standard_deviation = out.standard_deviation.setConstant(kInf);
        singular.semi_axes = Eigen::VectorXd::Constant(np, kInf);
        singular.axes = out.axes;  // the fallback: the position block of J, least informed last
        singular.condition = kInf;
        return singular;
    }
    out.condition = std::max(out.condition, spread);
    out.status = out.condition > options.max_condition ? BoundStatus::ill_conditioned : BoundStatus::ok;
    out.semi_axes = a;
    out.axes = svd.matrixU();
    return out;
}

BoundMap localization_bound_map(const std::vector<Eigen::MatrixXd>& gradient, const Eigen::VectorXd& noise_rms,
                                double accuracy_m, double cell_volume_m3, const BoundOptions& options) {
    if (gradient.empty()) throw InputError("a localization map needs at least one parameter");
    const Eigen::Index readings = gradient[0].rows(), points = gradient[0].cols();
    const Eigen::Index n = static_cast<Eigen::Index>(gradient.size()), np = options.position_parameters;
    if (np < 1 || np > n)
        throw InputError("position_parameters must lie between 1 and the number of parameters (" +
                         std::to_string(n) + ")");
    for (const Eigen::MatrixXd& g : gradient)
        if (g.rows() != readings || g.cols() != points)
            throw InputError("the gradient of every parameter must have the same readings and points");
    if (!(accuracy_m > 0) || !std::isfinite(accuracy_m)) throw InputError("accuracy must be positive and finite");
    if (!(cell_volume_m3 > 0) || !std::isfinite(cell_volume_m3))
        throw InputError("cell volume must be positive and finite");
    BoundMap map;
    map.status.resize(std::size_t(points));
    map.condition.resize(points);
    map.standard_deviation.resize(n, points);
    map.semi_axes.resize(np, points);
    map.axes.resize(np * np, points);
    map.within_accuracy.assign(std::size_t(points), 0);
    Eigen::MatrixXd g(readings, n);
    for (Eigen::Index i = 0; i < points; ++i) {
        for (Eigen::Index p = 0; p < n; ++p) g.col(p) = gradient[std::size_t(p)].col(i);
        const LocalizationBound b = localization_bound(fisher_information_independent(g, noise_rms), options);
        map.status[std::size_t(i)] = b.status;
        map.condition(i) = b.condition;
        map.standard_deviation.col(i) = b.standard_deviation;
        map.semi_axes.col(i) = b.semi_axes;
        map.axes.col(i) = Eigen::Map<const Eigen::VectorXd>(b.axes.data(), np * np);
        if (b.status != BoundStatus::singular && b.semi_axes(0) <= accuracy_m) {
            map.within_accuracy[std::size_t(i)] = 1;
            ++map.points_within;
        }
    }
    map.volume_within_m3 = double(map.points_within) * cell_volume_m3;
    return map;
}

Eigen::MatrixXd as_real_readings(const Eigen::MatrixXcd& readings) {
    Eigen::MatrixXd out(2 * readings.rows(), readings.cols());
    out.topRows(readings.rows()) = readings.real();
    out.bottomRows(readings.rows()) = readings.imag();
    return out;
}

Eigen::VectorXd as_real_noise(const Eigen::VectorXd& noise_rms) {
    Eigen::VectorXd out(2 * noise_rms.size());
    out << noise_rms, noise_rms;
    return out;
}

}  // namespace murk
