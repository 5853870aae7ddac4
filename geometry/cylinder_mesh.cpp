#include "geometry/cylinder_mesh.hpp"

#include "geometry/input_error.hpp"
#include "geometry/shapes.hpp"

#include <algorithm>
#include <cmath>

namespace murk {

namespace {

// Appends a ring of `count` vertices at radius r and height z (count 1: the centre).
std::vector<int> add_ring(TriangleMesh& m, double r, double z, int count) {
    std::vector<int> ids;
    for (int j = 0; j < count; ++j) {
        const double a = 2.0 * M_PI * j / count;
        m.vertices.emplace_back(r * std::cos(a), r * std::sin(a), z);
        ids.push_back(static_cast<int>(m.vertices.size()) - 1);
    }
    return ids;
}

// A triangle turned so that its normal has a positive component along `out`.
void add_facing(TriangleMesh& m, int a, int b, int c, const Vec3& out) {
    const Vec3 n = (m.vertices[b] - m.vertices[a]).cross(m.vertices[c] - m.vertices[a]);
    if (n.dot(out) >= 0.0) m.triangles.push_back({a, b, c});
    else m.triangles.push_back({a, c, b});
}

// Band between two rings (vertex j of a ring at angle 2 pi j / size), walking
// both in angle: each step advances the ring whose next vertex comes first.
void stitch(TriangleMesh& m, const std::vector<int>& p, const std::vector<int>& q, const Vec3& out_of_flat) {
    const int np = static_cast<int>(p.size()), nq = static_cast<int>(q.size());
    int i = 0, j = 0;
    // A ring of one vertex (an end's centre) never advances: its band is a fan.
    while (j < nq || (np > 1 && i < np)) {
        const double next_p = double(i + 1) / np, next_q = double(j + 1) / nq;
        const int a = p[std::size_t(i % np)], b = q[std::size_t(j % nq)];
        if (np > 1 && i < np && (j >= nq || next_p <= next_q)) {
            const int c = p[std::size_t((i + 1) % np)];
            const Vec3 out = out_of_flat.norm() > 0 ? out_of_flat
                                                    : Vec3(m.vertices[a].x(), m.vertices[a].y(), 0.0);
            add_facing(m, a, c, b, out);
            ++i;
        } else {
            const int c = q[std::size_t((j + 1) % nq)];
            const Vec3 out = out_of_flat.norm() > 0 ? out_of_flat
                                                    : Vec3(m.vertices[b].x(), m.vertices[b].y(), 0.0);
            add_facing(m, a, c, b, out);
            ++j;
        }
    }
}

}  // namespace

TriangleMesh make_cylinder(double radius, double height, double target_edge) {
    require_positive_length(radius, "cylinder radius");
    require_positive_length(height, "cylinder height");
    require_positive_length(target_edge, "cylinder panel size");
    const double spacing = kGridSpacingFactor * target_edge;
    const int around = std::max(8, static_cast<int>(std::ceil(2.0 * M_PI * radius / spacing)));
    const int rows = std::max(1, static_cast<int>(std::ceil(height / spacing)));
    const int rings = std::max(1, static_cast<int>(std::ceil(radius / spacing)));
    const double panels = 2.0 * around * rows + 2.0 * around * rings;
    if (panels > double(kMaxGeneratedPanels))
        throw InputError("cylinder: about " + shape_number(panels) + " panels at panel size " +
                         shape_number(target_edge) + " m, more than " + std::to_string(kMaxGeneratedPanels));
    TriangleMesh m;
    // Side: rows + 1 rings of `around` vertices from the bottom to the top.
    std::vector<std::vector<int>> side;
    for (int k = 0; k <= rows; ++k) side.push_back(add_ring(m, radius, -0.5 * height + height * k / rows, around));
    for (int k = 0; k < rows; ++k) stitch(m, side[std::size_t(k)], side[std::size_t(k) + 1], Vec3::Zero());
    // Ends: from the side's edge ring inward, the counts in proportion to the radius.
    for (int end = 0; end < 2; ++end) {
        const double z = end ? 0.5 * height : -0.5 * height;
        const Vec3 out(0.0, 0.0, end ? 1.0 : -1.0);
        std::vector<int> outer = end ? side.back() : side.front();
        for (int k = rings - 1; k >= 0; --k) {
            const double r = radius * k / rings;
            const int count = k == 0 ? 1 : std::max(6, static_cast<int>(std::lround(double(around) * k / rings)));
            const std::vector<int> inner = add_ring(m, r, z, count);
            stitch(m, inner, outer, out);
            outer = inner;
        }
    }
    m.region.assign(m.triangles.size(), 0);
    m.name = "cylinder";
    return m;
}

}  // namespace murk
