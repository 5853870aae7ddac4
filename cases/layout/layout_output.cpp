#include "cases/layout/layout_output.hpp"

#include "cases/output/coordinates.hpp"

#include <cmath>
#include <string>

namespace murk {

namespace {

std::string per_dipole_units(const std::string& units) { return units + " V-1 m-2"; }  // reading per V m^2

// The grid axes u, v and size as coordinates of `g`.
void grid_coordinates(const H5Group& g, const TargetGrid& grid) {
    g.write_coordinate("u", grid.u_m, "m", "target offset along u_direction from the grid origin");
    g.write_coordinate("v", grid.v_m, "m", "target offset along v_direction from the grid origin");
    if (!grid.planar()) g.write_coordinate("w", grid.w_m, "m", "target offset along w_direction from the grid origin");
    g.write_coordinate("size", grid.size_m, "m", "target size (largest half-extent)");
}

// The grid's dimensions (u, v and, for a volume, w) after `before` and before `after`.
std::vector<std::string> grid_dims(const TargetGrid& grid, std::vector<std::string> before,
                                   const std::vector<std::string>& after) {
    before.insert(before.end(), {"u", "v"});
    if (!grid.planar()) before.push_back("w");
    before.insert(before.end(), after.begin(), after.end());
    return before;
}
H5Shape grid_shape(const TargetGrid& grid, H5Shape before, const H5Shape& after) {
    before.insert(before.end(), {grid.u_m.size(), grid.v_m.size()});
    if (!grid.planar()) before.push_back(grid.w_m.size());
    before.insert(before.end(), after.begin(), after.end());
    return before;
}

// "detectable_area" (m2) on a plane, "detectable_volume" (m3) in a volume.
const char* region_name(const TargetGrid& grid) { return grid.planar() ? "detectable_area" : "detectable_volume"; }
const char* region_units(const TargetGrid& grid) { return grid.planar() ? "m2" : "m3"; }
const char* region_words(const TargetGrid& grid) {
    return grid.planar() ? "area of the grid where the target is detectable"
                         : "volume of the grid where the target is detectable";
}

// "localizable_area" (m2) on a plane, "localizable_volume" (m3) in a volume.
const char* localized_name(const TargetGrid& grid) { return grid.planar() ? "localizable_area" : "localizable_volume"; }
const char* localized_words(const TargetGrid& grid) {
    return grid.planar() ? "area of the grid where the position bound meets the accuracy"
                         : "volume of the grid where the position bound meets the accuracy";
}

// The Cramer-Rao bound on the target's position per size (layout_localization.hpp).
void write_bound(const H5Group& g, const LayoutQuantities& q, const TargetGrid& grid) {
    const hsize_t ns = grid.size_m.size();
    const H5Layout packed = H5Layout::compressed(1);
    std::vector<double> sd, axes, directions, area, size_sd;
    std::vector<std::uint8_t> status, within;
    for (const SizeQuantities& s : q.sizes) {
        sd.insert(sd.end(), s.position_sd.data(), s.position_sd.data() + s.position_sd.size());
        axes.insert(axes.end(), s.semi_axes.data(), s.semi_axes.data() + s.semi_axes.size());
        directions.insert(directions.end(), s.axes.data(), s.axes.data() + s.axes.size());
        status.insert(status.end(), s.bound_status.begin(), s.bound_status.end());
        within.insert(within.end(), s.within_accuracy.begin(), s.within_accuracy.end());
        area.push_back(s.localizable_area_m2);
        size_sd.insert(size_sd.end(), s.size_sd.begin(), s.size_sd.end());
    }
    index_coordinate(g, "semi_axis", 3, "semi-axis of the error ellipsoid, longest first");
    g.write("localization_accuracy", std::vector<double>{q.localization_accuracy_m}, H5Shape{}, "m",
            "position error asked for (largest semi-axis of the error ellipsoid)");
    g.write("localization_status", status, grid_shape(grid, {ns}, {}), "1", "state of the position bound", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {}))
        .set_flags(std::vector<std::uint8_t>{0, 1, 2, 3}, kLocalizationStatusWords);
    g.write("position_sd", sd, grid_shape(grid, {ns}, {3}), "m",
            "Cramer-Rao bound: standard deviation of the target position along x, y, z", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {"xyz"}))
        .set_fill_value(double(NAN));
    g.write("error_semi_axes", axes, grid_shape(grid, {ns}, {3}), "m",
            "Cramer-Rao bound: semi-axes of the 1-standard-deviation error ellipsoid of the position", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {"semi_axis"}))
        .set_fill_value(double(NAN));
    g.write("error_axes", directions, grid_shape(grid, {ns}, {3, 3}), "1",
            "Cramer-Rao bound: unit direction (x, y, z) of each semi-axis of the error ellipsoid "
            "(the sign of a direction is arbitrary)", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {"semi_axis", "xyz"}))
        .set_fill_value(double(NAN));
    if (q.localization_size_unknown)
        g.write("size_sd", size_sd, grid_shape(grid, {ns}, {}), "m",
                "Cramer-Rao bound: standard deviation of the target's size, estimated with its position", packed)
            .label_dimensions(grid_dims(grid, {"size"}, {}))
            .set_fill_value(double(NAN));
    g.write("within_accuracy", within, grid_shape(grid, {ns}, {}), "1",
            "whether the largest semi-axis is at most localization_accuracy", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {}))
        .set_flags(std::vector<std::uint8_t>{0, 1}, kWithinAccuracyWords);
    g.write(localized_name(grid), area, {ns}, region_units(grid), localized_words(grid)).label_dimensions({"size"});
}

void write_outline(const SizeQuantities& s, double size, const TargetGrid& grid,
                   std::vector<double>& u, std::vector<double>& v, std::vector<double>& xyz,
                   std::vector<double>& sizes, std::vector<std::int32_t>& ring, std::vector<std::uint8_t>& hole,
                   std::int32_t& next_ring) {
    for (const OutlineRing& r : s.outline) {
        for (std::size_t k = 0; k < r.u.size(); ++k) {
            u.push_back(r.u[k]);
            v.push_back(r.v[k]);
            const Eigen::Vector3d x = grid.origin + r.u[k] * grid.u_direction + r.v[k] * grid.v_direction;
            xyz.insert(xyz.end(), {x.x(), x.y(), x.z()});
            sizes.push_back(size);
            ring.push_back(next_ring);
            hole.push_back(r.hole ? 1 : 0);
        }
        ++next_ring;
    }
}

}  // namespace

void write_layout(const H5Group& layouts, const LayoutQuantities& q, const TargetGrid& grid) {
    const H5Group g = layouts.group(q.name);
    const hsize_t ns = grid.size_m.size();
    const hsize_t nr = static_cast<hsize_t>(q.readout.names.size());
    const H5Layout packed = H5Layout::compressed(1);
    g.set_attribute("layout_name", q.name);
    g.set_attribute("reading_units", q.readout.units);
    write_solver_used(g, q.solver_used);
    grid_coordinates(g, grid);
    xyz_coordinate(g);
    g.write_label_coordinate("reading", q.readout.names, "reading (channel) of the layout");
    g.write_label_coordinate("electrode", q.electrodes, "electrode of the layout");

    std::vector<std::uint8_t> parts(q.electrode_part.begin(), q.electrode_part.end());
    g.write("electrode_part", parts, {parts.size()}, "1", "part the electrode plays in the layout")
        .label_dimensions({"electrode"})
        .set_flags(std::vector<std::uint8_t>{0, 1, 2, 3, 4}, kElectrodePartWords);
    g.write("electrode_potential", q.electrode_potential_V, {parts.size()}, "V",
            "baseline electrode potential (an emitter's: the drive voltage needed or given)")
        .label_dimensions({"electrode"});
    g.write("electrode_current", q.electrode_current_A, {parts.size()}, "A",
            "baseline current from the electrode into the water (an emitter's: the drive current needed or given)")
        .label_dimensions({"electrode"});
    std::vector<double> base(q.baseline_reading.data(), q.baseline_reading.data() + q.baseline_reading.size());
    g.write("baseline_reading", base, {nr}, q.readout.units, "reading without the target").label_dimensions({"reading"});
    g.write("channel_noise", std::vector<double>{q.channel_noise}, H5Shape{}, q.readout.units, "rms noise of one reading");

    // sensitivity (u, v[, w], xyz, reading): the map's columns are 3 j + k, j the grid point (w fastest).
    g.write("sensitivity", q.sensitivity.data(), grid_shape(grid, {}, {3, nr}), per_dipole_units(q.readout.units),
            "reading change per unit induced dipole moment at the target position", packed)
        .label_dimensions(grid_dims(grid, {}, {"xyz", "reading"}));
    g.write("baseline_field", q.baseline_field.data(), grid_shape(grid, {}, {3}), "V m-1",
            "baseline electric field at the target position", packed)
        .label_dimensions(grid_dims(grid, {}, {"xyz"}));

    std::vector<double> change, snr, pd, area, range;
    std::vector<std::uint8_t> blocked;
    std::vector<double> ou, ov, oxyz, osize;
    std::vector<std::int32_t> oring;
    std::vector<std::uint8_t> ohole;
    std::int32_t next_ring = 0;
    for (std::size_t s = 0; s < q.sizes.size(); ++s) {
        const SizeQuantities& sq = q.sizes[s];
        change.insert(change.end(), sq.reading_change.data(), sq.reading_change.data() + sq.reading_change.size());
        snr.insert(snr.end(), sq.snr.begin(), sq.snr.end());
        pd.insert(pd.end(), sq.detection_probability.begin(), sq.detection_probability.end());
        blocked.insert(blocked.end(), sq.blocked.begin(), sq.blocked.end());
        area.push_back(sq.detectable_area_m2);
        range.push_back(sq.detection_range_m);
        write_outline(sq, grid.size_m[s], grid, ou, ov, oxyz, osize, oring, ohole, next_ring);
    }
    g.write("reading_change", change, grid_shape(grid, {ns}, {nr}), q.readout.units, "reading change caused by the target",
            packed)
        .label_dimensions(grid_dims(grid, {"size"}, {"reading"}))
        .set_fill_value(double(NAN));
    g.write("snr", snr, grid_shape(grid, {ns}, {}), "1", "ideal-observer signal-to-noise ratio d'", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {}))
        .set_fill_value(double(NAN));
    g.write("detection_probability", pd, grid_shape(grid, {ns}, {}), "1", "detection probability", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {}))
        .set_fill_value(double(NAN));
    g.write("target_status", blocked, grid_shape(grid, {ns}, {}), "1", "whether the target fits at the position", packed)
        .label_dimensions(grid_dims(grid, {"size"}, {}))
        .set_flags(std::vector<std::uint8_t>{0, 1}, kTargetStatusWords);
    g.write(region_name(grid), area, {ns}, region_units(grid), region_words(grid)).label_dimensions({"size"});
    g.write("detection_range", range, {ns}, "m", "largest distance from the hull at which the target is detectable")
        .label_dimensions({"size"})
        .set_fill_value(double(NAN));

    if (q.localization_accuracy_m > 0) write_bound(g, q, grid);

    if (ou.empty()) return;  // detectable nowhere: no outline (and no dimension of length 0)
    index_coordinate(g, "outline_vertex", ou.size(), "vertex of the detectable region's outline");
    g.write("outline_u", ou, {ou.size()}, "m", "outline vertex: offset along u_direction").label_dimensions({"outline_vertex"});
    g.write("outline_v", ov, {ov.size()}, "m", "outline vertex: offset along v_direction").label_dimensions({"outline_vertex"});
    g.write("outline_position", oxyz, {ou.size(), 3}, "m", "outline vertex position")
        .label_dimensions({"outline_vertex", "xyz"});
    g.write("outline_size", osize, {osize.size()}, "m", "target size whose region the vertex outlines")
        .label_dimensions({"outline_vertex"});
    g.write("outline_ring", oring, {oring.size()}, "1", "ring the vertex belongs to (each ring closed)")
        .label_dimensions({"outline_vertex"});
    g.write("outline_hole", ohole, {ohole.size()}, "1", "whether the vertex's ring is a hole")
        .label_dimensions({"outline_vertex"})
        .set_flags(std::vector<std::uint8_t>{0, 1}, "outer hole");
}

void write_layout_comparison(const H5Group& root, const std::vector<LayoutQuantities>& all, const TargetGrid& grid) {
    const H5Group g = root.group("layout_comparison");
    std::vector<std::string> names;
    std::vector<double> area, range, drive_power, noise, localized;
    std::vector<std::int32_t> readings;
    for (const LayoutQuantities& q : all) {
        names.push_back(q.name);
        readings.push_back(static_cast<std::int32_t>(q.readout.names.size()));
        noise.push_back(q.channel_noise);
        double power = 0;  // rms: P = sum V I over the emitters
        for (std::size_t e = 0; e < q.electrodes.size(); ++e)
            if (q.electrode_part[e] <= static_cast<int>(ElectrodePart::emitter_voltage))
                power += q.electrode_potential_V[e] * q.electrode_current_A[e];
        drive_power.push_back(power);
        for (const SizeQuantities& s : q.sizes) {
            area.push_back(s.detectable_area_m2);
            range.push_back(s.detection_range_m);
            localized.push_back(s.localizable_area_m2);
        }
    }
    g.write_label_coordinate("layout", names, "layout name");
    std::string joined;  // also as one attribute, for readers of plain attributes (murk inspect)
    for (const std::string& n : names) joined += (joined.empty() ? "" : ",") + n;
    g.set_attribute("layout_names", joined);
    g.write_coordinate("size", grid.size_m, "m", "target size (largest half-extent)");
    const hsize_t nl = names.size(), ns = grid.size_m.size();
    g.write("readings", readings, {nl}, "1", "number of readings").label_dimensions({"layout"});
    g.write("drive_power", drive_power, {nl}, "W", "power the emitters deliver into the water").label_dimensions({"layout"});
    g.write("channel_noise", noise, {nl}, "1", "rms noise of one reading (V or A, as the layout reads)")
        .label_dimensions({"layout"});
    g.write(region_name(grid), area, {nl, ns}, region_units(grid), region_words(grid)).label_dimensions({"layout", "size"});
    g.write("detection_range", range, {nl, ns}, "m", "largest distance from the hull at which the target is detectable")
        .label_dimensions({"layout", "size"})
        .set_fill_value(double(NAN));
    if (!all.empty() && all.front().localization_accuracy_m > 0)
        g.write(localized_name(grid), localized, {nl, ns}, region_units(grid), localized_words(grid))
            .label_dimensions({"layout", "size"});
}

void write_placement(const H5Group& root, const PlacementQuantities& p) {
    const H5Group g = root.group("placement");
    const PlacementResult& r = p.result;
    std::string chosen_names;  // also as one attribute, for readers of plain attributes (murk inspect)
    std::vector<std::string> chosen;
    std::vector<std::int32_t> chosen_index;
    std::vector<std::uint8_t> is_chosen(p.candidates.size(), 0);
    for (int c : r.chosen) {
        chosen.push_back(p.candidates[std::size_t(c)]);
        chosen_index.push_back(c);
        is_chosen[std::size_t(c)] = 1;
        chosen_names += (chosen_names.empty() ? "" : ",") + p.candidates[std::size_t(c)];
    }
    g.set_attribute("criterion", p.criterion);
    g.set_attribute("drive_layout", p.drive);
    write_solver_used(g, p.solver_used);
    g.set_attribute("chosen_names", chosen_names);
    std::string joined;
    for (const std::string& n : p.candidates) joined += (joined.empty() ? "" : ",") + n;
    g.set_attribute("candidate_names", joined);
    joined.clear();
    for (const std::string& n : p.layouts) joined += (joined.empty() ? "" : ",") + n;
    g.set_attribute("layout_names", joined);
    g.write_label_coordinate("candidate", p.candidates, "candidate site");
    g.write_label_coordinate("chosen", chosen, "chosen site");
    g.write_label_coordinate("layout", p.layouts, "layout name");
    std::vector<std::int32_t> steps;
    for (std::size_t k = 0; k < r.greedy.size(); ++k) steps.push_back(std::int32_t(k + 1));
    g.write_coordinate("step", steps, "1", "greedy step: number of sensors chosen");

    const std::string what = p.criterion == "mean_log_det"
                                 ? "mean over the targets of the log-determinant of the scaled Fisher information"
                                 : p.criterion == "detectable_area" ? "area of the grid where the target is detectable"
                                                                    : "volume of the grid where the target is detectable";
    g.write("is_chosen", is_chosen, {is_chosen.size()}, "1", "whether the candidate is chosen")
        .label_dimensions({"candidate"})
        .set_flags(std::vector<std::uint8_t>{0, 1}, kChosenWords);
    g.write("chosen_candidate", chosen_index, {chosen_index.size()}, "1", "index of the chosen site among the candidates")
        .label_dimensions({"chosen"});
    std::vector<std::int32_t> added;
    std::vector<double> greedy;
    for (const PlacementStep& s : r.greedy) added.push_back(s.added), greedy.push_back(s.criterion);
    g.write("greedy_added", added, {added.size()}, "1", "index of the candidate each greedy step adds")
        .label_dimensions({"step"});
    g.write("greedy_criterion", greedy, {greedy.size()}, p.units, what + ", after each greedy step")
        .label_dimensions({"step"});
    g.write("greedy_start", std::vector<std::int32_t>{r.start}, H5Shape{}, "1",
            "candidate the winning greedy run was made to start from (-1: the plain greedy run)");
    if (!r.exchanges.empty()) {  // no dimension of length 0
        index_coordinate(g, "exchange", r.exchanges.size(), "exchange accepted after the greedy steps");
        std::vector<std::int32_t> in, out;
        std::vector<double> value;
        for (const PlacementStep& s : r.exchanges) in.push_back(s.added), out.push_back(s.removed), value.push_back(s.criterion);
        g.write("exchange_added", in, {in.size()}, "1", "index of the candidate the exchange brings in")
            .label_dimensions({"exchange"});
        g.write("exchange_removed", out, {out.size()}, "1", "index of the candidate the exchange takes out")
            .label_dimensions({"exchange"});
        g.write("exchange_criterion", value, {value.size()}, p.units, what + ", after each exchange")
            .label_dimensions({"exchange"});
    }
    g.write("final_criterion", std::vector<double>{r.criterion}, H5Shape{}, p.units, what + ", of the chosen sites");
    g.write("layout_criterion", p.layout_criterion, {p.layout_criterion.size()}, p.units,
            what + ", of each layout on the same targets")
        .label_dimensions({"layout"});
    g.write("target_size", std::vector<double>{p.target_size_m}, H5Shape{}, "m", "target size the criterion uses");
    g.write("target_points", std::vector<std::int32_t>{std::int32_t(p.points)}, H5Shape{}, "1",
            "number of target positions the criterion counts");
    g.write("channel_noise", std::vector<double>{p.channel_noise_V}, H5Shape{}, "V", "rms noise of one candidate reading");
}

}  // namespace murk
