#pragma once
// Dense blocks of the single- and double-layer operators: the potential at a
// set of target points due to a unit constant density on each source panel.
//
//   single(i, k) = integral over panel k of G(x_i, y) dS_y
//   dbl(i, k)    = integral over panel k of dG/dn_y(x_i, y) dS_y
//
// with G = 1/(4 pi r) (see triangle_integrals.hpp). When the targets are the
// centroids of the source panels themselves (collocation), pass
// targets_are_centroids: the diagonal then holds the self terms. The source
// panels must then form one closed surface: the double layer's diagonal is set
// so that every row sums to -1/2 (Gauss's law; the exact principal value of a
// flat panel at its centroid is 0, and the diagonal absorbs the quadrature error
// of the distant panels instead).
#include "geometry/eigen_core.hpp"
#include "solver/panel_set.hpp"
#include "solver/quadrature_options.hpp"
#include "solver/triangle_integrals.hpp"

namespace murk {

void assemble_layer_blocks(const Eigen::Matrix3Xd& targets, const PanelSet& sources,
                           const QuadratureOptions& options, bool targets_are_centroids,
                           Eigen::MatrixXd& single, Eigen::MatrixXd& dbl);

// The same into storage the caller owns (targets x sources each), so that a
// caller assembling many blocks can keep one buffer instead of allocating, and
// for a strip of the targets: with targets_are_centroids, target i is then the
// centroid of source panel i + first_target (a strip of rows of the self block).
void assemble_layer_blocks(const Eigen::Matrix3Xd& targets, const PanelSet& sources,
                           const QuadratureOptions& options, bool targets_are_centroids, Eigen::Index first_target,
                           Eigen::Ref<Eigen::MatrixXd> single, Eigen::Ref<Eigen::MatrixXd> dbl);

// One entry of those blocks: target x against source panel k, by the same rule
// choice as assemble_layer_blocks (centroid rule far, Radon rule between, closed
// form near). With is_self (x is panel k's own centroid) the single layer is the
// closed form and the double layer the principal value 0: the caller supplies
// the Gauss's-law diagonal (double_layer_row_sums). Compressed operators ask
// for entries one at a time, never for whole strips.
LayerValues layer_pair(const Vec3& x, const PanelSet& sources, Eigen::Index k, const QuadratureOptions& options,
                       bool is_self);

// For every panel i of a closed surface, the sum over the other panels k of its
// double layer at centroid i, as assemble_layer_blocks computes the entries (up
// to the order of summation); the Gauss's-law diagonal is then -1/2 minus this.
// Costs N^2 entry evaluations without storing any of them.
Eigen::VectorXd double_layer_row_sums(const PanelSet& panels, const QuadratureOptions& options);

}  // namespace murk
