#pragma once
// Region tags on panels: how electrodes and skin zones are marked on a body surface.
// A panel belongs to the region its centroid selects; later tagging overwrites
// earlier tagging of the same panel.
#include "geometry/mesh.hpp"

#include <functional>
#include <string>

namespace murk {

// Registers `name` under a new tag (above every tag in use, never 0) and returns it.
// InputError when the name is empty or already used on this mesh.
int add_region(TriangleMesh& mesh, const std::string& name);

// Tags with `tag` every panel whose centroid satisfies `select`; returns how many.
// InputError naming the region when no panel is selected.
std::size_t tag_where(TriangleMesh& mesh, int tag, const std::function<bool(const Vec3&)>& select);

// Ring electrode: panels whose centroid c has axial coordinate (c - axis_point) . d in
// [from, to] (m), d = axis_direction normalised. InputError for a zero direction,
// from > to, or an empty band.
std::size_t tag_band(TriangleMesh& mesh, int tag, const Vec3& axis_point, const Vec3& axis_direction, double from, double to);

// Patch electrode: panels whose centroid lies within `radius` (m) of `centre`.
// InputError for a non-positive radius or an empty patch.
std::size_t tag_disc(TriangleMesh& mesh, int tag, const Vec3& centre, double radius);

// Number of panels carrying `tag`.
std::size_t region_size(const TriangleMesh& mesh, int tag);

// InputError naming the first named region (non-empty region_names entry) that has
// no panel left, e.g. after a later region overwrote all of it.
void require_regions_nonempty(const TriangleMesh& mesh);

}  // namespace murk
