#pragma once
// The targets every layout of `murk layout` is judged on: the [sweep] object's
// centre on the planar grid of [sweep.grid], at each value of the size axis, as
// the induced dipole p = M E_b(c) it carries (cases/README.md, `murk layout`). One grid and one set of tensors for all layouts,
// so that layouts are compared on the same targets.
//
// The tensor M is the one the sweep's dipole path uses (cases/sweep/moving_object.hpp):
// closed form for a plain sphere, spheroid or ellipsoid, computed once per size by
// boundary elements (the object alone in three uniform fields) for any other shape or a
// membrane-covered object. The dipole sits at the grid point: for generated shapes that is
// the object's reference point, for an imported mesh its mean vertex.
#include "cases/input/case_spec.hpp"
#include "geometry/eigen_core.hpp"
#include "solver/quadrature_options.hpp"

#include <cstdint>
#include <vector>

namespace murk {

struct TargetGrid {
    std::vector<double> u_m, v_m;            // grid offsets along u_direction and v_direction
    std::vector<double> w_m;                 // offsets along w_direction: empty for a planar grid
    Eigen::Vector3d origin, u_direction, v_direction, w_direction;  // world frame, unit length
    Eigen::Matrix3Xd points;                 // point (i, j, l) in column (i * v.size() + j) * nw() + l
    std::vector<double> size_m;              // the target sizes (largest half-extent)
    std::vector<Eigen::Matrix3d> polarization;  // M (m^3) of the target at each size
    std::vector<double> reach_m;             // per size: largest distance from the dipole to the target's surface
    std::string object;                      // the [[object]] that is the target
    std::size_t size() const { return static_cast<std::size_t>(points.cols()); }
    bool planar() const { return w_m.empty(); }
    std::size_t nw() const { return planar() ? 1 : w_m.size(); }
};

// Reads the grid, sizes and target from the case and works out the target's tensor at
// each size (`quad` for the ones computed by boundary elements). InputError (file, line,
// key) when the case has no [sweep] with a [sweep.grid], when the grid has more than
// kMaxLayoutTargets points (case_limits.hpp), when the sweep varies anything but size,
// or when the target cannot be meshed at a size.
TargetGrid target_grid(const CaseSpec& spec, const QuadratureOptions& quad = {});

}  // namespace murk
