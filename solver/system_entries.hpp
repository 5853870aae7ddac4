#pragma once
// Entries of a scene's system matrix one block at a time, without assembling
// the whole: what a compressed operator (hmatrix.hpp) asks for. The unknowns
// split in two:
//   - panel unknowns (global indices below layout.electrode_offset): each
//     belongs to one panel, and its row and column sit at the panel centroid;
//     entries between far panels are a smooth kernel, the part that compresses;
//   - the electrodes' potentials (one unknown and one row each): their columns
//     gather all panels of an electrode and their rows are current balances or
//     fixed potentials; with a tank, its reference unknown and row
//     (solver/tank.hpp) too; they form a thin border, stored dense.
// Every entry equals what assemble_system writes (bem_system_impl.hpp) up to the
// order of summation of the Gauss's-law diagonal, which is computed here once.
#include "solver/bem_system.hpp"
#include "solver/panel_set.hpp"

#include <vector>

namespace murk {

template <class S>
class SystemEntries {
public:
    SystemEntries(const Scene<S>& scene, const QuadratureOptions& options);

    const SystemLayout& layout() const { return layout_; }
    Eigen::Index panel_unknowns() const { return layout_.electrode_offset; }
    // Unknowns of the border: the electrodes, and a tank's reference.
    Eigen::Index electrodes() const { return layout_.size - layout_.electrode_offset; }
    // Point of each panel unknown (its row's and its column's).
    const Eigen::Matrix3Xd& points() const { return points_; }

    // A(rows, cols) for panel unknowns; out is resized.
    void panel_block(const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols,
                     MatrixX<S>& out) const;
    // The border: panel rows x electrode columns, and electrode rows x all columns.
    MatrixX<S> electrode_columns() const;
    MatrixX<S> electrode_rows() const;
    // The right-hand side of the whole system.
    const VectorX<S>& rhs() const { return rhs_; }

    // The same panel entries as sums of four layer kernels between panels
    // (layer_operator.hpp stores each kernel once): with i on surface a and k
    // on surface b,
    //   water_double(i, k)    the double layer at i's centroid, plus its images
    //                         (the Gauss's-law diagonal when i = k);
    //   water_single(i, k)    the single layer, plus its images and their constant;
    //   interior_double(i, k) the double layer alone, 0 unless a = b;
    //   interior_single(i, k) the single layer alone, 0 unless a = b.
    // A panel unknown's entry is a combination of them (UnknownRole).
    enum class Kernel { water_double, water_single, interior_double, interior_single };
    // Panels of all surfaces, surface after surface, and their centroids.
    Eigen::Index panel_count() const { return panel_points_.cols(); }
    const Eigen::Matrix3Xd& panel_points() const { return panel_points_; }
    void kernel_block(Kernel kernel, const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols,
                      MatrixX<S>& out) const;
    // Without images and with one surface, the interior kernels equal the water ones.
    bool interior_kernels_differ() const;
    // How a panel unknown's row and column combine the kernels:
    //   a water row (not interior_row): -water_double on a potential column,
    //     -water_single on a q column;
    //   an interior row: interior_double on a potential column, and
    //     membrane_factor * interior_double + conductivity_ratio * interior_single
    //     on a q column;
    // and on the unknowns of one panel, a constant 1/2 (times membrane_factor on
    // an interior row's q column; none on a water row's q column).
    struct UnknownRole {
        Eigen::Index panel = 0;  // in panel_count() numbering
        bool interior_row = false, q_column = false, two_sided = false;
        S membrane_factor = S(0), conductivity_ratio = S(0);  // of a two-sided surface; 0 otherwise
    };
    UnknownRole role(Eigen::Index unknown) const;

private:
    S entry(Eigen::Index row, Eigen::Index col) const;

    const Scene<S>* scene_;
    QuadratureOptions options_;
    SystemLayout layout_;
    std::vector<PanelSet> panels_;
    std::vector<Eigen::VectorXd> gauss_diagonal_;  // per surface: its own double layer's diagonal
    // Per panel unknown: surface, panel, whether its row is the interior
    // equation (else the water equation) and whether its column is q (else the
    // water-side potential; an electrode panel's unknown is q, its potential the
    // electrode's).
    std::vector<int> surface_of_;
    std::vector<Eigen::Index> panel_of_;
    std::vector<char> interior_row_, q_column_;
    Eigen::Matrix3Xd points_;
    // Per surface, per image of Scene::images: the centroids moved by the image's isometry.
    std::vector<std::vector<Eigen::Matrix3Xd>> imaged_;
    std::vector<Eigen::Index> panel_base_;  // per surface: its first panel in panel_count() numbering
    std::vector<int> surface_of_panel_;
    Eigen::Matrix3Xd panel_points_;
    VectorX<S> rhs_;
};

extern template class SystemEntries<double>;
extern template class SystemEntries<Complex>;

}  // namespace murk
