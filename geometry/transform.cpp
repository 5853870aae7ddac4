#include "geometry/transform.hpp"

#include "geometry/input_error.hpp"

#include <Eigen/Geometry>
#include <cmath>
#include <utility>

namespace murk {

void flip_orientation(TriangleMesh& mesh) {
    for (Triangle& t : mesh.triangles) std::swap(t[1], t[2]);
}

void transform(TriangleMesh& mesh, const Eigen::Matrix3d& rotation, const Vec3& translation) {
    for (Vec3& v : mesh.vertices) v = rotation * v + translation;
    if (rotation.determinant() < 0.0) flip_orientation(mesh);
}

void translate(TriangleMesh& mesh, const Vec3& offset) {
    for (Vec3& v : mesh.vertices) v += offset;
}

Eigen::Matrix3d rotation_from_axis_angle(const Vec3& axis, double angle) {
    const double n = axis.norm();
    if (!(std::isfinite(n) && n > 0.0)) throw InputError("rotation axis must be a non-zero finite vector");
    if (!std::isfinite(angle)) throw InputError("rotation angle must be finite");
    return Eigen::AngleAxisd(angle, axis / n).toRotationMatrix();
}

Eigen::Matrix3d rotation_from_yaw_pitch_roll(double yaw, double pitch, double roll) {
    if (!std::isfinite(yaw) || !std::isfinite(pitch) || !std::isfinite(roll))
        throw InputError("yaw, pitch and roll must be finite");
    return (Eigen::AngleAxisd(yaw, Vec3::UnitZ()) * Eigen::AngleAxisd(pitch, Vec3::UnitY()) *
            Eigen::AngleAxisd(roll, Vec3::UnitX()))
        .toRotationMatrix();
}

void mirror(TriangleMesh& mesh, const Vec3& point, const Vec3& unit_normal) {
    const double len = unit_normal.norm();
    if (!(std::isfinite(len) && len > 0.0)) throw InputError("mirror plane normal must be a non-zero finite vector");
    const Vec3 n = unit_normal / len;
    for (Vec3& v : mesh.vertices) v -= 2.0 * (v - point).dot(n) * n;
    flip_orientation(mesh);
}

}  // namespace murk
