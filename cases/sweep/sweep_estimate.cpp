#include "cases/sweep/sweep_estimate.hpp"

#include "cases/output/image_attributes.hpp"
#include "geometry/input_error.hpp"
#include "solver/bem_system.hpp"
#include "solver/memory_budget.hpp"

#include <cstdio>

namespace murk {

template <class S>
SweepSizes sweep_sizes(const std::vector<Scene<S>>& fixed, const MovingObjects<S>& objects, const SweepPlan& plan,
                       const SolverOptions& solver) {
    SweepSizes sizes;
    sizes.complex = std::is_same_v<S, Complex>;
    sizes.waters = plan.fixed_count();  // fixed parts: (water, frequency) pairs
    const Scene<S>& scene = fixed.front();
    sizes.fixed_unknowns = std::size_t(system_layout(scene).size);
    for (const Surface<S>& s : scene.surfaces) sizes.fixed_panels += s.mesh.size();
    for (const Scene<S>& f : fixed) sizes.images = std::max(sizes.images, water_bounds_summary(f.images).images);
    sizes.compressed = plan.sweep.method != SweepMethod::full && uses_compression(solver, sizes.fixed_unknowns);
    for (std::size_t k = 0; k < objects.size(); ++k) {
        const MovingObject<S>& o = objects.form(k);
        sizes.moving_unknowns = std::max(sizes.moving_unknowns, std::size_t(system_layout(object_alone(o)).size));
        sizes.moving_panels = std::max(sizes.moving_panels, o.shape->mesh.size());
    }
    return sizes;
}

template <class S>
SweepEstimate estimate_sweep(const SweepPlan& plan, const PointRoutes<S>& routes, const CostModel& cost) {
    SweepEstimate e;
    e.sizes = cost.sizes;
    e.rates = cost.rates;
    e.points = plan.total;
    for (const auto& block : routes.exact_blocks) e.exact += block.size();
    e.full = routes.full.size();
    for (const auto& block : routes.dipole_blocks) e.dipole += block.size();
    e.masked = routes.masked.size();
    const SweepMethod method = plan.sweep.method;
    // The full path keeps no factored fixed part; it solves the fixed scene once
    // per water for the baseline, about what assembling and factoring it costs.
    e.setup_seconds = cost.fixed_part_seconds();
    double work = 0;
    for (const auto& block : routes.exact_blocks)
        for (const PlacedPoint<S>& q : block) work += cost.exact_point_seconds(q.size_to_distance);
    work += double(routes.full.size()) * cost.full_point_seconds();
    for (const auto& block : routes.dipole_blocks) work += cost.dipole_block_seconds(block.size());
    if (method == SweepMethod::dipole || method == SweepMethod::automatic)  // the exact re-solves of the check
        work += double(std::min<std::size_t>(e.dipole, std::size_t(plan.sweep.dipole_checks))) *
                cost.exact_point_seconds(0.1);
    e.points_seconds = work / double(cost.rates.threads);
    CostModel held = cost;
    if (method == SweepMethod::full) held.sizes.waters = 0;  // nothing factored is kept, a system per thread
    e.memory_bytes = held.memory_bytes(!routes.exact_blocks.empty(), !routes.full.empty()) + kBytesPerPoint * double(plan.total);
    return e;
}

namespace {

std::string seconds_text(double s) {
    char buf[64];
    if (s < 120) std::snprintf(buf, sizeof buf, "%.1f s", s);
    else if (s < 7200) std::snprintf(buf, sizeof buf, "%.1f min", s / 60);
    else std::snprintf(buf, sizeof buf, "%.1f h", s / 3600);
    return buf;
}

}  // namespace

std::string format_estimate(const SweepEstimate& e) {
    char buf[512];
    std::string out;
    std::snprintf(buf, sizeof buf, "points:  %zu in all: %zu exact, %zu dipole, %zu full re-solve, %zu masked\n",
                  e.points, e.exact, e.dipole, e.full, e.masked);
    out += buf;
    std::snprintf(buf, sizeof buf,
                  "systems: %zu unknowns in the fixed part (%zu panels), %zu fixed part%s (one per water, "
                  "frequency and boundary gap); %zu unknowns in the "
                  "largest moving object (%zu panels); %s arithmetic\n",
                  e.sizes.fixed_unknowns, e.sizes.fixed_panels, e.sizes.waters, e.sizes.waters == 1 ? "" : "s",
                  e.sizes.moving_unknowns, e.sizes.moving_panels, e.sizes.complex ? "complex" : "real");
    out += buf;
    if (e.sizes.images > 0) {
        std::snprintf(buf, sizeof buf, "water:   %d image%s of the bounding planes in every entry (entries cost %.3g times "
                                       "those of unbounded water)\n",
                      e.sizes.images, e.sizes.images == 1 ? "" : "s", CostModel{e.rates, e.sizes}.image_factor());
        out += buf;
    }
    std::snprintf(buf, sizeof buf, "solver:  %s\n",
                  e.sizes.compressed
                      ? "compressed operator and iterative solve for the fixed part (its memory and time modelled, "
                        "not yet measured)"
                      : "dense LU of the fixed part");
    out += buf;
    std::snprintf(buf, sizeof buf,
                  "rates:   assembly %.2g entries/s per thread, LU %.3g GFLOP/s, solves %.3g GB/s per thread, "
                  "blocked solves %.3g GFLOP/s per thread\n",
                  e.rates.entry_rate, e.rates.lu_flop_rate * 1e-9, e.rates.solve_byte_rate * 1e-9,
                  e.rates.block_flop_rate * 1e-9);
    out += buf;
    std::snprintf(buf, sizeof buf, "memory:  about %s\n", memory_text(e.memory_bytes).c_str());
    out += buf;
    std::snprintf(buf, sizeof buf, "time:    about %s on %d thread%s: fixed part %s, points %s\n",
                  seconds_text(e.total_seconds()).c_str(), e.rates.threads, e.rates.threads == 1 ? "" : "s",
                  seconds_text(e.setup_seconds).c_str(), seconds_text(e.points_seconds).c_str());
    out += buf;
    return out;
}

void require_memory(const SweepEstimate& e, double limit_bytes, const std::string& where) {
    if (e.memory_bytes <= limit_bytes) return;
    throw InputError(where + ": the sweep needs about " + memory_text(e.memory_bytes) + " (a " +
                     (e.sizes.compressed ? "compressed" : "dense") + " system of " +
                     std::to_string(e.sizes.fixed_unknowns) + " unknowns from " + std::to_string(e.sizes.fixed_panels) +
                     " panels), more than the " + memory_text(limit_bytes) +
                     " it may use; set a larger mesh.panel_size (memory falls as its " +
                     (e.sizes.compressed ? "square" : "fourth power") + "), decimate an "
                     "imported mesh, or raise --memory-limit");
}

void require_point_memory(std::size_t points, double limit_bytes, const std::string& where) {
    const double bytes = kBytesPerPoint * double(points);
    if (bytes <= limit_bytes) return;
    throw InputError(where + ": the sweep has " + std::to_string(points) + " points, whose bookkeeping alone needs " +
                     memory_text(bytes) + ", more than the " + memory_text(limit_bytes) +
                     " it may use; split it into several runs or fewer axis values");
}

template SweepSizes sweep_sizes(const std::vector<Scene<double>>&, const MovingObjects<double>&, const SweepPlan&,
                                const SolverOptions&);
template SweepSizes sweep_sizes(const std::vector<Scene<Complex>>&, const MovingObjects<Complex>&, const SweepPlan&,
                                const SolverOptions&);
template SweepEstimate estimate_sweep(const SweepPlan&, const PointRoutes<double>&, const CostModel&);
template SweepEstimate estimate_sweep(const SweepPlan&, const PointRoutes<Complex>&, const CostModel&);

}  // namespace murk
