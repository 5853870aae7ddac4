#include "solver/system_entries.hpp"

#include "geometry/internal_check.hpp"
#include "solver/layer_blocks.hpp"
#include "solver/tank.hpp"

#include <numeric>

namespace murk {

namespace {
// Interior potential coefficient of q on a membrane: phi_in = u + rho_s * sigma_w * q
// (as in bem_system_impl.hpp).
template <class S>
S membrane_factor(const Scene<S>& scene, const Surface<S>& surface) {
    return surface.kind == InterfaceKind::membrane ? surface.membrane_resistance * scene.water_conductivity : S(0);
}
}  // namespace

template <class S>
SystemEntries<S>::SystemEntries(const Scene<S>& scene, const QuadratureOptions& options)
    : scene_(&scene), options_(options), layout_(system_layout(scene)) {
    const Eigen::Index n = layout_.electrode_offset;
    surface_of_.resize(n), panel_of_.resize(n), interior_row_.assign(n, 0), q_column_.assign(n, 0);
    points_.resize(3, n);
    for (std::size_t s = 0; s < scene.surfaces.size(); ++s) {
        panels_.emplace_back(scene.surfaces[s].mesh);
        const PanelSet& p = panels_.back();
        const auto& block = layout_.surfaces[s];
        for (int side = 0; side < (block.two_sided ? 2 : 1); ++side)
            for (Eigen::Index k = 0; k < block.panels; ++k) {
                const Eigen::Index u = block.offset + side * block.panels + k;
                surface_of_[u] = int(s), panel_of_[u] = k;
                points_.col(u) = p.centroid.col(k);
                interior_row_[u] = side == 1;
                q_column_[u] = side == 1 || (!block.two_sided && scene.surfaces[s].panel_electrode[k] >= 0);
            }
        // Gauss's law closes each row of the surface's own double layer (layer_blocks.hpp);
        // seen from a tank's wall, its inward-oriented double layer sums to +1/2, not -1/2.
        const double gauss = scene.surfaces[s].encloses_water ? 0.5 : -0.5;
        gauss_diagonal_.push_back((gauss - double_layer_row_sums(p, options).array()).matrix());
        std::vector<Eigen::Matrix3Xd> moved;
        for (const FieldImage<S>& t : scene.images.terms) {
            Eigen::Matrix3Xd m = t.linear * p.centroid;
            m.colwise() += t.shift;
            moved.push_back(std::move(m));
        }
        imaged_.push_back(std::move(moved));
    }
    Eigen::Index panels = 0;
    for (const PanelSet& p : panels_) panel_base_.push_back(panels), panels += p.centroid.cols();
    panel_points_.resize(3, panels);
    surface_of_panel_.resize(std::size_t(panels));
    for (std::size_t s = 0; s < panels_.size(); ++s) {
        panel_points_.middleCols(panel_base_[s], panels_[s].centroid.cols()) = panels_[s].centroid;
        std::fill_n(surface_of_panel_.begin() + panel_base_[s], panels_[s].centroid.cols(), int(s));
    }
    // The right-hand side: the rows of the whole system against no columns.
    std::vector<Eigen::Index> all(std::size_t(layout_.size));
    std::iota(all.begin(), all.end(), Eigen::Index(0));
    rhs_ = assemble_block(scene, layout_, options, all, {}).rhs;
}

template <class S>
S SystemEntries<S>::entry(Eigen::Index row, Eigen::Index col) const {
    const int a = surface_of_[row], b = surface_of_[col];
    const Eigen::Index i = panel_of_[row], k = panel_of_[col];
    const bool self = a == b && i == k;
    const PanelSet& src = panels_[b];
    if (interior_row_[row]) {
        // Interior equation of surface a: only its own panels bound its interior.
        if (a != b) return S(0);
        const LayerValues v = layer_pair(panels_[a].centroid.col(i), src, k, options_, self);
        const double kk = (self ? gauss_diagonal_[a](i) : v.dbl) + (self ? 0.5 : 0.0);
        if (!q_column_[col]) return S(kk);
        const Surface<S>& surface = scene_->surfaces[a];
        return kk * membrane_factor(*scene_, surface) + (scene_->water_conductivity / surface.inner_conductivity) * v.single;
    }
    // Water equation on surface a.
    LayerValues v = layer_pair(panels_[a].centroid.col(i), src, k, options_, self);
    if (self) v.dbl = gauss_diagonal_[a](i);
    S single = v.single, dbl = v.dbl;
    const ImageSeries<S>& images = scene_->images;
    for (std::size_t t = 0; t < images.terms.size(); ++t) {
        const LayerValues w = layer_pair(imaged_[a][t].col(i), src, k, options_, false);
        single += images.terms[t].weight * w.single, dbl += images.terms[t].weight * w.dbl;
    }
    // The series' constant: a constant kernel, in the single layer only.
    if (images.constant != S(0)) single -= images.constant * S(src.area(k) / (4.0 * M_PI));
    if (q_column_[col]) return -single;
    return -dbl + S(self ? 0.5 : 0.0);
}

template <class S>
bool SystemEntries<S>::interior_kernels_differ() const {
    return scene_->surfaces.size() > 1 || !scene_->images.terms.empty() || scene_->images.constant != S(0);
}

template <class S>
typename SystemEntries<S>::UnknownRole SystemEntries<S>::role(Eigen::Index unknown) const {
    MURK_CHECK(unknown >= 0 && unknown < panel_unknowns(), "a panel unknown");
    UnknownRole r;
    const int s = surface_of_[std::size_t(unknown)];
    r.panel = panel_base_[std::size_t(s)] + panel_of_[std::size_t(unknown)];
    r.interior_row = interior_row_[std::size_t(unknown)];
    r.q_column = q_column_[std::size_t(unknown)];
    r.two_sided = layout_.surfaces[std::size_t(s)].two_sided;
    if (r.two_sided) {
        const Surface<S>& surface = scene_->surfaces[std::size_t(s)];
        r.membrane_factor = membrane_factor(*scene_, surface);
        r.conductivity_ratio = scene_->water_conductivity / surface.inner_conductivity;
    }
    return r;
}

template <class S>
void SystemEntries<S>::kernel_block(Kernel kernel, const std::vector<Eigen::Index>& rows,
                                    const std::vector<Eigen::Index>& cols, MatrixX<S>& out) const {
    out.resize(Eigen::Index(rows.size()), Eigen::Index(cols.size()));
    const bool interior = kernel == Kernel::interior_double || kernel == Kernel::interior_single;
    const bool dbl = kernel == Kernel::water_double || kernel == Kernel::interior_double;
    const ImageSeries<S>& images = scene_->images;
    for (std::size_t j = 0; j < cols.size(); ++j) {
        MURK_CHECK(cols[j] >= 0 && cols[j] < panel_count(), "a kernel's columns are panels");
        const int b = surface_of_panel_[std::size_t(cols[j])];
        const Eigen::Index k = cols[j] - panel_base_[std::size_t(b)];
        const PanelSet& src = panels_[std::size_t(b)];
        for (std::size_t i = 0; i < rows.size(); ++i) {
            MURK_CHECK(rows[i] >= 0 && rows[i] < panel_count(), "a kernel's rows are panels");
            const int a = surface_of_panel_[std::size_t(rows[i])];
            const Eigen::Index p = rows[i] - panel_base_[std::size_t(a)];
            S& value = out(Eigen::Index(i), Eigen::Index(j));
            if (interior && a != b) {
                value = S(0);
                continue;
            }
            const bool self = a == b && p == k;
            const LayerValues v = layer_pair(panels_[std::size_t(a)].centroid.col(p), src, k, options_, self);
            value = dbl ? (self ? S(gauss_diagonal_[std::size_t(a)](p)) : S(v.dbl)) : S(v.single);
            if (interior) continue;
            for (std::size_t t = 0; t < images.terms.size(); ++t) {
                const LayerValues w = layer_pair(imaged_[std::size_t(a)][t].col(p), src, k, options_, false);
                value += images.terms[t].weight * (dbl ? w.dbl : w.single);
            }
            if (!dbl && images.constant != S(0)) value -= images.constant * S(src.area(k) / (4.0 * M_PI));
        }
    }
}

template <class S>
void SystemEntries<S>::panel_block(const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols,
                                   MatrixX<S>& out) const {
    out.resize(Eigen::Index(rows.size()), Eigen::Index(cols.size()));
    for (std::size_t j = 0; j < cols.size(); ++j) {
        MURK_CHECK(cols[j] >= 0 && cols[j] < panel_unknowns(), "a block's columns are panel unknowns");
        for (std::size_t i = 0; i < rows.size(); ++i) {
            MURK_CHECK(rows[i] >= 0 && rows[i] < panel_unknowns(), "a block's rows are panel unknowns");
            out(Eigen::Index(i), Eigen::Index(j)) = entry(rows[i], cols[j]);
        }
    }
}

template <class S>
MatrixX<S> SystemEntries<S>::electrode_columns() const {
    const Eigen::Index n = panel_unknowns();
    MatrixX<S> out = MatrixX<S>::Zero(n, electrodes());
    if (electrodes() == 0) return out;
    // Electrode panels (surface, panel, electrode): their potential is the electrode's.
    struct Site { int surface; Eigen::Index panel; int electrode; };
    std::vector<Site> sites;
    for (std::size_t s = 0; s < scene_->surfaces.size(); ++s)
        if (!layout_.surfaces[s].two_sided)
            for (Eigen::Index k = 0; k < layout_.surfaces[s].panels; ++k)
                if (const int e = scene_->surfaces[s].panel_electrode[k]; e >= 0) sites.push_back({int(s), k, e});
#pragma omp parallel for schedule(dynamic, 64)
    for (Eigen::Index row = 0; row < n; ++row) {
        if (interior_row_[row]) continue;  // only sealed surfaces carry electrodes, and only their own rows see them
        const int a = surface_of_[row];
        const Eigen::Index i = panel_of_[row];
        for (const Site& site : sites) {
            const bool self = site.surface == a && site.panel == i;
            LayerValues v = layer_pair(panels_[a].centroid.col(i), panels_[site.surface], site.panel, options_, self);
            if (self) v.dbl = gauss_diagonal_[a](i);
            S dbl = v.dbl;
            const ImageSeries<S>& images = scene_->images;
            for (std::size_t t = 0; t < images.terms.size(); ++t)
                dbl += images.terms[t].weight *
                       layer_pair(imaged_[a][t].col(i), panels_[site.surface], site.panel, options_, false).dbl;
            out(row, site.electrode) += -dbl + S(self ? 0.5 : 0.0);
        }
    }
    // A tank's reference unknown (solver/tank.hpp): with no electrode held at a potential
    // it enters every wall row with coefficient 1, as add_reference_border writes it.
    if (layout_.reference >= 0 && !holds_electrode_potential(*scene_)) {
        const auto& wall = layout_.surfaces[std::size_t(tank_index(*scene_))];
        for (Eigen::Index k = 0; k < wall.panels; ++k)
            out(wall.offset + k, layout_.reference - layout_.electrode_offset) = S(1);
    }
    return out;
}

template <class S>
MatrixX<S> SystemEntries<S>::electrode_rows() const {
    std::vector<Eigen::Index> rows(static_cast<std::size_t>(electrodes())), all(static_cast<std::size_t>(layout_.size));
    std::iota(rows.begin(), rows.end(), layout_.electrode_offset);
    std::iota(all.begin(), all.end(), Eigen::Index(0));
    // Electrode rows touch no layer integrals: assembling them costs a pass over the panels.
    return assemble_block(*scene_, layout_, options_, rows, all).matrix;
}

template class SystemEntries<double>;
template class SystemEntries<Complex>;

}  // namespace murk
