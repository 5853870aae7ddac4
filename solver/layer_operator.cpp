// The operator of layer_operator.hpp: each kernel's terms (its weights on rows
// and columns), the constant on each panel's own unknowns, the unknowns' tree
// made from the panels', and every product as a gather into panel vectors, one
// product per kernel, and a scatter back.
#include "solver/layer_operator.hpp"

#include "geometry/internal_check.hpp"

namespace murk {

template <class S>
LayerOperator<S>::LayerOperator(const SystemEntries<S>& entries, const HMatrixOptions& options) {
    using Kernel = typename SystemEntries<S>::Kernel;
    const Eigen::Index n = entries.panel_unknowns(), panels = entries.panel_count();
    std::vector<typename SystemEntries<S>::UnknownRole> roles;
    roles.reserve(std::size_t(n));
    bool any_interior = false;
    panel_of_.resize(std::size_t(n));
    unknowns_.assign(std::size_t(panels), {});
    for (Eigen::Index u = 0; u < n; ++u) {
        roles.push_back(entries.role(u));
        panel_of_[std::size_t(u)] = roles.back().panel;
        unknowns_[std::size_t(roles.back().panel)].push_back(u);
        any_interior |= roles.back().interior_row;
    }

    // The kernels, and each one's share of the rows and columns.
    std::vector<Kernel> kinds{Kernel::water_double, Kernel::water_single};
    const bool separate = any_interior && entries.interior_kernels_differ();
    if (separate) kinds.insert(kinds.end(), {Kernel::interior_double, Kernel::interior_single});
    auto add_term = [&](std::size_t kernel, auto row_weight, auto col_weight) {
        Term t;
        t.kernel = kernel;
        t.row_weight.resize(n), t.col_weight.resize(n);
        for (Eigen::Index u = 0; u < n; ++u) {
            t.row_weight(u) = row_weight(roles[std::size_t(u)]);
            t.col_weight(u) = col_weight(roles[std::size_t(u)]);
        }
        terms_.push_back(std::move(t));
    };
    using Role = typename SystemEntries<S>::UnknownRole;
    auto water = [](const Role& r) { return r.interior_row ? S(0) : S(1); };
    auto interior = [](const Role& r) { return r.interior_row ? S(1) : S(0); };
    add_term(0, water, [](const Role& r) { return r.q_column ? S(0) : S(-1); });
    add_term(1, water, [](const Role& r) { return r.q_column ? S(-1) : S(0); });
    if (any_interior) {
        // Interior rows see only their own surface, which is two-sided: a
        // one-sided surface's columns get no weight (its conductivity ratio may
        // not even be finite, a sealed surface having no interior conductivity).
        add_term(separate ? 2 : 0, interior, [](const Role& r) {
            return r.two_sided ? (r.q_column ? r.membrane_factor : S(1)) : S(0);
        });
        add_term(separate ? 3 : 1, interior,
                 [](const Role& r) { return r.two_sided && r.q_column ? r.conductivity_ratio : S(0); });
    }
    terms_of_kernel_.assign(kinds.size(), {});
    for (std::size_t t = 0; t < terms_.size(); ++t) terms_of_kernel_[terms_[t].kernel].push_back(t);

    // The constant on each panel's own unknowns (SystemEntries::UnknownRole).
    for (const auto& own : unknowns_)
        for (const Eigen::Index r : own)
            for (const Eigen::Index c : own) {
                const Role& row = roles[std::size_t(r)];
                const Role& col = roles[std::size_t(c)];
                const S value = row.interior_row ? (col.q_column ? S(0.5) * row.membrane_factor : S(0.5))
                                                 : (col.q_column ? S(0) : S(0.5));
                if (value != S(0)) diagonal_.push_back({r, c, value});
            }

    // One tree over the panels; the unknowns' tree is it with each panel's
    // unknowns side by side.
    panel_tree_ = build_cluster_tree(entries.panel_points(), options.leaf_size);
    position_.resize(std::size_t(n));
    first_unknown_position_.reserve(std::size_t(panels) + 1);
    for (Eigen::Index pp = 0; pp < panels; ++pp) {
        first_unknown_position_.push_back(Eigen::Index(tree_.order.size()));
        for (const Eigen::Index u : unknowns_[std::size_t(panel_tree_.order[std::size_t(pp)])]) {
            position_[std::size_t(u)] = Eigen::Index(tree_.order.size());
            tree_.order.push_back(u);
            panel_position_.push_back(pp);
        }
    }
    first_unknown_position_.push_back(Eigen::Index(tree_.order.size()));
    tree_.nodes = panel_tree_.nodes;
    for (ClusterTree::Node& node : tree_.nodes) {
        node.begin = first_unknown_position_[std::size_t(node.begin)];
        node.end = first_unknown_position_[std::size_t(node.end)];
    }

    double rank_sum = 0;
    for (const Kernel kind : kinds) {
        const BlockEntries<S> block = [&entries, kind](const std::vector<Eigen::Index>& rows,
                                                       const std::vector<Eigen::Index>& cols,
                                                       MatrixX<S>& out) { entries.kernel_block(kind, rows, cols, out); };
        kernels_.emplace_back(panel_tree_, block, options);
        const HMatrixStats& k = kernels_.back().stats();
        stats_.dense_blocks += k.dense_blocks, stats_.low_rank_blocks += k.low_rank_blocks;
        stats_.bytes += k.bytes, stats_.max_rank = std::max(stats_.max_rank, k.max_rank);
        rank_sum += k.mean_rank * double(k.low_rank_blocks);
        stats_.build_seconds += k.build_seconds;
    }
    stats_.mean_rank = stats_.low_rank_blocks > 0 ? rank_sum / double(stats_.low_rank_blocks) : 0.0;
    stats_.dense_bytes = double(n) * double(n) * double(sizeof(S));
}

template <class S>
MatrixX<S> LayerOperator<S>::apply(const MatrixX<S>& x, bool transposed) const {
    MURK_CHECK(x.rows() == size(), "one value per panel unknown");
    const Eigen::Index n = size(), m = x.cols(), panels = Eigen::Index(unknowns_.size());
    MatrixX<S> y = MatrixX<S>::Zero(n, m);
    for (std::size_t k = 0; k < kernels_.size(); ++k) {
        const std::vector<std::size_t>& terms = terms_of_kernel_[k];
        // The kernel's input: per term, each panel's unknowns weighted and summed.
        MatrixX<S> w = MatrixX<S>::Zero(panels, m * Eigen::Index(terms.size()));
        for (std::size_t a = 0; a < terms.size(); ++a) {
            const Term& term = terms_[terms[a]];
            const VectorX<S>& in = transposed ? term.row_weight : term.col_weight;
            for (Eigen::Index j = 0; j < m; ++j)
                for (Eigen::Index u = 0; u < n; ++u)
                    if (in(u) != S(0)) w(panel_of_[std::size_t(u)], Eigen::Index(a) * m + j) += in(u) * x(u, j);
        }
        const MatrixX<S> z = transposed ? kernels_[k].apply_transposed(w) : kernels_[k].apply(w);
        for (std::size_t a = 0; a < terms.size(); ++a) {
            const Term& term = terms_[terms[a]];
            const VectorX<S>& out = transposed ? term.col_weight : term.row_weight;
            for (Eigen::Index j = 0; j < m; ++j)
                for (Eigen::Index u = 0; u < n; ++u)
                    if (out(u) != S(0)) y(u, j) += out(u) * z(panel_of_[std::size_t(u)], Eigen::Index(a) * m + j);
        }
    }
    for (const DiagonalEntry& d : diagonal_) {
        if (transposed) y.row(d.col) += d.value * x.row(d.row);
        else y.row(d.row) += d.value * x.row(d.col);
    }
    return y;
}

template <class S>
Region LayerOperator<S>::panel_region(const Region& region) const {
    auto panels_of = [this](Eigen::Index begin, Eigen::Index count, Eigen::Index& first, Eigen::Index& size) {
        MURK_CHECK(begin >= 0 && count >= 0 && begin + count <= this->size(), "a region inside the operator");
        if (count == 0) {
            first = 0, size = 0;
            return;
        }
        first = panel_position_[std::size_t(begin)];
        const Eigen::Index end = panel_position_[std::size_t(begin + count - 1)] + 1;
        MURK_CHECK(first_unknown_position_[std::size_t(first)] == begin &&
                       first_unknown_position_[std::size_t(end)] == begin + count,
                   "a region of whole panels");
        size = end - first;
    };
    Region p;
    panels_of(region.row_begin, region.rows, p.row_begin, p.rows);
    panels_of(region.col_begin, region.cols, p.col_begin, p.cols);
    return p;
}

template <class S>
typename LayerOperator<S>::Spread LayerOperator<S>::spread(const VectorX<S>& weights, Eigen::Index begin,
                                                           Eigen::Index count, Eigen::Index first_panel) const {
    Spread s;
    for (Eigen::Index p = begin; p < begin + count; ++p) {
        const S weight = weights(tree_.order[std::size_t(p)]);
        if (weight == S(0)) continue;
        s.offset.push_back(p - begin);
        s.panel.push_back(panel_position_[std::size_t(p)] - first_panel);
        s.weight.push_back(weight);
    }
    return s;
}

template <class S>
void LayerOperator<S>::region_product(const Region& region, const MatrixX<S>& x, bool transposed,
                                      MatrixX<S>& out) const {
    MURK_CHECK(x.rows() == (transposed ? region.rows : region.cols), "one row of x per column of the region");
    const Region panels = panel_region(region);
    const Eigen::Index m = x.cols();
    const Eigen::Index in_begin = transposed ? region.row_begin : region.col_begin;
    const Eigen::Index in_count = transposed ? region.rows : region.cols;
    const Eigen::Index in_panel = transposed ? panels.row_begin : panels.col_begin;
    const Eigen::Index out_begin = transposed ? region.col_begin : region.row_begin;
    const Eigen::Index out_count = transposed ? region.cols : region.rows;
    const Eigen::Index out_panel = transposed ? panels.col_begin : panels.row_begin;
    out.setZero(out_count, m);
    MatrixX<S> z;
    for (std::size_t k = 0; k < kernels_.size(); ++k) {
        const std::vector<std::size_t>& terms = terms_of_kernel_[k];
        MatrixX<S> w = MatrixX<S>::Zero(transposed ? panels.rows : panels.cols, m * Eigen::Index(terms.size()));
        for (std::size_t a = 0; a < terms.size(); ++a) {
            const Term& term = terms_[terms[a]];
            const Spread s = spread(transposed ? term.row_weight : term.col_weight, in_begin, in_count, in_panel);
            for (Eigen::Index j = 0; j < m; ++j) s.gather(x.col(j), w.col(Eigen::Index(a) * m + j));
        }
        kernels_[k].region_product(panels, w, transposed, z);
        w.resize(0, 0);
        for (std::size_t a = 0; a < terms.size(); ++a) {
            const Term& term = terms_[terms[a]];
            const Spread s = spread(transposed ? term.col_weight : term.row_weight, out_begin, out_count, out_panel);
            for (Eigen::Index j = 0; j < m; ++j) s.scatter(z.col(Eigen::Index(a) * m + j), out.col(j));
        }
    }
    // The constant lies on each panel's own unknowns: only regions whose rows
    // and columns share panels see it.
    if (region.row_begin >= region.col_begin + region.cols || region.col_begin >= region.row_begin + region.rows) return;
    for (const DiagonalEntry& d : diagonal_) {
        const Eigen::Index i = position_[std::size_t(d.row)] - region.row_begin;
        const Eigen::Index j = position_[std::size_t(d.col)] - region.col_begin;
        if (i < 0 || i >= region.rows || j < 0 || j >= region.cols) continue;
        if (transposed) out.row(j) += d.value * x.row(i);
        else out.row(i) += d.value * x.row(j);
    }
}

template <class S>
MatrixX<S> LayerOperator<S>::region_dense(const Region& region) const {
    const Region panels = panel_region(region);
    MatrixX<S> a = MatrixX<S>::Zero(region.rows, region.cols);
    for (std::size_t k = 0; k < kernels_.size(); ++k) {
        const MatrixX<S> values = kernels_[k].region_dense(panels);
        for (const std::size_t t : terms_of_kernel_[k]) {
            const Term& term = terms_[t];
            for (Eigen::Index j = 0; j < region.cols; ++j) {
                const Eigen::Index cp = region.col_begin + j;
                const S cw = term.col_weight(tree_.order[std::size_t(cp)]);
                if (cw == S(0)) continue;
                const Eigen::Index kj = panel_position_[std::size_t(cp)] - panels.col_begin;
                for (Eigen::Index i = 0; i < region.rows; ++i) {
                    const Eigen::Index rp = region.row_begin + i;
                    const S rw = term.row_weight(tree_.order[std::size_t(rp)]);
                    if (rw != S(0)) a(i, j) += rw * values(panel_position_[std::size_t(rp)] - panels.row_begin, kj) * cw;
                }
            }
        }
    }
    for (const DiagonalEntry& d : diagonal_) {
        const Eigen::Index i = position_[std::size_t(d.row)] - region.row_begin;
        const Eigen::Index j = position_[std::size_t(d.col)] - region.col_begin;
        if (i >= 0 && i < region.rows && j >= 0 && j < region.cols) a(i, j) += d.value;
    }
    return a;
}

template <class S>
MatrixX<S> LayerOperator<S>::to_dense() const {
    const Eigen::Index n = size();
    const MatrixX<S> a_p = region_dense(Region{0, n, 0, n});
    MatrixX<S> a(n, n);
    for (Eigen::Index j = 0; j < n; ++j)
        for (Eigen::Index i = 0; i < n; ++i) a(tree_.order[std::size_t(i)], tree_.order[std::size_t(j)]) = a_p(i, j);
    return a;
}

template class LayerOperator<double>;
template class LayerOperator<Complex>;

}  // namespace murk
