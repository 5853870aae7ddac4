// The murk solve pipeline, in named stages: build the scenes (baseline without
// objects, and with them), assemble, solve, write, summarize.
#include "cases/solve/solve_run.hpp"

#include "cases/output/image_attributes.hpp"

#include "cases/output/result_metadata.hpp"
#include "cases/output/solver_attributes.hpp"
#include "cases/output/stop_request.hpp"
#include "cases/output/surface_output.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "cases/scene/scene_builder.hpp"
#include "cases/solve/probe_output.hpp"
#include "cases/solve/solve_output.hpp"
#include "geometry/input_error.hpp"
#include "solver/bem_system.hpp"
#include "solver/fixed_part.hpp"
#include "solver/memory_budget.hpp"
#include "solver/system_cost.hpp"
#include "solver/tank.hpp"

#include <chrono>
#include <cmath>
#include <stdexcept>
#include <cstdio>
#include <filesystem>
#include <string>

namespace murk {

namespace {

using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

double magnitude(double v) { return std::abs(v); }
double magnitude(const Complex& v) { return std::abs(v); }

// A value for the screen, with its sign where the sign means something: a real value as it
// is (the -1 V of an emitter, the negative image of an insulator); a complex one as its
// magnitude and phase.
std::string value_text(double v, const char* unit, const char* format = "%.4g") {
    char number[64];
    std::snprintf(number, sizeof number, format, v);
    return std::string(number) + " " + unit;
}
std::string value_text(const Complex& v, const char* unit, const char* format = "%.4g") {
    double degrees = std::arg(v) * 180.0 / M_PI;
    if (std::abs(degrees) < 0.05) degrees = 0;  // "+0.0", not "-0.0"
    char phase[32];
    std::snprintf(phase, sizeof phase, "%+.1f", degrees);
    return "|" + value_text(std::abs(v), unit, format) + "| at phase " + phase + " deg";
}

struct StageTimes { double assemble = 0, solve = 0; };

// A scene's solution: by a dense LU, as murk has always solved, unless the case's
// solver options compress a system of this size; then through the fixed part,
// which compresses the operator and iterates (solver/fixed_part.hpp). `used` says
// which it was.
template <class S>
Solution<S> solve_timed(const Scene<S>& scene, const QuadratureOptions& quad, const SolverOptions& solver,
                        StageTimes& times, SystemSolverUsed& used) {
    used = SystemSolverUsed{};
    if (scene.surfaces.empty()) return solve_scene(scene, quad);  // nothing to assemble
    if (uses_compression(solver, std::size_t(system_layout(scene).size))) {
        const FixedPart<S> fixed(scene, quad, solver);
        times.assemble += fixed.assembly_seconds();
        times.solve += fixed.factor_seconds();
        used = solver_used(fixed);
        return fixed.solution();
    }
    auto t = Clock::now();
    LinearSystem<S> system = assemble_system(scene, quad);
    times.assemble += seconds_since(t);
    t = Clock::now();
    const VectorX<S> x = solve_dense(system);
    times.solve += seconds_since(t);
    return unpack_solution(scene, system.layout, x);
}

const char* kind_name(InterfaceKind k) {
    switch (k) {
        case InterfaceKind::contact: return "contact";
        case InterfaceKind::membrane: return "membrane (skin)";
        case InterfaceKind::sealed: return "sealed (insulating / electrodes)";
    }
    return "";
}

// "area 6.2832 cm2 (exact 6.2832 cm2, +0.0001 %)", or without the exact part where it is not known.
std::string area_text(const ElectrodeArea& a) {
    char buf[128];
    if (std::isnan(a.exact_m2))
        std::snprintf(buf, sizeof buf, "area %.5g cm2", a.mesh_m2 * 1e4);
    else
        std::snprintf(buf, sizeof buf, "area %.5g cm2 (exact %.5g cm2, %+.3g %%)", a.mesh_m2 * 1e4, a.exact_m2 * 1e4,
                      100.0 * (a.mesh_m2 / a.exact_m2 - 1.0));
    return buf;
}

template <class S>
void print_summary(const CaseSpec& spec, const SolvedCase<S>& solved, const StageTimes& base, const StageTimes& pert,
                   std::size_t unknowns) {
    std::printf("case: %s (%s)\n", spec.title.c_str(), spec.path.c_str());
    for (const auto& s : solved.perturbed.surfaces)
        std::printf("  surface %-16s %6zu panels, %s\n", s.mesh.name.c_str(), s.mesh.size(), kind_name(s.kind));
    std::printf("arithmetic: %s; %zu unknowns with objects\n",
                std::is_same_v<S, double> ? "real (direct current or no capacitance)" : "complex", unknowns);
    std::printf("time: baseline assemble %.2f s, solve %.2f s; with objects assemble %.2f s, solve %.2f s\n",
                base.assemble, base.solve, pert.assemble, pert.solve);
    if (solved.baseline.surfaces.empty()) return;  // no sensing body: the probes tell
    const Surface<S>& body = solved.baseline.surfaces[0];
    if (body.kind == InterfaceKind::membrane) {
        const auto& before = solved.baseline_solution.surfaces[0];
        const auto& after = solved.perturbed_solution.surfaces[0];
        const VectorX<S> base = before.inner_potential - before.outer_potential;
        const VectorX<S> change = (after.inner_potential - after.outer_potential) - base;
        std::size_t at = 0;
        for (Eigen::Index k = 0; k < change.size(); ++k)
            if (magnitude(change(k)) > magnitude(change(at))) at = static_cast<std::size_t>(k);
        if constexpr (std::is_same_v<S, double>) {
            std::printf("baseline transdermal voltage: %.4g .. %.4g V over the skin\n", base.minCoeff(), base.maxCoeff());
        } else {
            const Eigen::VectorXd size = base.cwiseAbs();
            std::printf("baseline transdermal voltage |V|: %.4g .. %.4g V over the skin\n", size.minCoeff(), size.maxCoeff());
        }
        const Vec3 c = body.mesh.centroid(at);
        std::printf("electric image: peak change %s at panel %zu (%.4g, %.4g, %.4g) m\n",
                    value_text(change(at), "V").c_str(), at, c.x(), c.y(), c.z());
    }
    for (std::size_t e = 0; e < solved.baseline.electrodes.size(); ++e) {
        const S v = solved.baseline_solution.electrode_potential[e], i = solved.baseline_solution.electrode_current[e];
        const S dv = solved.perturbed_solution.electrode_potential[e] - v;
        const S di = solved.perturbed_solution.electrode_current[e] - i;
        std::printf("electrode %-12s baseline %s, %s; change %s, %s; %s\n", solved.baseline.electrodes[e].name.c_str(),
                    value_text(v, "V", "%.6g").c_str(), value_text(i, "A", "%.6g").c_str(), value_text(dv, "V").c_str(),
                    value_text(di, "A").c_str(), area_text(solved.electrode_areas.at(e)).c_str());
    }
}

// The sidecar's panel fields (cases/output/surface_output.hpp): per surface the water-side
// potential with the objects, and on the sensing body's membranes the electric image.
template <class S>
std::vector<XdmfSurface> sidecar_surfaces(const H5Group& root, const SolvedCase<S>& solved) {
    std::vector<XdmfSurface> surfaces;
    for (std::size_t s = 0; s < solved.perturbed.surfaces.size(); ++s) {
        const Surface<S>& surface = solved.perturbed.surfaces[s];
        const std::string name = surface_group_name(surface.mesh.name);
        XdmfSurface x{"/mesh/" + name, surface.mesh.vertices.size(), surface.mesh.size(), {}};
        x.cell_attributes = sidecar_fields(root.group("perturbed/" + name), "outer_potential", "potential", "panel");
        if (s < solved.baseline.surfaces.size() && surface.kind == InterfaceKind::membrane)
            for (XdmfAttribute& a : sidecar_fields(root.group("difference/" + name), "transdermal_voltage",
                                                   "electric image dV", "panel"))
                x.cell_attributes.push_back(a);
        surfaces.push_back(x);
    }
    return surfaces;
}

// The system of the scene with its objects is the largest thing held (dense, or
// compressed when the solver options say so: solver/system_cost.hpp); a case that
// would not fit is refused before it is allocated.
template <class S>
void require_memory_for(const Scene<S>& scene, const SolverOptions& solver, double limit_bytes,
                        const std::string& where) {
    const double n = double(system_layout(scene).size);
    const bool compressed = uses_compression(solver, std::size_t(n));
    const double bytes = system_entries(n, compressed) * sizeof(S);
    if (limit_bytes <= 0) limit_bytes = default_memory_limit_bytes();
    if (bytes <= limit_bytes) return;
    std::size_t panels = 0;
    for (const Surface<S>& s : scene.surfaces) panels += s.mesh.size();
    throw InputError(where + ": the solve needs about " + memory_text(bytes) + " (a " +
                     (compressed ? "compressed" : "dense") + " system of " +
                     std::to_string(std::size_t(n)) + " unknowns from " + std::to_string(panels) +
                     " panels), more than the " + memory_text(limit_bytes) +
                     " it may use; set a larger mesh.panel_size (memory falls as its " +
                     (compressed ? "square" : "fourth power") + "), decimate an "
                     "imported mesh, or raise --memory-limit");
}

// Nothing that is not a number is written or summarized.
template <class S>
void require_finite(const Solution<S>& solution, const char* what) {
    bool finite = true;
    for (const SurfaceSolution<S>& s : solution.surfaces)
        finite = finite && s.outer_potential.allFinite() && s.current_density.allFinite() && s.inner_potential.allFinite();
    for (const S& v : solution.electrode_potential) finite = finite && std::isfinite(std::abs(v));
    for (const S& v : solution.electrode_current) finite = finite && std::isfinite(std::abs(v));
    if (!finite)
        throw std::runtime_error(std::string("the solve of ") + what + " gave values that are not finite; the case's "
                                 "quantities are out of the range the solver can represent");
}

template <class S>
void write_solved(const CaseSpec& spec, const SolveOptions& options, const SolvedCase<S>& solved,
                  const QuadratureOptions& quad, const StageTimes& base, const StageTimes& pert,
                  const SystemSolverUsed& base_used, const SystemSolverUsed& pert_used);

template <class S>
void solve_case(const CaseSpec& spec, const SolveOptions& options) {
    // Refuse an existing result or an unusable name before spending time on the solve.
    // Refuse an existing result or an unusable name before spending time on the
    // solve; the file itself is created only when there is something to write, so
    // a solve stopped by a signal leaves nothing behind.
    check_xdmf_file_name(std::filesystem::path(options.output_path).filename().string());
    if (!options.force && std::filesystem::exists(options.output_path))
        throw InputError(options.output_path + " exists; pass --force to replace it");
    const std::filesystem::path folder = std::filesystem::path(options.output_path).parent_path();
    if (!folder.empty() && !std::filesystem::is_directory(folder))
        throw InputError(options.output_path + ": directory " + folder.string() + " does not exist");
    const QuadratureOptions quad = quadrature_options(spec);
    const SolverOptions solver = solver_options(spec);

    SolvedCase<S> solved;
    solved.baseline = build_scene<S>(spec, false);
    solved.perturbed = build_scene<S>(spec, true);
    solved.electrode_areas = electrode_areas(spec, solved.perturbed);
    require_memory_for(solved.perturbed, solver, options.memory_limit_bytes, spec.path);
    if (!options.quiet) {
        std::printf("quadrature: closed form below %g panel diameters, 7-point rule below %g, centroid beyond\n",
                    quad.near_ratio, quad.far_ratio);
        std::printf("water bounds: %s\n", spec.tank ? "closed tank walls (meshed)"
                                                    : water_bounds_text(water_bounds_summary(solved.perturbed.images)).c_str());
        std::printf("system solver: %s\n",
                    solver_choice_text(solver, std::size_t(system_layout(solved.perturbed).size)).c_str());
        if (spec.tank) std::printf("reference: %s (closed insulating tank)\n", tank_reference_text());
    }

    StageTimes base, pert;
    SystemSolverUsed base_used, pert_used;
    solved.baseline_solution = solve_timed(solved.baseline, quad, solver, base, base_used);
    solved.perturbed_solution = solve_timed(solved.perturbed, quad, solver, pert, pert_used);
    require_finite(solved.baseline_solution, "the baseline");
    require_finite(solved.perturbed_solution, "the scene with its objects");

    on_stop(OnStop::finish_work);  // a result is being written: a stop waits until it is complete
    try {
        write_solved(spec, options, solved, quad, base, pert, base_used, pert_used);
    } catch (const InputError&) {
        throw;
    } catch (const std::runtime_error& e) {
        throw std::runtime_error(std::string(e.what()) + "; no result was kept: make room and solve again");
    }
}

// Stage write (and summarize): the result file, its sidecar, the summary.
template <class S>
void write_solved(const CaseSpec& spec, const SolveOptions& options, const SolvedCase<S>& solved,
                  const QuadratureOptions& quad, const StageTimes& base, const StageTimes& pert,
                  const SystemSolverUsed& base_used, const SystemSolverUsed& pert_used) {
    H5Output output(options.output_path, options.force, "pass --force to replace it");
    write_result_metadata(output.root(), spec, options.command_line,
                          "full boundary-element solve: flat panels, piecewise-constant values, collocation", quad);
    write_image_attributes(output.root(), water_bounds_summary(solved.perturbed.images));
    write_solve_result(output.root(), solved);
    write_solver_used(output.root().group("baseline"), base_used);
    write_solver_used(output.root().group("perturbed"), pert_used);
    const ProbeValues<S> probes_before = evaluate_probes(spec, solved.baseline, solved.baseline_solution, quad);
    const ProbeValues<S> probes_after = evaluate_probes(spec, solved.perturbed, solved.perturbed_solution, quad);
    H5Group root = output.root();
    write_probes(root, spec, probes_before, probes_after);
    const std::vector<XdmfSurface> sidecar = sidecar_surfaces(root, solved);
    commit_with_sidecar(output, sidecar);

    if (!options.quiet) {
        std::size_t unknowns = 0;
        for (const auto& s : solved.perturbed.surfaces)
            unknowns += (s.kind == InterfaceKind::sealed ? 1 : 2) * s.mesh.size();
        print_summary(spec, solved, base, pert, unknowns + solved.perturbed.electrodes.size());
        for (const ProbeSpec& probe : spec.probes) {
            S peak{};
            for (std::size_t i = probe.first_point; i < probe.first_point + probe.point_count; ++i) {
                const S change = probes_after.potential[i] - probes_before.potential[i];
                if (magnitude(change) > magnitude(peak)) peak = change;
            }
            std::printf("probe %-12s %zu points, largest change of potential %s\n", probe.name.c_str(),
                        probe.point_count, value_text(peak, "V").c_str());
        }
        std::printf("wrote %s%s%s\n", options.output_path.c_str(), sidecar.empty() ? "" : " and ",
                    sidecar.empty() ? "" : xdmf_sidecar_path(options.output_path).c_str());
    }
}

}  // namespace

void run_solve(const CaseSpec& spec, const SolveOptions& options) {
    if (spec.waveform) {
        // One configuration at one frequency: a waveform's fundamental. murk run solves every kept harmonic.
        CaseSpec at_fundamental = spec;
        at_fundamental.frequency_Hz = spec.waveform->fundamental_Hz;
        at_fundamental.waveform.reset();
        if (!options.quiet)
            std::fprintf(stderr, "murk: the case's waveform is solved at its fundamental, %g Hz (murk run solves every "
                                 "harmonic and synthesizes the waveform)\n", spec.waveform->fundamental_Hz);
        return run_solve(at_fundamental, options);
    }
    if (case_needs_complex(spec)) solve_case<Complex>(spec, options);
    else solve_case<double>(spec, options);
}

}  // namespace murk
