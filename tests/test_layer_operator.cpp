// The fixed part's panel operator stored as layer kernels (solver/layer_operator.hpp)
// against the system matrix that assemble_system writes densely: the same
// entries, products and regions to the compression's accuracy, on a scene that
// needs four kernels (images, three surfaces, a sealed hull with electrodes) and
// on a lone membrane body that needs two. Also the reason it exists: it stores
// less than one hierarchical matrix over the unknowns does at the same tolerance.
#include "solver/layer_operator.hpp"
#include "geometry/internal_check.hpp"
#include "tests/scene_fixtures.hpp"

#include <doctest/doctest.h>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

template <class S>
Scene<S> lone_body(double panel) {
    Scene<S> scene = fixtures::mixed_scene<S>(S(0.2), S(0.1), panel);
    scene.surfaces.resize(1);  // the membrane ellipsoid alone, no images
    scene.images = ImageSeries<S>{};
    scene.electrodes.clear();
    return scene;
}

template <class S>
double relative(const MatrixX<S>& a, const MatrixX<S>& b) {
    return (a - b).norm() / b.norm();
}

// The dense panel part in the operator's tree order, for regions.
template <class S>
MatrixX<S> in_tree_order(const MatrixX<S>& a, const ClusterTree& tree) {
    const Eigen::Index n = a.rows();
    MatrixX<S> p(n, n);
    for (Eigen::Index j = 0; j < n; ++j)
        for (Eigen::Index i = 0; i < n; ++i) p(i, j) = a(tree.order[std::size_t(i)], tree.order[std::size_t(j)]);
    return p;
}

template <class S>
void check_against_assembly(const Scene<S>& scene, std::size_t kernels) {
    const SystemEntries<S> entries(scene, kQuad);
    HMatrixOptions options;
    options.leaf_size = 16;
    options.tolerance = 1e-10;
    const LayerOperator<S> op(entries, options);
    CHECK(op.kernels() == kernels);
    CHECK(op.stats().low_rank_blocks > 0);
    const Eigen::Index n = entries.panel_unknowns();
    REQUIRE(op.size() == n);
    const MatrixX<S> a = assemble_system(scene, kQuad).matrix.topLeftCorner(n, n);
    CHECK(relative<S>(op.to_dense(), a) < 1e-8);

    std::srand(3);
    const MatrixX<S> x = MatrixX<S>::Random(n, 2);
    CHECK(relative<S>(op.apply(x, false), MatrixX<S>(a * x)) < 1e-8);
    CHECK(relative<S>(op.apply(x, true), MatrixX<S>(a.transpose() * x)) < 1e-8);

    // Regions as the preconditioner asks for them: the two halves' couplings
    // (no panel in common) and a leaf's diagonal block (each panel's own
    // unknowns, with their constant).
    const ClusterTree& tree = op.tree();
    const MatrixX<S> a_p = in_tree_order(a, tree);
    const ClusterTree::Node& first = tree.nodes[std::size_t(tree.nodes[0].first_child)];
    const ClusterTree::Node& second = tree.nodes[std::size_t(tree.nodes[0].second_child)];
    int leaf = 0;
    while (!tree.nodes[std::size_t(leaf)].is_leaf()) leaf = tree.nodes[std::size_t(leaf)].first_child;
    const ClusterTree::Node& l = tree.nodes[std::size_t(leaf)];
    for (const Region r : {Region{first.begin, first.size(), second.begin, second.size()},
                           Region{second.begin, second.size(), first.begin, first.size()},
                           Region{l.begin, l.size(), l.begin, l.size()}}) {
        const MatrixX<S> block = a_p.block(r.row_begin, r.col_begin, r.rows, r.cols);
        CHECK(relative<S>(op.region_dense(r), block) < 1e-8);
        const MatrixX<S> in = MatrixX<S>::Random(r.cols, 3), in_t = MatrixX<S>::Random(r.rows, 3);
        MatrixX<S> out;
        op.region_product(r, in, false, out);
        CHECK(relative<S>(out, MatrixX<S>(block * in)) < 1e-8);
        op.region_product(r, in_t, true, out);
        CHECK(relative<S>(out, MatrixX<S>(block.transpose() * in_t)) < 1e-8);
    }
    // A region that splits a panel's two unknowns is not one of the operator's
    // (the body, surface 0, is two-sided: its panel k has unknowns k and k + panels).
    const Eigen::Index body_panels = entries.layout().surfaces[0].panels;
    Eigen::Index split = 0;
    while (tree.order[std::size_t(split)] >= body_panels) ++split;
    CHECK_THROWS_AS(op.region_dense(Region{0, split + 1, 0, n}), InternalError);
}

}  // namespace

TEST_CASE_TEMPLATE("layer kernels: images, three surfaces and electrodes, as assembled", S, double, Complex) {
    check_against_assembly(fixtures::mixed_scene<S>(S(0.2), S(0.1), 0.02), 4);
}

TEST_CASE_TEMPLATE("layer kernels: a lone membrane body needs two kernels, as assembled", S, double, Complex) {
    check_against_assembly(lone_body<S>(0.008), 2);
}

TEST_CASE("layer kernels store less than one hierarchical matrix over the unknowns") {
    // Both at the same tolerance and the same leaves in unknowns (32 panels of
    // two unknowns against 64 unknowns).
    const Scene<double> scene = lone_body<double>(0.004);
    const SystemEntries<double> entries(scene, kQuad);
    REQUIRE(entries.panel_unknowns() > 4000);
    HMatrixOptions kernels;
    kernels.leaf_size = 32;
    kernels.tolerance = 1e-7;
    HMatrixOptions unknowns = kernels;
    unknowns.leaf_size = 64;
    const LayerOperator<double> split(entries, kernels);
    const HMatrix<double> whole(
        entries.points(),
        [&entries](const std::vector<Eigen::Index>& rows, const std::vector<Eigen::Index>& cols, MatrixX<double>& out) {
            entries.panel_block(rows, cols, out);
        },
        unknowns);
    INFO("kernels " << split.stats().bytes << " B, one matrix " << whole.stats().bytes << " B");
    CHECK(double(split.stats().bytes) < 0.75 * double(whole.stats().bytes));
}
