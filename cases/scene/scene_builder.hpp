#pragma once
// Turns a case (CaseSpec) into the solver's Scene: meshes made and placed,
// materials turned into (complex) conductivities at the case's frequency, the
// electric organ into point sources, electrodes into tagged hull panels. Checks
// what only the whole scene can tell: meshes valid, surfaces apart and not
// nested, everything in the water, sources inside the body, electrodes on panels.
#include "cases/input/case_spec.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/solver_options.hpp"
#include "solver/scene.hpp"

#include <limits>
#include <string>
#include <vector>

namespace murk {

// True when the case needs complex arithmetic: a frequency is given and some
// material has a permittivity or a membrane a capacitance. Without a frequency
// (direct current) permittivities and capacitances carry no current.
bool case_needs_complex(const CaseSpec& spec);

// The scene of the case. Surface order: the sensing body first when the case has
// one, then the objects in case order (only when include_objects; false gives
// the baseline scene). A case without a body (sources and probes only) gives a
// baseline scene with no surfaces at all, and a full scene with only the objects,
// possibly none: the solver's assemble_system refuses a scene without surfaces,
// so callers must treat that case themselves (the potential is then the sources'
// own, in the water with its plane).
// Electrode order: the robot's electrodes in case order, then one floating
// electrode per "conductor" object, named object_electrode_name(object).
// Source order: the organ's points (head end first), then the points of every
// [[source]] in case order (source_points()).
// Sources and probe points are checked against the surfaces of the scene built
// (so the objects' only when include_objects): each must lie in the water or
// inside the fish, at least a quarter of the panel size from every surface, on
// the water side of the plane; no probe point may be on a source point.
// For S = double, throws InputError when case_needs_complex(spec).
// Bad geometry throws InputError naming the case file, line and part.
template <class S>
Scene<S> build_scene(const CaseSpec& spec, bool include_objects);

extern template Scene<double> build_scene<double>(const CaseSpec&, bool);
extern template Scene<Complex> build_scene<Complex>(const CaseSpec&, bool);

// The images of the water's bounds (Scene::images): one plane exactly; surface
// and bottom as a series truncated at [water] image_tolerance over the scene's
// horizontal reach (horizontal_reach); a bottom of [water] bottom_conductivity
// weighted by its reflection coefficient against the water's admittivity (the
// bottom's own permittivity is not modelled). InputError names the [water] key.
template <class S>
ImageSeries<S> water_images(const CaseSpec& spec, const Scene<S>& scene);
// The horizontal diameter (m) of what the case places: the body's mesh, each
// object at its case position (a ball of its largest dimension), sources and
// probe points. Sweep grids and layout targets are not included.
double horizontal_reach(const CaseSpec& spec, const TriangleMesh* body);

// The pieces build_scene makes an object from, for a sweep that builds an object
// once and moves it. object_mesh: the object's mesh (shape, panel size,
// orientation, position), checked valid (InputError naming the object's table).
// add_object_surface: appends the object's surface with that mesh, its material
// at the case's frequency, and for a perfect conductor its floating electrode
// (appended to scene.electrodes, named object_electrode_name).
TriangleMesh object_mesh(const CaseSpec& spec, const ObjectSpec& object);
template <class S>
void add_object_surface(Scene<S>& scene, const CaseSpec& spec, const ObjectSpec& object, TriangleMesh mesh);
// The water's admittivity (S/m) at the case's frequency for a given conductivity
// (a sweep's water axis replaces the case's conductivity).
template <class S>
S water_admittivity(const CaseSpec& spec, double conductivity_S_per_m);

// Electrodes made for perfectly conducting objects are named kObjectElectrodePrefix
// + the object's name (case_spec.hpp).
std::string object_electrode_name(const std::string& object_name);
bool is_object_electrode(const std::string& electrode_name);

// Current (A) of each organ point, head end first: the profile's weights scaled
// so that the largest magnitude equals organ.peak_current_A. They sum to zero
// (to rounding) for every profile the reader accepts.
std::vector<double> organ_currents(const OrganSpec& organ);

// Axial position of each organ point as a fraction of the body length from the
// nose, head end first: evenly spaced from organ.from_fraction to organ.to_fraction.
std::vector<double> organ_fractions(const OrganSpec& organ);

// The point sources of a [[source]] table, in order from its `from` end: one
// point, or `points` evenly spaced points from `from` to `to` (ends included)
// carrying total_current / points each, or the weights scaled so that the
// largest magnitude is peak_current.
std::vector<PointSource<double>> source_points(const SourceSpec& source);

// Rotation of a body or object frame into the world: heading about z, pitch
// nose-up, roll about the body axis (see Orientation).
Eigen::Matrix3d orientation_matrix(const Orientation& o);

// Target panel edge (m) of the sensing body: mesh.panel_size, or the body's
// length / 30 (a mesh hull is read to measure it). A case without a body has
// no such length: mesh.panel_size, or +infinity when unset (no limit for objects).
double body_panel_size(const CaseSpec& spec);

// Target panel edge (m) of an object: its own panel_size, or the smaller of the
// body's and half the object's smallest radius (a quarter of its smallest box
// edge; the body's for a mesh, or, with neither body nor mesh.panel_size, the
// typical edge of the file's own panels).
double object_panel_size(const CaseSpec& spec, const ObjectSpec& object);

// Area of an electrode of a scene: mesh_m2 the summed area of its panels,
// exact_m2 the area of the true surface where murk knows it (ring electrodes on
// a capsule, sphere or box hull, which are meshed on their edges: see
// geometry/electrode_hulls.hpp), else NaN.
struct ElectrodeArea {
    double mesh_m2 = 0.0;
    double exact_m2 = std::numeric_limits<double>::quiet_NaN();
};

// The areas of scene.electrodes, in that order, for a scene build_scene made from `spec`.
template <class S>
std::vector<ElectrodeArea> electrode_areas(const CaseSpec& spec, const Scene<S>& scene);
extern template std::vector<ElectrodeArea> electrode_areas(const CaseSpec&, const Scene<double>&);
extern template std::vector<ElectrodeArea> electrode_areas(const CaseSpec&, const Scene<Complex>&);

// The accuracy switches of the panel integrals from [mesh].
QuadratureOptions quadrature_options(const CaseSpec& spec);

// How the body's system is solved (dense LU or compressed), from [mesh].
SolverOptions solver_options(const CaseSpec& spec);

}  // namespace murk
