#pragma once
// A closed right circular cylinder with its axis along z, centred at the origin:
// a tank's walls (cases/scene/tank_walls.hpp). The side is a grid of rings of
// n vertices (n about 2 pi radius / target_edge); each flat end is meshed by
// concentric rings whose vertex counts fall in proportion to their radius, so
// that panels stay near equilateral up to the centre, consecutive rings stitched
// by walking both in angle. Vertices lie on the true circles (the polygon
// encloses slightly less than pi r^2 h; no volume rule: a tank's inner size is
// where its walls are). Oriented outward, tags 0. InputError for bad sizes.
#include "geometry/mesh.hpp"

namespace murk {

TriangleMesh make_cylinder(double radius, double height, double target_edge);

}  // namespace murk
