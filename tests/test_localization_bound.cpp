// Fisher information and the Cramér-Rao bound (cases/design/localization_bound.hpp).
// Sources: Kay 1993, "Fundamentals of Statistical Signal Processing, Volume I:
// Estimation Theory": the general Gaussian CRLB (section 3.9), the linear model,
// whose weighted least-squares estimator attains the bound (section 4.5), the DC
// level in white noise, var >= sigma^2 / N (example 3.3), and the asymptotic
// efficiency of the maximum-likelihood estimate (chapter 7) -- section numbers
// from memory.
#include "cases/design/localization_bound.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <Eigen/Cholesky>
#include <Eigen/QR>
#include <cmath>
#include <random>

using namespace murk;

namespace {

bool has_nan(const Eigen::MatrixXd& m) { return m.array().isNaN().any(); }

}  // namespace

TEST_CASE("localization bound: the linear Gaussian model, where least squares attains the bound") {
    Eigen::MatrixXd h(6, 3);
    h << 1.0, 0.2, -0.5, 0.3, 2.0, 0.1, -0.7, 0.4, 1.5, 0.9, -1.1, 0.3, 0.2, 0.6, -0.8, 1.4, 0.1, 0.7;
    Eigen::MatrixXd a(6, 6);
    a << 1.0, 0.1, 0.0, 0.3, -0.2, 0.0, 0.2, 0.8, 0.1, 0.0, 0.1, 0.4, 0.0, 0.3, 1.2, -0.1, 0.0, 0.2, 0.1, 0.0, 0.2,
        0.9, 0.3, -0.1, 0.0, 0.2, 0.0, 0.1, 1.1, 0.0, 0.3, 0.0, -0.2, 0.0, 0.1, 0.7;
    const Eigen::MatrixXd sigma = 1e-4 * (a * a.transpose() + 0.5 * Eigen::MatrixXd::Identity(6, 6));
    const LocalizationBound b = localization_bound(fisher_information(h, sigma));
    CHECK(b.status == BoundStatus::ok);
    // Covariance of the weighted least-squares estimator theta = W y, computed another
    // way: whiten with the Cholesky factor, solve by column-pivoted QR, then W Sigma W^T.
    const Eigen::MatrixXd l = sigma.llt().matrixL();
    const Eigen::MatrixXd l_inv = l.triangularView<Eigen::Lower>().solve(Eigen::MatrixXd::Identity(6, 6));
    const Eigen::MatrixXd w = (l_inv * h).colPivHouseholderQr().solve(l_inv);
    const Eigen::MatrixXd estimator_covariance = w * sigma * w.transpose();
    CHECK((b.covariance - estimator_covariance).norm() < 1e-10 * estimator_covariance.norm());
    for (int i = 0; i < 3; ++i)
        CHECK(b.standard_deviation(i) == doctest::Approx(std::sqrt(estimator_covariance(i, i))).epsilon(1e-10));
    // The ellipsoid: semi-axes^2 are the eigenvalues of the covariance, axes orthonormal.
    const Eigen::MatrixXd back = b.axes * b.semi_axes.array().square().matrix().asDiagonal() * b.axes.transpose();
    CHECK((back - estimator_covariance).norm() < 1e-10 * estimator_covariance.norm());
    CHECK(b.semi_axes(0) >= b.semi_axes(1));
    CHECK(b.semi_axes(1) >= b.semi_axes(2));

    SUBCASE("a DC level in white noise: var >= sigma^2 / N (Kay 1993, example 3.3)") {
        const Eigen::MatrixXd ones = Eigen::MatrixXd::Ones(25, 1);
        const LocalizationBound dc =
            localization_bound(fisher_information_independent(ones, Eigen::VectorXd::Constant(25, 0.3)), BoundOptions{1});
        CHECK(dc.standard_deviation(0) == doctest::Approx(0.3 / 5.0).epsilon(1e-14));
    }
    SUBCASE("a diagonal covariance gives the same information as the rms per reading") {
        const Eigen::VectorXd rms = (Eigen::VectorXd(6) << 1e-2, 2e-2, 5e-3, 1e-2, 3e-2, 8e-3).finished();
        const Eigen::MatrixXd full = rms.array().square().matrix().asDiagonal();
        CHECK((fisher_information_independent(h, rms) - fisher_information(h, full)).norm() <
              1e-12 * fisher_information_independent(h, rms).norm());
    }
}

TEST_CASE("localization bound: a maximum-likelihood estimate's scatter approaches the bound at high SNR") {
    // Synthetic nonlinear model: four point sensors in a plane see a dipole-like
    // response A n_k.(theta - s_k) / |theta - s_k|^3 of a target at theta (2-D).
    // The ML estimate (Gauss-Newton from the truth; the noise is small) is
    // asymptotically efficient (Kay 1993, ch. 7), so its sample covariance over
    // N = 4000 trials matches J^-1 within the sampling error of a standard
    // deviation, 1/sqrt(2N) = 1.1 %: the tolerance is 5 %.
    const std::vector<Eigen::Vector2d> s = {{0.1, 0.0}, {-0.1, 0.0}, {0.0, 0.1}, {0.0, -0.1}, {0.07, 0.07}};
    const std::vector<Eigen::Vector2d> n = {{-1, 0}, {1, 0}, {0, -1}, {0, 1}, {-0.6, -0.8}};
    const double amplitude = 1e-3, noise = 1e-3;
    const auto model = [&](const Eigen::Vector2d& t, Eigen::VectorXd& y, Eigen::MatrixXd& g) {
        y.resize(5);
        g.resize(5, 2);
        for (int k = 0; k < 5; ++k) {
            const Eigen::Vector2d r = t - s[std::size_t(k)];
            const double len = r.norm(), len3 = len * len * len;
            const double nr = n[std::size_t(k)].dot(r);
            y(k) = amplitude * nr / len3;
            g.row(k) = amplitude * (n[std::size_t(k)] / len3 - 3.0 * nr * r / (len3 * len * len)).transpose();
        }
    };
    const Eigen::Vector2d truth(0.02, -0.01);
    Eigen::VectorXd y0;
    Eigen::MatrixXd g0;
    model(truth, y0, g0);
    const LocalizationBound bound =
        localization_bound(fisher_information_independent(g0, Eigen::VectorXd::Constant(5, noise)), BoundOptions{2});
    REQUIRE(bound.status == BoundStatus::ok);
    MESSAGE("bound: std " << bound.standard_deviation.transpose() << " m");
    CHECK(bound.standard_deviation.maxCoeff() < 0.01 * 0.1);  // high SNR: errors well below the geometry

    std::mt19937_64 random(20261202);
    std::normal_distribution<double> gauss(0.0, noise);
    const int trials = 4000;
    Eigen::MatrixXd estimates(2, trials);
    for (int t = 0; t < trials; ++t) {
        Eigen::VectorXd data(5);
        for (int k = 0; k < 5; ++k) data(k) = y0(k) + gauss(random);
        Eigen::Vector2d theta = truth;
        for (int it = 0; it < 20; ++it) {
            Eigen::VectorXd y;
            Eigen::MatrixXd g;
            model(theta, y, g);
            const Eigen::Vector2d step = g.colPivHouseholderQr().solve(data - y);
            theta += step;
            if (step.norm() < 1e-12) break;
        }
        estimates(0, t) = theta(0);  // element-wise: GCC 12 misreports a whole-column copy (DEVELOPERS.md)
        estimates(1, t) = theta(1);
    }
    const Eigen::Vector2d mean = estimates.rowwise().mean();
    const Eigen::MatrixXd centred = estimates.colwise() - mean;
    const Eigen::Matrix2d sample = centred * centred.transpose() / double(trials - 1);
    for (int i = 0; i < 2; ++i) {
        const double ratio = std::sqrt(sample(i, i)) / bound.standard_deviation(i);
        MESSAGE("axis " << i << ": ML scatter / bound = " << ratio);
        CHECK(ratio == doctest::Approx(1.0).epsilon(0.05));
    }
    const double corr_sample = sample(0, 1) / std::sqrt(sample(0, 0) * sample(1, 1));
    const double corr_bound = bound.covariance(0, 1) / std::sqrt(bound.covariance(0, 0) * bound.covariance(1, 1));
    MESSAGE("correlation: ML " << corr_sample << ", bound " << corr_bound);
    CHECK(std::abs(corr_sample - corr_bound) < 0.05);
}

TEST_CASE("localization bound: invariances (noise scale, parameter units, more readings)") {
    Eigen::MatrixXd g(4, 3);
    g << 1.0, 0.5, 0.1, -0.3, 1.2, 0.4, 0.2, -0.1, 0.9, 0.7, 0.3, -0.5;
    const Eigen::VectorXd rms = Eigen::VectorXd::Constant(4, 1e-2);
    const LocalizationBound b = localization_bound(fisher_information_independent(g, rms));
    const double c = 7.5;
    const LocalizationBound scaled = localization_bound(fisher_information_independent(g, Eigen::VectorXd(c * rms)));
    CHECK((scaled.standard_deviation - c * b.standard_deviation).norm() < 1e-12 * b.standard_deviation.norm() * c);
    CHECK((scaled.semi_axes - c * b.semi_axes).norm() < 1e-12 * b.semi_axes.norm() * c);
    CHECK(scaled.condition == doctest::Approx(b.condition).epsilon(1e-12));
    // A parameter measured in other units (theta_3' = theta_3 / u): its column scales by u,
    // its bound by 1/u, the others and the scaled condition number do not change.
    Eigen::MatrixXd g_units = g;
    const double u = 1e3;
    g_units.col(2) *= u;
    const LocalizationBound units = localization_bound(fisher_information_independent(g_units, rms), BoundOptions{2});
    const LocalizationBound plain = localization_bound(fisher_information_independent(g, rms), BoundOptions{2});
    CHECK(units.standard_deviation(2) == doctest::Approx(plain.standard_deviation(2) / u).epsilon(1e-10));
    CHECK(units.standard_deviation(0) == doctest::Approx(plain.standard_deviation(0)).epsilon(1e-10));
    CHECK(units.condition == doctest::Approx(plain.condition).epsilon(1e-10));
    // One more reading never loosens the bound (information adds).
    Eigen::MatrixXd more(5, 3);
    more << g, Eigen::RowVector3d(0.2, 0.2, 0.2);
    const LocalizationBound extra = localization_bound(fisher_information_independent(more, Eigen::VectorXd::Constant(5, 1e-2)));
    for (int i = 0; i < 3; ++i) CHECK(extra.standard_deviation(i) <= b.standard_deviation(i));
}

TEST_CASE("localization bound: singular and ill-conditioned information are flagged, never NaN") {
    const Eigen::VectorXd rms = Eigen::VectorXd::Constant(3, 1e-3);
    SUBCASE("two parameters with the same effect on every reading") {
        Eigen::MatrixXd g(3, 3);
        g << 1, 1, 0.2, 2, 2, -0.4, 0.5, 0.5, 1.0;
        const LocalizationBound b = localization_bound(fisher_information_independent(g, rms));
        CHECK(b.status == BoundStatus::singular);
        CHECK(std::isinf(b.standard_deviation(0)));
        CHECK(std::isinf(b.semi_axes(0)));
        CHECK_FALSE(has_nan(b.covariance));
        CHECK_FALSE(has_nan(b.axes));
        // The least informed direction (last axis) is x - y, the one the readings cannot see.
        CHECK(std::abs(b.axes.col(2).dot(Eigen::Vector3d(1, -1, 0).normalized())) == doctest::Approx(1.0));
    }
    SUBCASE("no signal at all") {
        const LocalizationBound b = localization_bound(fisher_information_independent(Eigen::MatrixXd::Zero(3, 3), rms));
        CHECK(b.status == BoundStatus::singular);
        CHECK_FALSE(has_nan(b.covariance));
        CHECK_FALSE(has_nan(b.axes));
        CHECK_FALSE(has_nan(b.standard_deviation));
    }
    SUBCASE("nearly parallel columns") {
        Eigen::MatrixXd g(3, 3);
        g << 1, 1 + 1e-4, 0.2, 2, 2, -0.4, 0.5, 0.5, 1.0;
        const LocalizationBound b = localization_bound(fisher_information_independent(g, rms));
        CHECK(b.status == BoundStatus::ill_conditioned);
        CHECK(b.condition > 1e8);
        CHECK(std::isfinite(b.standard_deviation(0)));
        CHECK(b.standard_deviation(0) > 1e3 * 1e-3);  // barely informed: far beyond the noise scale
    }
    SUBCASE("a direction along a coordinate axis informed far less than the others") {
        // The diagonal scaling makes this J's scaled condition number 1, yet z is informed
        // 1e30 times less than x and y, all three in metres: not a bound worth a number.
        const Eigen::Vector3d d(1e6, 1e6, 1e-24);
        const LocalizationBound flat = localization_bound(Eigen::MatrixXd(d.asDiagonal()));
        CHECK(flat.status == BoundStatus::singular);
        CHECK(std::isinf(flat.semi_axes(0)));
        CHECK_FALSE(has_nan(flat.axes));
        // 1e10 less: finite, but flagged; the semi-axes are the exact 1/sqrt(J_ii).
        const Eigen::Vector3d e(1e6, 1e6, 1e-4);
        const LocalizationBound weak = localization_bound(Eigen::MatrixXd(e.asDiagonal()));
        CHECK(weak.status == BoundStatus::ill_conditioned);
        CHECK(weak.condition == doctest::Approx(1e10));
        CHECK(weak.semi_axes(0) == doctest::Approx(100.0));
        CHECK(weak.semi_axes(2) == doctest::Approx(1e-3));
    }
    SUBCASE("bad input is an InputError") {
        Eigen::MatrixXd g = Eigen::MatrixXd::Identity(3, 3);
        CHECK_THROWS_AS(fisher_information_independent(g, Eigen::VectorXd::Zero(3)), InputError);
        CHECK_THROWS_AS(fisher_information(g, Eigen::MatrixXd(-Eigen::MatrixXd::Identity(3, 3))), InputError);
        g(0, 0) = std::nan("");
        CHECK_THROWS_AS(fisher_information_independent(g, rms), InputError);
    }
}

TEST_CASE("localization bound: a map over points and the region within an accuracy") {
    // Three points, two parameters, two readings: a well-located point, a point
    // the readings do not see, and a poorly located one.
    std::vector<Eigen::MatrixXd> gradient(2, Eigen::MatrixXd(2, 3));
    gradient[0] << 1.0, 0.0, 1e-2, 0.0, 0.0, 0.0;
    gradient[1] << 0.0, 0.0, 0.0, 1.0, 0.0, 1e-2;
    const Eigen::VectorXd rms = Eigen::VectorXd::Constant(2, 1e-3);
    const BoundMap map = localization_bound_map(gradient, rms, 0.01, 2e-6, BoundOptions{2});
    CHECK(map.status[0] == BoundStatus::ok);
    CHECK(map.status[1] == BoundStatus::singular);
    CHECK(map.status[2] == BoundStatus::ok);
    CHECK(map.standard_deviation(0, 0) == doctest::Approx(1e-3));  // sigma / |g|
    CHECK(map.semi_axes(0, 2) == doctest::Approx(0.1));
    CHECK(map.within_accuracy == std::vector<std::uint8_t>{1, 0, 0});
    CHECK(map.points_within == 1);
    CHECK(map.volume_within_m3 == doctest::Approx(2e-6));
    CHECK_FALSE(has_nan(map.standard_deviation));
    CHECK_FALSE(has_nan(map.semi_axes));
    CHECK_FALSE(has_nan(map.axes));
    CHECK_FALSE(map.condition.array().isNaN().any());
}

TEST_CASE("localization bound: complex readings as real and imaginary parts") {
    // A phasor reading with noise sigma in each quadrature: J = Re(g^H g) / sigma^2.
    Eigen::MatrixXcd g(2, 2);
    g << std::complex<double>(1, 2), std::complex<double>(0.5, -1), std::complex<double>(-0.3, 0.4),
        std::complex<double>(2, 0.1);
    const double sigma = 0.1;
    const Eigen::MatrixXd j = fisher_information_independent(as_real_readings(g), as_real_noise(Eigen::VectorXd::Constant(2, sigma)));
    const Eigen::MatrixXd expected = (g.adjoint() * g).real() / (sigma * sigma);
    CHECK((j - expected).norm() < 1e-12 * expected.norm());
}
