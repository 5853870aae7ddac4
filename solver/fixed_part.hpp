#pragma once
// The part of a scene that stays while a sweep moves objects: the sensing body,
// its electrodes and sources, and any object that does not move. Its system is
// assembled and LU-factored once, or for a large body compressed once
// (compressed_system.hpp); every sweep point then costs triangular solves
// against the stored factors, or a preconditioned iterative solve against the
// compressed operator (DEVELOPERS.md, "How a sweep is solved").
// The stored factors are only read after construction, so any number of threads
// may solve against one FixedPart at once.
#include "solver/bem_system.hpp"
#include "solver/solver_options.hpp"

#include <Eigen/LU>
#include <memory>
#include <optional>

namespace murk {

template <class S>
class CompressedSystem;

template <class S>
class FixedPart {
public:
    FixedPart(const FixedPart&) = delete;  // the factors are referenced in place
    FixedPart& operator=(const FixedPart&) = delete;
    FixedPart(FixedPart&&) = default;
    // Assembles and factors the whole system of `scene` (which may have no
    // surfaces at all: then there is nothing to factor and every solve is empty).
    // `solver` chooses dense LU or the compressed operator with an iterative
    // solve (solver_options.hpp); every solve below works the same with either.
    FixedPart(Scene<S> scene, const QuadratureOptions& options, const SolverOptions& solver = {});

    const Scene<S>& scene() const { return scene_; }
    const SystemLayout& layout() const { return layout_; }
    Eigen::Index size() const { return layout_.size; }
    // The fixed part's own solution (its sources and electrode drives), as the
    // global unknown vector and unpacked.
    const VectorX<S>& unknowns() const { return x0_; }
    const Solution<S>& solution() const { return solution_; }
    // Centroids of every panel of the fixed surfaces, surface after surface: the
    // collocation points of the water rows.
    const Eigen::Matrix3Xd& water_row_points() const { return water_points_; }
    // Global row of each column of water_row_points().
    const std::vector<Eigen::Index>& water_rows() const { return water_rows_; }

    // A^-1 b for one or many right-hand sides, and A^-T b (for lead fields).
    VectorX<S> solve(const VectorX<S>& b) const;
    MatrixX<S> solve(const MatrixX<S>& b) const;
    MatrixX<S> solve_transposed(const MatrixX<S>& b) const;

    // Bytes held by the factors (the dense LU, or the compressed operator and
    // its preconditioner).
    std::size_t factor_bytes() const;
    double assembly_seconds() const { return assembly_seconds_; }
    // Dense: the LU; compressed: the compression and the preconditioner.
    double factor_seconds() const { return factor_seconds_; }
    // Whether the compressed operator is used, and what it is (for output).
    bool compressed() const { return static_cast<bool>(compressed_); }
    struct SolverReport {
        std::string solver;                 // "dense" or "compressed"
        double compression_tolerance = 0;   // compressed only
        double iteration_tolerance = 0;     // compressed only
        double compression_ratio = 1;       // stored / dense bytes of the operator
        int baseline_iterations = 0;        // of the fixed part's own solve
    };
    SolverReport report() const;
    // The compressed system itself (null when dense), for benchmarks and reports.
    const CompressedSystem<S>* compressed_system() const;
    // The solver options a compressed fixed part was built with (null when dense).
    const SolverOptions* compressed_options() const;

private:
    struct Compressed;  // compressed_system.hpp
    Scene<S> scene_;
    std::shared_ptr<const Compressed> compressed_;
    SystemLayout layout_;
    // Dense: factored in place (Eigen's inplace decomposition), the system held once.
    MatrixX<S> factors_;
    std::optional<Eigen::PartialPivLU<Eigen::Ref<MatrixX<S>>>> lu_;
    VectorX<S> x0_;
    Solution<S> solution_;
    Eigen::Matrix3Xd water_points_;
    std::vector<Eigen::Index> water_rows_;
    double assembly_seconds_ = 0, factor_seconds_ = 0;
};

extern template class FixedPart<double>;
extern template class FixedPart<Complex>;

}  // namespace murk
