#include "cases/input/case_reader.hpp"

#include "cases/input/case_limits.hpp"
#include "cases/input/electrode_sites.hpp"
#include "cases/input/toml_precheck.hpp"
#include "cases/input/units.hpp"
#include "geometry/file_bytes.hpp"
#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

#include <toml++/toml.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>

namespace murk {

namespace {

namespace fs = std::filesystem;

struct Context {
    std::string file;   // the case file's name in messages
    fs::path base_dir;  // mesh files are resolved against it
};

int line_of(const toml::node& n) { return static_cast<int>(n.source().begin.line); }

// "file:line: key": the file's name and the key may come from the user, so both are
// made printable and short (message_text.hpp).
std::string at(const Context& ctx, int line, const std::string& key) {
    return printable(ctx.file) + (line > 0 ? ":" + std::to_string(line) : std::string()) + ": " + printable(key);
}

[[noreturn]] void fail(const std::string& where, const std::string& what) {
    throw InputError(where + ": " + what);
}

std::string format_number(double v) {
    std::ostringstream out;
    out << v;
    return out.str();
}

// What a node holds, in words, for "got ..." in messages.
std::string describe(const toml::node& n) {
    switch (n.type()) {
        case toml::node_type::string: return in_quotes(n.as_string()->get());
        case toml::node_type::integer: return "the number " + std::to_string(n.as_integer()->get());
        case toml::node_type::floating_point: return "the number " + format_number(n.as_floating_point()->get());
        case toml::node_type::boolean: return n.as_boolean()->get() ? "true" : "false";
        case toml::node_type::array: return "an array";
        case toml::node_type::table: return "a table";
        default: return "a date or time";
    }
}

std::string join(const std::vector<std::string>& words) {
    std::string out;
    for (const auto& w : words) out += (out.empty() ? "" : ", ") + w;
    return out;
}

// A table being read: where it is, so that every key can be named in messages.
struct Section {
    const toml::table& table;
    std::string path;  // dotted path; empty for the root table
    int line;          // line where the table starts
    const Context& ctx;

    std::string key_path(const std::string& key) const { return path.empty() ? key : path + "." + key; }
    const toml::node* find(const std::string& key) const { return table.get(key); }
    // "file:line: path.key" at the key if present, else at the table.
    std::string where(const std::string& key) const {
        const toml::node* n = find(key);
        return at(ctx, n ? line_of(*n) : line, key_path(key));
    }
    std::string where_self() const { return at(ctx, line, path.empty() ? "(top level)" : path); }
};

// Refuses any key of `sec` not in `allowed`, listing the allowed ones.
// Keys whose names said less than they meant, and what they are called now.
const std::vector<std::pair<std::string, std::string>> kRenamedKeys = {
    {"objects", "alternatives (the objects of which one is in the water at each point)"},
    {"check_points", "dipole_checks (dipole points re-solved exactly)"},
    {"length", "overall_length (a capsule's length from tip to tip)"},
    {"scale", "file_unit (the length of one unit of the mesh file's coordinates)"},
};

void check_keys(const Section& sec, const std::vector<std::string>& allowed) {
    for (const auto& [key, node] : sec.table) {
        const std::string k(key.str());
        if (std::find(allowed.begin(), allowed.end(), k) != allowed.end()) continue;
        const int line = key.source().begin.line ? static_cast<int>(key.source().begin.line) : line_of(node);
        for (const auto& [old_name, new_name] : kRenamedKeys)
            if (k == old_name) fail(at(sec.ctx, line, sec.key_path(k)), "this key is now called " + new_name);
        // The key is the user's: shown as short as a value, so that the list of allowed keys fits on the line.
        fail(at(sec.ctx, line, sec.key_path(printable(k, kEchoedValueChars))), "unknown key; allowed here: " + join(allowed));
    }
}

const toml::node& required(const Section& sec, const std::string& key, const std::string& hint = "") {
    const toml::node* n = sec.find(key);
    if (!n) fail(sec.where(key), "missing required key" + (hint.empty() ? "" : " (" + hint + ")"));
    return *n;
}

std::string read_string(const Section& sec, const std::string& key, const toml::node& n) {
    if (!n.is_string()) fail(sec.where(key), "expected text in quotes, got " + describe(n));
    return n.as_string()->get();
}

// A name (of an object, a probe, an electrode): it names results and appears in
// messages, so it is short and on one line.
std::string read_name(const Section& sec, const std::string& key, const toml::node& n) {
    const std::string name = read_string(sec, key, n);
    if (name.empty()) fail(sec.where(key), "must not be empty");
    if (name.size() > kMaxNameBytes)
        fail(sec.where(key), "a name has at most " + std::to_string(kMaxNameBytes) + " bytes, got " + in_quotes(name));
    for (const char c : name)
        if (static_cast<unsigned char>(c) < 0x20 || c == 0x7F)
            fail(sec.where(key), "a name cannot hold control characters such as line breaks, got " + in_quotes(name));
    return name;
}

// One of `choices`, written as a string.
std::string read_choice(const Section& sec, const std::string& key, const toml::node& n,
                        const std::vector<std::string>& choices) {
    const std::string value = read_string(sec, key, n);
    if (std::find(choices.begin(), choices.end(), value) == choices.end())
        fail(sec.where(key), "expected one of " + join(choices) + ", got " + in_quotes(value));
    return value;
}

// Whether a quantity must lie in murk's computing window (case_limits.hpp) or is
// an object's conductivity, which is taken to its limit beyond a contrast instead.
enum class Window { computable, contrast_limited };

// A quantity: a string with a unit, or a bare TOML number where the dimension
// has no unit. `where` names the node in messages.
double quantity_at(const std::string& where, const toml::node& n, Dimension d, Window window = Window::computable) {
    if (n.is_string()) {
        const double v = parse_quantity(n.as_string()->get(), d, where);
        const double size = std::abs(v);
        if (window == Window::computable && v != 0.0 && (size < kSmallestQuantity || size > kLargestQuantity))
            fail(where, describe(n) + " is " + format_number(v) + " " + si_unit(d) + ", outside the range murk computes with (" +
                            format_number(kSmallestQuantity) + " to " + format_number(kLargestQuantity) + " " +
                            si_unit(d) + ", or zero)");
        return v;
    }
    if (n.is_number()) {
        const double v = n.is_integer() ? static_cast<double>(n.as_integer()->get()) : n.as_floating_point()->get();
        if (d == Dimension::dimensionless || d == Dimension::permittivity_relative) {
            if (!std::isfinite(v)) fail(where, "expected a finite number, got " + describe(n));
            if (std::fpclassify(v) == FP_SUBNORMAL)
                fail(where, describe(n) + " is too small for double precision (below 2.2e-308; write 0 if zero is meant)");
            return v;
        }
        fail(where, "expected " + dimension_name(d) + " written with a unit like '" + example_quantity(d) +
                        "', got " + describe(n) + " (no unit)");
    }
    fail(where, "expected " + dimension_name(d) + " like '" + example_quantity(d) + "', got " + describe(n));
}

double read_quantity(const Section& sec, const std::string& key, const toml::node& n, Dimension d,
                     Window window = Window::computable) {
    return quantity_at(sec.where(key), n, d, window);
}

std::optional<double> optional_quantity(const Section& sec, const std::string& key, Dimension d) {
    const toml::node* n = sec.find(key);
    if (!n) return std::nullopt;
    return read_quantity(sec, key, *n, d);
}

double positive_quantity(const Section& sec, const std::string& key, const toml::node& n, Dimension d,
                         Window window = Window::computable) {
    const double v = read_quantity(sec, key, n, d, window);
    if (!(v > 0.0)) fail(sec.where(key), "must be positive, got " + describe(n));
    return v;
}

std::optional<double> optional_positive(const Section& sec, const std::string& key, Dimension d) {
    const toml::node* n = sec.find(key);
    if (!n) return std::nullopt;
    return positive_quantity(sec, key, *n, d);
}

double required_positive(const Section& sec, const std::string& key, Dimension d) {
    return positive_quantity(sec, key, required(sec, key, "e.g. " + key + " = \"" + example_quantity(d) + "\""), d);
}

// Relative permittivity: a plain number, at least 1 (the vacuum).
std::optional<double> optional_permittivity(const Section& sec, const std::string& key) {
    const toml::node* n = sec.find(key);
    if (!n) return std::nullopt;
    const double v = read_quantity(sec, key, *n, Dimension::permittivity_relative);
    if (!(v >= 1.0)) fail(sec.where(key), "a relative permittivity is at least 1, got " + describe(*n));
    return v;
}

// An array of exactly `count` elements, each read by `element(where, node)`.
template <class F>
void read_array(const Section& sec, const std::string& key, const toml::node& n, std::size_t count,
                const std::string& expected, F element) {
    const toml::array* arr = n.as_array();
    if (!arr || arr->size() != count)
        fail(sec.where(key), "expected " + expected + ", got " +
                                 (arr ? "an array of " + std::to_string(arr->size()) : describe(n)));
    for (std::size_t i = 0; i < count; ++i) {
        const toml::node& e = *arr->get(i);
        element(at(sec.ctx, line_of(e), sec.key_path(key) + "[" + std::to_string(i + 1) + "]"), e, i);
    }
}

Point3 read_lengths3(const Section& sec, const std::string& key, const toml::node& n, bool positive) {
    Point3 p{};
    read_array(sec, key, n, 3, "an array of three lengths like [\"1 cm\", \"0 cm\", \"2 cm\"]",
               [&](const std::string& where, const toml::node& e, std::size_t i) {
                   p[i] = quantity_at(where, e, Dimension::length);
                   if (positive && !(p[i] > 0.0)) fail(where, "must be positive, got " + describe(e));
               });
    return p;
}

Orientation read_orientation(const Section& sec) {
    Orientation o;
    o.heading_rad = optional_quantity(sec, "heading", Dimension::angle).value_or(0.0);
    o.pitch_rad = optional_quantity(sec, "pitch", Dimension::angle).value_or(0.0);
    o.roll_rad = optional_quantity(sec, "roll", Dimension::angle).value_or(0.0);
    return o;
}

const toml::table& as_table(const Section& parent, const std::string& key, const toml::node& n) {
    if (!n.is_table()) fail(parent.where(key), "expected a table ([" + parent.key_path(key) + "]), got " + describe(n));
    return *n.as_table();
}

SourceLine source_line(const Section& sec) { return SourceLine{printable(sec.ctx.file), sec.line, sec.path}; }

// Reads every table of the array of tables `key` ([[key]]) with read_one(section, index).
template <class F>
void read_tables(const Section& sec, const std::string& key, F read_one) {
    const toml::node* list = sec.find(key);
    if (!list) return;
    const toml::array* arr = list->as_array();
    if (!arr || !arr->is_array_of_tables())
        fail(sec.where(key), "expected [[" + sec.key_path(key) + "]] tables (double brackets, one per " + key + "), got " +
                                 describe(*list));
    for (std::size_t i = 0; i < arr->size(); ++i) {
        const toml::node& n = *arr->get(i);
        read_one(Section{*n.as_table(), sec.key_path(key + "[" + std::to_string(i + 1) + "]"), line_of(n), sec.ctx}, i);
    }
}

// ---- shapes ---------------------------------------------------------------

const std::vector<std::string> kShapeNames = {"sphere", "spheroid", "ellipsoid", "capsule", "box", "mesh"};

ShapeKind shape_kind(const std::string& name) {
    const auto i = std::find(kShapeNames.begin(), kShapeNames.end(), name) - kShapeNames.begin();
    return static_cast<ShapeKind>(i);
}

std::vector<std::string> shape_keys(ShapeKind kind) {
    switch (kind) {
        case ShapeKind::sphere: return {"radius"};
        case ShapeKind::spheroid: return {"polar_radius", "equatorial_radius"};
        case ShapeKind::ellipsoid: return {"semi_axes"};
        case ShapeKind::capsule: return {"radius", "overall_length"};
        case ShapeKind::box: return {"size"};
        case ShapeKind::mesh: return {"file", "file_unit"};
    }
    return {};
}

ShapeKind read_shape_kind(const Section& sec) {
    return shape_kind(read_choice(sec, "shape", required(sec, "shape", "one of " + join(kShapeNames)), kShapeNames));
}

std::string read_mesh_file(const Section& sec) {
    const std::string name = read_string(sec, "file", required(sec, "file", "an STL or Gmsh MSH file"));
    fs::path path(name);
    if (path.is_relative()) path = sec.ctx.base_dir / path;
    std::string ext = path.extension().string();
    std::transform(ext.begin(), ext.end(), ext.begin(), [](unsigned char c) { return std::tolower(c); });
    if (ext != ".stl" && ext != ".msh")
        fail(sec.where("file"), "expected an STL (.stl) or Gmsh (.msh) file, got " + in_quotes(name));
    std::error_code ec;
    if (!fs::is_regular_file(path, ec)) fail(sec.where("file"), "no such file: " + in_quotes(path.string(), kEchoedNameChars));
    return path.lexically_normal().string();
}

// Reads the size keys of `kind` (checked by the caller against unknown keys).
ShapeSpec read_shape_sizes(const Section& sec, ShapeKind kind) {
    ShapeSpec s;
    s.kind = kind;
    switch (kind) {
        case ShapeKind::sphere: s.radius_m = required_positive(sec, "radius", Dimension::length); break;
        case ShapeKind::spheroid: {
            const double polar = required_positive(sec, "polar_radius", Dimension::length);
            const double equatorial = required_positive(sec, "equatorial_radius", Dimension::length);
            s.semi_axes_m = {polar, equatorial, equatorial};
            break;
        }
        case ShapeKind::ellipsoid:
            s.semi_axes_m = read_lengths3(sec, "semi_axes", required(sec, "semi_axes", "three lengths along x, y, z"), true);
            break;
        case ShapeKind::capsule: {
            s.radius_m = required_positive(sec, "radius", Dimension::length);
            s.overall_length_m = required_positive(sec, "overall_length", Dimension::length);
            if (s.overall_length_m < 2.0 * s.radius_m)
                fail(sec.where("overall_length"), "the overall length of a capsule must be at least twice its radius (" +
                                              format_number(2.0 * s.radius_m) + " m), got " +
                                              describe(*sec.find("overall_length")));
            break;
        }
        case ShapeKind::box:
            s.size_m = read_lengths3(sec, "size", required(sec, "size", "three edge lengths along x, y, z"), true);
            break;
        case ShapeKind::mesh:
            s.mesh_file = read_mesh_file(sec);
            s.file_unit_m = optional_positive(sec, "file_unit", Dimension::length).value_or(1.0);
            break;
    }
    return s;
}

std::vector<std::string> concat(std::vector<std::string> a, const std::vector<std::string>& b) {
    a.insert(a.end(), b.begin(), b.end());
    return a;
}

// ---- sections -------------------------------------------------------------

WaterSpec read_water(const Section& sec) {
    check_keys(sec, {"conductivity", "permittivity", "surface_z", "bottom_z", "bottom_conductivity", "image_tolerance"});
    WaterSpec w;
    w.source = source_line(sec);
    w.conductivity_S_per_m = required_positive(sec, "conductivity", Dimension::conductivity);
    w.permittivity_relative = optional_permittivity(sec, "permittivity");
    auto plane = [&](const std::string& key, bool water_below) -> std::optional<PlaneSpec> {
        const toml::node* n = sec.find(key);
        if (!n) return std::nullopt;
        PlaneSpec p;
        p.height_m = read_quantity(sec, key, *n, Dimension::length);
        p.water_below = water_below;
        p.source = SourceLine{printable(sec.ctx.file), line_of(*n), sec.key_path(key)};
        return p;
    };
    w.surface = plane("surface_z", true);
    w.bottom = plane("bottom_z", false);
    if (w.surface && w.bottom && !(w.surface->height_m > w.bottom->height_m))
        fail(sec.where("bottom_z"), "the bottom at z = " + format_number(w.bottom->height_m) +
                                        " m must lie below the water surface at z = " +
                                        format_number(w.surface->height_m) + " m (surface_z)");
    if (const toml::node* n = sec.find("bottom_conductivity")) {
        if (!w.bottom) fail(sec.where("bottom_conductivity"), "needs bottom_z: the bottom it belongs to");
        w.bottom_conductivity_S_per_m = positive_quantity(sec, "bottom_conductivity", *n, Dimension::conductivity);
        w.bottom_conductivity_source = SourceLine{printable(sec.ctx.file), line_of(*n), sec.key_path("bottom_conductivity")};
    }
    if (const toml::node* n = sec.find("image_tolerance")) {
        if (!w.surface || !w.bottom)
            fail(sec.where("image_tolerance"), "applies only to water between surface_z and bottom_z (an image series)");
        w.image_tolerance = read_quantity(sec, "image_tolerance", *n, Dimension::dimensionless);
        if (!(w.image_tolerance >= 1e-12 && w.image_tolerance <= 0.1))
            fail(sec.where("image_tolerance"), "must lie between 1e-12 and 0.1, got " + describe(*n));
        w.image_tolerance_source = SourceLine{printable(sec.ctx.file), line_of(*n), sec.key_path("image_tolerance")};
    }
    return w;
}

// [tank]: shape "box" (size, centre), "cylinder" (radius, height, centre) or
// "mesh" (file, file_unit); panel_size for the generated ones. Whether it holds
// the scene is the scene builder's check (cases/scene/tank_walls.hpp).
TankSpec read_tank(const Section& sec) {
    const std::vector<std::string> shapes = {"box", "cylinder", "mesh"};
    const std::string shape = read_choice(sec, "shape", required(sec, "shape", "one of " + join(shapes)), shapes);
    TankSpec t;
    t.shape = shape == "box" ? TankShape::box : shape == "cylinder" ? TankShape::cylinder : TankShape::mesh;
    std::string extent_key;
    switch (t.shape) {
        case TankShape::box:
            check_keys(sec, {"shape", "size", "centre", "panel_size"});
            t.size_m = read_lengths3(sec, "size", required(sec, "size", "three inner edge lengths along x, y, z"), true);
            extent_key = "size";
            break;
        case TankShape::cylinder:
            check_keys(sec, {"shape", "radius", "height", "centre", "panel_size"});
            t.radius_m = required_positive(sec, "radius", Dimension::length);
            t.height_m = required_positive(sec, "height", Dimension::length);
            extent_key = "radius";
            break;
        case TankShape::mesh:
            check_keys(sec, {"shape", "file", "file_unit"});
            t.mesh_file = read_mesh_file(sec);
            t.file_unit_m = optional_positive(sec, "file_unit", Dimension::length).value_or(1.0);
            extent_key = "file";
            break;
    }
    if (t.shape != TankShape::mesh) {
        t.centre_m = read_lengths3(sec, "centre", required(sec, "centre", "the centre of the water, three lengths"), false);
        t.panel_size_m = required_positive(sec, "panel_size", Dimension::length);
    }
    t.source = SourceLine{printable(sec.ctx.file), line_of(*sec.find(extent_key)), sec.key_path(extent_key)};
    return t;
}

// One [[mesh.zone]]: a ball of finer panels on the sensing body. What depends on
// the body (its panel size, whether the ball reaches its skin) is checked by the
// scene builder, which names the keys kept here.
MeshZoneSpec read_mesh_zone(const Section& sec) {
    check_keys(sec, {"centre", "radius", "panel_size"});
    MeshZoneSpec z;
    z.source = source_line(sec);
    const toml::node& centre = required(sec, "centre", "a point [x, y, z] near the skin");
    z.centre_m = read_lengths3(sec, "centre", centre, false);
    z.centre_source = SourceLine{printable(sec.ctx.file), line_of(centre), sec.key_path("centre")};
    z.radius_m = required_positive(sec, "radius", Dimension::length);
    z.panel_size_m = required_positive(sec, "panel_size", Dimension::length);
    z.panel_size_source = SourceLine{printable(sec.ctx.file), line_of(*sec.find("panel_size")), sec.key_path("panel_size")};
    return z;
}

// A whole number from lo to hi (a count of points).
int read_count(const Section& sec, const std::string& key, const toml::node& n, std::int64_t lo, std::size_t hi) {
    if (!n.is_integer() || n.as_integer()->get() < lo || n.as_integer()->get() > static_cast<std::int64_t>(hi))
        fail(sec.where(key), "expected a whole number from " + std::to_string(lo) + " to " + std::to_string(hi) +
                                 ", got " + describe(n));
    return static_cast<int>(n.as_integer()->get());
}

// A relative tolerance of the compressed solver: a plain number strictly between
// 1e-14 (about 50 times double precision's rounding, which neither the compression
// nor the iteration can get below) and 1e-2 (an error of a per cent in the body's
// own solution, coarser than the small changes murk reports can bear).
// A relative tolerance between 1e-14 and `largest` (both excluded; `largest_text`
// is how the message writes it).
std::optional<double> optional_tolerance(const Section& sec, const std::string& key, double largest = 1e-2,
                                         const char* largest_text = "1e-2") {
    const toml::node* n = sec.find(key);
    if (!n) return std::nullopt;
    const double t = read_quantity(sec, key, *n, Dimension::dimensionless);
    if (!(t > 1e-14 && t < largest))
        fail(sec.where(key), std::string("must be a relative tolerance between 1e-14 and ") + largest_text +
                                 " (both excluded), got " + describe(*n));
    return t;
}

// The keys of SolverOptions: which solver, the size where auto switches, the tolerances.
SolverOptions read_solver_options(const Section& sec) {
    SolverOptions o;
    if (const toml::node* n = sec.find("solver")) {
        const std::string choice = read_choice(sec, "solver", *n, {"auto", "dense", "compressed"});
        o.choice = choice == "dense" ? SystemSolver::dense
                   : choice == "compressed" ? SystemSolver::compressed
                                            : SystemSolver::automatic;
    }
    if (const toml::node* n = sec.find("dense_limit"))
        o.dense_limit = std::size_t(read_count(sec, "dense_limit", *n, 1, kMaxDenseLimit));
    o.compression_tolerance = optional_tolerance(sec, "compression_tolerance").value_or(o.compression_tolerance);
    o.iteration_tolerance = optional_tolerance(sec, "iteration_tolerance").value_or(o.iteration_tolerance);
    o.preconditioner_tolerance =
        optional_tolerance(sec, "preconditioner_tolerance", 0.5, "0.5").value_or(o.preconditioner_tolerance);
    return o;
}

MeshSpec read_mesh(const Section& sec) {
    check_keys(sec, {"panel_size", "near_ratio", "far_ratio", "zone", "electrode_edge", "solver", "dense_limit",
                     "compression_tolerance", "iteration_tolerance", "preconditioner_tolerance"});
    MeshSpec m;
    m.panel_size_m = optional_positive(sec, "panel_size", Dimension::length);
    m.electrode_edge_m = optional_positive(sec, "electrode_edge", Dimension::length);
    if (m.electrode_edge_m && m.panel_size_m && *m.electrode_edge_m > *m.panel_size_m)
        fail(sec.where("electrode_edge"), "must not be larger than panel_size (" + format_number(*m.panel_size_m) + " m)");
    m.near_ratio = optional_positive(sec, "near_ratio", Dimension::dimensionless).value_or(m.near_ratio);
    m.far_ratio = optional_positive(sec, "far_ratio", Dimension::dimensionless).value_or(m.far_ratio);
    if (m.far_ratio < m.near_ratio)
        fail(sec.find("far_ratio") ? sec.where("far_ratio") : sec.where("near_ratio"),
             "far_ratio (" + format_number(m.far_ratio) + ") must not be smaller than near_ratio (" +
                 format_number(m.near_ratio) + ")");
    if (const toml::node* zones = sec.find("zone"); zones && zones->is_array() && zones->as_array()->size() > kMaxMeshZones)
        fail(sec.where("zone"), "expected at most " + std::to_string(kMaxMeshZones) + " [[mesh.zone]] tables, got " +
                                    std::to_string(zones->as_array()->size()));
    read_tables(sec, "zone", [&](const Section& zs, std::size_t) { m.zones.push_back(read_mesh_zone(zs)); });
    m.solver = read_solver_options(sec);
    return m;
}

// A fish-like outline (invented for murk, not measured): laterally compressed,
// deepest at about a quarter of the length, tapering to a thin tail.
std::vector<ProfileStation> default_fish_profile() {
    return {{0.00, 0.000, 0.000}, {0.03, 0.022, 0.030}, {0.08, 0.038, 0.055}, {0.16, 0.048, 0.072},
            {0.30, 0.050, 0.078}, {0.50, 0.042, 0.065}, {0.70, 0.028, 0.042}, {0.85, 0.015, 0.022},
            {1.00, 0.000, 0.000}};
}

std::vector<ProfileStation> read_profile(const Section& sec, const toml::node& n) {
    const toml::array* arr = n.as_array();
    if (arr && arr->size() > kMaxProfileStations)
        fail(sec.where("profile"), "expected at most " + std::to_string(kMaxProfileStations) + " stations, got " +
                                       std::to_string(arr->size()));
    if (!arr || arr->size() < 3)
        fail(sec.where("profile"), "expected an array of at least 3 stations [x, half_width, half_height] "
                                   "(fractions of the length), got " +
                                       (arr ? "an array of " + std::to_string(arr->size()) : describe(n)));
    std::vector<ProfileStation> stations;
    for (std::size_t i = 0; i < arr->size(); ++i) {
        const toml::node& station = *arr->get(i);
        const std::string key = "profile[" + std::to_string(i + 1) + "]";
        const std::string where = at(sec.ctx, line_of(station), sec.key_path(key));
        const toml::array* s = station.as_array();
        if (!s || s->size() != 3)
            fail(where, "expected a station [x_fraction, half_width_fraction, half_height_fraction], got " +
                            (s ? "an array of " + std::to_string(s->size()) : describe(station)));
        std::array<double, 3> v{};
        for (std::size_t k = 0; k < 3; ++k) {
            v[k] = quantity_at(where, *s->get(k), Dimension::dimensionless);
            if (v[k] < 0.0) fail(where, "fractions must not be negative, got " + describe(*s->get(k)));
        }
        const bool tip = i == 0 || i + 1 == arr->size();
        if (i == 0 && v[0] != 0.0) fail(where, "the first station is the nose: x_fraction must be 0, got " + format_number(v[0]));
        if (i + 1 == arr->size() && v[0] != 1.0)
            fail(where, "the last station is the tail tip: x_fraction must be 1, got " + format_number(v[0]));
        if (!stations.empty() && !(v[0] > stations.back().x_fraction))
            fail(where, "x_fraction must increase from station to station, got " + format_number(v[0]) +
                            " after " + format_number(stations.back().x_fraction));
        if (tip && (v[1] != 0.0 || v[2] != 0.0))
            fail(where, "the nose and tail stations must have zero half_width and half_height");
        if (!tip && !(v[1] > 0.0 && v[2] > 0.0))
            fail(where, "stations between the tips must have positive half_width and half_height");
        stations.push_back({v[0], v[1], v[2]});
    }
    return stations;
}

// The `weights` of a line of point sources (the organ or a [[source]] line): at
// least two numbers, not all zero, summing to zero so that the points' currents
// cancel (a distribution that neither gains nor loses charge).
std::vector<double> read_weights(const Section& sec) {
    const toml::node& n = *sec.find("weights");
    const toml::array* arr = n.as_array();
    if (!arr || arr->size() < 2)
        fail(sec.where("weights"), "expected an array of at least 2 numbers, got " +
                                       (arr ? "an array of " + std::to_string(arr->size()) : describe(n)));
    if (arr->size() > kMaxLinePoints)
        fail(sec.where("weights"), "expected at most " + std::to_string(kMaxLinePoints) + " weights (one point each), got " +
                                       std::to_string(arr->size()));
    std::vector<double> w;
    for (std::size_t i = 0; i < arr->size(); ++i) {
        const toml::node& e = *arr->get(i);
        w.push_back(quantity_at(at(sec.ctx, line_of(e), sec.key_path("weights[" + std::to_string(i + 1) + "]")), e,
                                Dimension::dimensionless));
    }
    double sum = 0.0, total = 0.0;
    for (double x : w) sum += x, total += std::abs(x);
    if (!(total > 0.0)) fail(sec.where("weights"), "the weights are all zero");
    if (std::abs(sum) > 1e-9 * total)
        fail(sec.where("weights"), "the weights must sum to zero (the points' currents cancel), got a sum of " +
                                       format_number(sum));
    return w;
}

OrganSpec read_organ(const Section& sec) {
    check_keys(sec, {"from", "to", "distribution", "weights", "points", "current"});
    OrganSpec o;
    o.source = source_line(sec);
    if (const toml::node* n = sec.find("from")) o.from_fraction = read_quantity(sec, "from", *n, Dimension::dimensionless);
    if (const toml::node* n = sec.find("to")) o.to_fraction = read_quantity(sec, "to", *n, Dimension::dimensionless);
    if (o.from_fraction < 0.0 || o.from_fraction >= 1.0)
        fail(sec.where("from"), "expected a fraction of the body length in [0, 1), got " + format_number(o.from_fraction));
    if (o.to_fraction <= o.from_fraction || o.to_fraction > 1.0)
        fail(sec.where("to"), "expected a fraction of the body length above from (" + format_number(o.from_fraction) +
                                  ") and at most 1, got " + format_number(o.to_fraction));

    const toml::node* distribution = sec.find("distribution");
    const toml::node* weights = sec.find("weights");
    const toml::node* points = sec.find("points");
    if (distribution && weights)
        fail(sec.where("weights"), "give either distribution or weights, not both");
    if (weights) {
        if (points) fail(sec.where("points"), "not used with weights: there is one point per weight");
        o.weights = read_weights(sec);
        o.profile = OrganProfile::weights;
        o.points = static_cast<int>(o.weights.size());
    } else {
        const std::string name =
            distribution ? read_choice(sec, "distribution", *distribution, {"linear", "cosine", "dipole"}) : "linear";
        o.profile = name == "dipole" ? OrganProfile::dipole
                    : name == "cosine" ? OrganProfile::cosine
                                       : OrganProfile::linear;
        if (o.profile == OrganProfile::dipole) {
            if (points) fail(sec.where("points"), "not used with the dipole distribution (always 2 points)");
            o.points = 2;
        } else if (points) {
            o.points = read_count(sec, "points", *points, 2, kMaxLinePoints);
        }
    }
    o.peak_current_A = required_positive(sec, "current", Dimension::current);
    return o;
}

FishSpec read_fish(const Section& sec) {
    check_keys(sec, {"length", "profile", "nose", "centre", "heading", "pitch", "roll", "interior_conductivity",
                     "interior_permittivity", "skin_resistance", "skin_capacitance", "organ"});
    FishSpec f;
    f.source = source_line(sec);
    f.length_m = required_positive(sec, "length", Dimension::length);
    const toml::node* profile = sec.find("profile");
    f.profile = profile ? read_profile(sec, *profile) : default_fish_profile();
    const toml::node* nose = sec.find("nose");
    const toml::node* centre = sec.find("centre");
    if (nose && centre) fail(sec.where("centre"), "give the position of the nose or of the centre, not both");
    f.anchored_at_nose = nose != nullptr;
    if (nose) f.position_m = read_lengths3(sec, "nose", *nose, false);
    if (centre) f.position_m = read_lengths3(sec, "centre", *centre, false);
    f.orientation = read_orientation(sec);
    f.interior_conductivity_S_per_m = required_positive(sec, "interior_conductivity", Dimension::conductivity);
    f.interior_permittivity_relative = optional_permittivity(sec, "interior_permittivity");
    f.skin_resistance_ohm_m2 = required_positive(sec, "skin_resistance", Dimension::specific_resistance);
    f.skin_capacitance_F_per_m2 = optional_positive(sec, "skin_capacitance", Dimension::capacitance_per_area);
    const toml::node& organ = required(sec, "organ", "a table [fish.organ]");
    f.organ = read_organ(Section{as_table(sec, "organ", organ), sec.key_path("organ"), line_of(organ), sec.ctx});
    return f;
}

// `site`: the case has [[layout]] tables, which say what each electrode does; the
// electrode is then only a place on the hull (floating until a layout drives or reads it).
ElectrodeSpec read_electrode(const Section& sec, ShapeKind hull, const std::string& hull_file, bool site) {
    const std::vector<std::string> forms = {"ring", "patch", "region"};
    const std::string form = read_choice(sec, "form", required(sec, "form", "ring, patch or region"), forms);
    if (site)
        for (const char* key : {"role", "current", "voltage", "potential"})
            if (sec.find(key))
                fail(sec.where(key), "in a case with [[layout]] tables an electrode is a site on the hull; each "
                                     "layout says which sites emit or sense and how (remove this key)");
    const std::vector<std::string> common = {"name", "form", "role", "current", "voltage", "potential"};
    ElectrodeSpec e;
    e.source = source_line(sec);
    if (form == "ring") {
        check_keys(sec, concat(common, {"from", "to"}));
        e.form = ElectrodeForm::ring;
        e.from_m = read_quantity(sec, "from", required(sec, "from", "position along the hull axis"), Dimension::length);
        e.to_m = read_quantity(sec, "to", required(sec, "to", "position along the hull axis"), Dimension::length);
        if (!(e.to_m > e.from_m)) fail(sec.where("to"), "must lie beyond from (" + format_number(e.from_m) + " m)");
    } else if (form == "patch") {
        check_keys(sec, concat(common, {"at", "radius"}));
        e.form = ElectrodeForm::patch;
        e.at_m = read_lengths3(sec, "at", required(sec, "at", "a point on the hull, hull frame"), false);
        e.radius_m = required_positive(sec, "radius", Dimension::length);
    } else {
        check_keys(sec, concat(common, {"region"}));
        e.form = ElectrodeForm::region;
        std::string ext = fs::path(hull_file).extension().string();
        std::transform(ext.begin(), ext.end(), ext.begin(), [](unsigned char c) { return std::tolower(c); });
        if (hull != ShapeKind::mesh || ext != ".msh")
            fail(sec.where("form"), "region electrodes need a hull read from a Gmsh .msh file (robot.shape = \"mesh\")");
        e.region = read_string(sec, "region", required(sec, "region", "a physical group name of the mesh"));
    }
    e.name = read_name(sec, "name", required(sec, "name"));
    if (e.name.rfind(kObjectElectrodePrefix, 0) == 0)
        fail(sec.where("name"), "names starting with '" + kObjectElectrodePrefix +
                                    "' are kept for conducting objects, got " + in_quotes(e.name));

    if (site) return e;  // floating
    const std::string role = read_choice(sec, "role", required(sec, "role", "emitter or sensor"), {"emitter", "sensor"});
    const toml::node* current = sec.find("current");
    const toml::node* voltage = sec.find("voltage");
    const toml::node* potential = sec.find("potential");
    if (role == "emitter") {
        if (potential) fail(sec.where("potential"), "only for sensors; an emitter is driven by current or voltage");
        if (current && voltage) fail(sec.where("voltage"), "give the emitter's current or its voltage, not both");
        if (!current && !voltage) fail(sec.where("role"), "an emitter needs current = \"...\" or voltage = \"...\"");
        e.drive = current ? ElectrodeDrive::current : ElectrodeDrive::voltage;
        e.value = current ? read_quantity(sec, "current", *current, Dimension::current)
                          : read_quantity(sec, "voltage", *voltage, Dimension::voltage);
    } else {
        if (current || voltage)
            fail(sec.where(current ? "current" : "voltage"),
                 "a sensor is not driven; give potential = \"...\" to hold it at a fixed potential, or nothing to "
                 "read its voltage");
        e.drive = potential ? ElectrodeDrive::fixed_potential : ElectrodeDrive::floating;
        if (potential) e.value = read_quantity(sec, "potential", *potential, Dimension::voltage);
    }
    return e;
}

RobotSpec read_robot(const Section& sec, bool sites) {
    const ShapeKind kind = read_shape_kind(sec);
    check_keys(sec, concat({"shape", "position", "heading", "pitch", "roll", "electrode"}, shape_keys(kind)));
    RobotSpec r;
    r.source = source_line(sec);
    r.hull = read_shape_sizes(sec, kind);
    if (const toml::node* p = sec.find("position")) r.position_m = read_lengths3(sec, "position", *p, false);
    r.orientation = read_orientation(sec);
    const toml::node& list = required(sec, "electrode", "one [[robot.electrode]] table per electrode");
    const toml::array* arr = list.as_array();
    if (!arr || !arr->is_array_of_tables())
        fail(sec.where("electrode"), "expected [[robot.electrode]] tables, got " + describe(list));
    std::set<std::string> names;
    bool emitter = false;
    for (std::size_t i = 0; i < arr->size(); ++i) {
        const toml::node& n = *arr->get(i);
        const Section es{*n.as_table(), sec.key_path("electrode[" + std::to_string(i + 1) + "]"), line_of(n), sec.ctx};
        ElectrodeSpec e = read_electrode(es, kind, r.hull.mesh_file, sites);
        if (!names.insert(e.name).second) fail(es.where("name"), "another electrode is already named " + in_quotes(e.name));
        emitter = emitter || e.drive == ElectrodeDrive::current || e.drive == ElectrodeDrive::voltage;
        r.electrodes.push_back(std::move(e));
    }
    if (!emitter && !sites) fail(sec.where("electrode"), "the robot needs at least one electrode with role = \"emitter\"");
    if (sites) check_electrode_sites(r);
    return r;
}

// ---- layouts ---------------------------------------------------------------

// A name of a [[robot.electrode]] site, given as text at `key` (or inside its array).
std::string read_site_name(const Section& sec, const std::string& key, const toml::node& n, const RobotSpec& robot) {
    const std::string name = read_name(sec, key, n);
    for (const ElectrodeSpec& e : robot.electrodes)
        if (e.name == name) return name;
    fail(at(sec.ctx, line_of(n), sec.key_path(key)), "no [[robot.electrode]] is named " + in_quotes(name));
}

const toml::array& read_list(const Section& sec, const std::string& key, const std::string& hint) {
    const toml::node& n = required(sec, key, hint);
    const toml::array* arr = n.as_array();
    if (!arr || arr->empty()) fail(sec.where(key), "expected a non-empty array (" + hint + "), got " + describe(n));
    if (arr->size() > kMaxLayoutElectrodes)
        fail(sec.where(key), "expected at most " + std::to_string(kMaxLayoutElectrodes) + " entries, got " +
                                 std::to_string(arr->size()));
    return *arr;
}

LayoutSpec read_layout(const Section& sec, const RobotSpec& robot) {
    check_keys(sec, {"name", "emitters", "sensors", "read", "reference", "pairs", "potential", "noise"});
    LayoutSpec l;
    l.line = sec.line;
    l.key = sec.path;
    l.name = read_name(sec, "name", required(sec, "name", "it names the layout's results"));
    for (const char c : l.name)
        if (!std::isalnum(static_cast<unsigned char>(c)) && c != '_' && c != '-')
            fail(sec.where("name"), "a layout name names a result group: letters, digits, '_' and '-' only, got " +
                                        in_quotes(l.name));
    std::set<std::string> used;  // every electrode plays one part in a layout
    const auto use = [&](const std::string& key, const toml::node& n, const std::string& name) {
        if (!used.insert(name).second)
            fail(at(sec.ctx, line_of(n), sec.key_path(key)),
                 "electrode " + in_quotes(name) + " already has a part in this layout (an electrode emits, senses or "
                 "is the reference, once)");
    };

    const toml::array& emitters = read_list(sec, "emitters", "tables { electrode = \"...\", current = \"...\" }");
    for (std::size_t i = 0; i < emitters.size(); ++i) {
        const toml::node& n = *emitters.get(i);
        const std::string key = "emitters[" + std::to_string(i + 1) + "]";
        if (!n.is_table()) fail(at(sec.ctx, line_of(n), sec.key_path(key)), "expected a table { electrode, current or voltage }");
        const Section es{*n.as_table(), sec.key_path(key), line_of(n), sec.ctx};
        check_keys(es, {"electrode", "current", "voltage"});
        LayoutEmitter em;
        const toml::node& en = required(es, "electrode", "a [[robot.electrode]] name");
        em.electrode = read_site_name(es, "electrode", en, robot);
        use(key + ".electrode", en, em.electrode);
        const toml::node* current = es.find("current");
        const toml::node* voltage = es.find("voltage");
        if (current && voltage) fail(es.where("voltage"), "give the emitter's current or its voltage, not both");
        if (!current && !voltage) fail(es.where_self(), "an emitter needs current = \"...\" or voltage = \"...\"");
        em.drive = current ? ElectrodeDrive::current : ElectrodeDrive::voltage;
        em.value = current ? read_quantity(es, "current", *current, Dimension::current)
                           : read_quantity(es, "voltage", *voltage, Dimension::voltage);
        l.emitters.push_back(em);
    }

    const std::string read = read_choice(sec, "read", required(sec, "read", "reference, pairs or current"),
                                         {"reference", "pairs", "current"});
    l.reading = read == "reference" ? LayoutReading::reference
                : read == "pairs"   ? LayoutReading::pairs
                                    : LayoutReading::current;
    const auto refuse_unless = [&](const char* key, bool allowed, const std::string& why) {
        if (sec.find(key) && !allowed) fail(sec.where(key), why);
    };
    refuse_unless("reference", l.reading == LayoutReading::reference, "only with read = \"reference\"");
    refuse_unless("pairs", l.reading == LayoutReading::pairs, "only with read = \"pairs\"");
    refuse_unless("potential", l.reading == LayoutReading::current, "only with read = \"current\"");
    refuse_unless("sensors", l.reading != LayoutReading::pairs,
                  "with read = \"pairs\" the pairs name the sensors; remove sensors");

    if (l.reading == LayoutReading::pairs) {
        const toml::array& pairs = read_list(sec, "pairs", "pairs of electrode names such as [\"s2\", \"s1\"]");
        std::set<std::string> pair_names;
        for (std::size_t i = 0; i < pairs.size(); ++i) {
            const toml::node& n = *pairs.get(i);
            const std::string key = "pairs[" + std::to_string(i + 1) + "]";
            const toml::array* two = n.as_array();
            if (!two || two->size() != 2)
                fail(at(sec.ctx, line_of(n), sec.key_path(key)), "expected two electrode names, [\"first\", \"second\"] "
                                                                 "(the channel reads first minus second)");
            const std::string a = read_site_name(sec, key + "[1]", *two->get(0), robot);
            const std::string b = read_site_name(sec, key + "[2]", *two->get(1), robot);
            if (a == b) fail(at(sec.ctx, line_of(n), sec.key_path(key)), "a pair needs two different electrodes");
            if (!pair_names.insert(a + "\n" + b).second)
                fail(at(sec.ctx, line_of(n), sec.key_path(key)), "this pair is already read");
            // A sensor may be in several pairs; it must not emit.
            for (const LayoutEmitter& em : l.emitters)
                if (em.electrode == a || em.electrode == b)
                    fail(at(sec.ctx, line_of(n), sec.key_path(key)),
                         "electrode " + in_quotes(em.electrode) + " emits in this layout; it cannot also sense");
            l.pairs.emplace_back(a, b);
        }
    } else {
        const toml::array& sensors = read_list(sec, "sensors", "electrode names such as [\"s1\", \"s2\"]");
        for (std::size_t i = 0; i < sensors.size(); ++i) {
            const toml::node& n = *sensors.get(i);
            const std::string key = "sensors[" + std::to_string(i + 1) + "]";
            const std::string name = read_site_name(sec, key, n, robot);
            use(key, n, name);
            l.sensors.push_back(name);
        }
    }
    if (l.reading == LayoutReading::reference) {
        const toml::node& n = required(sec, "reference", "the floating electrode the sensors are read against");
        l.reference = read_site_name(sec, "reference", n, robot);
        use("reference", n, l.reference);
    }
    if (l.reading == LayoutReading::current)
        if (const toml::node* p = sec.find("potential")) l.sensor_potential_V = read_quantity(sec, "potential", *p, Dimension::voltage);
    if (const toml::node* n = sec.find("noise"))
        l.noise_density = positive_quantity(sec, "noise", *n,
                                            l.reading == LayoutReading::current ? Dimension::current_noise_density
                                                                                : Dimension::voltage_noise_density);
    return l;
}

// ---- placement -------------------------------------------------------------

// Sizes the targets of murk layout take (target_grid.cpp): the sweep's size axis, or the
// sweep object's own size (a sphere's radius, the largest semi-axis).
std::vector<double> target_sizes(const CaseSpec& spec) {
    if (!spec.sweep) return {};
    if (!spec.sweep->size_m.empty()) return spec.sweep->size_m;
    const std::string name = spec.sweep->object.empty() ? spec.objects.front().name : spec.sweep->object;
    for (const ObjectSpec& o : spec.objects)
        if (o.name == name)
            return {o.shape.kind == ShapeKind::sphere ? o.shape.radius_m
                                                      : std::max({o.shape.semi_axes_m[0], o.shape.semi_axes_m[1],
                                                                  o.shape.semi_axes_m[2]})};
    return {};
}

// candidate_rings = { from, to, count, width }: `count` rings of `width`, the first from
// `from`, the last to `to`, the gaps between them equal; named c01, c02, ... and added to
// the robot's sites (check_electrode_sites then refuses one that overlaps an existing site).
std::vector<std::string> read_candidate_rings(const Section& sec, RobotSpec& robot) {
    const toml::node& n = *sec.find("candidate_rings");
    const Section rs{as_table(sec, "candidate_rings", n), sec.key_path("candidate_rings"), line_of(n), sec.ctx};
    check_keys(rs, {"from", "to", "count", "width"});
    const double from = read_quantity(rs, "from", required(rs, "from", "position along the hull axis"), Dimension::length);
    const double to = read_quantity(rs, "to", required(rs, "to", "position along the hull axis"), Dimension::length);
    if (!(to > from)) fail(rs.where("to"), "must lie beyond from (" + format_number(from) + " m)");
    const int count = read_count(rs, "count", required(rs, "count", "number of rings"), 1, kMaxLayoutElectrodes);
    const double width = required_positive(rs, "width", Dimension::length);
    const double gap = count > 1 ? (to - from - count * width) / (count - 1) : 0.0;
    if (count * width > to - from || (count > 1 && !(gap > 0.0)))
        fail(rs.where("width"), std::to_string(count) + " rings of " + format_number(width) +
                                    " m do not fit apart between from and to (" + format_number(to - from) +
                                    " m): they would overlap each other");
    const int digits = std::max(2, static_cast<int>(std::to_string(count).size()));
    std::vector<std::string> names;
    for (int k = 0; k < count; ++k) {
        std::string number = std::to_string(k + 1);
        ElectrodeSpec e;
        e.name = "c" + std::string(static_cast<std::size_t>(digits) - number.size(), '0') + number;
        e.form = ElectrodeForm::ring;
        e.from_m = count > 1 ? from + k * (width + gap) : 0.5 * (from + to - width);
        e.to_m = e.from_m + width;
        e.source = SourceLine{printable(sec.ctx.file), rs.line, rs.path};
        for (const ElectrodeSpec& other : robot.electrodes)
            if (other.name == e.name)
                fail(rs.where_self(), "names its rings c01, c02, ...; " + other.source.key + " is already named " +
                                          in_quotes(e.name));
        names.push_back(e.name);
        robot.electrodes.push_back(std::move(e));
    }
    check_electrode_sites(robot);
    return names;
}

// `rings`: the names read_candidate_rings gave, when the table has candidate_rings (read
// before the [[layout]] tables, so that a layout may use a candidate ring).
PlacementSpec read_placement(const Section& sec, CaseSpec& spec, const std::vector<std::string>& rings) {
    PlacementSpec p;
    p.line = sec.line;
    const toml::node& dn = required(sec, "drive", "the name of the [[layout]] whose emitters drive the candidates");
    const std::string drive = read_name(sec, "drive", dn);
    const auto it = std::find_if(spec.layouts.begin(), spec.layouts.end(),
                                 [&](const LayoutSpec& l) { return l.name == drive; });
    if (it == spec.layouts.end()) fail(sec.where("drive"), "no [[layout]] is named " + in_quotes(drive));
    if (it->reading != LayoutReading::reference)
        fail(sec.where("drive"), "each candidate is read against the drive layout's reference; layout " +
                                     in_quotes(drive) + " has no reference (it does not read = \"reference\")");
    p.drive = static_cast<std::size_t>(it - spec.layouts.begin());

    const bool listed = sec.find("candidates") != nullptr;
    if (listed) {
        const toml::array& arr = read_list(sec, "candidates", "[[robot.electrode]] names such as [\"s1\", \"s2\"]");
        std::set<std::string> seen;
        for (std::size_t i = 0; i < arr.size(); ++i) {
            const toml::node& n = *arr.get(i);
            const std::string key = "candidates[" + std::to_string(i + 1) + "]";
            const std::string name = read_site_name(sec, key, n, *spec.robot);
            if (!seen.insert(name).second) fail(at(sec.ctx, line_of(n), sec.key_path(key)), in_quotes(name) + " is listed twice");
            p.candidates.push_back(name);
        }
    } else {
        p.candidates = rings;
        p.generated_rings = true;
    }
    const LayoutSpec& d = *it;
    for (const std::string& c : p.candidates) {
        const bool emits = std::any_of(d.emitters.begin(), d.emitters.end(),
                                       [&](const LayoutEmitter& e) { return e.electrode == c; });
        if (emits || c == d.reference)
            fail(sec.where(listed ? "candidates" : "candidate_rings"),
                 "site " + in_quotes(c) + (emits ? " emits" : " is the reference") + " in the drive layout " +
                     in_quotes(d.name) + "; it cannot be a candidate");
    }

    const toml::node& bn = required(sec, "budget", "how many sensors to choose");
    if (!bn.is_integer() || bn.as_integer()->get() < 1 ||
        bn.as_integer()->get() > static_cast<std::int64_t>(p.candidates.size()))
        fail(sec.where("budget"), "expected a whole number from 1 to the " + std::to_string(p.candidates.size()) +
                                      " candidates, got " + describe(bn));
    p.budget = static_cast<int>(bn.as_integer()->get());

    const bool volume = spec.sweep && spec.sweep->grid && !spec.sweep->grid->w_m.empty();
    const std::string criterion =
        read_choice(sec, "criterion", required(sec, "criterion", "detectable_area, detectable_volume or mean_log_det"),
                    {"detectable_area", "detectable_volume", "mean_log_det"});
    if (criterion == "detectable_volume" && !volume)
        fail(sec.where("criterion"), "the targets lie on a plane (no sweep.grid.w): use \"detectable_area\"");
    if (criterion == "detectable_area" && volume)
        fail(sec.where("criterion"), "the targets fill a volume (sweep.grid.w): use \"detectable_volume\"");
    p.goal = criterion == "mean_log_det" ? PlacementGoal::mean_log_det : PlacementGoal::detectable_region;

    if (const toml::node* n = sec.find("target_size")) {
        const double size = positive_quantity(sec, "target_size", *n, Dimension::length);
        const std::vector<double> sizes = target_sizes(spec);
        const bool known = std::any_of(sizes.begin(), sizes.end(),
                                       [&](double s) { return std::abs(s - size) <= 1e-9 * std::max(s, size); });
        if (!known && !sizes.empty()) {
            std::string list;
            for (double s : sizes) list += (list.empty() ? "" : ", ") + format_number(s) + " m";
            fail(sec.where("target_size"), "is not one of the target sizes (" + list + ")");
        }
        p.target_size_m = size;
    }
    return p;
}

ObjectSpec read_object(const Section& sec, std::size_t index) {
    const ShapeKind kind = read_shape_kind(sec);
    check_keys(sec, concat({"name", "shape", "position", "heading", "pitch", "roll", "conductivity", "permittivity",
                            "membrane_resistance", "membrane_capacitance", "panel_size"},
                           shape_keys(kind)));
    ObjectSpec o;
    o.source = source_line(sec);
    o.name = sec.find("name") ? read_name(sec, "name", *sec.find("name")) : "object" + std::to_string(index + 1);
    o.shape = read_shape_sizes(sec, kind);
    o.position_m = read_lengths3(sec, "position", required(sec, "position", "the centre, [x, y, z]"), false);
    o.orientation = read_orientation(sec);
    o.panel_size_m = optional_positive(sec, "panel_size", Dimension::length);

    const toml::node& c = required(sec, "conductivity", "a conductivity, \"insulator\" or \"conductor\"");
    const std::string word = c.is_string() ? c.as_string()->get() : "";
    if (word == "insulator" || word == "conductor") {
        o.material = word == "insulator" ? Material::insulator : Material::conductor;
        for (const char* key : {"permittivity", "membrane_resistance", "membrane_capacitance"})
            if (sec.find(key))
                fail(sec.where(key), "does not apply to an object whose conductivity is \"" + word + "\"");
    } else {
        o.material = Material::conducting;
        o.conductivity_S_per_m = read_quantity(sec, "conductivity", c, Dimension::conductivity, Window::contrast_limited);
        if (!(o.conductivity_S_per_m > 0.0))
            fail(sec.where("conductivity"), "must be positive, got " + describe(c) + " (write \"insulator\" for none)");
        o.permittivity_relative = optional_permittivity(sec, "permittivity");
        const std::optional<double> rm = optional_positive(sec, "membrane_resistance", Dimension::specific_resistance);
        const std::optional<double> cm = optional_positive(sec, "membrane_capacitance", Dimension::capacitance_per_area);
        if (cm && !rm) fail(sec.where("membrane_capacitance"), "a membrane needs membrane_resistance as well");
        if (rm) o.membrane = MembraneSpec{*rm, cm};
    }
    return o;
}

// ---- free sources and probes ---------------------------------------------------

// A current that is not zero: a zero source is almost surely a slip.
double nonzero_current(const Section& sec, const std::string& key, const std::string& hint) {
    const toml::node& n = required(sec, key, hint);
    const double v = read_quantity(sec, key, n, Dimension::current);
    if (v == 0.0) fail(sec.where(key), "must not be zero, got " + describe(n));
    return v;
}

// The two ends of a line (from, to), which must differ.
void read_ends(const Section& sec, Point3& from, Point3& to) {
    from = read_lengths3(sec, "from", required(sec, "from", "the first point, [x, y, z]"), false);
    to = read_lengths3(sec, "to", required(sec, "to", "the last point, [x, y, z]"), false);
    if (from == to) fail(sec.where("to"), "the same point as from; a line needs two different ends");
}

SourceSpec read_source(const Section& sec) {
    const std::string form = read_choice(sec, "form", required(sec, "form", "point or line"), {"point", "line"});
    SourceSpec s;
    s.source = source_line(sec);
    if (form == "point") {
        check_keys(sec, {"form", "position", "current"});
        s.form = SourceForm::point;
        s.position_m = read_lengths3(sec, "position", required(sec, "position", "where the source is, [x, y, z]"), false);
        s.current_A = nonzero_current(sec, "current", "the current into the water, e.g. current = \"10 uA\"");
        return s;
    }
    check_keys(sec, {"form", "from", "to", "points", "total_current", "weights", "peak_current"});
    s.form = SourceForm::line;
    read_ends(sec, s.from_m, s.to_m);
    if (sec.find("weights")) {
        if (sec.find("total_current"))
            fail(sec.where("total_current"), "give total_current (split equally) or weights with peak_current, not both");
        if (sec.find("points")) fail(sec.where("points"), "not used with weights: there is one point per weight");
        s.share = LineShare::weights;
        s.weights = read_weights(sec);
        s.points = static_cast<int>(s.weights.size());
        s.peak_current_A = required_positive(sec, "peak_current", Dimension::current);
        return s;
    }
    if (sec.find("peak_current"))
        fail(sec.where("peak_current"), "only used with weights; for an equal split give total_current");
    s.share = LineShare::equal;
    s.points = read_count(sec, "points", required(sec, "points", "number of points, 2 to 1000"), 2, kMaxLinePoints);
    s.total_current_A = nonzero_current(
        sec, "total_current", "split equally over the points; or give weights = [...] with peak_current = \"...\"");
    return s;
}

// (1 - t) a + t b: exact at both ends.
Point3 between(const Point3& a, const Point3& b, double t) {
    Point3 p{};
    for (int k = 0; k < 3; ++k) p[k] = (1.0 - t) * a[k] + t * b[k];
    return p;
}

// Fraction k / (n - 1) of the way along n evenly spaced points, ends included.
double fraction(std::size_t k, std::size_t n) { return static_cast<double>(k) / static_cast<double>(n - 1); }

// An edge vector of a grid: not of zero length.
Point3 read_edge(const Section& sec, const std::string& key) {
    const Point3 e = read_lengths3(sec, key, required(sec, key, "an edge of the grid from its corner, [dx, dy, dz]"), false);
    if (e == Point3{0.0, 0.0, 0.0}) fail(sec.where(key), "an edge of zero length; a grid needs two edges");
    return e;
}

// True when a and b are not parallel: |a x b| > 1e-9 |a| |b|.
bool spans_plane(const Point3& a, const Point3& b) {
    const double cx = a[1] * b[2] - a[2] * b[1], cy = a[2] * b[0] - a[0] * b[2], cz = a[0] * b[1] - a[1] * b[0];
    const double na = std::hypot(a[0], a[1], a[2]), nb = std::hypot(b[0], b[1], b[2]);
    return std::hypot(cx, cy, cz) > 1e-9 * na * nb;
}

// The probe's points in order (see ProbeSpec), labelled for messages.
std::vector<ProbePoint> probe_points_of(const ProbeSpec& p, std::size_t index) {
    std::vector<ProbePoint> out;
    if (p.form == ProbeForm::point) {
        out.push_back({p.name, p.position_m, index});
    } else if (p.form == ProbeForm::line) {
        for (std::size_t k = 0; k < p.shape[0]; ++k)
            out.push_back({p.name + "[" + std::to_string(k + 1) + "]",
                           between(p.from_m, p.to_m, fraction(k, p.shape[0])), index});
    } else {
        for (std::size_t i = 0; i < p.shape[0]; ++i)
            for (std::size_t j = 0; j < p.shape[1]; ++j) {
                const double a = fraction(i, p.shape[0]), b = fraction(j, p.shape[1]);
                Point3 x{};
                for (int k = 0; k < 3; ++k) x[k] = p.corner_m[k] + a * p.along_m[k] + b * p.across_m[k];
                out.push_back({p.name + "[" + std::to_string(i + 1) + "," + std::to_string(j + 1) + "]", x, index});
            }
    }
    return out;
}

ProbeSpec read_probe(const Section& sec) {
    const std::string form =
        read_choice(sec, "form", required(sec, "form", "point, line or grid"), {"point", "line", "grid"});
    ProbeSpec p;
    p.source = source_line(sec);
    if (form == "point") {
        check_keys(sec, {"name", "form", "position"});
        p.form = ProbeForm::point;
        p.position_m = read_lengths3(sec, "position", required(sec, "position", "the point, [x, y, z]"), false);
        p.shape = {1};
    } else if (form == "line") {
        check_keys(sec, {"name", "form", "from", "to", "points"});
        p.form = ProbeForm::line;
        read_ends(sec, p.from_m, p.to_m);
        p.shape = {static_cast<std::size_t>(
            read_count(sec, "points", required(sec, "points", "number of points, 2 to 1000"), 2, kMaxLinePoints))};
    } else {
        check_keys(sec, {"name", "form", "corner", "along", "across", "points"});
        p.form = ProbeForm::grid;
        p.corner_m = read_lengths3(sec, "corner", required(sec, "corner", "a corner of the grid, [x, y, z]"), false);
        p.along_m = read_edge(sec, "along");
        p.across_m = read_edge(sec, "across");
        // Parallel edges span no plane; the tolerance only absorbs rounding.
        if (!spans_plane(p.along_m, p.across_m))
            fail(sec.where("across"), "parallel to along; the two edges of a grid must span a plane");
        p.shape.assign(2, 0);
        read_array(sec, "points", required(sec, "points", "[points along, points across]"), 2,
                   "two whole numbers [points along, points across], each 2 to 1000",
                   [&](const std::string& where, const toml::node& e, std::size_t i) {
                       if (!e.is_integer() || e.as_integer()->get() < 2 ||
                           e.as_integer()->get() > static_cast<std::int64_t>(kMaxLinePoints))
                           fail(where, "expected a whole number from 2 to " + std::to_string(kMaxLinePoints) + ", got " +
                                           describe(e));
                       p.shape[i] = static_cast<std::size_t>(e.as_integer()->get());
                   });
    }
    p.name = read_name(sec, "name", required(sec, "name", "a name for the probe's output"));
    p.point_count = 1;
    for (std::size_t n : p.shape) p.point_count *= n;
    return p;
}

// ---- sweep and detection ---------------------------------------------------

// Values of one sweep axis: an array of quantities, or a range table
// { from, to, count, spacing = "linear" | "log" }. With `words`, "insulator" and
// "conductor" stand for conductivities 0 and infinity.
std::vector<double> read_axis_values(const Section& sec, const std::string& key, Dimension d, bool words = false,
                                     bool any_sign = false) {
    const toml::node& n = *sec.find(key);
    std::vector<double> values;
    if (const toml::array* arr = n.as_array()) {
        if (arr->empty()) fail(sec.where(key), "expected at least one value");
        if (arr->size() > kMaxAxisValues)
            fail(sec.where(key), "expected at most " + std::to_string(kMaxAxisValues) + " values, got an array of " +
                                     std::to_string(arr->size()));
        for (std::size_t i = 0; i < arr->size(); ++i) {
            const toml::node& e = *arr->get(i);
            const std::string where = at(sec.ctx, line_of(e), sec.key_path(key) + "[" + std::to_string(i + 1) + "]");
            if (words && e.is_string() && e.as_string()->get() == "insulator") values.push_back(kInsulatorConductivity);
            else if (words && e.is_string() && e.as_string()->get() == "conductor") values.push_back(kConductorConductivity);
            else {
                const double v = quantity_at(where, e, d, words ? Window::contrast_limited : Window::computable);
                if (!any_sign && !(v > 0.0)) fail(where, "must be positive, got " + describe(e));
                values.push_back(v);
            }
        }
    } else if (n.is_table()) {
        const Section range{*n.as_table(), sec.key_path(key), line_of(n), sec.ctx};
        check_keys(range, {"from", "to", "count", "spacing"});
        // The object-conductivity axis (`words`) spans contrasts beyond the computing window.
        const Window window = words ? Window::contrast_limited : Window::computable;
        const double from = any_sign ? read_quantity(range, "from", required(range, "from"), d)
                                     : positive_quantity(range, "from", required(range, "from"), d, window);
        const double to = any_sign ? read_quantity(range, "to", required(range, "to"), d)
                                   : positive_quantity(range, "to", required(range, "to"), d, window);
        const int count = read_count(range, "count", required(range, "count"), 1, kMaxAxisValues);
        std::string spacing = "linear";
        if (const toml::node* sp = range.find("spacing")) spacing = read_choice(range, "spacing", *sp, {"linear", "log"});
        if (spacing == "log" && !(from > 0.0)) fail(range.where("from"), "log spacing needs a positive 'from'");
        if (count > 1 && !(to > from)) fail(range.where("to"), "must be larger than 'from'");
        for (int i = 0; i < count; ++i) {
            const double t = count == 1 ? 0.0 : double(i) / (count - 1);
            values.push_back(spacing == "log" ? from * std::pow(to / from, t) : from + t * (to - from));
        }
    } else {
        fail(sec.where(key), "expected an array of values or a range table {from, to, count, spacing}, got " + describe(n));
    }
    for (std::size_t i = 1; i < values.size(); ++i)
        if (!(values[i] > values[i - 1]))
            fail(sec.where(key), "values must increase strictly (insulator first, conductor last)");
    return values;
}

// A direction: three plain numbers, normalized; zero is refused.
std::array<double, 3> read_direction(const Section& sec, const std::string& key) {
    std::array<double, 3> v{};
    read_array(sec, key, *sec.find(key), 3, "three numbers like [0, 1, 0]",
               [&](const std::string& where, const toml::node& e, std::size_t i) {
                   v[i] = quantity_at(where, e, Dimension::dimensionless);
               });
    // Scaled by the largest component first, so that [1e200, 1e200, 0] and
    // [0, 1e-200, 0] normalize without their squares overflowing or vanishing.
    const double largest = std::max({std::abs(v[0]), std::abs(v[1]), std::abs(v[2])});
    if (!(largest > 0.0)) fail(sec.where(key), "a direction cannot be zero");
    for (double& x : v) x /= largest;
    const double norm = std::sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    for (double& x : v) x /= norm;
    return v;
}

// The axis surface_distance, bottom_distance or wall_distance (one of the three): gaps
// between the sensing body and the boundary it moves; wall_distance names its wall by
// `wall`, "+x", "-x", "+y" or "-y" (the side of the tank it lies on).
void read_boundary_distance_axis(const Section& sec, SweepSpec& s) {
    const char* given = nullptr;
    for (const MovedBoundary boundary : {MovedBoundary::surface, MovedBoundary::bottom, MovedBoundary::wall}) {
        const char* key = boundary_axis_key(boundary);
        if (!sec.find(key)) continue;
        if (given)
            fail(sec.where(key), std::string("a sweep moves one boundary: give one of surface_distance, "
                                             "bottom_distance and wall_distance, not both ") + given + " and " + key);
        given = key;
        s.moved = boundary;
        s.boundary_distance_m = read_axis_values(sec, key, Dimension::length);
    }
    if (sec.find("wall") && s.moved != MovedBoundary::wall)
        fail(sec.where("wall"), "names the wall a wall_distance axis moves; the sweep has no wall_distance");
    if (s.moved != MovedBoundary::wall || !given) return;
    const std::vector<std::string> walls = {"+x", "-x", "+y", "-y"};
    const std::string wall =
        read_choice(sec, "wall", required(sec, "wall", "the side wall the axis moves, one of " + join(walls)), walls);
    s.wall_sign = wall[0] == '+' ? 1 : -1;
    s.wall_axis = wall[1] == 'x' ? 0 : 1;
}

SweepSpec read_sweep(const Section& sec) {
    check_keys(sec, {"object", "alternatives", "distance", "direction", "size", "conductivity", "water_conductivity", "grid",
                     "frequency", "permittivity", "readings", "method", "dipole_accuracy", "dipole_checks", "coupling_tolerance",
                     "surface_distance", "bottom_distance", "wall_distance", "wall"});
    SweepSpec s;
    s.line = sec.line;
    if (const toml::node* m = sec.find("method")) {
        const std::string method = read_choice(sec, "method", *m, {"exact", "dipole", "auto", "full"});
        s.method = method == "exact"    ? SweepMethod::exact
                   : method == "dipole" ? SweepMethod::dipole
                   : method == "auto"   ? SweepMethod::automatic
                                        : SweepMethod::full;
    }
    if (const auto a = optional_positive(sec, "dipole_accuracy", Dimension::dimensionless)) {
        if (*a >= 0.5) fail(sec.where("dipole_accuracy"), "must be a relative error below 0.5, got " + format_number(*a));
        if (s.method != SweepMethod::automatic)
            fail(sec.where("dipole_accuracy"), "sets the switch of method = \"auto\" and means nothing otherwise");
        s.dipole_accuracy = *a;
    }
    if (const toml::node* c = sec.find("dipole_checks")) {
        s.dipole_checks = read_count(sec, "dipole_checks", *c, 0, 10000);
        if (s.method != SweepMethod::dipole && s.method != SweepMethod::automatic)
            fail(sec.where("dipole_checks"), "goes with method = \"dipole\" or \"auto\" (the points re-solved exactly)");
    }
    if (const auto t = optional_positive(sec, "coupling_tolerance", Dimension::dimensionless)) {
        if (*t > 1e-4) fail(sec.where("coupling_tolerance"), "must be at most 1e-4 (a relative residual), got " + format_number(*t));
        s.coupling_tolerance = *t;
    }
    if (const toml::node* o = sec.find("object")) s.object = read_string(sec, "object", *o);
    if (const toml::node* r = sec.find("readings"))
        s.electrode_pairs = read_choice(sec, "readings", *r, {"electrodes", "pairs"}) == "pairs";
    if (const toml::node* list = sec.find("alternatives")) {
        const toml::array* arr = list->as_array();
        if (!arr || arr->empty()) fail(sec.where("alternatives"), "expected an array of object names, got " + describe(*list));
        if (arr->size() > kMaxAxisValues)
            fail(sec.where("alternatives"), "expected at most " + std::to_string(kMaxAxisValues) + " names, got an array of " +
                                           std::to_string(arr->size()));
        for (std::size_t i = 0; i < arr->size(); ++i) {
            const toml::node& e = *arr->get(i);
            if (!e.is_string())
                fail(at(sec.ctx, line_of(e), "sweep.alternatives[" + std::to_string(i + 1) + "]"),
                     "expected an object name in quotes, got " + describe(e));
            s.alternatives.push_back(e.as_string()->get());
        }
        if (sec.find("object")) fail(sec.where("alternatives"), "give either object (the one that changes) or alternatives, not both");
    }
    if (sec.find("distance")) s.distance_m = read_axis_values(sec, "distance", Dimension::length);
    if (sec.find("direction")) s.direction = read_direction(sec, "direction");
    if (sec.find("size")) s.size_m = read_axis_values(sec, "size", Dimension::length);
    if (sec.find("conductivity")) s.conductivity_S_per_m = read_axis_values(sec, "conductivity", Dimension::conductivity, true);
    if (sec.find("water_conductivity"))
        s.water_conductivity_S_per_m = read_axis_values(sec, "water_conductivity", Dimension::conductivity);
    if (sec.find("frequency")) s.frequency_Hz = read_axis_values(sec, "frequency", Dimension::frequency);
    read_boundary_distance_axis(sec, s);
    if (sec.find("permittivity")) {
        s.permittivity_relative = read_axis_values(sec, "permittivity", Dimension::permittivity_relative);
        if (s.permittivity_relative.front() < 1.0)
            fail(sec.where("permittivity"), "a relative permittivity is at least 1, got " + format_number(s.permittivity_relative.front()));
    }
    if (const toml::node* g = sec.find("grid")) {
        const Section grid{as_table(sec, "grid", *g), sec.key_path("grid"), line_of(*g), sec.ctx};
        check_keys(grid, {"origin", "u_direction", "v_direction", "u", "v", "w_direction", "w"});
        SweepGridSpec spec;
        spec.origin_m = read_lengths3(grid, "origin", required(grid, "origin"), false);
        (void)required(grid, "u_direction"), (void)required(grid, "v_direction");
        spec.u_direction = read_direction(grid, "u_direction");
        spec.v_direction = read_direction(grid, "v_direction");
        const double dot = spec.u_direction[0] * spec.v_direction[0] + spec.u_direction[1] * spec.v_direction[1] +
                           spec.u_direction[2] * spec.v_direction[2];
        if (std::abs(dot) > 0.999) fail(grid.where("v_direction"), "must not be parallel to u_direction");
        (void)required(grid, "u"), (void)required(grid, "v");
        // Grid coordinates are offsets from the origin: zero and negative allowed.
        spec.u_m = read_axis_values(grid, "u", Dimension::length, false, true);
        spec.v_m = read_axis_values(grid, "v", Dimension::length, false, true);
        if (grid.find("w") || grid.find("w_direction")) {  // a volume of targets (murk layout)
            (void)required(grid, "w_direction", "a third direction, out of the u-v plane"), (void)required(grid, "w");
            spec.w_direction = read_direction(grid, "w_direction");
            const auto& a = spec.u_direction;
            const auto& b = spec.v_direction;
            const auto& c = spec.w_direction;
            const double volume = a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) +
                                  a[2] * (b[0] * c[1] - b[1] * c[0]);
            if (std::abs(volume) < 1e-3) fail(grid.where("w_direction"), "lies in the plane of u_direction and v_direction");
            spec.w_m = read_axis_values(grid, "w", Dimension::length, false, true);
        }
        s.grid = spec;
    }
    if (s.grid && !s.distance_m.empty())
        fail(sec.where("grid"), "a sweep places the object either by distance or on a grid, not both");
    if (s.direction && s.distance_m.empty()) fail(sec.where("direction"), "direction goes with a distance axis");
    if (s.distance_m.empty() && !s.grid && s.size_m.empty() && s.conductivity_S_per_m.empty() &&
        s.water_conductivity_S_per_m.empty() && s.alternatives.empty() && s.frequency_Hz.empty() &&
        s.permittivity_relative.empty() && s.boundary_distance_m.empty())
        fail(sec.where_self(), "no axis to sweep: give distance, size, conductivity, water_conductivity, frequency, "
                               "permittivity, surface_distance, bottom_distance, wall_distance, alternatives or grid");
    return s;
}

// [detection] channels, with the phase noise (or timing jitter) that the phase channel needs.
void read_detection_channels(const Section& sec, DetectionSpec& d) {
    using Channels = DetectionSpec::Channels;
    if (const toml::node* n = sec.find("channels")) {
        const std::string c = read_choice(sec, "channels", *n, {"quadratures", "amplitude", "amplitude_and_phase"});
        d.channels = c == "amplitude" ? Channels::amplitude
                     : c == "amplitude_and_phase" ? Channels::amplitude_and_phase : Channels::quadratures;
    }
    const toml::node* phase = sec.find("phase_noise");
    const toml::node* jitter = sec.find("timing_jitter");
    if (d.channels != Channels::amplitude_and_phase) {
        for (const char* key : {"phase_noise", "timing_jitter"})
            if (sec.find(key)) fail(sec.where(key), "is the noise of the phase channel; give channels = \"amplitude_and_phase\" too");
        return;
    }
    if ((phase != nullptr) == (jitter != nullptr))
        fail(sec.where("channels"), "\"amplitude_and_phase\" needs exactly one of phase_noise (an angle, e.g. "
                                    "\"0.5 deg\") or timing_jitter (a time, e.g. \"100 ns\")");
    if (phase) d.phase_noise_rad = required_positive(sec, "phase_noise", Dimension::angle);
    if (jitter) d.timing_jitter_s = required_positive(sec, "timing_jitter", Dimension::time);
}

DetectionSpec read_detection(const Section& sec) {
    check_keys(sec, {"receptor_noise", "receptor_density", "receptor_zones", "amplifier_noise", "amplifier_current_noise",
                     "integration_time", "false_alarm_probability", "probability_level", "localization_accuracy",
                     "localization_size", "channels", "phase_noise", "timing_jitter"});
    DetectionSpec d;
    d.line = sec.line;
    read_detection_channels(sec, d);
    const bool receptors = sec.find("receptor_noise") != nullptr;
    const bool voltage = sec.find("amplifier_noise") != nullptr;
    const bool current = sec.find("amplifier_current_noise") != nullptr;
    if (int(receptors) + int(voltage) + int(current) != 1)
        fail(sec.where_self(), "give exactly one noise level: receptor_noise (fish), amplifier_noise (robot voltage "
                               "sensors) or amplifier_current_noise (robot current sensors)");
    // Keys of the other noise model would be silently ignored: refuse them.
    for (const char* key : receptors ? std::vector<const char*>{"integration_time"}
                                     : std::vector<const char*>{"receptor_density", "receptor_zones"})
        if (sec.find(key))
            fail(sec.where(key), std::string("belongs to the ") + (receptors ? "amplifier" : "receptor") +
                                     " noise model, but this section gives " +
                                     (receptors ? "receptor_noise" : "an amplifier noise"));
    if (receptors) {
        d.noise = DetectionSpec::Noise::receptors;
        d.receptor_noise_V = required_positive(sec, "receptor_noise", Dimension::voltage);
        d.receptor_density_per_m2 = required_positive(sec, "receptor_density", Dimension::areal_density);
        if (const toml::node* zones = sec.find("receptor_zones")) {
            const toml::array* arr = zones->as_array();
            if (!arr) fail(sec.where("receptor_zones"), "expected an array of tables {from, to, density}, got " + describe(*zones));
            if (arr->size() > kMaxReceptorZones)
                fail(sec.where("receptor_zones"), "expected at most " + std::to_string(kMaxReceptorZones) +
                                                      " zones, got an array of " + std::to_string(arr->size()));
            for (std::size_t i = 0; i < arr->size(); ++i) {
                const toml::node& z = *arr->get(i);
                const std::string key = "receptor_zones[" + std::to_string(i + 1) + "]";
                if (!z.is_table()) fail(at(sec.ctx, line_of(z), sec.key_path(key)), "expected a table {from, to, density}");
                const Section zone{*z.as_table(), sec.key_path(key), line_of(z), sec.ctx};
                check_keys(zone, {"from", "to", "density"});
                ReceptorZone rz;
                rz.from_fraction = read_quantity(zone, "from", required(zone, "from"), Dimension::dimensionless);
                rz.to_fraction = read_quantity(zone, "to", required(zone, "to"), Dimension::dimensionless);
                if (!(0.0 <= rz.from_fraction && rz.from_fraction < rz.to_fraction && rz.to_fraction <= 1.0))
                    fail(zone.where("to"), "expected 0 <= from < to <= 1 (fractions of the body length from the nose)");
                const double density = read_quantity(zone, "density", required(zone, "density"), Dimension::areal_density);
                if (!(density >= 0.0)) fail(zone.where("density"), "must not be negative");
                rz.density_per_m2 = density;
                d.receptor_zones.push_back(rz);
            }
        }
    } else {
        d.noise = voltage ? DetectionSpec::Noise::voltage_amplifier : DetectionSpec::Noise::current_amplifier;
        d.noise_density = voltage ? required_positive(sec, "amplifier_noise", Dimension::voltage_noise_density)
                                  : required_positive(sec, "amplifier_current_noise", Dimension::current_noise_density);
        d.integration_time_s = required_positive(sec, "integration_time", Dimension::time);
    }
    auto probability = [&](const char* key, double fallback) {
        const toml::node* n = sec.find(key);
        if (!n) return fallback;
        const double p = read_quantity(sec, key, *n, Dimension::dimensionless);
        if (!(p > 0.0 && p < 1.0)) fail(sec.where(key), "a probability strictly between 0 and 1, got " + describe(*n));
        return p;
    };
    d.false_alarm_probability = probability("false_alarm_probability", 1e-3);
    d.probability_level = probability("probability_level", 0.5);
    if (const toml::node* n = sec.find("localization_accuracy")) {
        const double a = read_quantity(sec, "localization_accuracy", *n, Dimension::length);
        if (!(a > 0.0 && std::isfinite(a)))
            fail(sec.where("localization_accuracy"), "a positive length, got " + describe(*n));
        d.localization_accuracy_m = a;
    }
    if (const toml::node* n = sec.find("localization_size")) {
        if (d.localization_accuracy_m == 0.0)
            fail(sec.where("localization_size"), "says how the position bound treats the target's size; give "
                                                 "localization_accuracy too, or leave it out");
        d.localization_size_unknown = read_choice(sec, "localization_size", *n, {"known", "unknown"}) == "unknown";
    }
    return d;
}

// ---- signal -------------------------------------------------------------------

// The emitter's waveform of [signal] (cases/input/waveform.hpp): harmonics {order,
// amplitude, phase} or samples over one period, with the fundamental frequency.
WaveformSpec read_waveform(const Section& sec) {
    WaveformSpec w;
    w.line = sec.line;
    w.fundamental_Hz = required_positive(sec, "frequency", Dimension::frequency);
    const toml::node* list = sec.find("harmonics");
    const toml::node* samples = sec.find("samples");
    if (list && samples) fail(sec.where("samples"), "give the waveform either by harmonics or by samples, not both");
    int highest = 1;
    if (list) {
        w.form = WaveformSpec::Form::harmonics;
        const toml::array* arr = list->as_array();
        if (!arr || arr->empty())
            fail(sec.where("harmonics"), "expected an array of tables {order, amplitude, phase}, got " + describe(*list));
        if (arr->size() > kMaxWaveformSamples)
            fail(sec.where("harmonics"), "expected at most " + std::to_string(kMaxWaveformSamples) + " harmonics, got " +
                                             std::to_string(arr->size()));
        for (std::size_t i = 0; i < arr->size(); ++i) {
            const toml::node& e = *arr->get(i);
            const std::string key = "harmonics[" + std::to_string(i + 1) + "]";
            if (!e.is_table()) fail(at(sec.ctx, line_of(e), sec.key_path(key)), "expected a table {order, amplitude, phase}, got " + describe(e));
            const Section h{*e.as_table(), sec.key_path(key), line_of(e), sec.ctx};
            check_keys(h, {"order", "amplitude", "phase"});
            Harmonic one;
            const toml::node& order = required(h, "order", "the multiple of the fundamental, 1 or more");
            if (!order.is_integer() || order.as_integer()->get() < 1)
                fail(h.where("order"), "expected a whole number of at least 1 (the fundamental is 1), got " + describe(order));
            if (order.as_integer()->get() > std::int64_t(kMaxWaveformSamples / 2))
                fail(h.where("order"), "above " + std::to_string(kMaxWaveformSamples / 2) +
                                           ", the highest order murk synthesizes, got " + describe(order));
            one.order = int(order.as_integer()->get());
            one.amplitude = read_quantity(h, "amplitude", required(h, "amplitude"), Dimension::dimensionless);
            if (!(one.amplitude >= 0.0)) fail(h.where("amplitude"), "must not be negative (turn the phase by 180 deg instead)");
            one.phase_rad = optional_quantity(h, "phase", Dimension::angle).value_or(0.0);
            one.energy = 0.5 * one.amplitude * one.amplitude;
            for (const Harmonic& other : w.harmonics)
                if (other.order == one.order) fail(h.where("order"), "another harmonic already has order " + std::to_string(one.order));
            highest = std::max(highest, one.order);
            w.harmonics.push_back(one);
        }
        std::sort(w.harmonics.begin(), w.harmonics.end(), [](const Harmonic& a, const Harmonic& b) { return a.order < b.order; });
    } else {
        w.form = WaveformSpec::Form::samples;
        const toml::array* arr = samples->as_array();
        if (!arr) fail(sec.where("samples"), "expected an array of numbers over one period, got " + describe(*samples));
        if (arr->size() < 2 || arr->size() > kMaxWaveformSamples)
            fail(sec.where("samples"), "expected from 2 to " + std::to_string(kMaxWaveformSamples) +
                                           " samples over one period, got " + std::to_string(arr->size()));
        double largest = 0;
        for (std::size_t i = 0; i < arr->size(); ++i) {
            const toml::node& e = *arr->get(i);
            const double v = quantity_at(at(sec.ctx, line_of(e), sec.key_path("samples[" + std::to_string(i + 1) + "]")), e,
                                         Dimension::dimensionless);
            largest = std::max(largest, std::abs(v));
            w.samples.push_back(v);
        }
        // murk solves harmonics 1 and up; a mean would be a direct current, which the
        // synthesis would leave out. Rounding of the user's decimals is tolerated.
        if (!(largest > 0.0)) fail(sec.where("samples"), "are all zero: the emitter would carry nothing");
        // One period without its closing sample: a list that ends where it began (away
        // from zero, where pulses padded with zeros legitimately begin and end) counts
        // that instant twice, which skews every harmonic. Checked before the mean, which
        // the doubled sample also shifts.
        const double first = w.samples.front(), last = w.samples.back();
        if (w.samples.size() > 2 && std::abs(first) > 1e-9 * largest && std::abs(last - first) <= 1e-12 * largest)
            fail(sec.where("samples"), "the last sample repeats the first (" + format_number(first) +
                                           "): give one period without its closing sample (drop the last one)");
        const double mean = samples_mean(w.samples);
        if (std::abs(mean) > 1e-9 * largest)
            fail(sec.where("samples"), "must have zero mean (no direct current: murk solves harmonics 1 and up), got a mean of " +
                                           format_number(mean) + "; subtract it from every sample");
        w.harmonics = harmonics_of_samples(w.samples);
        highest = int(w.samples.size() / 2);
    }
    bool any = false;
    for (const Harmonic& h : w.harmonics) any = any || h.amplitude > 0.0;
    if (!any) fail(sec.where(list ? "harmonics" : "samples"), "every amplitude is zero: the emitter would carry nothing");
    if (const toml::node* f = sec.find("energy_fraction")) {
        w.energy_fraction = read_quantity(sec, "energy_fraction", *f, Dimension::dimensionless);
        if (!(w.energy_fraction > 0.0 && w.energy_fraction < 1.0))
            fail(sec.where("energy_fraction"), "a share of the energy strictly between 0 and 1, got " + describe(*f));
    }
    if (const toml::node* n = sec.find("synthesis_samples")) {
        w.synthesis_samples = read_count(sec, "synthesis_samples", *n, 2, kMaxWaveformSamples);
        // Nyquist: N samples a period represent orders up to N / 2.
        for (const Harmonic& h : w.harmonics)
            if (h.amplitude > 0.0 && 2 * h.order > w.synthesis_samples)
                fail(sec.where("synthesis_samples"), std::to_string(w.synthesis_samples) + " samples a period represent harmonics up to order " +
                                                          std::to_string(w.synthesis_samples / 2) + " (Nyquist); the waveform has order " +
                                                          std::to_string(h.order));
    } else {
        w.synthesis_samples = w.form == WaveformSpec::Form::samples ? int(w.samples.size())
                                                                    : std::max(64, 4 * highest);
    }
    if (const toml::node* n = sec.find("synthesize")) {
        auto word = [&](const std::string& where, const toml::node& e, bool array) {
            const std::string v = e.as_string()->get();
            if (v == "peak") w.synthesize_peak = true;
            else if (v == "all" && !array) w.synthesize_all = true;
            else fail(where, std::string("expected ") + (array ? "\"peak\" or a position index" : "\"peak\", \"all\" or an array") + ", got " + in_quotes(v));
        };
        if (n->is_string()) word(sec.where("synthesize"), *n, false);
        else if (const toml::array* arr = n->as_array()) {
            if (arr->size() > kMaxAxisValues) fail(sec.where("synthesize"), "expected at most " + std::to_string(kMaxAxisValues) + " entries");
            for (std::size_t i = 0; i < arr->size(); ++i) {
                const toml::node& e = *arr->get(i);
                const std::string where = at(sec.ctx, line_of(e), sec.key_path("synthesize[" + std::to_string(i + 1) + "]"));
                if (e.is_string()) word(where, e, true);
                else if (e.is_integer() && e.as_integer()->get() >= 0) w.synthesize_points.push_back(std::size_t(e.as_integer()->get()));
                else fail(where, "expected a position index (0 or more) or \"peak\", got " + describe(e));
            }
        } else fail(sec.where("synthesize"), "expected \"peak\", \"all\" or an array of position indices, got " + describe(*n));
    }
    return w;
}

// A frequency axis replaces the case's one frequency (and a waveform's harmonics);
// a permittivity axis needs some frequency, else it carries no current.
void check_sweep_frequencies(const Section& sw, const CaseSpec& spec) {
    if (!spec.sweep->frequency_Hz.empty()) {
        if (spec.frequency_Hz)
            fail(sw.where("frequency"), "the case already has one frequency (frequency or signal.frequency); give one of the two");
        if (spec.waveform)
            fail(sw.where("frequency"), "the [signal] waveform sets the frequencies (its harmonics); remove this axis");
    }
    if (!spec.sweep->permittivity_relative.empty() && spec.sweep->frequency_Hz.empty() && !spec.frequency_Hz &&
        !spec.waveform)
        fail(sw.where("permittivity"), "a permittivity carries current only at a frequency: give frequency (case or "
                                       "sweep axis) or a [signal] waveform");
}

// A distance-to-boundary axis measures from the sensing body and moves a boundary the
// case gives: a plane in [water] (surface_z or bottom_z; the case says which water it
// is, an insulating or sediment bottom, the axis only replaces the plane's height at
// every point) or a side wall of a generated [tank] (the axis moves the whole tank
// horizontally; an imported tank mesh has no named walls to move).
void check_sweep_boundary(const Section& sw, const CaseSpec& spec) {
    if (spec.sweep->boundary_distance_m.empty()) return;
    const MovedBoundary moved = spec.sweep->moved;
    const std::string key = boundary_axis_key(moved);
    if (!spec.fish && !spec.robot)
        fail(sw.where(key), "measures the gap from the sensing body: the case needs a [fish] or [robot]");
    if (moved == MovedBoundary::wall) {
        if (!spec.tank) fail(sw.where(key), "moves a wall of the tank: give a [tank] with shape \"box\" or \"cylinder\"");
        if (spec.tank->shape == TankShape::mesh)
            fail(sw.where(key), "moves a side wall of a box or cylinder [tank]; a tank read from a mesh file has no "
                                "named walls to move (move the mesh by hand, one case per distance)");
        return;
    }
    const bool bottom = moved == MovedBoundary::bottom;
    if (bottom ? !spec.water.bottom : !spec.water.surface)
        fail(sw.where(key), std::string("moves the ") + (bottom ? "bottom" : "water surface") + ": give [water] " +
                                (bottom ? "bottom_z" : "surface_z") +
                                " too (the axis replaces its height at every point)");
}

CaseSpec read_root(const toml::table& root, const Context& ctx) {
    const Section sec{root, "", 1, ctx};
    check_keys(sec, {"title", "description", "frequency", "signal", "water", "mesh", "fish", "robot", "object", "source",
                     "probe", "sweep", "detection", "layout", "placement", "tank"});
    CaseSpec spec;
    spec.title = read_string(sec, "title", required(sec, "title", "a short name of the case"));
    if (const toml::node* d = sec.find("description")) spec.description = read_string(sec, "description", *d);

    if (const toml::node* f = sec.find("frequency")) spec.frequency_Hz = positive_quantity(sec, "frequency", *f, Dimension::frequency);
    if (const toml::node* s = sec.find("signal")) {
        const Section signal{as_table(sec, "signal", *s), "signal", line_of(*s), ctx};
        check_keys(signal, {"frequency", "harmonics", "samples", "energy_fraction", "synthesis_samples", "synthesize"});
        if (signal.find("harmonics") || signal.find("samples")) {
            if (spec.frequency_Hz) fail(at(ctx, line_of(*sec.find("frequency")), "frequency"),
                                        "a [signal] waveform gives its fundamental as signal.frequency; remove this one");
            spec.waveform = read_waveform(signal);
        } else if (const toml::node* f = signal.find("frequency")) {
            for (const char* key : {"energy_fraction", "synthesis_samples", "synthesize"})
                if (signal.find(key)) fail(signal.where(key), "goes with a waveform (signal.harmonics or signal.samples)");
            if (spec.frequency_Hz) fail(signal.where("frequency"), "the frequency is already given at the top level");
            spec.frequency_Hz = positive_quantity(signal, "frequency", *f, Dimension::frequency);
        } else {
            for (const char* key : {"energy_fraction", "synthesis_samples", "synthesize"})
                if (signal.find(key)) fail(signal.where(key), "goes with a waveform (signal.harmonics or signal.samples)");
        }
    }

    const toml::node& water = required(sec, "water", "a table [water] with at least conductivity");
    spec.water = read_water(Section{as_table(sec, "water", water), "water", line_of(water), ctx});
    if (const toml::node* t = sec.find("tank")) {
        spec.tank = read_tank(Section{as_table(sec, "tank", *t), "tank", line_of(*t), ctx});
        if (!spec.water.planes().empty())
            fail(spec.water.planes().front().source.where(),
                 "a case with a [tank] has no insulating plane: the tank's top face stands for the water surface");
    }
    if (const toml::node* m = sec.find("mesh")) {
        const Section mesh{as_table(sec, "mesh", *m), "mesh", line_of(*m), ctx};
        spec.mesh = read_mesh(mesh);
    }

    const toml::node* fish = sec.find("fish");
    const toml::node* robot = sec.find("robot");
    if (fish && robot) fail(sec.where("robot"), "a case has one sensing body: [fish] or [robot], not both");
    if (fish) spec.fish = read_fish(Section{as_table(sec, "fish", *fish), "fish", line_of(*fish), ctx});
    const bool layouts = sec.find("layout") != nullptr;
    if (const toml::node* pl = sec.find("placement"); pl && !layouts)  // before the robot's sites are read as roles
        fail(at(ctx, line_of(*pl), "placement"),
             "placement drives the candidates with the emitters of a [[layout]]; the case has none");
    if (robot) spec.robot = read_robot(Section{as_table(sec, "robot", *robot), "robot", line_of(*robot), ctx}, layouts);
    if (layouts && !robot) fail(sec.where("layout"), "layouts place electrodes on a robot's hull; the case has no [robot]");
    // [placement]'s own keys first, and its generated rings added to the sites before the
    // layouts are read (a layout may name them); the rest once the layouts are known.
    std::optional<Section> placement;
    std::vector<std::string> candidate_rings;
    if (const toml::node* pl = sec.find("placement")) {
        placement.emplace(Section{as_table(sec, "placement", *pl), "placement", line_of(*pl), ctx});
        check_keys(*placement, {"drive", "candidates", "candidate_rings", "budget", "criterion", "target_size"});
        if (!spec.robot) fail(sec.where("placement"), "placement chooses a robot's sensors; the case has no [robot]");
        const bool listed = placement->find("candidates") != nullptr;
        if (listed == (placement->find("candidate_rings") != nullptr))
            fail(placement->where(listed ? "candidate_rings" : "candidates"),
                 "give the candidates either as a list of sites (candidates) or as generated rings (candidate_rings), "
                 "one of the two");
        if (!listed) candidate_rings = read_candidate_rings(*placement, *spec.robot);
    }
    std::set<std::string> layout_names;
    read_tables(sec, "layout", [&](const Section& ls, std::size_t) {
        if (spec.layouts.size() >= kMaxLayouts)
            fail(ls.where_self(), "a case has at most " + std::to_string(kMaxLayouts) + " layouts");
        LayoutSpec l = read_layout(ls, *spec.robot);
        if (!layout_names.insert(l.name).second) fail(ls.where("name"), "another layout is already named " + in_quotes(l.name));
        spec.layouts.push_back(std::move(l));
    });

    std::set<std::string> object_names;
    read_tables(sec, "object", [&](const Section& os, std::size_t i) {
        ObjectSpec o = read_object(os, i);
        if (!object_names.insert(o.name).second) fail(os.where("name"), "another object is already named " + in_quotes(o.name));
        spec.objects.push_back(std::move(o));
    });
    std::size_t point_sources = spec.fish ? static_cast<std::size_t>(spec.fish->organ.points) : 0;
    read_tables(sec, "source", [&](const Section& ss, std::size_t) {
        SourceSpec s = read_source(ss);
        point_sources += s.form == SourceForm::point ? 1 : static_cast<std::size_t>(s.points);
        if (point_sources > kMaxPointSources)
            fail(ss.where_self(), "the case would have more than " + std::to_string(kMaxPointSources) +
                                      " point sources (the organ's and every [[source]]'s points), the most murk takes");
        spec.sources.push_back(std::move(s));
    });
    std::set<std::string> probe_names;
    read_tables(sec, "probe", [&](const Section& ps, std::size_t i) {
        ProbeSpec p = read_probe(ps);
        if (!probe_names.insert(p.name).second) fail(ps.where("name"), "another probe is already named " + in_quotes(p.name));
        if (p.point_count > kMaxProbePoints - spec.probe_points.size())
            fail(ps.where_self(), "the probes would have more than " + std::to_string(kMaxProbePoints) +
                                      " points in all, the most murk takes");
        p.first_point = spec.probe_points.size();
        for (ProbePoint& x : probe_points_of(p, i)) spec.probe_points.push_back(std::move(x));
        spec.probes.push_back(std::move(p));
    });

    if (const toml::node* sw = sec.find("sweep"))
        spec.sweep = read_sweep(Section{as_table(sec, "sweep", *sw), "sweep", line_of(*sw), ctx});
    if (const toml::node* de = sec.find("detection"))
        spec.detection = read_detection(Section{as_table(sec, "detection", *de), "detection", line_of(*de), ctx});
    if (spec.sweep && spec.objects.empty()) fail(sec.where("sweep"), "a sweep changes an [[object]]; the case has none");
    if (spec.sweep) check_sweep_frequencies(Section{*sec.find("sweep")->as_table(), "sweep", spec.sweep->line, ctx}, spec);
    if (spec.sweep) check_sweep_boundary(Section{*sec.find("sweep")->as_table(), "sweep", spec.sweep->line, ctx}, spec);
    if (placement) spec.placement = read_placement(*placement, spec, candidate_rings);
    if (spec.sweep && spec.sweep->electrode_pairs && !spec.layouts.empty())
        fail(at(ctx, spec.sweep->line, "sweep.readings"), "each [[layout]] says how its sensors are read; remove readings");
    if (spec.sweep && spec.sweep->electrode_pairs && !spec.robot)
        fail(at(ctx, spec.sweep->line, "sweep.readings"), "pairs of sensor electrodes need a [robot]");
    if (!spec.mesh.zones.empty() && !fish && !robot)
        fail(spec.mesh.zones.front().source.where(), "refinement zones make the sensing body's panels finer; the case "
                                                     "has no [fish] or [robot]");
    if (!spec.mesh.zones.empty() && spec.robot && spec.robot->hull.kind == ShapeKind::mesh)
        fail(spec.mesh.zones.front().source.where(), "refinement zones need a generated hull (sphere, spheroid, "
                                                     "ellipsoid, capsule or box); an imported mesh keeps its own panels");
    if (spec.detection && !spec.detection->receptor_zones.empty() && !spec.fish)
        fail(sec.where("detection"), "receptor_zones describe a fish's skin; the case has no [fish]");
    if (spec.detection && spec.detection->channels == DetectionSpec::Channels::amplitude_and_phase && !spec.frequency_Hz)
        fail(at(ctx, spec.detection->line, "detection.channels"), "the phase channel reads the phase of an alternating "
                                                                  "signal; the case has no frequency");
    if (spec.sweep) {
        const Section sw{*sec.find("sweep")->as_table(), "sweep", spec.sweep->line, ctx};
        std::vector<std::string> names = spec.sweep->alternatives;
        if (!spec.sweep->object.empty()) names.push_back(spec.sweep->object);
        for (const std::string& n : names)
            if (!object_names.count(n))
                fail(sw.where(spec.sweep->alternatives.empty() ? "object" : "alternatives"), "no [[object]] is named " + in_quotes(n));
    }

    // Without a body nothing drives a current or reads one unless the case has
    // its own sources and probes: the open-water case of a point-like emitter.
    if (!fish && !robot && (spec.sources.empty() || spec.probes.empty()))
        fail(sec.where_self(), "missing the sensing body: add a [fish] or a [robot] table (a case without one needs "
                               "at least one [[source]] and one [[probe]])");
    return spec;
}

CaseSpec read_case(const std::string& text, const Context& ctx) {
    precheck_toml_text(text, printable(ctx.file));
    toml::table root;
    try {
        root = toml::parse(std::string_view(text), std::string_view(ctx.file));
    } catch (const toml::parse_error& e) {
        throw InputError(at(ctx, static_cast<int>(e.source().begin.line), "TOML syntax") + ": " +
                         printable(e.description(), 120));
    }
    CaseSpec spec = read_root(root, ctx);
    spec.path = ctx.file;
    spec.text = text;
    return spec;
}

}  // namespace

CaseSpec read_case_file(const std::string& path) {
    return read_case(read_file_bytes(path, kMaxCaseFileBytes, "case file"), Context{path, fs::path(path).parent_path()});
}

CaseSpec read_case_text(const std::string& text, const std::string& name_for_messages) {
    return read_case(text, Context{name_for_messages, fs::path()});
}

}  // namespace murk
