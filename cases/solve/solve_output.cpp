#include "cases/solve/solve_output.hpp"

#include "cases/output/result_layout.hpp"
#include "cases/output/surface_output.hpp"

#include <string>
#include <vector>

namespace murk {

namespace {

// The electrodes of one solution over the coordinate `electrode`, which holds their names
// (also kept as the attribute electrode_names, comma-separated).
template <class S>
void write_electrodes(const H5Group& parent, const std::vector<Electrode<S>>& electrodes, const std::vector<S>& potential,
                      const std::vector<S>& current, const std::vector<ElectrodeArea>* areas = nullptr) {
    using namespace layout;
    if (electrodes.empty()) return;
    const H5Group group = parent.group(kElectrodes);
    std::vector<std::string> labels;
    std::string names;
    for (std::size_t i = 0; i < electrodes.size(); ++i) {
        labels.push_back(electrodes[i].name);
        names += (i ? "," : "") + electrodes[i].name;
    }
    group.write_label_coordinate(kElectrode, labels, "electrode name");
    group.write(kPotential, potential, "V", "electrode potential")
        .label_dimensions({kElectrode})
        .set_attribute(kElectrodeNames, names);
    group.write(kCurrent, current, "A", "current from the electrode into the water")
        .label_dimensions({kElectrode})
        .set_attribute(kElectrodeNames, names);
    if (!areas) return;
    std::vector<double> mesh_area, exact_area;
    for (std::size_t i = 0; i < electrodes.size(); ++i) {
        mesh_area.push_back(areas->at(i).mesh_m2);
        exact_area.push_back(areas->at(i).exact_m2);
    }
    group.write("area", mesh_area, "m2", "summed area of the electrode's panels").label_dimensions({kElectrode});
    group.write("exact_area", exact_area, "m2", "area of the electrode on the true surface, NaN where not known")
        .label_dimensions({kElectrode});
}

}  // namespace

template <class S>
void write_solve_result(H5Group root, const SolvedCase<S>& solved) {
    H5Group mesh = root.group("mesh"), baseline = root.group("baseline"), perturbed = root.group("perturbed"),
                  difference = root.group("difference");
    for (std::size_t s = 0; s < solved.perturbed.surfaces.size(); ++s) {
        const Surface<S>& surface = solved.perturbed.surfaces[s];
        const std::string name = surface_group_name(surface.mesh.name);
        write_mesh(mesh.group(name), surface.mesh);
        write_surface_values(perturbed.group(name), surface, solved.perturbed_solution.surfaces[s]);
    }
    // The baseline scene holds the sensing body's surfaces first, in the same order.
    for (std::size_t s = 0; s < solved.baseline.surfaces.size(); ++s) {
        const Surface<S>& surface = solved.baseline.surfaces[s];
        const std::string name = surface_group_name(surface.mesh.name);
        const SurfaceSolution<S>& before = solved.baseline_solution.surfaces[s];
        const SurfaceSolution<S>& after = solved.perturbed_solution.surfaces[s];
        write_surface_values(baseline.group(name), surface, before);
        SurfaceSolution<S> change;
        change.outer_potential = after.outer_potential - before.outer_potential;
        change.current_density = after.current_density - before.current_density;
        if (before.inner_potential.size() > 0) change.inner_potential = after.inner_potential - before.inner_potential;
        write_surface_values(difference.group(name), surface, change);
    }
    write_electrodes(perturbed, solved.perturbed.electrodes, solved.perturbed_solution.electrode_potential,
                     solved.perturbed_solution.electrode_current, &solved.electrode_areas);
    // Baseline electrodes are the robot's; conductor objects add theirs after them.
    const std::size_t shared = solved.baseline.electrodes.size();
    write_electrodes(baseline, solved.baseline.electrodes, solved.baseline_solution.electrode_potential,
                     solved.baseline_solution.electrode_current, &solved.electrode_areas);
    std::vector<S> dp(shared), dc(shared);
    for (std::size_t e = 0; e < shared; ++e) {
        dp[e] = solved.perturbed_solution.electrode_potential[e] - solved.baseline_solution.electrode_potential[e];
        dc[e] = solved.perturbed_solution.electrode_current[e] - solved.baseline_solution.electrode_current[e];
    }
    write_electrodes(difference, solved.baseline.electrodes, dp, dc);
}

template void write_solve_result(H5Group, const SolvedCase<double>&);
template void write_solve_result(H5Group, const SolvedCase<Complex>&);

}  // namespace murk
