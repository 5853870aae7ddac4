#include "cases/sweep/sweep_merge.hpp"

#include "cases/output/hdf5_file.hpp"
#include "cases/output/result_layout.hpp"
#include "cases/output/result_metadata.hpp"
#include "cases/sweep/dipole_check.hpp"
#include "cases/sweep/result_finish.hpp"
#include "geometry/input_error.hpp"

#include <algorithm>
#include <complex>
#include <cstdio>
#include <map>
#include <set>

namespace murk {

namespace {

struct Part {
    std::string path;
    H5File file;
    std::int64_t share = 0, shares = 0;
    std::vector<std::uint8_t> status;
};

// The per-point datasets of /sweep that a part fills for its own points (those a
// result has; the perturbation is copied apart, point by point).
const char* const kPointDatasets[] = {"status", "mask_reason", "path", "peak_perturbation", "peak_sensor",
                                      "peak_position", "object_position", "image_width", "snr",
                                      "detection_probability", "amplitude_change", "phase_change",
                                      "snr_amplitude", "snr_phase"};

Part open_part(const std::string& path) {
    Part p{path, H5File::open_readonly(path), 0, 0, {}};
    const H5Group root = p.file.root();
    if (!root.has_attribute("share_index") || !root.has_attribute("share_count"))
        throw InputError(path + ": is not a share of a sweep (murk run --shard K/N writes those)");
    p.share = root.int_attribute("share_index");
    p.shares = root.int_attribute("share_count");
    p.status = root.read<std::uint8_t>(std::string(layout::kSweep) + "/" + layout::kStatus).values;
    return p;
}

// Copies each of `from`'s points that `take` marks, in every dataset whose leading
// dimensions are the sweep's points, into `to`.
template <class T>
void copy_points(const H5Dataset& from, const H5Dataset& to, std::size_t points, const std::vector<char>& take) {
    const H5Shape shape = from.shape();
    std::size_t per_point = 1;
    std::size_t leading = 1, d = 0;
    for (; d < shape.size() && leading < points; ++d) leading *= shape[d];
    for (; d < shape.size(); ++d) per_point *= shape[d];
    const H5Shape all(shape.size(), 0);
    const std::vector<T> source = from.read_slab<T>(all, shape);
    std::vector<T> target = to.read_slab<T>(all, shape);
    for (std::size_t p = 0; p < points; ++p)
        if (take[p]) std::copy_n(source.begin() + p * per_point, per_point, target.begin() + p * per_point);
    to.write_slab(all, shape, target);
}

void copy_dataset(const std::string& name, const H5Dataset& from, const H5Dataset& to, std::size_t points,
                  const std::vector<char>& take) {
    // Codes are bytes and the peak sensor a 32-bit index (cases/RESULT_LAYOUT.md); the rest are reals.
    if (name == "status" || name == "mask_reason" || name == "path") return copy_points<std::uint8_t>(from, to, points, take);
    if (name == "peak_sensor") return copy_points<std::int32_t>(from, to, points, take);
    copy_points<double>(from, to, points, take);
}

// The perturbation of each point `take` marks, one point at a time.
template <class S>
void copy_perturbation(const H5Dataset& from, const H5Dataset& to, const std::vector<std::size_t>& shape,
                       const std::vector<char>& take) {
    const std::size_t sensors = std::size_t(from.shape().back());
    for (std::size_t p = 0; p < take.size(); ++p) {
        if (!take[p]) continue;
        H5Shape offset(shape.size() + 1, 0), count(shape.size(), 1);
        for (std::size_t k = shape.size(), q = p; k-- > 0;) offset[k] = q % shape[k], q /= shape[k];
        count.push_back(sensors);
        to.write_slab(offset, count, from.read_slab<S>(offset, count));
    }
}

}  // namespace

void merge_results(const std::vector<std::string>& paths, const MergeOptions& options) {
    if (paths.empty()) throw InputError("no parts to merge");
    std::vector<Part> parts;
    for (const std::string& path : paths) parts.push_back(open_part(path));

    // Parts of one sweep: the same case, murk and share count, each share once.
    const H5Group first = parts.front().file.root();
    const std::string sha = first.string_attribute("case_sha256"), version = first.string_attribute("murk_version");
    const std::int64_t shares = parts.front().shares;
    std::map<std::int64_t, std::string> by_share;
    for (const Part& p : parts) {
        const H5Group root = p.file.root();
        if (root.string_attribute("case_sha256") != sha)
            throw InputError(p.path + ": is a share of another case than " + parts.front().path);
        if (root.string_attribute("murk_version") != version)
            throw InputError(p.path + ": was written by murk " + root.string_attribute("murk_version") + ", " +
                             parts.front().path + " by murk " + version);
        if (p.shares != shares)
            throw InputError(p.path + ": is share " + std::to_string(p.share) + "/" + std::to_string(p.shares) + ", " +
                             parts.front().path + " one of " + std::to_string(shares));
        if (p.status.size() != parts.front().status.size())
            throw InputError(p.path + ": holds a sweep of another size than " + parts.front().path);
        const auto [it, fresh] = by_share.emplace(p.share, p.path);
        if (!fresh)
            throw InputError(p.path + " and " + it->second + " are both share " + std::to_string(p.share) + "/" +
                             std::to_string(shares));
    }
    // Every point in one part at most; without --partial, in one at least.
    const std::size_t points = parts.front().status.size();
    std::vector<int> owner(points, -1);
    for (std::size_t k = 0; k < parts.size(); ++k)
        for (std::size_t p = 0; p < points; ++p) {
            if (parts[k].status[p] == std::uint8_t(PointStatus::not_computed)) continue;
            if (owner[p] >= 0)
                throw InputError(parts[k].path + " and " + parts[std::size_t(owner[p])].path + " both hold point " +
                                 std::to_string(p) + "; parts of one sweep must not overlap");
            owner[p] = int(k);
        }
    const std::size_t missing = std::size_t(std::count(owner.begin(), owner.end(), -1));
    if (missing > 0 && !options.partial) {
        std::string absent;
        for (std::int64_t s = 1; s <= shares; ++s)
            if (!by_share.count(s)) absent += (absent.empty() ? "" : ", ") + std::to_string(s);
        throw InputError(std::to_string(missing) + " of " + std::to_string(points) +
                         " points are in no part" +
                         (absent.empty() ? " (some parts are unfinished)" : " (shares missing: " + absent + " of " +
                                                                                std::to_string(shares) + ")") +
                         "; give every part, or pass --partial to leave them not computed");
    }

    // The result starts as a copy of the first part, and takes every other part's points.
    H5Output output = H5Output::copy_of(paths.front(), options.output_path, options.force, "pass --force to replace it",
                                        options.output_path + ".writing");
    H5Group root = output.root();
    H5Group sweep = root.open_group(layout::kSweep);
    const std::vector<SweepAxis> axes = axes_in_file(root);
    std::vector<std::size_t> shape;
    for (const SweepAxis& a : axes) shape.push_back(a.values.size());
    DipoleCheck checks;
    double peak_memory = 0;
    for (std::size_t k = 0; k < parts.size(); ++k) {
        const H5Group part_root = parts[k].file.root();
        const H5Group part_sweep = part_root.open_group(layout::kSweep);
        if (part_root.has_attribute("peak_memory_MiB"))
            peak_memory = std::max(peak_memory, part_root.double_attribute("peak_memory_MiB"));
        if (part_sweep.exists(layout::kDipoleCheck)) {
            const H5Group c = part_sweep.open_group(layout::kDipoleCheck);
            for (std::int64_t v : c.read<std::int64_t>(layout::kCheckPoint).values) checks.points.push_back(v);
            for (double v : c.read<double>(layout::kDiscrepancy).values) checks.discrepancy.push_back(v);
            for (double v : c.read<double>("size_to_distance").values) checks.size_to_distance.push_back(v);
        }
        if (k == 0) continue;  // already in the copy
        std::vector<char> take(points);
        for (std::size_t p = 0; p < points; ++p) take[p] = owner[p] == int(k);
        for (const char* name : kPointDatasets)
            if (part_sweep.exists(name)) copy_dataset(name, part_sweep.dataset(name), sweep.dataset(name), points, take);
        const H5Dataset from = part_sweep.dataset("perturbation"), to = sweep.dataset("perturbation");
        if (from.kind() == H5Kind::complex)
            copy_perturbation<std::complex<double>>(from, to, shape, take);
        else
            copy_perturbation<double>(from, to, shape, take);
    }
    // The checks of every part, in point order, as one run lists them.
    sweep.remove(layout::kDipoleCheck);
    if (!checks.points.empty()) {
        std::vector<std::size_t> order(checks.points.size());
        for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
        std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return checks.points[a] < checks.points[b]; });
        DipoleCheck sorted;
        for (std::size_t i : order) {
            sorted.points.push_back(checks.points[i]);
            sorted.discrepancy.push_back(checks.discrepancy[i]);
            sorted.size_to_distance.push_back(checks.size_to_distance[i]);
        }
        const bool automatic = root.string_attribute("sweep_method") == "auto";
        write_dipole_check(root, sorted,
                         automatic ? std::optional<double>(root.double_attribute("dipole_accuracy")) : std::nullopt);
    }
    // A whole sweep now: no share, the analysis and the sidecar of the whole.
    root.remove_attribute("share_index");
    root.remove_attribute("share_count");
    root.append_to_attribute("history", history_line(utc_now_iso8601(), options.command_line));
    root.set_attribute("peak_memory_MiB", peak_memory);
    const std::vector<XdmfSurface> surfaces = finish_result(root);
    parts.clear();
    commit_with_sidecar(output, surfaces);
    if (!options.quiet)
        std::printf("merged %zu parts into %s (%zu points%s)\n", paths.size(), options.output_path.c_str(), points,
                    missing ? (", " + std::to_string(missing) + " not computed").c_str() : "");
}

}  // namespace murk
