#include "solver/fixed_part.hpp"

#include "geometry/internal_check.hpp"
#include "solver/compressed_system.hpp"
#include "geometry/input_error.hpp"

#include <chrono>

namespace murk {

namespace {
double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}
}  // namespace

template <class S>
struct FixedPart<S>::Compressed {
    CompressedSystem<S> system;
    SolverOptions options;
    int baseline_iterations = 0;
};

template <class S>
FixedPart<S>::FixedPart(Scene<S> scene, const QuadratureOptions& options, const SolverOptions& solver)
    : scene_(std::move(scene)) {
    layout_ = system_layout(scene_);
    water_points_.resize(3, 0);
    if (scene_.surfaces.empty()) return;
    if (uses_compression(solver, std::size_t(layout_.size))) {
        auto c = std::make_shared<Compressed>(Compressed{CompressedSystem<S>(scene_, options, solver), solver, 0});
        assembly_seconds_ = c->system.entries_seconds();
        factor_seconds_ = c->system.compression_seconds() + c->system.preconditioner_seconds();
        x0_ = c->system.solve_columns(c->system.rhs(), false, &c->baseline_iterations);
        compressed_ = std::move(c);
    } else {
        auto t0 = std::chrono::steady_clock::now();
        LinearSystem<S> system = assemble_system(scene_, options);
        assembly_seconds_ = seconds_since(t0);
        t0 = std::chrono::steady_clock::now();
        factors_ = std::move(system.matrix);
        lu_.emplace(factors_);
        factor_seconds_ = seconds_since(t0);
        x0_ = lu_->solve(system.rhs);
    }
    solution_ = unpack_solution(scene_, layout_, x0_);

    Eigen::Index count = 0;
    for (const auto& b : layout_.surfaces) count += b.panels;
    water_points_.resize(3, count);
    Eigen::Index i = 0;
    for (std::size_t s = 0; s < scene_.surfaces.size(); ++s)
        for (std::size_t t = 0; t < scene_.surfaces[s].mesh.size(); ++t, ++i) {
            water_points_.col(i) = scene_.surfaces[s].mesh.centroid(t);
            water_rows_.push_back(layout_.surfaces[s].offset + static_cast<Eigen::Index>(t));
        }
}

template <class S>
VectorX<S> FixedPart<S>::solve(const VectorX<S>& b) const {
    MURK_CHECK(b.size() == size(), "a right-hand side has one row per unknown of the fixed part");
    if (size() == 0) return VectorX<S>();
    if (compressed_) return compressed_->system.solve_columns(b, false);
    return lu_->solve(b);
}

template <class S>
MatrixX<S> FixedPart<S>::solve(const MatrixX<S>& b) const {
    MURK_CHECK(b.rows() == size(), "right-hand sides have one row per unknown of the fixed part");
    if (size() == 0) return MatrixX<S>(0, b.cols());
    if (compressed_) return compressed_->system.solve_columns(b, false);
    return lu_->solve(b);
}

template <class S>
MatrixX<S> FixedPart<S>::solve_transposed(const MatrixX<S>& b) const {
    MURK_CHECK(b.rows() == size(), "right-hand sides have one row per unknown of the fixed part");
    if (size() == 0) return MatrixX<S>(0, b.cols());
    if (compressed_) return compressed_->system.solve_columns(b, true);
    return lu_->transpose().solve(b);
}

template <class S>
std::size_t FixedPart<S>::factor_bytes() const {
    if (compressed_) return compressed_->system.bytes();
    return static_cast<std::size_t>(size()) * static_cast<std::size_t>(size()) * sizeof(S);
}

template <class S>
typename FixedPart<S>::SolverReport FixedPart<S>::report() const {
    SolverReport r;
    r.solver = compressed_ ? "compressed" : "dense";
    if (!compressed_) return r;
    r.compression_tolerance = compressed_->options.compression_tolerance;
    r.iteration_tolerance = compressed_->options.iteration_tolerance;
    r.compression_ratio = compressed_->system.operator_stats().compression();
    r.baseline_iterations = compressed_->baseline_iterations;
    return r;
}

template <class S>
const SolverOptions* FixedPart<S>::compressed_options() const {
    return compressed_ ? &compressed_->options : nullptr;
}

template <class S>
const CompressedSystem<S>* FixedPart<S>::compressed_system() const {
    return compressed_ ? &compressed_->system : nullptr;
}

template class FixedPart<double>;
template class FixedPart<Complex>;

}  // namespace murk
