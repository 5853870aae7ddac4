#include "solver/compressed_system.hpp"

#include "geometry/internal_check.hpp"
#include "solver/system_entries.hpp"

#include <chrono>

#if defined(__GLIBC__)
#include <malloc.h>
#endif

namespace murk {

namespace {
double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

// Hands the pages of freed temporaries back to the system. The compression
// leaves its per-block temporaries scattered between the blocks it keeps, and
// the allocator keeps those pages for reuse: without this the preconditioner's
// build started from hundreds of megabytes more than the operator holds.
void release_free_pages() {
#if defined(__GLIBC__)
    malloc_trim(0);
#endif
}
}  // namespace

template <class S>
CompressedSystem<S>::CompressedSystem(const Scene<S>& scene, const QuadratureOptions& quadrature,
                                      const SolverOptions& options)
    : options_(options) {
    auto t0 = std::chrono::steady_clock::now();
    const SystemEntries<S> entries(scene, quadrature);
    size_ = entries.layout().size;
    panels_ = entries.panel_unknowns();
    electrode_columns_ = entries.electrode_columns();
    electrode_rows_ = entries.electrode_rows();
    rhs_ = entries.rhs();
    entries_seconds_ = seconds_since(t0);

    t0 = std::chrono::steady_clock::now();
    HMatrixOptions h;
    h.leaf_size = kernel_leaf_panels;
    h.tolerance = options.compression_tolerance;
    h_ = std::make_unique<LayerOperator<S>>(entries, h);
    release_free_pages();
    compression_seconds_ = seconds_since(t0);

    t0 = std::chrono::steady_clock::now();
    HodlrOptions p;
    p.leaf_size = preconditioner_block;
    p.tolerance = options.preconditioner_tolerance;
    // Single precision rounds the stored factors by about 6e-8 (relative), far
    // below a tolerance of 1e-5 or more; tighter ones keep double precision.
    p.single_precision = options.preconditioner_tolerance >= kSinglePrecisionFrom;
    preconditioner_ = std::make_unique<HodlrInverse<S>>(*h_, p);
    release_free_pages();
    preconditioner_seconds_ = seconds_since(t0);
}

template <class S>
MatrixX<S> CompressedSystem<S>::apply(const MatrixX<S>& x, bool transposed) const {
    MURK_CHECK(x.rows() == size_, "one value per unknown");
    const Eigen::Index e = size_ - panels_;
    MatrixX<S> y(size_, x.cols());
    if (!transposed) {
        y.topRows(panels_) = h_->apply(MatrixX<S>(x.topRows(panels_)), false);
        y.topRows(panels_) += electrode_columns_ * x.bottomRows(e);
        y.bottomRows(e) = electrode_rows_ * x;
    } else {
        y = electrode_rows_.transpose() * x.bottomRows(e);
        y.topRows(panels_) += h_->apply(MatrixX<S>(x.topRows(panels_)), true);
        y.bottomRows(e) += electrode_columns_.transpose() * x.topRows(panels_);
    }
    return y;
}

template <class S>
MatrixX<S> CompressedSystem<S>::precondition(const MatrixX<S>& x, bool transposed) const {
    MatrixX<S> y = x;  // the electrodes' part passes unchanged
    y.topRows(panels_) = preconditioner_->solve(MatrixX<S>(x.topRows(panels_)), transposed);
    return y;
}

template <class S>
MatrixX<S> CompressedSystem<S>::solve_columns(const MatrixX<S>& b, bool transposed, int* iterations,
                                              double tolerance) const {
    MURK_CHECK(b.rows() == size_, "right-hand sides have one row per unknown");
    MatrixX<S> x(size_, b.cols());
    int most = 0;
    // Columns iterate together, in batches: each step applies the operator and
    // the preconditioner to all their vectors at once, which reads the stored
    // operator once per step instead of once per column. A batch holds its
    // Krylov bases (restart + 1 vectors per column), so its width is bounded by
    // kBasisBytes.
    const std::size_t per_column = sizeof(S) * std::size_t(size_) * std::size_t(kRestart + 1);
    const Eigen::Index width = std::max<Eigen::Index>(1, Eigen::Index(kBasisBytes / std::max<std::size_t>(1, per_column)));
    for (Eigen::Index first = 0; first < b.cols(); first += width) {
        const Eigen::Index count = std::min(width, b.cols() - first);
        std::vector<GmresRun<S>> runs;
        runs.reserve(std::size_t(count));
        for (Eigen::Index j = 0; j < count; ++j)
            runs.emplace_back(VectorX<S>(b.col(first + j)), tolerance > 0 ? tolerance : options_.iteration_tolerance,
                              options_.max_iterations, kRestart);
        for (;;) {
            std::vector<std::size_t> active;
            for (std::size_t j = 0; j < runs.size(); ++j)
                if (!runs[j].done()) active.push_back(j);
            if (active.empty()) break;
            MatrixX<S> z(size_, Eigen::Index(active.size()));
            for (std::size_t a = 0; a < active.size(); ++a) z.col(Eigen::Index(a)) = runs[active[a]].request();
            // Right preconditioning: GMRES on A M^-1 z = b, then x = M^-1 z; the
            // residual it measures is the true one of A x = b.
            const MatrixX<S> images = apply(precondition(z, transposed), transposed);
            for (std::size_t a = 0; a < active.size(); ++a) runs[active[a]].answer(images.col(Eigen::Index(a)));
        }
        MatrixX<S> solutions(size_, count);
        for (Eigen::Index j = 0; j < count; ++j) {
            const GmresResult& r = runs[std::size_t(j)].result();
            MURK_CHECK(r.converged, "the preconditioned iterative solve reaches its tolerance within max_iterations");
            most = std::max(most, r.iterations);
            solutions.col(j) = runs[std::size_t(j)].solution();
        }
        x.middleCols(first, count) = precondition(solutions, transposed);
    }
    if (iterations) *iterations = most;
    return x;
}

template <class S>
std::size_t CompressedSystem<S>::bytes() const {
    std::size_t total = h_->stats().bytes + sizeof(S) * std::size_t(electrode_columns_.size() + electrode_rows_.size());
    total += preconditioner_->stats().bytes;
    return total;
}

template class CompressedSystem<double>;
template class CompressedSystem<Complex>;

}  // namespace murk
