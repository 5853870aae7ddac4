// Restarted GMRES against a direct solve on small systems, real and complex.
#include "solver/gmres.hpp"

#include <Eigen/LU>
#include <doctest/doctest.h>

using namespace murk;

namespace {
template <class S>
Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic> near_identity(int n, double spread, unsigned seed) {
    std::srand(seed);
    using M = Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic>;
    return M::Identity(n, n) + spread * M::Random(n, n) / std::sqrt(double(n));
}
}  // namespace

TEST_CASE_TEMPLATE("gmres solves a well-conditioned system to its tolerance", S, double, std::complex<double>) {
    using V = Eigen::Matrix<S, Eigen::Dynamic, 1>;
    const int n = 60;
    const auto a = near_identity<S>(n, 0.8, 7);
    const V b = V::Random(n);
    V x;
    const GmresResult r = gmres<S>([&](const V& v) -> V { return a * v; }, b, x, 1e-12, 200);
    CHECK(r.converged);
    const V direct = a.partialPivLu().solve(b);
    CHECK((x - direct).norm() / direct.norm() < 1e-10);
    // The true residual meets the tolerance, not only the recurrence's estimate.
    CHECK((b - a * x).norm() / b.norm() < 2e-12);

    SUBCASE("a short restart still converges, in more iterations") {
        V y;
        const GmresResult restarted = gmres<S>([&](const V& v) -> V { return a * v; }, b, y, 1e-12, 400, 5);
        CHECK(restarted.converged);
        CHECK(restarted.iterations > r.iterations);
        CHECK((y - direct).norm() / direct.norm() < 1e-10);
    }
    SUBCASE("an iteration limit too small is reported as not converged") {
        V y;
        const GmresResult limited = gmres<S>([&](const V& v) -> V { return a * v; }, b, y, 1e-12, 3);
        CHECK_FALSE(limited.converged);
        CHECK(limited.relative_residual > 1e-12);
    }
}

TEST_CASE("gmres of a zero right-hand side is zero at once") {
    Eigen::VectorXd x, b = Eigen::VectorXd::Zero(4);
    const GmresResult r = gmres<double>([](const Eigen::VectorXd& v) -> Eigen::VectorXd { return v; }, b, x, 1e-10, 10);
    CHECK(r.converged);
    CHECK(r.iterations == 0);
    CHECK(x.norm() == 0.0);
}
