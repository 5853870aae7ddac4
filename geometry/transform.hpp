#pragma once
// Rigid placement and mirroring of meshes. All keep panels oriented outward.
#include "geometry/eigen_core.hpp"
#include "geometry/mesh.hpp"

namespace murk {

// x -> rotation * x + translation for every vertex. `rotation` should be a proper
// rotation; if its determinant is negative (a reflection) the panels are reversed so
// that they still face outward.
void transform(TriangleMesh& mesh, const Eigen::Matrix3d& rotation, const Vec3& translation);

// x -> x + offset.
void translate(TriangleMesh& mesh, const Vec3& offset);

// Rotation by `angle` (radians, right-hand rule) about `axis` (any non-zero length;
// normalised here). Rodrigues' formula. Throws InputError for a zero or non-finite axis.
Eigen::Matrix3d rotation_from_axis_angle(const Vec3& axis, double angle);

// Rotation from intrinsic yaw (about z), pitch (about the new y) and roll (about the
// newest x), radians: R = Rz(yaw) * Ry(pitch) * Rx(roll). The usual aerospace
// convention for a body whose long axis is x.
Eigen::Matrix3d rotation_from_yaw_pitch_roll(double yaw, double pitch, double roll);

// Reflection across the plane through `point` with normal `unit_normal` (normalised
// here; InputError if zero). Panels are reversed so that they keep facing outward.
void mirror(TriangleMesh& mesh, const Vec3& point, const Vec3& unit_normal);

// Reverses every panel (swaps corners 1 and 2): outward <-> inward.
void flip_orientation(TriangleMesh& mesh);

}  // namespace murk
