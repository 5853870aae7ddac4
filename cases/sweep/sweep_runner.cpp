#include "cases/sweep/sweep_runner.hpp"

#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/path_check.hpp"
#include "cases/sweep/sweep_estimate.hpp"
#include "cases/sweep/sweep_points.hpp"
#include "solver/memory_budget.hpp"

#include <omp.h>

#include <sys/resource.h>

#include <chrono>
#include <cstdio>

namespace murk {

namespace {

using Clock = std::chrono::steady_clock;

double peak_memory_MiB() {
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    return usage.ru_maxrss / 1024.0;  // Linux reports KiB
}

const char* kMaskWords[kMaskReasonCount] = {"", "touching the body", "touching an object that stays",
                                            "beyond the plane", "clearance not reachable along the direction",
                                            "too near a source or probe point"};

template <class S>
class SweepRun {
public:
    SweepRun(const CaseSpec& spec, const RunOptions& options) : spec_(spec), options_(options) {}

    RunOutcome run() {
        const auto start = Clock::now();
        auto since_start = [&] { return std::chrono::duration<double>(Clock::now() - start).count(); };
        const QuadratureOptions quad = quadrature_options(spec_);
        // Geometry: what moves where, nothing assembled yet.
        const SweepPlan plan = plan_sweep(spec_);
        const double memory_limit =
            options_.memory_limit_bytes > 0 ? options_.memory_limit_bytes : default_memory_limit_bytes();
        require_point_memory(plan.total, memory_limit, plan.where);
        std::vector<Scene<S>> scenes = fixed_scenes<S>(spec_, plan);
        const MovingObjects<S> objects(spec_, plan);
        const PointPlacement placement(spec_, plan, meshes_of(scenes.front()));
        const PointRoutes<S> routes = route_points(plan, placement, objects, kDipoleBlockSize);
        stats_.placement_seconds = since_start();
        // The cost, before paying it.
        const CostModel cost{measured_or_reference_rates(), sweep_sizes(scenes, objects, plan)};
        const SweepEstimate estimate = estimate_sweep(plan, routes, cost);
        if (options_.estimate_only) {
            std::printf("%s", format_estimate(estimate).c_str());
            return RunOutcome::complete;
        }
        require_memory(estimate, memory_limit, plan.where);
        // The fixed part, factored once per water.
        const SweepBaselines<S> baselines = solve_baselines(spec_, plan, std::move(scenes), quad);
        SweepFile<S> file = options_.resume ? SweepFile<S>::resume(spec_, options_, plan, baselines)
                                            : SweepFile<S>(spec_, options_, plan, baselines);
        stats_.assembly_seconds = baselines.assembly_seconds;
        stats_.factor_seconds = baselines.factor_seconds;
        stats_.factor_bytes = baselines.factor_bytes;
        stats_.setup_seconds = since_start() - stats_.placement_seconds;
        try {
            const PathContext<S> context{&baselines, &objects, quad, CouplingOptions{plan.sweep.coupling_tolerance}};
            const PointPaths<S> paths = make_point_paths(context);
            compute_points(routes, paths, baselines, file, options_.quiet, stats_);
            const double before_checks = since_start();
            if (!stop_requested()) check_paths(plan, routes, paths, baselines, file);
            stats_.check_seconds = since_start() - before_checks;
            count_paths(file);
            if (!stop_requested()) {
                warn_if_all_masked(plan, file);
                file.commit(peak_memory_MiB());
            }
        } catch (...) {
            file.suspend();  // keep every finished point for --resume
            throw;
        }
        stats_.wall_seconds = since_start();
        stats_.peak_memory_MiB = peak_memory_MiB();
        if (!options_.quiet) print_stats(plan, file);
        if (stop_requested()) {
            file.suspend();
            std::fprintf(stderr,
                         "murk: interrupted; %zu of %zu points are kept in %s; run again with --resume to finish\n",
                         file.finished(), plan.total, file.partial_path().c_str());
            return RunOutcome::interrupted;
        }
        return RunOutcome::complete;
    }

    RunStats stats_;

private:
    // The surfaces that stay, for placement: geometry only, the same in every water.
    static std::vector<TriangleMesh> meshes_of(const Scene<S>& scene) {
        std::vector<TriangleMesh> meshes;
        for (const Surface<S>& s : scene.surfaces) meshes.push_back(s.mesh);
        return meshes;
    }

    // The estimate a person reads uses this machine's rates; a run's own memory
    // check needs only sizes, so it skips the half second of measuring.
    MachineRates measured_or_reference_rates() const {
        const int threads = omp_get_max_threads();
        return options_.estimate_only ? measure_rates(threads) : reference_rates(threads);
    }

    void check_paths(const SweepPlan& plan, const PointRoutes<S>& routes, const PointPaths<S>& paths,
                     const SweepBaselines<S>& baselines, SweepFile<S>& file) {
        const SweepMethod method = plan.sweep.method;
        if (method != SweepMethod::dipole && method != SweepMethod::automatic) return;
        std::optional<PathCheck> check = file.path_check();  // done by the run this one resumes
        if (!check) {
            check = check_dipole_points(routes, std::size_t(plan.sweep.check_points), *paths.exact, baselines, file);
            if (stop_requested()) return;
            file.write_path_check(*check, plan.sweep);
        }
        stats_.checked = check->points.size();
        stats_.max_discrepancy = check->largest();
        if (method == SweepMethod::automatic && stats_.max_discrepancy > plan.sweep.dipole_accuracy)
            std::fprintf(stderr,
                         "murk: warning: the dipole points re-solved exactly differ by up to %.3g, more than "
                         "dipole_accuracy = %.3g; lower dipole_accuracy or use method = \"exact\"\n",
                         stats_.max_discrepancy, plan.sweep.dipole_accuracy);
    }

    void count_paths(const SweepFile<S>& file) {
        for (PathCode p : file.paths()) {
            stats_.exact_points += p == PathCode::exact;
            stats_.dipole_points += p == PathCode::dipole;
            stats_.full_points += p == PathCode::full;
        }
    }

    static void warn_if_all_masked(const SweepPlan& plan, const SweepFile<S>& file) {
        std::size_t masked = 0;
        for (int r = 1; r < kMaskReasonCount; ++r) masked += file.masked(MaskReason(r));
        if (masked > 0 && masked == plan.total)
            std::fprintf(stderr, "murk: warning: every point of the sweep is masked (the object could not be placed "
                                 "clear of the body); check sweep.direction and the axes\n");
    }

    void print_stats(const SweepPlan& plan, const SweepFile<S>& file) const {
        const RunStats& t = stats_;
        if (plan.sweep.method != SweepMethod::full)
            std::fprintf(stderr, "murk: body system: assembly %.2f s, factorization %.2f s, factors %.0f MiB\n",
                         t.assembly_seconds, t.factor_seconds, t.factor_bytes / 1048576.0);
        std::fprintf(stderr,
                     "murk: points: %zu exact, %zu dipole, %zu full re-solve (%zu fell back from exact); "
                     "placement %.2f s, exact and full %.2f s, dipole %.2f s\n",
                     t.exact_points, t.dipole_points, t.full_points, t.fallbacks, t.placement_seconds, t.point_seconds,
                     t.dipole_seconds);
        std::string masks;
        for (int r = 1; r < kMaskReasonCount; ++r)
            if (file.masked(MaskReason(r)) > 0)
                masks += (masks.empty() ? "" : ", ") + std::to_string(file.masked(MaskReason(r))) + " " + kMaskWords[r];
        if (!masks.empty()) std::fprintf(stderr, "murk: masked points: %s\n", masks.c_str());
        if (t.checked > 0)
            std::fprintf(stderr, "murk: %zu dipole points re-solved exactly: largest discrepancy %.3g\n", t.checked,
                         t.max_discrepancy);
        std::fprintf(stderr, "murk: peak memory %.0f MiB\n", t.peak_memory_MiB);
    }

    const CaseSpec& spec_;
    const RunOptions& options_;
};

}  // namespace

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options, RunStats* stats) {
    auto go = [&](auto&& run) {
        const RunOutcome outcome = run.run();
        if (stats) *stats = run.stats_;
        return outcome;
    };
    if (case_needs_complex(spec)) return go(SweepRun<Complex>(spec, options));
    return go(SweepRun<double>(spec, options));
}

}  // namespace murk
