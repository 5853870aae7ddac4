#include "geometry/regions.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace murk {
namespace {

std::string region_label(const TriangleMesh& mesh, int tag) {
    const std::string where = mesh.name.empty() ? "" : " on mesh " + in_quotes(mesh.name);
    if (tag >= 0 && static_cast<std::size_t>(tag) < mesh.region_names.size() && !mesh.region_names[tag].empty())
        return "region " + in_quotes(mesh.region_names[tag]) + where;
    return "region " + std::to_string(tag) + where;
}

std::string num(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4g", v);
    return buf;
}

}  // namespace

int add_region(TriangleMesh& mesh, const std::string& name) {
    if (name.empty()) throw InputError("region name must not be empty");
    if (std::find(mesh.region_names.begin(), mesh.region_names.end(), name) != mesh.region_names.end())
        throw InputError("region " + in_quotes(name) + " is defined twice" + (mesh.name.empty() ? "" : " on mesh " + in_quotes(mesh.name)));
    int tag = std::max<int>(1, static_cast<int>(mesh.region_names.size()));
    for (int r : mesh.region) tag = std::max(tag, r + 1);
    mesh.region_names.resize(tag + 1);
    mesh.region_names[tag] = name;
    return tag;
}

std::size_t tag_where(TriangleMesh& mesh, int tag, const std::function<bool(const Vec3&)>& select) {
    mesh.region.resize(mesh.size(), 0);
    std::size_t n = 0;
    for (std::size_t t = 0; t < mesh.size(); ++t)
        if (select(mesh.centroid(t))) {
            mesh.region[t] = tag;
            ++n;
        }
    if (n == 0) throw InputError(region_label(mesh, tag) + " selects no panel");
    return n;
}

std::size_t tag_band(TriangleMesh& mesh, int tag, const Vec3& axis_point, const Vec3& axis_direction, double from, double to) {
    const double len = axis_direction.norm();
    if (!(std::isfinite(len) && len > 0.0)) throw InputError(region_label(mesh, tag) + ": band axis direction must be non-zero");
    if (!(from <= to))
        throw InputError(region_label(mesh, tag) + ": band must have from <= to, got from " + num(from) + " m, to " + num(to) + " m");
    const Vec3 d = axis_direction / len;
    return tag_where(mesh, tag, [&](const Vec3& c) {
        const double s = (c - axis_point).dot(d);
        return s >= from && s <= to;
    });
}

std::size_t tag_disc(TriangleMesh& mesh, int tag, const Vec3& centre, double radius) {
    if (!(std::isfinite(radius) && radius > 0.0))
        throw InputError(region_label(mesh, tag) + ": patch radius must be positive, got " + num(radius) + " m");
    return tag_where(mesh, tag, [&](const Vec3& c) { return (c - centre).norm() <= radius; });
}

std::size_t region_size(const TriangleMesh& mesh, int tag) {
    return static_cast<std::size_t>(std::count(mesh.region.begin(), mesh.region.end(), tag));
}

void require_regions_nonempty(const TriangleMesh& mesh) {
    for (std::size_t tag = 1; tag < mesh.region_names.size(); ++tag)
        if (!mesh.region_names[tag].empty() && region_size(mesh, static_cast<int>(tag)) == 0)
            throw InputError(region_label(mesh, static_cast<int>(tag)) + " has no panels");
}

}  // namespace murk
