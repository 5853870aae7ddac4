#include "cases/layout/detectable_region.hpp"

#include "geometry/internal_check.hpp"

// With -O3 GCC 12 reports the rescale factor in Boost.Geometry's get_rescale_policy.hpp
// (reached from union_) as maybe used uninitialized: a report on Boost's own lines, not on
// murk's, silenced for those lines alone (as geometry/exact_predicates.cpp does for
// Boost.Multiprecision).
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#include <boost/geometry.hpp>
#include <boost/geometry/geometries/multi_polygon.hpp>
#include <boost/geometry/geometries/point_xy.hpp>
#include <boost/geometry/geometries/polygon.hpp>
#pragma GCC diagnostic pop

namespace murk {

namespace bg = boost::geometry;
using Point2 = bg::model::d2::point_xy<double>;
using Polygon2 = bg::model::polygon<Point2>;  // clockwise, closed
using Region2 = bg::model::multi_polygon<Polygon2>;

CellEdges cell_edges(const std::vector<double>& x) {
    CellEdges e;
    for (std::size_t i = 0; i < x.size(); ++i) {
        e.low.push_back(i == 0 ? x[i] : 0.5 * (x[i - 1] + x[i]));
        e.high.push_back(i + 1 == x.size() ? x[i] : 0.5 * (x[i] + x[i + 1]));
    }
    return e;
}

double flagged_area(const std::vector<double>& u, const std::vector<double>& v, const std::vector<std::uint8_t>& flags,
                    double sine) {
    MURK_CHECK(flags.size() == u.size() * v.size(), "one flag per grid point");
    const CellEdges cu = cell_edges(u), cv = cell_edges(v);
    double area = 0;
    for (std::size_t i = 0; i < u.size(); ++i)
        for (std::size_t j = 0; j < v.size(); ++j)
            if (flags[i * v.size() + j]) area += (cu.high[i] - cu.low[i]) * (cv.high[j] - cv.low[j]);
    return area * sine;
}

double flagged_volume(const std::vector<double>& u, const std::vector<double>& v, const std::vector<double>& w,
                      const std::vector<std::uint8_t>& flags, double det) {
    MURK_CHECK(flags.size() == u.size() * v.size() * w.size(), "one flag per grid point");
    const CellEdges cu = cell_edges(u), cv = cell_edges(v), cw = cell_edges(w);
    double volume = 0;
    for (std::size_t i = 0; i < u.size(); ++i)
        for (std::size_t j = 0; j < v.size(); ++j)
            for (std::size_t l = 0; l < w.size(); ++l)
                if (flags[(i * v.size() + j) * w.size() + l])
                    volume += (cu.high[i] - cu.low[i]) * (cv.high[j] - cv.low[j]) * (cw.high[l] - cw.low[l]);
    return volume * det;
}

namespace {

Polygon2 rectangle(double u0, double u1, double v0, double v1) {
    Polygon2 p;
    bg::append(p.outer(), Point2(u0, v0));
    bg::append(p.outer(), Point2(u0, v1));
    bg::append(p.outer(), Point2(u1, v1));
    bg::append(p.outer(), Point2(u1, v0));
    bg::append(p.outer(), Point2(u0, v0));
    bg::correct(p);
    return p;
}

// Union of the regions first .. last-1, pairwise (a balanced tree of unions keeps each
// union small, where adding one piece at a time would redo the growing whole each time).
Region2 union_of(std::vector<Region2>& parts, std::size_t first, std::size_t last) {
    if (last - first == 1) return parts[first];
    const std::size_t mid = first + (last - first) / 2;
    const Region2 a = union_of(parts, first, mid), b = union_of(parts, mid, last);
    Region2 out;
    bg::union_(a, b, out);
    return out;
}

OutlineRing ring_of(const bg::model::ring<Point2>& r, bool hole) {
    OutlineRing out;
    out.hole = hole;
    for (const Point2& p : r) {
        out.u.push_back(p.x());
        out.v.push_back(p.y());
    }
    return out;
}

}  // namespace

std::vector<OutlineRing> flagged_outline(const std::vector<double>& u, const std::vector<double>& v,
                                         const std::vector<std::uint8_t>& flags, double tolerance) {
    MURK_CHECK(flags.size() == u.size() * v.size(), "one flag per grid point");
    const CellEdges cu = cell_edges(u), cv = cell_edges(v);
    // Runs of flagged cells along v in each u column become one rectangle each.
    std::vector<Region2> parts;
    for (std::size_t i = 0; i < u.size(); ++i) {
        if (cu.high[i] <= cu.low[i]) continue;  // a one-point axis has cells of no width
        for (std::size_t j = 0; j < v.size();) {
            if (!flags[i * v.size() + j]) { ++j; continue; }
            std::size_t end = j;
            while (end < v.size() && flags[i * v.size() + end]) ++end;
            if (cv.high[end - 1] > cv.low[j]) parts.push_back(Region2{rectangle(cu.low[i], cu.high[i], cv.low[j], cv.high[end - 1])});
            j = end;
        }
    }
    std::vector<OutlineRing> out;
    if (parts.empty()) return out;
    Region2 region = union_of(parts, 0, parts.size());
    if (tolerance > 0) {
        Region2 simple;
        bg::simplify(region, simple, tolerance);
        region = simple;
    }
    for (const Polygon2& p : region) {
        out.push_back(ring_of(p.outer(), false));
        for (const auto& inner : p.inners()) out.push_back(ring_of(inner, true));
    }
    return out;
}

}  // namespace murk
