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

// GMRES as a sequence of requests: the caller applies the operator to request()
// and hands the image to answer(), until done(). Several systems can so advance
// together, their operator applications gathered into one blocked step (the
// exact sweep path solves a batch of points against one factorization this way);
// each run's arithmetic is the same as alone. Solves A x = b from x = 0 until
// |b - A x| <= tolerance |b|, restarting every `restart` iterations.
template <class S>
class GmresRun {
public:
    using Vec = Eigen::Matrix<S, Eigen::Dynamic, 1>;

    GmresRun(const Vec& b, double tolerance, int max_iterations, int restart = 40)
        : b_(b), tolerance_(tolerance), max_iterations_(max_iterations), restart_(restart) {
        // The tolerance a case gives was checked when the case was read.
        MURK_CHECK(tolerance > 0.0 && max_iterations >= 0 && restart >= 1, "GMRES is called with a usable setting");
        x_ = Vec::Zero(b.size());
        b_norm_ = b.norm();
        if (b_norm_ == 0.0) {
            result_.converged = true;
            done_ = true;
            return;
        }
        start_cycle(b_);
    }

    bool done() const { return done_; }
    // The vector whose image the run needs next (valid while !done()).
    const Vec& request() const { return restarting_ ? x_ : basis_[k_]; }
    // A * request().
    void answer(const Vec& image) {
        MURK_CHECK(!done_ && image.size() == b_.size(),
                   "the operator maps vectors of the right-hand side's size to the same size");
        ++result_.iterations;
        if (restarting_) {
            restarting_ = false;
            start_cycle(b_ - image);  // true residual to restart from
        } else {
            arnoldi_step(image);
        }
    }
    const Vec& solution() const { return x_; }
    const GmresResult& result() const { return result_; }

private:
    using Mat = Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic>;

    void start_cycle(const Vec& r) {
        const double beta = r.norm();
        result_.relative_residual = beta / b_norm_;
        if (result_.relative_residual <= tolerance_) {
            result_.converged = true;
            done_ = true;
            return;
        }
        if (result_.iterations >= max_iterations_) {
            done_ = true;
            return;
        }
        m_ = std::min<int>(restart_, max_iterations_ - result_.iterations);
        basis_.assign(1, r / beta);
        h_ = Mat::Zero(m_ + 1, m_);
        c_.assign(m_, 0.0);
        s_.assign(m_, S(0));
        g_ = Vec::Zero(m_ + 1);
        g_(0) = beta;
        k_ = 0;
    }

    void arnoldi_step(Vec w) {
        const int k = k_;
        for (int i = 0; i <= k; ++i) {  // modified Gram-Schmidt
            h_(i, k) = basis_[i].dot(w);  // conjugates basis_[i]
            w -= h_(i, k) * basis_[i];
        }
        h_(k + 1, k) = w.norm();
        for (int i = 0; i < k; ++i) {  // earlier rotations
            const S t = c_[i] * h_(i, k) + s_[i] * h_(i + 1, k);
            h_(i + 1, k) = -detail::conjugate(s_[i]) * h_(i, k) + c_[i] * h_(i + 1, k);
            h_(i, k) = t;
        }
        const S a = h_(k, k), bb = h_(k + 1, k);  // bb is real and >= 0
        const double r_len =
            std::sqrt(detail::magnitude(a) * detail::magnitude(a) + detail::magnitude(bb) * detail::magnitude(bb));
        if (detail::magnitude(a) == 0.0) {
            c_[k] = 0.0, s_[k] = S(1);
        } else {
            c_[k] = detail::magnitude(a) / r_len;
            s_[k] = (a / detail::magnitude(a)) * detail::conjugate(bb) / r_len;
        }
        h_(k, k) = c_[k] * a + s_[k] * bb;
        h_(k + 1, k) = S(0);
        g_(k + 1) = -detail::conjugate(s_[k]) * g_(k);
        g_(k) = c_[k] * g_(k);
        const bool breakdown = detail::magnitude(bb) == 0.0;
        if (!breakdown) basis_.push_back(w / detail::magnitude(bb));
        ++k_;
        if (detail::magnitude(g_(k + 1)) <= tolerance_ * b_norm_ || breakdown || k_ == m_) end_cycle();
    }

    // x += V y with H y = g (upper triangular k x k); then done, or a restart.
    void end_cycle() {
        const int k = k_;
        const Vec y = h_.topLeftCorner(k, k).template triangularView<Eigen::Upper>().solve(g_.head(k));
        for (int i = 0; i < k; ++i) x_ += y(i) * basis_[i];
        result_.relative_residual = detail::magnitude(g_(k)) / b_norm_;
        if (result_.relative_residual <= tolerance_) {
            result_.converged = true;
            done_ = true;
        } else if (result_.iterations >= max_iterations_) {
            done_ = true;
        } else {
            restarting_ = true;
        }
    }

    Vec b_, x_, g_;
    double tolerance_, b_norm_ = 0.0;
    int max_iterations_, restart_, m_ = 0, k_ = 0;
    std::vector<Vec> basis_;
    Mat h_;
    std::vector<double> c_;
    std::vector<S> s_;
    GmresResult result_;
    bool done_ = false, restarting_ = false;
};

// Solves A x = b from x = 0 until |b - A x| <= tolerance |b|. apply(v) returns A v.
template <class S, class Apply>
GmresResult gmres(Apply&& apply, const Eigen::Matrix<S, Eigen::Dynamic, 1>& b,
                  Eigen::Matrix<S, Eigen::Dynamic, 1>& x, double tolerance, int max_iterations, int restart = 40) {
    GmresRun<S> run(b, tolerance, max_iterations, restart);
    while (!run.done()) run.answer(apply(run.request()));
    x = run.solution();
    return run.result();
}

}  // namespace murk
