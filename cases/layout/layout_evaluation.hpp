#pragma once
// Evaluating one layout on the common targets: its body factored once, its readings'
// lead fields (one transposed solve each), then for every target position and size
// only field evaluations: the sensitivity map, the baseline field, the dipole
// p = M E_b(c), the reading change L b(p), and from it d', P_D, the detectable area,
// range and outline; when [detection] gives localization_accuracy, the bound on the
// target's position (layout_localization.hpp).
#include "cases/input/case_spec.hpp"
#include "cases/layout/layout_quantities.hpp"
#include "cases/layout/target_grid.hpp"
#include "cases/layout/target_placement.hpp"
#include "solver/quadrature_options.hpp"

namespace murk {

// The scene every layout shares except for its electrodes: the case of the layout
// without the target object.
CaseSpec layout_fixed_case(const CaseSpec& spec, std::size_t layout, const TargetGrid& grid);

LayoutQuantities evaluate_layout(const CaseSpec& spec, std::size_t layout, const TargetGrid& grid,
                                 const TargetPlacement& placement, const QuadratureOptions& quad);

// Reading change (readings) of a dipole p at grid point j from a sensitivity map.
Eigen::VectorXd change_for_dipole(const Eigen::MatrixXd& sensitivity, Eigen::Index j, const Eigen::Vector3d& p);

}  // namespace murk
