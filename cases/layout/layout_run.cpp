#include "cases/layout/layout_run.hpp"

#include "cases/layout/layout_evaluation.hpp"
#include "cases/layout/layout_noise.hpp"
#include "cases/layout/layout_output.hpp"
#include "cases/layout/layout_placement.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/output/image_attributes.hpp"
#include "cases/output/result_metadata.hpp"
#include "cases/scene/scene_builder.hpp"
#include "geometry/input_error.hpp"

#include <cstdio>

namespace murk {

namespace {

QuadratureOptions quadrature_of(const CaseSpec& spec) {
    QuadratureOptions q;
    q.near_ratio = spec.mesh.near_ratio;
    q.far_ratio = spec.mesh.far_ratio;
    return q;
}

}  // namespace

LayoutRun evaluate_layouts(const CaseSpec& spec, const QuadratureOptions& quad, bool quiet) {
    if (spec.layouts.empty())
        throw InputError(spec.path + ": layout: murk layout compares [[layout]] tables; the case has none");
    if (spec.waveform)
        throw InputError(spec.path + ":" + std::to_string(spec.waveform->line) + ": signal: murk layout computes at "
                         "direct current; a waveform (harmonics or samples) is solved by murk run");
    if (case_needs_complex(spec))
        throw InputError(spec.path + ": murk layout computes in real arithmetic; this case has a permittivity or "
                                     "capacitance at a frequency (leave them out to compare layouts)");
    for (const LayoutSpec& l : spec.layouts) layout_noise(spec, l);  // every refusal before any solve
    LayoutRun run;
    run.grid = target_grid(spec, quad);                          // 1. targets
    const TargetPlacement placement = place_targets(spec, run.grid);  // 2. placed against the hull
    for (std::size_t k = 0; k < spec.layouts.size(); ++k) {      // 3. layouts
        run.layouts.push_back(evaluate_layout(spec, k, run.grid, placement, quad));
        const LayoutQuantities& q = run.layouts.back();
        if (!quiet)
            std::printf("layout %s: %zu readings, factored in %.2f s (%s), maps of %zu points in %.2f s\n",
                        q.name.c_str(), q.readout.names.size(), q.factor_seconds, q.solver_used.solver.c_str(),
                        run.grid.size(), q.map_seconds);
    }
    if (spec.placement) {                                        // 4. placement
        run.placement = place_layout_sensors(spec, run.grid, placement, run.layouts, quad);
        const PlacementQuantities& p = *run.placement;
        if (!quiet) {
            std::printf("placement: %d of %zu candidates by %s in %.2f s (body of %ld unknowns %.2f s, lead fields "
                        "and responses %.2f s, choice %.2f s); chosen",
                        spec.placement->budget, p.candidates.size(), p.criterion.c_str(),
                        p.factor_seconds + p.lead_seconds + p.choose_seconds, p.unknowns, p.factor_seconds,
                        p.lead_seconds, p.choose_seconds);
            for (int c : p.result.chosen) std::printf(" %s", p.candidates[std::size_t(c)].c_str());
            std::printf("\n");
        }
    }
    return run;
}

LayoutRun run_layouts(const CaseSpec& spec, const LayoutOptions& options) {
    const QuadratureOptions quad = quadrature_of(spec);
    H5Output out(options.output_path, options.force, "pass --force to replace it");  // refused before any work
    LayoutRun run = evaluate_layouts(spec, quad, options.quiet);
    H5Group root = out.root();
    write_result_metadata(root, spec, options.command_line, "induced dipole (reciprocity)", quad);
    // Every layout sits in the same water, so the first one's images stand for all.
    if (!run.layouts.empty()) write_image_attributes(root, run.layouts.front().water);
    const H5Group layouts = root.group("layouts");
    for (const LayoutQuantities& q : run.layouts) write_layout(layouts, q, run.grid);
    write_layout_comparison(root, run.layouts, run.grid);
    if (run.placement) write_placement(root, *run.placement);
    out.commit();  // 5. written under OUT.h5.partial, renamed onto OUT.h5
    if (!options.quiet) std::printf("wrote %s\n", options.output_path.c_str());
    return run;
}

}  // namespace murk
