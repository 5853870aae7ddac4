#pragma once
// Where on a planar grid of target positions the target is detectable: its area and
// its outline. Each grid point stands for the cell of the plane nearest to it along
// each grid direction: from half-way to the previous point to half-way to the next,
// and at the grid's ends to the end itself, so that the cells tile the grid's
// parallelogram exactly. The detectable region is the union of the cells of the
// detectable points; its outline is that union as polygons (Boost.Geometry union_),
// simplified (Douglas-Peucker, Boost.Geometry simplify) to drop the staircase of
// the cells.
#include <cstdint>
#include <vector>

namespace murk {

// The extent of each point's cell along one axis of offsets (increasing).
struct CellEdges {
    std::vector<double> low, high;
};
CellEdges cell_edges(const std::vector<double>& offsets);

// Area (m^2) of the cells whose flag is 1. flags: u.size() x v.size(), v fastest.
// sine: the sine of the angle between the grid directions (1 when square).
double flagged_area(const std::vector<double>& u, const std::vector<double>& v, const std::vector<std::uint8_t>& flags,
                    double sine);

// Volume (m^3) of the cells whose flag is 1 on a grid of three axes. flags: u.size() x
// v.size() x w.size(), w fastest. det: |det(u_direction, v_direction, w_direction)|.
double flagged_volume(const std::vector<double>& u, const std::vector<double>& v, const std::vector<double>& w,
                      const std::vector<std::uint8_t>& flags, double det);

// One ring of an outline in grid offsets (u, v), closed (last vertex = first).
struct OutlineRing {
    std::vector<double> u, v;
    bool hole = false;  // an inner ring: a region not detectable inside a detectable one
};

// The outline of the union of the flagged cells, each polygon's outer ring followed by
// its holes, simplified by `tolerance` (m, in grid offsets; 0 keeps the staircase).
// Its area in (u, v) equals flagged_area / sine before simplification.
std::vector<OutlineRing> flagged_outline(const std::vector<double>& u, const std::vector<double>& v,
                                         const std::vector<std::uint8_t>& flags, double tolerance);

}  // namespace murk
