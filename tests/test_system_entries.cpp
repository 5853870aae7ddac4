// The system's entries one block at a time (solver/system_entries.hpp), which the
// compressed operator is built from, against the dense assembly of the same
// scene: the same discrete equations, entry for entry, so they agree to rounding
// (only the Gauss's-law diagonal is summed in another order).
#include "solver/system_entries.hpp"
#include "tests/scene_fixtures.hpp"

#include <cmath>

#include <doctest/doctest.h>

#include <numeric>

using namespace murk;

namespace {

const QuadratureOptions kQuad{};

template <class S>
double max_abs(const MatrixX<S>& m) {
    return m.size() ? m.cwiseAbs().maxCoeff() : 0.0;
}

}  // namespace

TEST_CASE_TEMPLATE("the system's entries block by block equal the dense assembly", S, double, Complex) {
    const Scene<S> scene = fixtures::mixed_scene<S>(S(0.2), S(0.1));
    const LinearSystem<S> full = assemble_system(scene, kQuad);
    const SystemEntries<S> entries(scene, kQuad);
    const Eigen::Index n = entries.panel_unknowns(), e = entries.electrodes();
    REQUIRE(n + e == full.layout.size);
    REQUIRE(e == 3);

    std::vector<Eigen::Index> panel(std::size_t(n), 0);
    std::iota(panel.begin(), panel.end(), Eigen::Index(0));
    MatrixX<S> part;
    entries.panel_block(panel, panel, part);
    const double scale = max_abs<S>(full.matrix);
    CHECK(max_abs<S>(part - full.matrix.topLeftCorner(n, n)) < 1e-12 * scale);
    CHECK(max_abs<S>(entries.electrode_columns() - full.matrix.topRightCorner(n, e)) < 1e-12 * scale);
    CHECK(max_abs<S>(entries.electrode_rows() - full.matrix.bottomRows(e)) == 0.0);
    CHECK(max_abs<S>(entries.rhs() - full.rhs) == 0.0);
    CHECK(entries.points().cols() == n);

    SUBCASE("a scattered block of rows and columns, in any order") {
        const std::vector<Eigen::Index> rows{n - 1, 0, 7, n / 2, 3}, cols{5, n - 2, 1, n / 3};
        MatrixX<S> block;
        entries.panel_block(rows, cols, block);
        for (std::size_t i = 0; i < rows.size(); ++i)
            for (std::size_t j = 0; j < cols.size(); ++j)
                CHECK(std::abs(block(Eigen::Index(i), Eigen::Index(j)) - full.matrix(rows[i], cols[j])) <= 1e-12 * scale);
    }
}
