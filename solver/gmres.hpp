#pragma once
// Restarted GMRES (Saad & Schultz 1986, "GMRES: a generalized minimal residual
// algorithm for solving nonsymmetric linear systems") for an operator given as
// a callback. Used on the small coupling systems of a sweep, where applying the
// operator costs one solve against a stored factorization and a few matrix-
// vector products, and no matrix of the operator exists. (Eigen's unsupported
// GMRES wants a matrix type; a callback keeps this one short.) Arnoldi with
// modified Gram-Schmidt, Givens rotations in their complex form.
#include "geometry/eigen_core.hpp"
#include "geometry/internal_check.hpp"

#include <cmath>
#include <complex>
#include <vector>

namespace murk {

struct GmresResult {
    int iterations = 0;            // operator applications
    double relative_residual = 0;  // |b - A x| / |b| (from the Arnoldi recurrence)
    bool converged = false;
};

namespace detail {
inline double magnitude(double v) { return std::abs(v); }
inline double magnitude(const std::complex<double>& v) { return std::abs(v); }
inline double conjugate(double v) { return v; }
inline std::complex<double> conjugate(const std::complex<double>& v) { return std::conj(v); }
}  // namespace detail

// Solves A x = b from x = 0 until |b - A x| <= tolerance |b|. apply(v) returns A v.
template <class S, class Apply>
GmresResult gmres(Apply&& apply, const Eigen::Matrix<S, Eigen::Dynamic, 1>& b,
                  Eigen::Matrix<S, Eigen::Dynamic, 1>& x, double tolerance, int max_iterations, int restart = 40) {
    using Vec = Eigen::Matrix<S, Eigen::Dynamic, 1>;
    // The tolerance a case gives was checked when the case was read.
    MURK_CHECK(tolerance > 0.0 && max_iterations >= 0 && restart >= 1, "GMRES is called with a usable setting");
    const Eigen::Index n = b.size();
    x = Vec::Zero(n);
    GmresResult result;
    const double b_norm = b.norm();
    if (b_norm == 0.0) {
        result.converged = true;
        return result;
    }
    Vec r = b;
    while (result.iterations < max_iterations) {
        const double beta = r.norm();
        result.relative_residual = beta / b_norm;
        if (result.relative_residual <= tolerance) {
            result.converged = true;
            return result;
        }
        const int m = std::min<int>(restart, max_iterations - result.iterations);
        std::vector<Vec> basis{r / beta};
        Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic> h = Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic>::Zero(m + 1, m);
        std::vector<double> c(m);
        std::vector<S> s(m);
        Vec g = Vec::Zero(m + 1);
        g(0) = beta;
        int k = 0;
        for (; k < m; ++k) {
            Vec w = apply(basis[k]);
            MURK_CHECK(w.size() == n, "the operator maps vectors of the right-hand side's size to the same size");
            ++result.iterations;
            for (int i = 0; i <= k; ++i) {  // modified Gram-Schmidt
                h(i, k) = basis[i].dot(w);  // conjugates basis[i]
                w -= h(i, k) * basis[i];
            }
            h(k + 1, k) = w.norm();
            for (int i = 0; i < k; ++i) {  // earlier rotations
                const S t = c[i] * h(i, k) + s[i] * h(i + 1, k);
                h(i + 1, k) = -detail::conjugate(s[i]) * h(i, k) + c[i] * h(i + 1, k);
                h(i, k) = t;
            }
            const S a = h(k, k), bb = h(k + 1, k);  // bb is real and >= 0
            const double r_len = std::sqrt(detail::magnitude(a) * detail::magnitude(a) +
                                           detail::magnitude(bb) * detail::magnitude(bb));
            if (detail::magnitude(a) == 0.0) {
                c[k] = 0.0, s[k] = S(1);
            } else {
                c[k] = detail::magnitude(a) / r_len;
                s[k] = (a / detail::magnitude(a)) * detail::conjugate(bb) / r_len;
            }
            h(k, k) = c[k] * a + s[k] * bb;
            h(k + 1, k) = S(0);
            g(k + 1) = -detail::conjugate(s[k]) * g(k);
            g(k) = c[k] * g(k);
            const bool breakdown = detail::magnitude(bb) == 0.0;
            if (!breakdown) basis.push_back(w / detail::magnitude(bb));
            if (detail::magnitude(g(k + 1)) <= tolerance * b_norm || breakdown) {
                ++k;
                break;
            }
        }
        // x += V y with H y = g (upper triangular k x k).
        const Vec y = h.topLeftCorner(k, k).template triangularView<Eigen::Upper>().solve(g.head(k));
        for (int i = 0; i < k; ++i) x += y(i) * basis[i];
        result.relative_residual = detail::magnitude(g(k)) / b_norm;
        if (result.relative_residual <= tolerance) {
            result.converged = true;
            return result;
        }
        if (result.iterations >= max_iterations) break;
        r = b - apply(x);  // true residual to restart from
        ++result.iterations;
    }
    return result;
}

}  // namespace murk
