#pragma once
// A case file read into plain data: every quantity in SI, every choice an enum,
// nothing of TOML left. The reader (case_reader.hpp) fills it and checks each
// value on its own; the scene builder (scene_builder.hpp) checks what only the
// whole scene can tell (overlaps, sources inside the body, electrodes on panels).
// The file format itself is documented in cases/README.md.
#include "solver/scene.hpp"
#include "solver/solver_options.hpp"

#include <array>
#include <optional>

#include "cases/input/layout_spec.hpp"
#include "cases/input/placement_spec.hpp"
#include "cases/input/sweep_spec.hpp"
#include "cases/input/waveform.hpp"
#include <string>
#include <vector>

namespace murk {

using Point3 = std::array<double, 3>;  // x, y, z in metres (world frame unless stated)

// Where a part of the case was written, for messages of later stages.
struct SourceLine {
    std::string file;  // the name used in messages (the case file path)
    int line = 0;      // 1-based line where the part's table starts; 0 if unknown
    std::string key;   // dotted path, e.g. "object[2]" or "robot.electrode[1]"
    // "file:line: key" — the prefix of every message about this part.
    std::string where() const {
        return file + (line > 0 ? ":" + std::to_string(line) : std::string()) + ": " + key;
    }
};

// Attitude of a body or object, applied in this order to its own frame:
// roll about its x axis, then pitch (nose up) about its y axis, then heading
// about the world z axis (0 = along +x, positive turns +x toward +y).
struct Orientation {
    double heading_rad = 0.0;
    double pitch_rad = 0.0;
    double roll_rad = 0.0;
};

// The water surface or bottom: the plane z = height. Nothing may cross it.
struct PlaneSpec {
    double height_m = 0.0;
    bool water_below = true;  // true: the plane is the water surface (water at z < height)
    SourceLine source;
};

// The water's bounds: an insulating surface, a bottom (insulating, or of finite
// conductivity: a sediment), or both (shallow water: an image series truncated
// at image_tolerance, solver/image_series.hpp).
struct WaterSpec {
    double conductivity_S_per_m = 0.0;
    std::optional<double> permittivity_relative;  // 1; only matters with a frequency
    std::optional<PlaneSpec> surface;             // [water] surface_z
    std::optional<PlaneSpec> bottom;              // [water] bottom_z
    std::optional<double> bottom_conductivity_S_per_m;  // none: an insulating bottom
    SourceLine bottom_conductivity_source;
    double image_tolerance = 1e-6;  // relative truncation error of the two-plane image series
    SourceLine image_tolerance_source;
    SourceLine source;
    // The planes given, surface first.
    std::vector<PlaneSpec> planes() const {
        std::vector<PlaneSpec> out;
        if (surface) out.push_back(*surface);
        if (bottom) out.push_back(*bottom);
        return out;
    }
};

// [tank]: closed insulating walls around the water and everything in it
// (solver/tank.hpp). A box or a vertical cylinder is given by its inner size and
// the centre of the water it holds; its top face may stand for the free water
// surface (also insulating). An imported mesh is placed as written.
enum class TankShape { box, cylinder, mesh };

struct TankSpec {
    TankShape shape = TankShape::box;
    Point3 size_m{};         // box: inner edge lengths along x, y, z
    double radius_m = 0.0;   // cylinder: inner radius (axis along z)
    double height_m = 0.0;   // cylinder: inner height
    Point3 centre_m{};       // box, cylinder: centre of the water volume (world frame)
    std::string mesh_file;   // mesh: path resolved against the case file's folder
    double file_unit_m = 1.0;
    double panel_size_m = 0.0;  // mean panel edge of the walls (box, cylinder)
    SourceLine source;          // at the key that sets the extent: tank.size, tank.radius or tank.file
};

// A refinement zone of [[mesh.zone]]: a ball in which the sensing body's panels
// are at most panel_size_m, grading back to the body's panel size outside it.
struct MeshZoneSpec {
    Point3 centre_m{};  // world frame
    double radius_m = 0.0;
    double panel_size_m = 0.0;
    SourceLine source;             // the [[mesh.zone]] table, key "mesh.zone[k]"
    SourceLine centre_source;      // its centre key, for messages of the scene builder
    SourceLine panel_size_source;  // its panel_size key
};

// Meshing and accuracy settings.
struct MeshSpec {
    // Target panel edge length (m) of the sensing body; objects use the smaller of
    // this and a size derived from their own dimensions unless they set their own.
    // Unset: length of the sensing body / 30.
    std::optional<double> panel_size_m;
    double near_ratio = 3.0;   // 1; closed-form integrals below this distance/panel ratio
    double far_ratio = 10.0;   // 1; one-point rule above this ratio
    std::vector<MeshZoneSpec> zones;  // finer panels on the sensing body, in case order
    // Panel length (m) across the edges of a robot's ring electrodes; unset: the
    // grading rule of geometry/electrode_hulls.hpp (a fraction of panel_size).
    std::optional<double> electrode_edge_m;
    // How the body's system is solved (solver/solver_options.hpp): the keys solver,
    // dense_limit, compression_tolerance, iteration_tolerance and
    // preconditioner_tolerance; unset keys keep
    // SolverOptions' defaults.
    SolverOptions solver;
};

// Solid shapes shared by objects and the robot hull. Local frame: centred at the
// origin, the long or polar axis along x.
enum class ShapeKind { sphere, spheroid, ellipsoid, capsule, box, mesh };

struct ShapeSpec {
    ShapeKind kind = ShapeKind::sphere;
    double radius_m = 0.0;           // sphere, capsule
    double overall_length_m = 0.0;   // capsule: overall length, tip to tip (> 2 radius)
    Point3 semi_axes_m{};            // spheroid (polar along x, equatorial y and z), ellipsoid
    Point3 size_m{};                 // box: full edge lengths along x, y, z
    std::string mesh_file;           // mesh: path resolved against the case file's folder
    double file_unit_m = 1.0;        // mesh: metres per unit of the file's coordinates
};

// One station of a body profile, all as fractions of the body length.
struct ProfileStation {
    double x_fraction = 0.0;            // 0 = nose, 1 = tail
    double half_width_fraction = 0.0;   // semi-axis along the body's y (sideways)
    double half_height_fraction = 0.0;  // semi-axis along the body's z (up)
};

// How the electric organ's current is shared among its points, head end first.
enum class OrganProfile {
    dipole,   // +1 at the head end, -1 at the tail end, nothing between
    linear,   // falls linearly from +1 at the head end to -1 at the tail end
    cosine,   // cos(pi s), s from 0 at the head end to 1 at the tail end
    weights,  // the user's list, one weight per point
};

// A line of point current sources on the body axis.
struct OrganSpec {
    double from_fraction = 0.1;  // head end of the organ, fraction of body length from the nose
    double to_fraction = 0.9;    // tail end
    OrganProfile profile = OrganProfile::linear;
    std::vector<double> weights;  // profile == weights only; sums to zero
    int points = 20;              // number of source points (2 for dipole)
    double peak_current_A = 0.0;  // largest |current| of any point
    SourceLine source;
};

struct FishSpec {
    double length_m = 0.0;
    std::vector<ProfileStation> profile;  // nose first; filled with the default when not given
    bool anchored_at_nose = false;        // position is the nose (true) or the mid-length point
    Point3 position_m{};
    Orientation orientation;
    double interior_conductivity_S_per_m = 0.0;
    std::optional<double> interior_permittivity_relative;
    double skin_resistance_ohm_m2 = 0.0;
    std::optional<double> skin_capacitance_F_per_m2;
    OrganSpec organ;
    SourceLine source;
};

enum class ElectrodeForm {
    ring,    // band of the hull between two positions along its x axis
    patch,   // disc of the hull around a point
    region,  // a named region (Gmsh physical group) of an imported hull mesh
};

struct ElectrodeSpec {
    std::string name;
    ElectrodeForm form = ElectrodeForm::ring;
    double from_m = 0.0, to_m = 0.0;  // ring: interval along the hull axis, hull frame
    Point3 at_m{};                    // patch: centre, hull frame (origin = hull centre)
    double radius_m = 0.0;            // patch: disc radius
    std::string region;               // region: region name in the mesh file
    ElectrodeDrive drive = ElectrodeDrive::floating;
    double value = 0.0;  // A for current, V for voltage and fixed_potential
    SourceLine source;
};

struct RobotSpec {
    ShapeSpec hull;
    Point3 position_m{};  // hull centre (origin of the hull frame)
    Orientation orientation;
    std::vector<ElectrodeSpec> electrodes;
    SourceLine source;
};

enum class Material {
    conducting,  // conductivity_S_per_m (and permittivity) apply
    insulator,   // no current enters
    conductor,   // perfect conductor: one equipotential surface, no net current
};

struct MembraneSpec {
    double resistance_ohm_m2 = 0.0;
    std::optional<double> capacitance_F_per_m2;
};

struct ObjectSpec {
    std::string name;
    ShapeSpec shape;
    Point3 position_m{};  // centre
    Orientation orientation;
    Material material = Material::conducting;
    double conductivity_S_per_m = 0.0;              // conducting only
    std::optional<double> permittivity_relative;    // conducting only
    std::optional<MembraneSpec> membrane;           // conducting only
    std::optional<double> panel_size_m;
    SourceLine source;
};

// A free current source of [[source]]: one point, or a line of evenly spaced
// points. Its points go into the water or into the fish, never into an object or
// the robot hull (checked by the scene builder, which expands it with
// source_points()).
enum class SourceForm { point, line };

// How a line source shares its current among its points, from the `from` end.
enum class LineShare {
    equal,    // total_current_A split equally over `points` points
    weights,  // weights scaled so that the largest |current| is peak_current_A
};

struct SourceSpec {
    SourceForm form = SourceForm::point;
    Point3 position_m{};           // point
    double current_A = 0.0;        // point: its current into the water, signed, not zero
    Point3 from_m{}, to_m{};       // line: first and last point (distinct)
    LineShare share = LineShare::equal;  // line
    int points = 0;                // line: number of points, 2..1000 (weights: one per weight)
    double total_current_A = 0.0;  // line, equal: signed, not zero
    std::vector<double> weights;   // line, weights: from the `from` end, summing to zero
    double peak_current_A = 0.0;   // line, weights: positive
    SourceLine source;
};

// A probe of [[probe]]: named points where potential and field are reported.
// Its points are listed, in order, in CaseSpec::probe_points.
enum class ProbeForm {
    point,  // one point
    line,   // `points` evenly spaced points from `from` to `to`, ends included
    grid,   // corner + i/(n_along-1) along + j/(n_across-1) across, i outer, j inner
};

struct ProbeSpec {
    std::string name;  // unique among probes
    ProbeForm form = ProbeForm::point;
    // Array shape of the probe's values, row-major: point {1}, line {points},
    // grid {n_along, n_across} (so that point (i, j) is entry i * n_across + j).
    std::vector<std::size_t> shape;
    std::size_t first_point = 0;  // index of its first point in CaseSpec::probe_points
    std::size_t point_count = 0;  // product of shape
    // The definition as written, world frame.
    Point3 position_m{};                      // point
    Point3 from_m{}, to_m{};                  // line
    Point3 corner_m{}, along_m{}, across_m{};  // grid: a corner and the two edges from it
    SourceLine source;
};

struct ProbePoint {
    std::string label;    // for messages: "tip", "axis[3]", "map[2,5]" (counted from 1)
    Point3 position_m{};  // world frame
    std::size_t probe = 0;  // index into CaseSpec::probes
};

struct CaseSpec {
    std::string path;  // the case file as given, or the name used for text
    std::string text;  // the whole case file, written into result files
    std::string title;
    std::string description;
    std::optional<double> frequency_Hz;  // unset: direct current (omega = 0)
    // [signal] with harmonics or samples: the emitter's periodic waveform (frequency_Hz
    // then stays unset; murk run solves at the kept harmonics' frequencies).
    std::optional<WaveformSpec> waveform;
    WaterSpec water;
    std::optional<TankSpec> tank;  // [tank]: closed insulating walls (none: open water)
    MeshSpec mesh;
    // At most one of fish and robot is set. Neither only when the case has at
    // least one source and one probe (the body-free case: sources in open water).
    std::optional<FishSpec> fish;
    std::optional<RobotSpec> robot;
    std::vector<ObjectSpec> objects;
    std::vector<SourceSpec> sources;      // [[source]] in case order
    std::vector<ProbeSpec> probes;        // [[probe]] in case order
    std::vector<ProbePoint> probe_points;  // every probe's points, probe after probe
    std::optional<SweepSpec> sweep;          // [sweep]: what murk run varies
    std::optional<DetectionSpec> detection;  // [detection]: noise model and detection criteria
    // [[layout]]: candidate layouts of the robot's electrodes (murk layout). When there are
    // any, robot->electrodes are the hull's sites, all floating; layout_case() makes the
    // case of one layout.
    std::vector<LayoutSpec> layouts;
    // [placement]: sensors chosen from candidate sites (murk layout; solve and run ignore it).
    std::optional<PlacementSpec> placement;
};

// Electrodes made for perfectly conducting objects are named "object:<name>", so
// that output can tell them from the robot's sensors (robot electrode names are
// free text but never start with this prefix: the reader refuses such names).
inline const std::string kObjectElectrodePrefix = "object:";

}  // namespace murk
