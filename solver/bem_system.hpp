#pragma once
// The multi-domain direct collocation system of a scene (DEVELOPERS.md, "Physics and
// method" and "The formulation in one paragraph").
//
// Unknowns per panel: the water-side potential u and q = j / sigma_water, the
// outward normal current density scaled so that both columns have similar size
// (q has units of V/m, like a field). Contact and membrane surfaces carry u and q
// on every panel; a sealed surface carries u on insulating panels and q on
// electrode panels; each electrode carries one potential.
//
// Rows: on every panel of every surface, Green's representation of the water
// (exterior) potential at the panel centroid; on contact and membrane panels also
// the representation of the interior potential; one row per electrode (current
// balance, or its prescribed potential). Water sees the image Green's function
// when an insulating plane bounds it.
#include "geometry/eigen_core.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/scene.hpp"

#include <vector>

namespace murk {

template <class S>
using MatrixX = Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic>;
template <class S>
using VectorX = Eigen::Matrix<S, Eigen::Dynamic, 1>;

// Where each surface's unknowns and rows live in the global system.
struct SystemLayout {
    struct Block {
        Eigen::Index offset = 0;   // first unknown (and first row) of the surface
        Eigen::Index panels = 0;
        bool two_sided = false;    // contact or membrane: u block then q block
    };
    std::vector<Block> surfaces;
    Eigen::Index electrode_offset = 0;  // one unknown / row per electrode from here
    // With a tank, the last unknown and row (solver/tank.hpp): the row sets the
    // reference (mean water-side potential over the tank walls is zero), the
    // unknown borders the otherwise singular system. -1 without a tank.
    Eigen::Index reference = -1;
    Eigen::Index size = 0;
};

template <class S>
struct LinearSystem {
    MatrixX<S> matrix;
    VectorX<S> rhs;
    SystemLayout layout;
};

// Stage: assemble. Checks the scene (throws InputError for a source inside a
// sealed surface, an electrode index out of range, a uniform field with a plane).
template <class S>
LinearSystem<S> assemble_system(const Scene<S>& scene, const QuadratureOptions& options);

// The unknowns' order in the global system (what assemble_system uses).
template <class S>
SystemLayout system_layout(const Scene<S>& scene);

// The unknowns (equally, the rows) of a part of the scene, as global indices in
// increasing order: every unknown of the given surfaces, then the potentials of
// the electrodes whose panels lie on them.
template <class S>
std::vector<Eigen::Index> part_unknowns(const Scene<S>& scene, const SystemLayout& layout,
                                        const std::vector<std::size_t>& surfaces);

// Rows x columns of the system matrix, and the same rows of the right-hand side.
// Surface pairs that touch no selected row or column are not computed, so the
// coupling block between a large body and a small object costs only their panel
// pairs. The entries are those assemble_system computes, bit for bit.
template <class S>
struct SystemBlock {
    MatrixX<S> matrix;
    VectorX<S> rhs;
};
template <class S>
SystemBlock<S> assemble_block(const Scene<S>& scene, const SystemLayout& layout, const QuadratureOptions& options,
                              const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols);
// The same into an existing block, whose storage is kept when the size is the
// same (a sweep assembles blocks of one size at every point).
template <class S>
void assemble_block_into(const Scene<S>& scene, const SystemLayout& layout, const QuadratureOptions& options,
                         const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols,
                         SystemBlock<S>& block);

// Stage: solve (dense LU with partial pivoting), then unpack the panel values.
template <class S>
VectorX<S> solve_dense(LinearSystem<S>& system);
template <class S>
Solution<S> unpack_solution(const Scene<S>& scene, const SystemLayout& layout, const VectorX<S>& x);

// All three stages in order. A scene without surfaces (sources in open water)
// has nothing to solve for and gives an empty solution.
template <class S>
Solution<S> solve_scene(const Scene<S>& scene, const QuadratureOptions& options);

// Index of the surface whose interior contains x, or -1 for the water
// (winding number from the solid angles of the panels).
template <class S>
int enclosing_surface(const Scene<S>& scene, const Vec3& x);

// Potential (V) of a solved scene at arbitrary points, by Green's representation
// in the region that contains each point; accurate close to surfaces because
// near panels are integrated in closed form. A point inside a sealed surface
// (where nothing is modelled) is an InputError. With induced_only, the direct
// potential of the sources and of the uniform field is left out: what remains is
// the part the surfaces add (finite even at a source point).
template <class S>
VectorX<S> potential_at(const Scene<S>& scene, const Solution<S>& solution,
                        const Eigen::Matrix3Xd& points, const QuadratureOptions& options,
                        bool induced_only = false);

// Electric field E = -grad phi (V/m) at arbitrary points off the surfaces. The
// incident part (sources, uniform field) is differentiated exactly; the part the
// surfaces add is differentiated by centred differences of potential_at with a
// step of 1e-3 times the distance to the nearest panel centroid, which keeps the
// truncation error near 1e-6 of that part. Points must not lie on a surface.
template <class S>
Eigen::Matrix<S, 3, Eigen::Dynamic> field_at(const Scene<S>& scene, const Solution<S>& solution,
                                             const Eigen::Matrix3Xd& points, const QuadratureOptions& options);

}  // namespace murk
