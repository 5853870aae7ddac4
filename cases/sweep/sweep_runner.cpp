#include "cases/sweep/sweep_runner.hpp"

#include "cases/output/result_metadata.hpp"
#include "cases/output/solver_attributes.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/sweep/dipole_check.hpp"
#include "cases/sweep/point_journal.hpp"
#include "cases/sweep/sweep_estimate.hpp"
#include "cases/sweep/sweep_points.hpp"
#include "cases/sweep/waveform_synthesis.hpp"
#include "cases/sweep/work_shares.hpp"
#include "geometry/input_error.hpp"
#include "solver/memory_budget.hpp"

#include <omp.h>
#include <sys/resource.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <filesystem>

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

std::string host_name() {
    char name[256] = {};
    return ::gethostname(name, sizeof name - 1) == 0 ? std::string(name) : std::string("an unknown host");
}

template <class S>
class SweepRun {
public:
    SweepRun(const CaseSpec& spec, const RunOptions& options) : spec_(spec), options_(options) {}

    RunOutcome run() {
        const auto start = Clock::now();
        auto since_start = [&] { return std::chrono::duration<double>(Clock::now() - start).count(); };
        const QuadratureOptions quad = quadrature_options(spec_);
        // plan: what moves where, from geometry alone; nothing assembled yet.
        const SweepPlan plan = plan_sweep(spec_);
        const double memory_limit =
            options_.memory_limit_bytes > 0 ? options_.memory_limit_bytes : default_memory_limit_bytes();
        require_point_memory(plan.total, memory_limit, plan.where);
        std::vector<Scene<S>> scenes = fixed_scenes<S>(spec_, plan);
        SensorLayout sensors = sensor_layout(spec_, scenes.front(), plan.where);
        if (spec_.waveform) check_synthesis_size(spec_, plan.total / plan.frequencies.size(), sensors.size());
        const MovingObjects<S> objects(spec_, plan);
        const PointPlacement placement(spec_, plan, meshes_of(scenes.front()));
        const SweepSizes sizes = sweep_sizes(scenes, objects, plan, solver_options(spec_));
        const PointRoutes<S> routes =
            route_points(plan, placement, objects, exact_batch_size(sizes), kDipoleBlockSize);
        stats_.placement_seconds = since_start();
        // The cost, before paying it.
        const SweepEstimate estimate = estimate_sweep(plan, routes, CostModel{measured_or_reference_rates(), sizes});
        if (options_.estimate_only) {
            std::printf("%s", format_estimate(estimate).c_str());
            return RunOutcome::complete;
        }
        require_memory(estimate, memory_limit, plan.where);
        const std::vector<char> share = share_of(plan, routes, sizes);
        // output: the journal, this run's lock (point_journal.hpp).
        PointJournal journal = open_journal(plan, sensors.size());
        if (!options_.quiet && spec_.waveform) std::fprintf(stderr, "%s", describe_kept_harmonics(*spec_.waveform).c_str());
        if (!options_.quiet && plan.sweep.method != SweepMethod::full)  // after the refusals, which are one line
            std::fprintf(stderr, "murk: system solver: %s\n",
                         solver_choice_text(solver_options(spec_), sizes.fixed_unknowns).c_str());
        // Until a point is finished a stop loses nothing: stop at once, and take a
        // journal this run started with it.
        on_stop(OnStop::exit_at_once, options_.resume ? std::string() : journal.path());
        // baselines: the fixed part, factored once per water.
        const SweepBaselines<S> baselines = solve_baselines(spec_, plan, std::move(scenes), std::move(sensors), quad);
        stats_.assembly_seconds = baselines.assembly_seconds;
        stats_.factor_seconds = baselines.factor_seconds;
        stats_.factor_bytes = baselines.factor_bytes;
        stats_.compressed = baselines.solver_used.solver == "compressed";
        stats_.system_iterations = baselines.solver_used.iterations;
        stats_.setup_seconds = since_start() - stats_.placement_seconds;
        on_stop(OnStop::finish_work);  // from now on a stop keeps what is finished
        try {
            // points, checks
            const PathContext<S> context{&baselines, &objects, quad, CouplingOptions{plan.sweep.coupling_tolerance}};
            const PointPaths<S> paths = make_point_paths(context);
            compute_points(routes, paths, baselines, share, journal, options_.quiet, stats_);
            const double before_checks = since_start();
            if (!stop_requested() && checks_dipoles(plan))
                check_dipole_points(routes, std::size_t(plan.sweep.dipole_checks), share, *paths.exact, baselines,
                                    journal);
            stats_.check_seconds = since_start() - before_checks;
            journal.sync();
        } catch (...) {
            journal.sync();  // what is finished stays for --resume
            throw;
        }
        count_points(plan, journal);
        if (stop_requested()) {
            if (!options_.quiet) print_stats(plan);
            const std::size_t mine = share.empty() ? plan.total : std::size_t(std::count(share.begin(), share.end(), 1));
            std::fprintf(stderr,
                         "murk: interrupted; %zu of %zu points%s are kept in %s; run again with --resume to finish\n",
                         journal.finished(), mine, share.empty() ? "" : " of this share", journal.path().c_str());
            return RunOutcome::interrupted;
        }
        // analysis and commit: the result file, written once from the journal.
        warn_about_checks(plan);
        warn_if_all_masked(plan);
        try {
            // The journal goes the moment the result has its name: the two are
            // never both on disk unless the process dies in that instant.
            write_result_from_journal(spec_, options_, plan, baselines, journal, peak_memory_MiB(),
                                      [&journal] { journal.discard(); });
        } catch (const InputError&) {
            throw;
        } catch (const std::runtime_error& e) {
            // Nothing is lost: the journal holds every point, and a resume writes the result again.
            throw std::runtime_error(std::string(e.what()) + "; every point is kept in " + journal.path() +
                                     ": make room and run again with --resume");
        }
        stats_.wall_seconds = since_start();
        stats_.peak_memory_MiB = peak_memory_MiB();
        if (!options_.quiet) print_stats(plan);
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

    // The points this run computes: all, or its share (--shard), dealt by cost
    // with the reference rates so that every task deals the same shares.
    std::vector<char> share_of(const SweepPlan& plan, const PointRoutes<S>& routes, const SweepSizes& sizes) const {
        if (options_.share_count <= 1) return {};
        const CostModel reference{reference_rates(1), sizes};
        return share_points(work_units(routes, reference), plan.total, options_.share_index, options_.share_count);
    }

    PointJournal open_journal(const SweepPlan& plan, std::size_t sensors) const {
        // Refuse what would be wasted before spending anything: an unusable output
        // name, or a finished result in the way.
        check_xdmf_file_name(std::filesystem::path(options_.output_path).filename().string());
        if (!options_.force && std::filesystem::exists(options_.output_path))
            throw InputError(options_.output_path + " exists; pass --force to replace it");
        JournalHeader header;
        header.case_sha256 = sha256_hex(spec_.text);
        header.murk_version = MURK_VERSION;
        header.points = plan.total;
        header.sensors = sensors;
        header.scalar_bytes = sizeof(S);
        header.share_index = std::uint32_t(options_.share_index);
        header.share_count = std::uint32_t(std::max<std::size_t>(options_.share_count, 1));
        header.pid = ::getpid();
        header.host = host_name();
        header.started_utc = utc_now_iso8601();
        const std::string path = journal_path(options_.output_path);
        PointJournal journal =
            options_.resume ? PointJournal::reopen(path, header) : PointJournal::start(path, header, options_.force);
        journal.append_history(history_line(header.started_utc, options_.command_line));
        return journal;
    }

    static bool checks_dipoles(const SweepPlan& plan) {
        return plan.sweep.method == SweepMethod::dipole || plan.sweep.method == SweepMethod::automatic;
    }

    void count_points(const SweepPlan& plan, const PointJournal& journal) {
        masked_.assign(kMaskReasonCount, 0);
        stats_.exact_points = stats_.dipole_points = stats_.full_points = 0;
        for (std::size_t p = 0; p < plan.total; ++p) {
            if (!journal.has(p)) continue;
            const PathCode path = journal.path(p);
            stats_.exact_points += path == PathCode::exact;
            stats_.dipole_points += path == PathCode::dipole;
            stats_.full_points += path == PathCode::full;
            if (journal.status(p) == PointStatus::masked) ++masked_[static_cast<int>(journal.mask(p))];
        }
        stats_.checked = journal.checks().size();
        stats_.max_discrepancy = 0;
        for (const CheckRecord& c : journal.checks()) stats_.max_discrepancy = std::max(stats_.max_discrepancy, c.discrepancy);
    }

    void warn_about_checks(const SweepPlan& plan) const {
        if (plan.sweep.method == SweepMethod::automatic && stats_.max_discrepancy > plan.sweep.dipole_accuracy)
            std::fprintf(stderr,
                         "murk: warning: the dipole points re-solved exactly differ by up to %.3g, more than "
                         "dipole_accuracy = %.3g; lower dipole_accuracy or use method = \"exact\"\n",
                         stats_.max_discrepancy, plan.sweep.dipole_accuracy);
    }

    void warn_if_all_masked(const SweepPlan& plan) const {
        std::size_t masked = 0;
        for (int r = 1; r < kMaskReasonCount; ++r) masked += masked_[r];
        if (masked > 0 && masked == plan.total)
            std::fprintf(stderr, "murk: warning: every point of the sweep is masked (the object could not be placed "
                                 "clear of the body); check sweep.direction and the axes\n");
    }

    void print_stats(const SweepPlan& plan) const {
        const RunStats& t = stats_;
        if (plan.sweep.method != SweepMethod::full)
            std::fprintf(stderr, "murk: body system: assembly %.2f s, %s %.2f s, %s %.0f MiB; %s\n",
                         t.assembly_seconds, t.compressed ? "compression" : "factorization", t.factor_seconds,
                         t.compressed ? "operator and preconditioner" : "factors", t.factor_bytes / 1048576.0,
                         t.compressed ? ("compressed, " + std::to_string(t.system_iterations) + " iterations").c_str()
                                      : "dense LU");
        std::fprintf(stderr,
                     "murk: points: %zu exact, %zu dipole, %zu full re-solve (%zu fell back from exact); "
                     "placement %.2f s, exact and full %.2f s, dipole %.2f s\n",
                     t.exact_points, t.dipole_points, t.full_points, t.fallbacks, t.placement_seconds, t.point_seconds,
                     t.dipole_seconds);
        std::string masks;
        for (int r = 1; r < kMaskReasonCount; ++r)
            if (masked_[r] > 0) masks += (masks.empty() ? "" : ", ") + std::to_string(masked_[r]) + " " + kMaskWords[r];
        if (!masks.empty()) std::fprintf(stderr, "murk: masked points: %s\n", masks.c_str());
        if (t.checked > 0)
            std::fprintf(stderr, "murk: %zu dipole points re-solved exactly: largest discrepancy %.3g\n", t.checked,
                         t.max_discrepancy);
        std::fprintf(stderr, "murk: peak memory %.0f MiB\n", peak_memory_MiB());
    }

    const CaseSpec& spec_;
    const RunOptions& options_;
    std::vector<std::size_t> masked_ = std::vector<std::size_t>(kMaskReasonCount, 0);
};

}  // namespace

std::string journal_path(const std::string& output_path) { return output_path + ".partial"; }

RunOutcome run_sweep(const CaseSpec& spec, const RunOptions& options, RunStats* stats) {
    auto go = [&](auto&& run) {
        const RunOutcome outcome = run.run();
        if (stats) *stats = run.stats_;
        return outcome;
    };
    // A frequency axis (given, or a waveform's harmonics) and a permittivity axis are complex throughout.
    const bool axes_complex = spec.waveform || (spec.sweep && (!spec.sweep->frequency_Hz.empty() ||
                                                               !spec.sweep->permittivity_relative.empty()));
    if (case_needs_complex(spec) || axes_complex) return go(SweepRun<Complex>(spec, options));
    return go(SweepRun<double>(spec, options));
}

}  // namespace murk
