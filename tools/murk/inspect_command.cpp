// `murk inspect OUT.h5`: a readable summary of a result file of `murk run` or `murk solve`,
// read through murk's own HDF5 layer against the layout of cases/RESULT_LAYOUT.md.
// The file decides which summary it gets: a /sweep group means `murk run`.
//
// Sweep axes are found from the dimension scales attached to /sweep/status (the layout's way
// of naming dimensions), so the summary follows whatever axes and order a run chose. The same
// holds for /detection and /falloff, whose datasets lie over the axes other than distance.
// What a code means is read from the coded dataset's own flag_values / flag_meanings, looked
// up by the words of cases/output/result_layout.hpp, never by numbers written in here.
// Anything the layout requires that is missing or malformed is an InputError naming the
// file and the dataset, never a guess.
#include "cases/output/image_attributes.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/output/result_layout.hpp"
#include "geometry/input_error.hpp"
#include "cases/sweep/point_journal.hpp"
#include "tools/murk/commands.hpp"

#include <H5DSpublic.h>
#include <hdf5.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdarg>
#include <cstdint>
#include <cstdio>
#include <limits>
#include <string>
#include <vector>

namespace murk::cli {

namespace {

// ---- formatting -----------------------------------------------------------------------

std::string format(const char* pattern, ...) __attribute__((format(printf, 1, 2)));
std::string format(const char* pattern, ...) {
    char buffer[512];
    va_list args;
    va_start(args, pattern);
    std::vsnprintf(buffer, sizeof buffer, pattern, args);
    va_end(args);
    return buffer;
}

// Volts and amperes span fifteen decades between a baseline and a faint image: an SI prefix
// keeps them readable ("0.35 uV"). ASCII "u", as in murk's case files.
std::string with_prefix(double value, const std::string& unit) {
    // Zero, and rounding noise below a femto-unit (the net current of a floating electrode),
    // read best without a prefix.
    if (!std::isfinite(value) || std::abs(value) < 1e-15) return format("%.3g %s", value, unit.c_str());
    static const struct { double scale; const char* prefix; } prefixes[] = {
        {1e6, "M"}, {1e3, "k"}, {1e0, ""}, {1e-3, "m"}, {1e-6, "u"}, {1e-9, "n"}, {1e-12, "p"}, {1e-15, "f"}};
    const double size = std::abs(value);
    // 0.9995 of the step: "%.3g" would print 999.96 u as "1e+03 u"; that is 1.00 m.
    for (const auto& p : prefixes)
        if (size >= 0.9995 * p.scale) return format("%.3g %s%s", value / p.scale, p.prefix, unit.c_str());
    return format("%.3g %s", value, unit.c_str());
}

// Distances and sizes of millimetres to decimetres: one decimal of a millimetre.
std::string millimetres(double metres) { return format("%.1f mm", metres * 1e3); }

// A conductivity axis uses 0 for an insulator and infinity for a perfect conductor.
std::string conductivity_text(double s_per_m) {
    if (s_per_m == 0) return "0 (insulator)";
    if (std::isinf(s_per_m)) return "inf (conductor)";
    return format("%g", s_per_m);
}

std::string shape_text(const H5Shape& shape) {
    std::string s = "(";
    for (std::size_t k = 0; k < shape.size(); ++k) s += (k ? ", " : "") + std::to_string(shape[k]);
    return s + ")";
}

std::vector<std::string> split_commas(const std::string& text) {
    std::vector<std::string> parts;
    std::size_t start = 0;
    while (true) {
        const std::size_t comma = text.find(',', start);
        parts.push_back(text.substr(start, comma - start));
        if (comma == std::string::npos) return parts;
        start = comma + 1;
    }
}

// Columns padded to their widest cell, two spaces apart.
class Table {
public:
    explicit Table(std::vector<std::string> header) : rows_{std::move(header)} {}
    void add(std::vector<std::string> row) { rows_.push_back(std::move(row)); }
    void print(const char* indent) const {
        std::vector<std::size_t> width(rows_.front().size(), 0);
        for (const auto& row : rows_)
            for (std::size_t c = 0; c < row.size(); ++c) width[c] = std::max(width[c], row[c].size());
        for (const auto& row : rows_) {
            std::string line = indent;
            for (std::size_t c = 0; c < row.size(); ++c)
                line += row[c] + (c + 1 < row.size() ? std::string(width[c] - row[c].size() + 2, ' ') : "");
            std::printf("%s\n", line.c_str());
        }
    }

private:
    std::vector<std::vector<std::string>> rows_;
};

// ---- reading helpers ------------------------------------------------------------------

[[noreturn]] void malformed(const H5Object& object, const std::string& what) {
    throw InputError(object.file_name() + ": " + object.path() + " " + what);
}

// Names of a group's members, in name order. Our layer opens paths but does not list them.
std::vector<std::string> members(const H5Group& group) {
    std::vector<std::string> names;
    const auto collect = [](hid_t, const char* name, const H5L_info_t*, void* out) -> herr_t {
        static_cast<std::vector<std::string>*>(out)->push_back(name);
        return 0;
    };
    if (H5Literate(group.id(), H5_INDEX_NAME, H5_ITER_INC, nullptr, collect, &names) < 0)
        throw InputError(group.file_name() + ": cannot list the members of " + group.path());
    return names;
}

// The axis name of each dimension: the last path component of the dimension scale attached
// to it, or "" where none is.
std::vector<std::string> scale_names(const H5Dataset& d) {
    const H5Shape shape = d.shape();
    std::vector<std::string> names(shape.size());
    for (unsigned dim = 0; dim < shape.size(); ++dim) {
        if (H5DSget_num_scales(d.id(), dim) <= 0) continue;
        // A scale whose link was deleted has no path left, but keeps the name make_scale gave
        // it: that is the axis a reader will then report missing.
        const auto visit = [](hid_t, unsigned, hid_t scale, void* out) -> herr_t {
            char text[1024] = "";
            std::string name;
            if (H5Iget_name(scale, text, sizeof text) > 0) {
                name = text;
                name = name.substr(name.rfind('/') + 1);
            } else if (H5DSget_scale_name(scale, text, sizeof text) > 0) {
                name = text;
            }
            *static_cast<std::string*>(out) = name.empty() ? "?" : name;
            return 1;  // the first scale is the axis
        };
        H5DSiterate_scales(d.id(), dim, nullptr, visit, &names[dim]);
    }
    return names;
}

std::string units_of(const H5Dataset& d) { return d.string_attribute("units"); }

// Magnitudes of a real or complex dataset: images may be complex (a frequency with
// capacitances), and their size is what a summary reports.
std::vector<double> magnitudes(const H5Dataset& d) {
    if (d.kind() == H5Kind::complex) {
        std::vector<double> out;
        for (const auto& z : d.read<std::complex<double>>().values) out.push_back(std::abs(z));
        return out;
    }
    if (d.kind() != H5Kind::real) malformed(d, "holds neither real nor complex numbers");
    auto values = d.read<double>().values;
    for (double& v : values) v = std::abs(v);
    return values;
}

// The CF flags of a coded dataset: its codes and the word of each.
struct Flags {
    std::vector<std::int64_t> codes;
    std::vector<std::string> words;

    // The code of a word of result_layout.hpp; a file that lacks it is malformed.
    std::int64_t code(const H5Dataset& d, std::string_view word) const {
        for (std::size_t k = 0; k < words.size(); ++k)
            if (words[k] == word) return codes[k];
        malformed(d, "has no code for '" + std::string(word) + "' in its flag_meanings");
    }
    // The word of a code found in the data; a code the flags do not list is malformed.
    const std::string& word(const H5Dataset& d, std::int64_t value) const {
        for (std::size_t k = 0; k < codes.size(); ++k)
            if (codes[k] == value) return words[k];
        malformed(d, "holds " + std::to_string(value) + ", which its flag_values do not list");
    }
};

Flags read_flags(const H5Dataset& d) {
    using namespace layout;
    if (!d.has_attribute(kFlagValues) || !d.has_attribute(kFlagMeanings))
        malformed(d, "has no flag_values and flag_meanings: what its codes mean is unknown");
    Flags flags;
    for (double v : d.double_array_attribute(kFlagValues)) flags.codes.push_back(static_cast<std::int64_t>(v));
    const std::string meanings = d.string_attribute(kFlagMeanings);
    std::size_t start = 0;
    while (start < meanings.size()) {
        const std::size_t end = std::min(meanings.find(' ', start), meanings.size());
        if (end > start) flags.words.push_back(meanings.substr(start, end - start));
        start = end + 1;
    }
    if (flags.words.size() != flags.codes.size())
        malformed(d, "has " + std::to_string(flags.codes.size()) + " flag_values but " +
                         std::to_string(flags.words.size()) + " words in flag_meanings");
    return flags;
}

// Real or integer values as doubles: an object axis holds indices, status codes are integers.
std::vector<double> numbers(const H5Dataset& d) {
    if (d.kind() == H5Kind::real) return d.read<double>().values;
    if (d.kind() != H5Kind::integer) malformed(d, "holds neither real numbers nor integers");
    const std::vector<std::int64_t> whole = d.read<std::int64_t>().values;
    return {whole.begin(), whole.end()};
}

// ---- the header shared by both kinds of file --------------------------------------------

void print_header(const H5File& file, const H5Group& root) {
    if (!root.has_attribute("murk_version"))
        throw InputError(file.path() + ": not a murk result file (no murk_version attribute at the root)");
    const std::string sha = root.string_attribute("case_sha256");
    const double frequency = root.double_attribute("frequency_Hz");
    std::printf("%s\n", file.path().c_str());
    std::printf("  title:          %s\n", root.string_attribute("title").c_str());
    std::printf("  murk version:   %s\n", root.string_attribute("murk_version").c_str());
    std::printf("  created (UTC):  %s\n", root.string_attribute("created_utc").c_str());
    std::printf("  command:        %s\n", root.string_attribute("command").c_str());
    std::printf("  approximation:  %s\n", root.string_attribute("approximation").c_str());
    std::printf("  case SHA-256:   %s...%s\n", sha.substr(0, 12).c_str(),
                root.has_attribute("case_path") ? (" (" + root.string_attribute("case_path") + ")").c_str() : "");
    if (root.exists("sweep/frequency"))  // a frequency axis (or a waveform's harmonics): no one frequency
        std::printf("  frequency:      swept, %zu values (/sweep/frequency)%s\n",
                    std::size_t(root.dataset("sweep/frequency").shape()[0]),
                    root.exists("signal") ? ", the harmonics of a waveform (/signal)" : "");
    else
        std::printf("  frequency:      %s\n", frequency == 0 ? "0 Hz (direct current)" : with_prefix(frequency, "Hz").c_str());
    if (root.has_attribute("system_solver")) {  // files written before murk recorded its solver have none
        std::string line = format("%s, dense_limit %lld unknowns", root.string_attribute("system_solver").c_str(),
                                  static_cast<long long>(root.int_attribute("dense_limit")));
        if (root.has_attribute("compression_tolerance"))
            line += format(", compression_tolerance %g, iteration_tolerance %g",
                           root.double_attribute("compression_tolerance"), root.double_attribute("iteration_tolerance"));
        if (root.has_attribute("preconditioner_tolerance"))  // files before the HODLR preconditioner have none
            line += format(", preconditioner_tolerance %g", root.double_attribute("preconditioner_tolerance"));
        std::printf("  system solver:  %s\n", line.c_str());
    }
    if (root.has_attribute("water_images")) {  // files written before murk recorded the water's bounds have none
        WaterBoundsSummary w;
        w.planes = static_cast<int>(root.int_attribute("water_planes"));
        w.images = static_cast<int>(root.int_attribute("water_images"));
        w.tolerance = root.double_attribute("water_image_tolerance");
        w.reach_m = root.double_attribute("water_image_reach_m");
        // A tank's walls are panels, not images; the file says so by its reference.
        const bool tank = root.has_attribute("reference");
        std::printf("  water bounds:   %s\n", tank ? "closed tank walls (meshed)" : water_bounds_text(w).c_str());
        if (tank) std::printf("  reference:      %s\n", root.string_attribute("reference").c_str());
    }
}

// How a group's system was solved ("dense", or "compressed, 27 iterations, ..."); empty
// when the group does not say.
std::string solver_used_text(const H5Group& g) {
    if (!g.has_attribute("system_solver_used")) return "";
    std::string text = g.string_attribute("system_solver_used");
    if (g.has_attribute("compression_ratio"))
        text += format(", %lld iterations, compression ratio %.3g",
                       static_cast<long long>(g.int_attribute("system_iterations")), g.double_attribute("compression_ratio"));
    return text;
}

// ---- murk solve -----------------------------------------------------------------------

std::size_t panel_count(const H5Group& root, const std::string& surface) {
    const H5Dataset triangles = root.dataset(std::string(layout::kMesh) + "/" + surface + "/" + layout::kTriangles);
    const H5Shape shape = triangles.shape();
    if (shape.size() != 2 || shape[1] != 3) malformed(triangles, "has shape " + shape_text(shape) + ", expected (t, 3)");
    return shape[0];
}

// "peak 0.31 uV at panel 17 (30.2, 7.1, 0.0) mm", from the change of transdermal voltage.
std::string image_peak(const H5Group& root, const std::string& surface, std::size_t panels) {
    const H5Dataset change = root.dataset(std::string(layout::kDifference) + "/" + surface + "/" + layout::kTransdermal);
    const std::vector<double> size = magnitudes(change);
    if (size.size() != panels) malformed(change, "has " + std::to_string(size.size()) + " values for " +
                                                     std::to_string(panels) + " panels");
    const std::size_t at = std::max_element(size.begin(), size.end()) - size.begin();
    std::string text = "change of transdermal voltage: peak " + with_prefix(size[at], units_of(change)) +
                       " at panel " + std::to_string(at);
    const std::string centroid = std::string(layout::kMesh) + "/" + surface + "/" + layout::kCentroid;
    if (root.exists(centroid)) {
        const H5Array<double> c = root.read<double>(centroid);
        if (c.shape != H5Shape{panels, 3}) malformed(root.dataset(centroid), "is not (t, 3)");
        text += format(" (%.1f, %.1f, %.1f) mm", c.values[3 * at] * 1e3, c.values[3 * at + 1] * 1e3,
                       c.values[3 * at + 2] * 1e3);
    }
    return text;
}

void print_surfaces(const H5Group& root) {
    std::printf("surfaces:\n");
    Table table({"surface", "panels", "electric image"});
    for (const std::string& surface : members(root.open_group(layout::kMesh))) {
        const std::size_t panels = panel_count(root, surface);
        const bool has_image = root.exists(std::string(layout::kDifference) + "/" + surface + "/" + layout::kTransdermal);
        table.add({surface, std::to_string(panels), has_image ? image_peak(root, surface, panels) : "-"});
    }
    table.print("  ");
}

// Real values keep their sign; complex ones are shown as magnitudes.
std::vector<std::string> readable_values(const H5Dataset& d) {
    std::vector<std::string> out;
    const std::string units = units_of(d);
    if (d.kind() == H5Kind::real) {
        for (double v : d.read<double>().values) out.push_back(with_prefix(v, units));
    } else {
        for (double v : magnitudes(d)) out.push_back("|" + with_prefix(v, units) + "|");
    }
    return out;
}

void print_electrodes(const H5Group& root) {
    using namespace layout;
    const std::string electrodes = std::string(kDifference) + "/" + kElectrodes + "/";
    if (!root.exists(electrodes)) return;
    const H5Dataset potential = root.dataset(electrodes + kPotential);
    const H5Dataset current = root.dataset(electrodes + kCurrent);
    const std::vector<std::string> dv = readable_values(potential), di = readable_values(current);
    std::vector<std::string> names;
    if (potential.has_attribute(kElectrodeNames)) names = split_commas(potential.string_attribute(kElectrodeNames));
    if (di.size() != dv.size()) malformed(current, "has " + std::to_string(di.size()) + " values, potential has " +
                                                       std::to_string(dv.size()));
    if (!names.empty() && names.size() != dv.size())
        malformed(potential, "names " + std::to_string(names.size()) + " electrodes in electrode_names but holds " +
                                 std::to_string(dv.size()) + " values");
    // Areas are written for the baseline's electrodes, which the difference shares.
    const std::string area_path = std::string("baseline/") + kElectrodes + "/area";
    const std::string exact_path = std::string("baseline/") + kElectrodes + "/exact_area";
    std::vector<double> area, exact;
    if (root.exists(area_path) && root.exists(exact_path)) {
        area = root.dataset(area_path).read<double>().values;
        exact = root.dataset(exact_path).read<double>().values;
        if (area.size() != dv.size() || exact.size() != dv.size())
            malformed(root.dataset(area_path), "does not hold one area per electrode of the difference");
    }
    std::printf("electrodes, change caused by the objects:\n");
    Table table(area.empty() ? std::vector<std::string>{"electrode", "potential", "current"}
                             : std::vector<std::string>{"electrode", "potential", "current", "area", "exact area"});
    for (std::size_t e = 0; e < dv.size(); ++e) {
        std::vector<std::string> row{names.empty() ? std::to_string(e) : names[e], dv[e], di[e]};
        if (!area.empty()) {
            row.push_back(format("%.5g cm2", area[e] * 1e4));
            row.push_back(std::isnan(exact[e]) ? "-" : format("%.5g cm2", exact[e] * 1e4));
        }
        table.add(row);
    }
    table.print("  ");
}

void print_solve(const H5Group& root) {
    std::printf("kind:             murk solve (one configuration)\n");
    if (root.exists("baseline") && root.exists("perturbed")) {
        const std::string base = solver_used_text(root.open_group("baseline"));
        const std::string pert = solver_used_text(root.open_group("perturbed"));
        if (!base.empty() && !pert.empty())
            std::printf("solved by:        %s (baseline), %s (with the objects)\n", base.c_str(), pert.c_str());
    }
    print_surfaces(root);
    print_electrodes(root);
}

// ---- murk run: axes and points ----------------------------------------------------------

struct Axis {
    std::string name, units;
    std::vector<double> values;
    std::vector<std::string> labels;  // alternative axis: names from alternative_names

    std::string header() const {
        if (units == "m") return name + " (mm)";
        if (units == "S m-1") return name + " (S/m)";
        return units == "1" || units.empty() ? name : name + " (" + units + ")";
    }
    std::string cell(std::size_t i) const {
        if (!labels.empty() && i < labels.size()) return labels[i];
        if (units == "m") return format("%g", values[i] * 1e3);
        if (units == "S m-1") return conductivity_text(values[i]);
        return format("%g", values[i]);
    }
    std::string range() const {
        if (values.size() <= 6) {
            std::string s;
            for (std::size_t i = 0; i < values.size(); ++i) s += (i ? ", " : "") + cell(i);
            return s;
        }
        return cell(0) + " .. " + cell(values.size() - 1);
    }
};

std::vector<Axis> read_axes(const H5Group& sweep, const H5Dataset& status) {
    const H5Shape shape = status.shape();
    const std::vector<std::string> names = scale_names(status);
    std::vector<Axis> axes;
    for (std::size_t k = 0; k < shape.size(); ++k) {
        if (names[k].empty())
            malformed(status, "has no axis attached to dimension " + std::to_string(k) +
                                  " (expected a dimension scale from /sweep/<axis>)");
        const H5Dataset d = sweep.dataset(names[k]);
        Axis a{names[k], units_of(d), numbers(d), {}};
        if (a.values.size() != shape[k])
            malformed(d, "has " + std::to_string(a.values.size()) + " values but /sweep/status has " +
                             std::to_string(shape[k]) + " along dimension " + std::to_string(k));
        if (d.has_attribute(layout::kAlternativeNames)) a.labels = split_commas(d.string_attribute(layout::kAlternativeNames));
        axes.push_back(std::move(a));
    }
    return axes;
}

int axis_named(const std::vector<Axis>& axes, const std::string& name) {
    for (std::size_t a = 0; a < axes.size(); ++a)
        if (axes[a].name == name) return static_cast<int>(a);
    return -1;
}

// What happened at each point (/sweep/status), by the words of its flags.
struct PointStates {
    std::vector<PointStatus> of_point;

    std::size_t count(PointStatus s) const { return std::size_t(std::count(of_point.begin(), of_point.end(), s)); }
};

PointStates read_status(const H5Dataset& status) {
    const Flags flags = read_flags(status);
    const std::vector<std::uint8_t> codes = status.read<std::uint8_t>().values;
    PointStates states;
    for (std::size_t p = 0; p < codes.size(); ++p) {
        const std::string& word = flags.word(status, codes[p]);
        std::size_t k = 0;
        while (k < CodeWords<PointStatus>::words.size() && CodeWords<PointStatus>::words[k] != word) ++k;
        if (k == CodeWords<PointStatus>::words.size())
            malformed(status, "says '" + word + "' at point " + std::to_string(p) + ", which is no point status");
        states.of_point.push_back(static_cast<PointStatus>(k));
    }
    return states;
}

void print_axes(const std::vector<Axis>& axes) {
    std::printf("sweep axes:\n");
    Table table({"axis", "count", "values"});
    for (const Axis& a : axes) table.add({a.header(), std::to_string(a.values.size()), a.range()});
    table.print("  ");
}

void print_points(const PointStates& status) {
    std::printf("points:           %zu in all: %zu computed, %zu masked, %zu missing (not computed)\n",
                status.of_point.size(), status.count(PointStatus::computed), status.count(PointStatus::masked),
                status.count(PointStatus::not_computed));
}

// How many points of each code a coded dataset holds, among the points `counted`.
template <class Code>
std::vector<std::size_t> counts_by_code(const H5Dataset& d, const std::vector<bool>& counted) {
    const Flags flags = read_flags(d);
    const std::vector<std::uint8_t> codes = d.read<std::uint8_t>().values;
    if (codes.size() != counted.size())
        malformed(d, "has " + std::to_string(codes.size()) + " points, /sweep/status " + std::to_string(counted.size()));
    std::vector<std::size_t> count(CodeWords<Code>::words.size(), 0);
    for (std::size_t k = 0; k < count.size(); ++k) {
        const std::int64_t code = flags.code(d, CodeWords<Code>::words[k]);
        for (std::size_t p = 0; p < codes.size(); ++p) count[k] += counted[p] && codes[p] == code;
    }
    return count;
}

// Why the masked points are masked (/sweep/mask_reason), reason by reason.
void print_masks(const H5Group& sweep, const PointStates& status) {
    if (!sweep.exists(layout::kMaskReason) || status.count(PointStatus::masked) == 0) return;
    std::vector<bool> masked;
    for (PointStatus s : status.of_point) masked.push_back(s == PointStatus::masked);
    const std::vector<std::size_t> count = counts_by_code<MaskReason>(sweep.dataset(layout::kMaskReason), masked);
    std::string text;
    for (std::size_t k = 0; k < count.size(); ++k) {
        if (count[k] == 0) continue;
        std::string reason(CodeWords<MaskReason>::words[k]);
        std::replace(reason.begin(), reason.end(), '_', ' ');
        text += (text.empty() ? "" : ", ") + std::to_string(count[k]) + " " + reason;
    }
    std::printf("masked points:    %s\n", text.c_str());
}

// Which path computed the points (/sweep/path), and the exact re-solves of
// dipole points (/sweep/dipole_check), when the file has them.
void print_paths(const H5Group& sweep, const PointStates& status) {
    if (!sweep.exists(layout::kPath)) return;
    const std::vector<bool> every(status.of_point.size(), true);
    const std::vector<std::size_t> count = counts_by_code<PathCode>(sweep.dataset(layout::kPath), every);
    std::printf("paths:            %zu exact, %zu induced dipole, %zu full re-solve\n",
                count[std::size_t(PathCode::exact)], count[std::size_t(PathCode::dipole)],
                count[std::size_t(PathCode::full)]);
    const std::string check = std::string(layout::kDipoleCheck) + "/" + layout::kDiscrepancy;
    if (!sweep.exists(check)) return;
    const H5Dataset d = sweep.dataset(check);
    const std::size_t n = d.shape().empty() ? 0 : d.shape()[0];
    std::printf("dipole check:     %zu dipole points re-solved exactly, largest discrepancy %.3g", n,
                n ? d.double_attribute("max_discrepancy") : 0.0);
    if (d.has_attribute("dipole_accuracy")) std::printf(" (dipole_accuracy %.3g)", d.double_attribute("dipole_accuracy"));
    std::printf("\n");
}

void print_sensors(const H5Group& root, const H5Group& sweep) {
    const H5Dataset sensor = sweep.dataset(layout::kSensor);
    const std::size_t n = sensor.shape().empty() ? 1 : sensor.shape()[0];
    if (sensor.has_attribute(layout::kSensorNames)) {
        std::printf("sensors:          %zu channels: %s\n", n, sensor.string_attribute(layout::kSensorNames).c_str());
        return;
    }
    // The runner names the body in a root attribute; the layout alone has it as the only mesh.
    std::string body = root.has_attribute("body") ? root.string_attribute("body") : "";
    if (body.empty() && root.exists(layout::kMesh)) {
        const std::vector<std::string> meshes = members(root.open_group(layout::kMesh));
        if (meshes.size() == 1) body = meshes.front();
    }
    std::printf("sensors:          %zu skin panels%s\n", n, body.empty() ? "" : (" of " + body).c_str());
}

void print_peak_range(const H5Group& sweep) {
    const H5Dataset peak = sweep.dataset(layout::kPeakPerturbation);
    double lo = std::numeric_limits<double>::infinity(), hi = 0;
    for (double v : peak.read<double>().values)
        if (std::isfinite(v)) lo = std::min(lo, std::abs(v)), hi = std::max(hi, std::abs(v));
    if (hi == 0 && std::isinf(lo)) return;
    const std::string units = units_of(peak);
    std::printf("peak perturbation: %s .. %s over the computed points\n", with_prefix(lo, units).c_str(),
                with_prefix(hi, units).c_str());
}

// ---- murk run: detection and falloff ----------------------------------------------------

// A dataset over some of the sweep axes (those other than distance), with the sweep axis
// of each of its dimensions.
struct OverAxes {
    std::vector<int> axis_of_dim;
    H5Shape shape;
    std::vector<double> values;

    double at(const std::vector<std::size_t>& index) const {
        std::size_t flat = 0;
        for (std::size_t k = 0; k < shape.size(); ++k) flat = flat * shape[k] + index[axis_of_dim[k]];
        return values[flat];
    }
};

// Finds which axes a dataset lies over: from its dimension scales, or, where none are
// attached, by assuming all of `candidates` in sweep order (a sweep over distance alone
// has a single row, shape (1)).
std::vector<int> dims_over(const H5Dataset& d, const std::vector<Axis>& axes, const std::vector<int>& candidates) {
    const H5Shape shape = d.shape();
    const std::vector<std::string> names = scale_names(d);
    const bool any = std::any_of(names.begin(), names.end(), [](const std::string& n) { return !n.empty(); });
    std::vector<int> dims;
    if (any) {
        for (std::size_t k = 0; k < names.size(); ++k) {
            const int a = names[k].empty() ? -1 : axis_named(axes, names[k]);
            if (a < 0 || std::find(candidates.begin(), candidates.end(), a) == candidates.end())
                malformed(d, "dimension " + std::to_string(k) + " is not one of the sweep axes other than distance");
            if (axes[a].values.size() != shape[k]) malformed(d, "does not match the length of axis " + axes[a].name);
            dims.push_back(a);
        }
        return dims;
    }
    if (candidates.empty() && (shape.empty() || shape == H5Shape{1})) return {};  // a scalar: one row
    H5Shape expected;
    for (int a : candidates) expected.push_back(axes[a].values.size());
    if (shape != expected) malformed(d, "has shape " + shape_text(shape) + ", expected " + shape_text(expected) +
                                            " over the sweep axes other than distance");
    return candidates;
}

OverAxes read_over_axes(const H5Dataset& d, const std::vector<Axis>& axes, const std::vector<int>& others) {
    OverAxes o{dims_over(d, axes, others), d.shape(), {}};
    if (o.axis_of_dim.empty()) o.shape.clear();
    o.values = numbers(d);
    return o;
}

struct Falloff {
    OverAxes exponent, from, to, r_squared;
};

struct Detection {
    OverAxes range, status;
    Flags status_flags;
    double level, false_alarm;
};

// Distances of the computed points of one row (every axis but distance fixed).
std::vector<double> computed_distances(const std::vector<Axis>& axes, const PointStates& status,
                                       std::vector<std::size_t> index, int d) {
    std::vector<double> out;
    for (std::size_t k = 0; k < axes[d].values.size(); ++k) {
        index[d] = k;
        std::size_t flat = 0;
        for (std::size_t a = 0; a < axes.size(); ++a) flat = flat * axes[a].values.size() + index[a];
        if (status.of_point[flat] == PointStatus::computed) out.push_back(axes[d].values[k]);
    }
    return out;
}

std::string range_text(const Detection& det, const H5Dataset& status_ds, const std::vector<std::size_t>& index,
                       const std::vector<double>& computed) {
    const std::string& word = det.status_flags.word(status_ds, std::int64_t(det.status.at(index)));
    const double range = det.range.at(index);
    if (word == word_of(RangeStatus::no_data)) return "no point computed";
    if (word == word_of(RangeStatus::crossed)) {
        if (!std::isfinite(range)) malformed(status_ds, "says '" + word + "' where /detection/range is not a number");
        return millimetres(range);
    }
    if (word == word_of(RangeStatus::beyond_sweep))
        return "beyond the sweep (> " + (computed.empty() ? "?" : millimetres(computed.back())) + ")";
    if (word == word_of(RangeStatus::never))
        return "not detectable within the sweep (< " + (computed.empty() ? "?" : millimetres(computed.front())) + ")";
    malformed(status_ds, "says '" + word + "', which is no detection status");
}

std::vector<std::string> falloff_cells(const Falloff& f, const std::vector<std::size_t>& index) {
    const double n = f.exponent.at(index);
    if (!std::isfinite(n)) return {"-", "-", "-", "-"};
    return {format("%.2f", n), format("%.1f .. %.1f mm", f.from.at(index) * 1e3, f.to.at(index) * 1e3),
            format("%.4f", f.r_squared.at(index)), std::abs(n + 4) <= 0.5 ? "yes" : "no"};
}

Falloff read_falloff(const H5Group& root, const std::vector<Axis>& axes, const std::vector<int>& others) {
    const H5Group g = root.open_group(layout::kFalloff);
    return {read_over_axes(g.dataset("exponent"), axes, others), read_over_axes(g.dataset("fit_from"), axes, others),
            read_over_axes(g.dataset("fit_to"), axes, others), read_over_axes(g.dataset("r_squared"), axes, others)};
}

Detection read_detection(const H5Group& root, const std::vector<Axis>& axes, const std::vector<int>& others) {
    const H5Group g = root.open_group(layout::kDetection);
    const H5Dataset status = g.dataset(layout::kStatus);
    return {read_over_axes(g.dataset(layout::kRange), axes, others), read_over_axes(status, axes, others),
            read_flags(status), g.double_attribute("probability_level"), g.double_attribute("false_alarm_probability")};
}

// Advances a multi-index over `axes` (the distance axis `skip` held at 0); false at the end.
bool next_row(std::vector<std::size_t>& index, const std::vector<Axis>& axes, int skip) {
    for (int a = static_cast<int>(axes.size()) - 1; a >= 0; --a) {
        if (a == skip) continue;
        if (++index[a] < axes[a].values.size()) return true;
        index[a] = 0;
    }
    return false;
}

constexpr std::size_t kMaxRows = 60;  // a terminal's worth; the file holds the rest

void print_analysis(const H5Group& root, const std::vector<Axis>& axes, const PointStates& status) {
    const int d = axis_named(axes, "distance");
    if (d < 0) {
        std::printf("no distance axis: no detection ranges and no falloff fit\n");
        return;
    }
    std::vector<int> others;
    for (int a = 0; a < static_cast<int>(axes.size()); ++a)
        if (a != d) others.push_back(a);
    const Falloff falloff = read_falloff(root, axes, others);
    const bool has_detection = root.exists(layout::kDetection);
    Detection detection{};
    if (has_detection) {
        detection = read_detection(root, axes, others);
        std::printf("detection range: where the detection probability falls below %g (false-alarm probability %g)\n",
                    detection.level, detection.false_alarm);
    } else {
        std::printf("no /detection group: %s\n", root.has_attribute("analysis_note")
                                                     ? root.string_attribute("analysis_note").c_str()
                                                     : "the case has no noise model");
    }
    std::printf("falloff: peak perturbation ~ distance^exponent, least squares over the fit range\n");
    std::vector<std::string> header;
    for (int a : others) header.push_back(axes[a].header());
    for (const char* h : {"detection range", "exponent", "fit range", "R^2", "within 0.5 of -4"})
        if (has_detection || std::string(h) != "detection range") header.push_back(h);
    Table table(header);
    const H5Dataset status_ds = root.open_group(has_detection ? layout::kDetection : layout::kSweep).dataset(layout::kStatus);
    std::vector<std::size_t> index(axes.size(), 0);
    std::size_t rows = 0;
    do {
        if (++rows > kMaxRows) continue;
        std::vector<std::string> row;
        for (int a : others) row.push_back(axes[a].cell(index[a]));
        if (has_detection)
            row.push_back(range_text(detection, status_ds, index, computed_distances(axes, status, index, d)));
        for (std::string& cell : falloff_cells(falloff, index)) row.push_back(std::move(cell));
        table.add(std::move(row));
    } while (next_row(index, axes, d));
    table.print("  ");
    if (rows > kMaxRows) std::printf("  ... %zu more rows (see /detection and /falloff)\n", rows - kMaxRows);
}

void print_run(const H5Group& root) {
    std::printf("kind:             murk run (sweep)\n");
    const H5Group sweep = root.open_group(layout::kSweep);
    if (const std::string used = solver_used_text(sweep); !used.empty())
        std::printf("body system:      %s\n", used.c_str());
    const H5Dataset status_ds = sweep.dataset(layout::kStatus);
    const std::vector<Axis> axes = read_axes(sweep, status_ds);
    const PointStates status = read_status(status_ds);
    print_axes(axes);
    print_points(status);
    print_masks(sweep, status);
    print_paths(sweep, status);
    print_sensors(root, sweep);
    print_peak_range(sweep);
    print_analysis(root, axes, status);
}

}  // namespace

// The journal of a run in progress or interrupted (OUT.h5.partial): how far it got.
void print_journal(const std::string& path) {
    const PointJournal j = PointJournal::inspect(path);
    const JournalHeader& h = j.header();
    std::size_t computed = 0, masked = 0;
    for (std::size_t p = 0; p < h.points; ++p)
        if (j.has(p)) (j.status(p) == PointStatus::masked ? masked : computed) += 1;
    std::printf("file:             %s\n", path.c_str());
    std::printf("kind:             journal of a murk run %s (murk %s)\n",
                j.held_by_a_run() ? "in progress" : "that was interrupted", h.murk_version.c_str());
    std::printf("written by:       process %lld on %s, started %s\n", static_cast<long long>(h.pid), h.host.c_str(),
                h.started_utc.c_str());
    std::printf("case SHA-256:     %.12s...\n", h.case_sha256.c_str());
    if (h.share_count > 1) std::printf("share:            %u/%u\n", h.share_index + 1, h.share_count);
    std::printf("points:           %zu of %llu finished: %zu computed, %zu masked\n", j.finished(),
                static_cast<unsigned long long>(h.points), computed, masked);
    std::printf("dipole check:     %zu points re-solved exactly\n", j.checks().size());
    if (j.dropped_bytes() > 0)
        std::printf("torn end:         %zu bytes of a record cut short (a resume drops them)\n", j.dropped_bytes());
    std::printf("%s\n", j.held_by_a_run() ? "the run is alive; it writes the result file when it finishes"
                                          : "finish it with: murk run CASE.toml -o OUT.h5 --resume");
}

// A result of murk layout: one row per layout of /layout_comparison.
void print_layouts(const H5Group& root) {
    const H5Group cmp = root.open_group("layout_comparison");
    const std::vector<std::string> names = split_commas(cmp.string_attribute("layout_names"));
    const std::vector<double> sizes = numbers(cmp.dataset("size"));
    const std::vector<double> power = numbers(cmp.dataset("drive_power"));
    const bool volume = cmp.exists("detectable_volume");  // a 3-D grid of targets
    const std::vector<double> area = numbers(cmp.dataset(volume ? "detectable_volume" : "detectable_area"));
    const std::vector<double> range = numbers(cmp.dataset("detection_range"));
    const std::vector<double> noise = numbers(cmp.dataset("channel_noise"));
    const H5Array<std::int32_t> readings = cmp.dataset("readings").read<std::int32_t>();
    // Present when the case gave [detection] localization_accuracy.
    const char* localized_name = volume ? "localizable_volume" : "localizable_area";
    const bool localized = cmp.exists(localized_name);
    const std::vector<double> within = localized ? numbers(cmp.dataset(localized_name)) : std::vector<double>{};
    if (localized && within.size() != names.size() * sizes.size())
        malformed(cmp.dataset(localized_name), "does not hold one value per layout and size");
    if (power.size() != names.size() || area.size() != names.size() * sizes.size() || range.size() != area.size() ||
        readings.values.size() != names.size() || noise.size() != names.size())
        malformed(cmp.dataset("detection_range"), "does not hold one value per layout and size");
    std::printf("layouts compared on the same targets (%zu layouts, %zu target sizes):\n", names.size(), sizes.size());
    std::vector<std::string> head = {"layout", "readings", "noise", "drive power"};
    for (double s : sizes) {
        head.push_back((volume ? "volume, " : "area, ") + millimetres(s));
        head.push_back("range, " + millimetres(s));
        if (localized) head.push_back("localized, " + millimetres(s));
    }
    Table table(head);
    for (std::size_t l = 0; l < names.size(); ++l) {
        const std::string units =
            root.open_group("layouts/" + names[l]).string_attribute("reading_units");
        std::vector<std::string> row = {names[l], std::to_string(readings.values[l]), with_prefix(noise[l], units),
                                        with_prefix(power[l], "W")};
        for (std::size_t k = 0; k < sizes.size(); ++k) {
            const double a = area[l * sizes.size() + k];
            row.push_back(volume ? format("%.4g cm3", a * 1e6) : format("%.4g cm2", a * 1e4));
            const double r = range[l * sizes.size() + k];
            row.push_back(std::isfinite(r) ? millimetres(r) : "not detectable");
            const auto in_units = [&](double a) { return volume ? format("%.4g cm3", a * 1e6) : format("%.4g cm2", a * 1e4); };
            if (localized) row.push_back(in_units(within[l * sizes.size() + k]));
        }
        table.add(row);
    }
    table.print("  ");
    if (localized && !names.empty() && root.open_group("layouts/" + names.front()).exists("size_sd"))
        std::printf("  localized: the position bound with the target's size unknown, estimated with it\n");
}

// The [placement] of a murk layout result: /placement.
void print_placement(const H5Group& root) {
    const H5Group g = root.open_group("placement");
    const std::string criterion = g.string_attribute("criterion");
    const bool log_det = criterion == "mean_log_det";
    const bool volume = criterion == "detectable_volume";
    const auto value = [&](double v) {
        return log_det ? format("%.4g", v) : volume ? format("%.4g cm3", v * 1e6) : format("%.4g cm2", v * 1e4);
    };
    const std::vector<double> greedy = numbers(g.dataset("greedy_criterion"));
    const H5Array<std::int32_t> added = g.dataset("greedy_added").read<std::int32_t>();
    const H5Array<std::int32_t> chosen = g.dataset("chosen_candidate").read<std::int32_t>();
    const std::vector<double> final_value = numbers(g.dataset("final_criterion"));
    const std::vector<double> layouts = numbers(g.dataset("layout_criterion"));
    const std::vector<std::string> layout_names = split_commas(g.string_attribute("layout_names"));
    const H5Array<std::uint8_t> is_chosen = g.dataset("is_chosen").read<std::uint8_t>();
    const std::size_t candidates = is_chosen.values.size();
    std::vector<std::string> names = split_commas(g.string_attribute("candidate_names"));
    if (names.size() != candidates) {  // a name with a comma in it: number them instead
        names.clear();
        for (std::size_t c = 0; c < candidates; ++c) names.push_back(format("#%zu", c));
    }
    const auto name = [&](std::int32_t c) {
        if (c < 0 || std::size_t(c) >= candidates) malformed(g, "names a candidate that does not exist");
        return names[std::size_t(c)];
    };
    if (greedy.size() != added.values.size() || final_value.size() != 1 || layouts.size() != layout_names.size())
        malformed(g, "does not hold one value per greedy step and per layout");
    std::printf("placement: %zu of %zu candidates by %s (target size %s, %s targets), driven as layout %s\n",
                chosen.values.size(), candidates, criterion.c_str(),
                millimetres(numbers(g.dataset("target_size")).at(0)).c_str(),
                format("%d", g.dataset("target_points").read<std::int32_t>().values.at(0)).c_str(),
                g.string_attribute("drive_layout").c_str());
    std::string list;
    for (std::int32_t c : chosen.values) list += (list.empty() ? "" : ", ") + name(c);
    std::printf("  chosen sites: %s\n", list.c_str());
    Table steps({"step", "added", criterion});
    for (std::size_t k = 0; k < greedy.size(); ++k)
        steps.add({format("greedy %zu", k + 1), name(added.values[k]), value(greedy[k])});
    if (g.exists("exchange_criterion")) {
        const std::vector<double> swaps = numbers(g.dataset("exchange_criterion"));
        const H5Array<std::int32_t> in = g.dataset("exchange_added").read<std::int32_t>();
        const H5Array<std::int32_t> out = g.dataset("exchange_removed").read<std::int32_t>();
        if (in.values.size() != swaps.size() || out.values.size() != swaps.size())
            malformed(g, "does not hold one value per exchange");
        for (std::size_t k = 0; k < swaps.size(); ++k)
            steps.add({format("exchange %zu", k + 1), name(in.values[k]) + " for " + name(out.values[k]), value(swaps[k])});
    }
    std::printf("  criterion after each step:\n");
    steps.print("    ");
    std::printf("  chosen sites: %s\n", value(final_value[0]).c_str());
    std::size_t best = 0;
    for (std::size_t l = 0; l < layouts.size(); ++l)
        if (layouts[l] > layouts[best]) best = l;
    Table cmp({"layout", criterion});
    for (std::size_t l = 0; l < layouts.size(); ++l) cmp.add({layout_names[l], value(layouts[l])});
    std::printf("  layouts on the same targets and criterion:\n");
    cmp.print("    ");
    if (layouts.empty()) return;
    if (log_det)
        std::printf("  best layout: %s, %s; the chosen sites %s (%+.3g)\n", layout_names[best].c_str(),
                    value(layouts[best]).c_str(), value(final_value[0]).c_str(), final_value[0] - layouts[best]);
    else
        std::printf("  best layout: %s, %s; the chosen sites %s (%s)\n", layout_names[best].c_str(),
                    value(layouts[best]).c_str(), value(final_value[0]).c_str(),
                    layouts[best] > 0 ? format("x%.3g", final_value[0] / layouts[best]).c_str() : "the layout detects nowhere");
}

int inspect_command(const InspectArgs& args) {
    if (PointJournal::is_journal(args.path)) {
        print_journal(args.path);
        return 0;
    }
    const H5File file = H5File::open_readonly(args.path);
    const H5Group root = file.root();
    print_header(file, root);
    if (root.exists("layout_comparison")) {
        print_layouts(root);
        if (root.exists("placement")) print_placement(root);
    }
    else if (root.exists(layout::kSweep))
        print_run(root);
    else
        print_solve(root);
    return 0;
}

}  // namespace murk::cli
