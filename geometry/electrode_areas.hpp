#pragma once
// True areas of electrodes on analytic hulls: what the electrode cut's area rule
// aims at (electrode_cut.hpp) and what murk solve reports beside the panel area.
// Every hull is centred at the origin with its long axis along x, as shapes.hpp
// generates it; an electrode is where all its sides' levels are <= 0.
#include "geometry/electrode_cut.hpp"
#include "geometry/mesh.hpp"

#include <optional>
#include <vector>

namespace murk {

// Area (m^2) of the sphere of `radius` within `ball_radius` of `centre`: a cap of
// height h cut off by the plane through the two spheres' circle, 2 pi R h
// (Archimedes, "On the Sphere and Cylinder"); 0 or the whole sphere when the
// spheres do not meet.
double sphere_area_within(double radius, const Vec3& centre, double ball_radius);

// Area (m^2) of the box (full edge lengths `size`) within `ball_radius` of
// `centre` when that is a disc on one face, pi (r^2 - d^2) for a face at distance
// d from the centre (common practice); nullopt when the disc would cross a face
// edge or the ball meets no face.
std::optional<double> box_area_within(const Vec3& size, const Vec3& centre, double ball_radius);

// Area (m^2) of the capsule (radius, cylinder_length; cylinder_length 0 a sphere)
// where every side is <= 0, by quadrature: on a capsule, cylinder and caps
// alike, the area element is radius dx dtheta (Archimedes' hat-box theorem), so
// the area is radius times the integral over theta of the length along x that
// lies inside (Gauss-Kronrod over theta, Boost.Math; the inside intervals found
// on a fine grid in x and refined by bisection). Relative accuracy about 1e-7.
double capsule_area_where(double radius, double cylinder_length, const std::vector<ElectrodeSide>& sides);

// Area (m^2) of the ellipsoid with semi-axes (a, b, c) where every side is <= 0,
// by quadrature of |p_u x p_theta| over p = (a cos u, b sin u cos theta,
// c sin u sin theta) (the surface area element, common practice): Gauss-Kronrod
// over theta, Gauss-Legendre over each inside interval of u.
double ellipsoid_area_where(const Vec3& semi_axes, const std::vector<ElectrodeSide>& sides);

}  // namespace murk
