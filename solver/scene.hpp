#pragma once
// A scene: closed surfaces in water, what each interface does, the sources and
// electrodes. Plain data; the solver turns it into panel values. SI units inside.
//
// Every surface bounds one interior region and sits in the water; surfaces are
// not nested. The normal current density j on a surface is the current per area
// leaving the interior (outward normal), and it is the same on both sides.
// One exception, a tank (Surface::encloses_water): a closed insulating surface
// around the water and everything in it; its mesh is oriented with the normals
// pointing into the water (inward), like every other surface's, so that the
// water's representation formula is the same sum over all surfaces.
#include "geometry/eigen_core.hpp"
#include "geometry/mesh.hpp"

#include <complex>
#include <optional>
#include <string>
#include <vector>

namespace murk {

using Complex = std::complex<double>;

// How a closed surface couples the water outside to what is inside it.
enum class InterfaceKind {
    contact,   // object in water: potential and normal current continuous
    membrane,  // resistive skin: current continuous, inner - outer potential = rho_s * j
    sealed,    // only the water side is modelled: a panel insulates (j = 0) unless it
               // belongs to an electrode, where the water-side potential is the electrode's
};

template <class S>
struct Surface {
    TriangleMesh mesh;                  // mesh.name names the surface in messages and output
    InterfaceKind kind = InterfaceKind::contact;
    S inner_conductivity{};             // S/m; contact and membrane
    S membrane_resistance{};            // ohm m^2 (specific resistance); membrane only
    std::vector<int> panel_electrode;   // sealed only: per triangle an index into
                                        // Scene::electrodes, or -1 for an insulating panel
    // A tank (solver/tank.hpp): sealed, every panel insulating, the water inside,
    // normals inward. At most one per scene; not combined with a plane.
    bool encloses_water = false;
};

enum class ElectrodeDrive {
    current,          // given total current into the water (A); potential is solved for
    voltage,          // given potential (V); current is solved for
    floating,         // ideal voltmeter: zero net current; potential is solved for
    fixed_potential,  // sensor held at a given potential (V) whose current is read
};

template <class S>
struct Electrode {
    std::string name;
    ElectrodeDrive drive = ElectrodeDrive::floating;
    S value{};  // A for current, V for voltage and fixed_potential, unused when floating
};

// A point current source (A) in whatever region contains it: the water or the
// interior of a contact or membrane surface (an electric organ inside a body).
template <class S>
struct PointSource {
    Vec3 position;
    S current{};
};

// A point dipole in the water: the stand-in for a small object on the
// induced-dipole path. Its potential is p.(x - c) / (4 pi |x - c|^3), with the
// moment p in V m^2 (potential times area, as induced_dipole_moment gives it).
template <class S>
struct PointDipole {
    Vec3 position = Vec3::Zero();
    Eigen::Matrix<S, 3, 1> moment = Eigen::Matrix<S, 3, 1>::Zero();
};

// A plane bounding the water (water surface or bottom): the water lies on the
// side opposite to `normal`. Whether it insulates or conducts is in the weights
// of its images (ImageSeries).
struct BoundingPlane {
    Vec3 point = Vec3::Zero();
    Vec3 normal = Vec3::UnitZ();  // unit, pointing out of the water
};
using InsulatingPlane = BoundingPlane;

// One image of the field point in the Green's function of bounded water: the
// isometry x -> linear x + shift (a reflection across a plane, a translation
// along its normal, or both) and the image's weight (1 for an insulating plane,
// the reflection coefficient of a conducting bottom, its powers for repeated
// reflections; complex at a frequency).
template <class S>
struct FieldImage {
    Eigen::Matrix3d linear = Eigen::Matrix3d::Identity();  // orthogonal
    Vec3 shift = Vec3::Zero();
    S weight{1};
    Vec3 of(const Vec3& x) const { return linear * x + shift; }
    // Where the image of a source at y sits: |of(x) - y| = |x - source_of(y)|.
    Vec3 source_of(const Vec3& y) const { return linear.transpose() * (y - shift); }
};

// The Green's function of the water as images (solver/image_series.hpp builds them):
//   4 pi G(x, y) = 1/|x - y| + sum_k weight_k / |T_k x - y| - constant.
// Empty: unbounded water. One image: one plane (exact). Two parallel planes: a
// series truncated at `tolerance` over the horizontal `reach` (its far images
// folded into one equivalent pair per family), and for two insulating planes a
// constant subtracted so that the series converges (image_series.hpp says which
// reference the potential then has). `constant` adds nothing to a double layer.
template <class S>
struct ImageSeries {
    std::vector<BoundingPlane> bounds;  // the planes bounding the water
    std::vector<FieldImage<S>> terms;   // images of weight zero are left out
    S constant{};            // 1/m, subtracted from 4 pi G
    double tolerance = 0.0;  // relative truncation error aimed at; 0: exact (no truncation)
    double reach = 0.0;      // m, horizontal extent over which the tolerance was checked
    bool has_terms() const { return !terms.empty(); }
};

template <class S>
struct Scene {
    S water_conductivity{};
    ImageSeries<S> images;  // the water's bounds (empty: unbounded water)
    std::vector<Surface<S>> surfaces;
    std::vector<Electrode<S>> electrodes;
    std::vector<PointSource<S>> sources;
    std::vector<PointDipole<S>> dipoles;  // all in the water
    // Imposed uniform field far away (V/m); the incident potential is -E.x.
    // Used by the verification checks; zero in ordinary scenes.
    Eigen::Matrix<S, 3, 1> uniform_field = Eigen::Matrix<S, 3, 1>::Zero();
};

// Panel values of one surface after a solve (one entry per triangle).
template <class S>
struct SurfaceSolution {
    Eigen::Matrix<S, Eigen::Dynamic, 1> outer_potential;  // V, water side
    Eigen::Matrix<S, Eigen::Dynamic, 1> inner_potential;  // V, inside; empty for sealed surfaces
    Eigen::Matrix<S, Eigen::Dynamic, 1> current_density;  // A/m^2, outward normal
};

template <class S>
struct Solution {
    std::vector<SurfaceSolution<S>> surfaces;  // same order as Scene::surfaces
    std::vector<S> electrode_potential;        // V, same order as Scene::electrodes
    std::vector<S> electrode_current;          // A into the water
};

}  // namespace murk
