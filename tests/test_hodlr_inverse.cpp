// The HODLR approximate inverse (the compressed solve's preconditioner) against
// the dense LU of the same matrix: a second-kind test matrix I + w K, K the
// Laplace (real) or Helmholtz (complex) kernel between nearly uniform points on
// the unit sphere and w = 4 pi / n each point's share of the area, so that the
// matrix is the identity plus a smoothing operator and well conditioned.
// Methods: Ambikasaran and Darve 2013, "An O(N log N) fast direct solver for
// partial hierarchically semi-separable matrices", J. Sci. Comput. 57 (the
// Woodbury recursion); Halko, Martinsson and Tropp 2011, "Finding structure
// with randomness", SIAM Review 53 (the randomized range finder).
#include "solver/hodlr_inverse.hpp"
#include "tests/sphere_points.hpp"

#include <Eigen/LU>
#include <doctest/doctest.h>

#include <cmath>
#include <omp.h>
#include <complex>
#include <vector>

using namespace murk;

namespace {

constexpr double pi = 3.14159265358979323846;

template <class S>
S entry(const Eigen::Matrix3Xd& points, Eigen::Index i, Eigen::Index j) {
    const double w = 4 * pi / double(points.cols());
    if (i == j) return S(1.0 + w);
    const double r = (points.col(i) - points.col(j)).norm();
    if constexpr (std::is_same_v<S, double>)
        return w / (4 * pi * r);
    else
        return w * std::exp(Complex(0, 2) * r) / (4 * pi * r);
}

template <class S>
BlockEntries<S> entries_of(const Eigen::Matrix3Xd& points) {
    return [&points](const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols, MatrixX<S>& out) {
        for (std::size_t j = 0; j < cols.size(); ++j)
            for (std::size_t i = 0; i < rows.size(); ++i)
                out(Eigen::Index(i), Eigen::Index(j)) = entry<S>(points, rows[i], cols[j]);
    };
}

struct Fixture {
    static constexpr Eigen::Index n = 2400;
    Eigen::Matrix3Xd points = fixtures::fibonacci_sphere(n);
};

template <class S>
HMatrix<S> operator_of(const Eigen::Matrix3Xd& points) {
    HMatrixOptions h;
    h.leaf_size = 32;
    h.tolerance = 1e-12;
    return HMatrix<S>(points, entries_of<S>(points), h);
}

// Leaves of 128 unknowns and a rank cap no block of these tests reaches, so that
// the tolerance alone sets the accuracy.
HodlrOptions uncapped(double tolerance, bool single_precision = false) {
    HodlrOptions o;
    o.leaf_size = 128;
    o.tolerance = tolerance;
    o.max_rank = 1000;
    o.single_precision = single_precision;
    return o;
}

// Largest relative column error of M^-1 b against the dense solve.
template <class S>
double inverse_error(const HodlrInverse<S>& m, const Eigen::PartialPivLU<MatrixX<S>>& lu, bool transposed) {
    const MatrixX<S> b = MatrixX<S>::Random(lu.rows(), 3);
    const MatrixX<S> exact = transposed ? MatrixX<S>(lu.transpose().solve(b)) : MatrixX<S>(lu.solve(b));
    const MatrixX<S> approx = m.solve(b, transposed);
    double worst = 0;
    for (Eigen::Index j = 0; j < b.cols(); ++j)
        worst = std::max(worst, (approx.col(j) - exact.col(j)).norm() / exact.col(j).norm());
    return worst;
}

}  // namespace

TEST_CASE_TEMPLATE("HODLR inverse: the error falls with the tolerance, down to the inverse itself", S, double,
                   Complex) {
    const Fixture f;
    const HMatrix<S> a = operator_of<S>(f.points);
    const Eigen::PartialPivLU<MatrixX<S>> lu(a.to_dense());
    std::srand(7);
    double previous = 1;
    for (const double tolerance : {1e-2, 1e-4, 1e-6, 1e-10}) {
        const HodlrInverse<S> m(a, uncapped(tolerance));
        CHECK(m.stats().capped_blocks == 0);
        CHECK(m.stats().leaves >= Fixture::n / 128);
        for (const bool transposed : {false, true}) {
            const double error = inverse_error(m, lu, transposed);
            INFO("tolerance " << tolerance << (transposed ? " transposed" : "") << ": error " << error);
            // A relative perturbation of the off-diagonal blocks of this well
            // conditioned matrix moves its inverse by about as much.
            CHECK(error <= 10 * tolerance);
            if (!transposed) {
                CHECK(error < previous);
                previous = error;
            }
        }
    }
}

TEST_CASE_TEMPLATE("HODLR inverse: with no rank allowed it is block Jacobi on the leaves", S, double, Complex) {
    const Fixture f;
    const HMatrix<S> a = operator_of<S>(f.points);
    HodlrOptions o;
    o.leaf_size = 200;
    o.max_rank = 0;
    const HodlrInverse<S> m(a, o);
    CHECK(m.stats().max_rank == 0);
    CHECK(m.stats().capped_blocks > 0);  // every coupling block had a rank above 0 to give up

    // The leaves, rebuilt here from the cluster tree: nodes of at most 200 points
    // whose parents have more.
    const ClusterTree& tree = a.tree();
    const MatrixX<S> dense = a.to_dense();
    MatrixX<S> jacobi = MatrixX<S>::Zero(Fixture::n, Fixture::n);
    std::vector<int> pending{0};
    std::size_t leaves = 0;
    while (!pending.empty()) {
        const ClusterTree::Node& node = tree.nodes[std::size_t(pending.back())];
        pending.pop_back();
        if (node.size() > 200 && !node.is_leaf()) {
            pending.push_back(node.first_child);
            pending.push_back(node.second_child);
            continue;
        }
        ++leaves;
        for (Eigen::Index p = node.begin; p < node.end; ++p)
            for (Eigen::Index q = node.begin; q < node.end; ++q) {
                const Eigen::Index i = tree.order[std::size_t(p)], j = tree.order[std::size_t(q)];
                jacobi(i, j) = dense(i, j);
            }
    }
    CHECK(m.stats().leaves == leaves);
    std::srand(11);
    const MatrixX<S> b = MatrixX<S>::Random(Fixture::n, 2);
    const MatrixX<S> expected = jacobi.partialPivLu().solve(b);
    CHECK((m.solve(b, false) - expected).norm() <= 1e-12 * expected.norm());
    const MatrixX<S> expected_t = jacobi.transpose().partialPivLu().solve(b);
    CHECK((m.solve(b, true) - expected_t).norm() <= 1e-12 * expected_t.norm());
}

TEST_CASE_TEMPLATE("HODLR inverse: single-precision storage halves the bytes and keeps the accuracy", S, double,
                   Complex) {
    const Fixture f;
    const HMatrix<S> a = operator_of<S>(f.points);
    const Eigen::PartialPivLU<MatrixX<S>> lu(a.to_dense());
    for (const double tolerance : {1e-2, 1e-3, 1e-4, 1e-5}) {
        const HodlrInverse<S> full(a, uncapped(tolerance));
        const HodlrInverse<S> single(a, uncapped(tolerance, true));
        // The ranks come from the blocks, not from the storage, so the same
        // entries are stored at half the size of a float against a double.
        CHECK(single.stats().max_rank == full.stats().max_rank);
        CHECK(2 * single.stats().bytes == full.stats().bytes);
        std::srand(13);
        for (const bool transposed : {false, true}) {
            const double error = inverse_error(single, lu, transposed);
            INFO("tolerance " << tolerance << (transposed ? " transposed" : "") << ": error " << error);
            // Rounding to float (unit roundoff 6e-8, IEEE 754) is far below the tolerance.
            CHECK(error <= 10 * tolerance);
        }
        // Still one linear operator: M^-1 (b + 3c) = M^-1 b + 3 M^-1 c to double
        // rounding (right-preconditioned GMRES relies on it).
        const MatrixX<S> b = MatrixX<S>::Random(Fixture::n, 1), c = MatrixX<S>::Random(Fixture::n, 1);
        const MatrixX<S> together = single.solve(MatrixX<S>(b + S(3.0) * c), false);
        const MatrixX<S> apart = single.solve(b, false) + S(3.0) * single.solve(c, false);
        CHECK((together - apart).norm() <= 1e-13 * together.norm());
    }
}

TEST_CASE_TEMPLATE("HODLR inverse: the same to the last bit on one thread and on two", S, double, Complex) {
    const Fixture f;
    const HMatrix<S> a = operator_of<S>(f.points);
    std::srand(5);
    const MatrixX<S> b = MatrixX<S>::Random(Fixture::n, 4);
    for (const bool single : {false, true}) {
        HodlrOptions o;
        o.leaf_size = 64;
        o.single_precision = single;
        const int threads = omp_get_max_threads();
        omp_set_num_threads(1);
        const MatrixX<S> one = HodlrInverse<S>(a, o).solve(b, false);
        omp_set_num_threads(2);
        const MatrixX<S> two = HodlrInverse<S>(a, o).solve(b, false);
        omp_set_num_threads(threads);
        CHECK((one - two).cwiseAbs().maxCoeff() == 0.0);
    }
}
