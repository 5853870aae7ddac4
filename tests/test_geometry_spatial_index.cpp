// Tests of geometry/spatial_index: panel boxes and R-tree queries against brute force.
#include "geometry/shapes.hpp"
#include "geometry/spatial_index.hpp"

#include <doctest/doctest.h>

#include <algorithm>

using namespace murk;

TEST_CASE("geometry: panel boxes and R-tree box queries") {
    TriangleMesh t;
    t.vertices = {Vec3(0, 1, 2), Vec3(-1, 3, 0), Vec3(2, 0, 1)};
    t.triangles = {{0, 1, 2}};
    const BgBox b = panel_box(t, 0);
    CHECK(b.min_corner().get<0>() == -1);
    CHECK(b.min_corner().get<1>() == 0);
    CHECK(b.min_corner().get<2>() == 0);
    CHECK(b.max_corner().get<0>() == 2);
    CHECK(b.max_corner().get<1>() == 3);
    CHECK(b.max_corner().get<2>() == 2);
    const BgBox mb = mesh_box(t);
    CHECK(bg::equals(mb, b));

    const TriangleMesh s = make_icosphere(1.0, 3);
    const PanelTree tree = build_panel_tree(s);
    CHECK(tree.size() == s.size());
    const BgBox q(BgPoint(0.2, -0.3, 0.1), BgPoint(0.9, 0.4, 1.0));
    std::vector<PanelBox> hits;
    tree.query(bgi::intersects(q), std::back_inserter(hits));
    std::vector<std::size_t> got;
    for (const PanelBox& h : hits) got.push_back(h.second);
    std::sort(got.begin(), got.end());
    // Brute force: boxes overlap iff their intervals overlap on every axis.
    std::vector<std::size_t> want;
    for (std::size_t p = 0; p < s.size(); ++p) {
        bool overlap = true;
        for (int d = 0; d < 3; ++d) {
            const double lo = std::min({s.corner(p, 0)[d], s.corner(p, 1)[d], s.corner(p, 2)[d]});
            const double hi = std::max({s.corner(p, 0)[d], s.corner(p, 1)[d], s.corner(p, 2)[d]});
            const double qlo = d == 0 ? 0.2 : d == 1 ? -0.3 : 0.1, qhi = d == 0 ? 0.9 : d == 1 ? 0.4 : 1.0;
            overlap = overlap && hi >= qlo && lo <= qhi;
        }
        if (overlap) want.push_back(p);
    }
    CHECK(!want.empty());
    CHECK(got == want);
}
