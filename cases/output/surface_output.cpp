#include "cases/output/surface_output.hpp"

#include <algorithm>

namespace murk {

namespace {

template <class S>
std::vector<S> to_vector(const Eigen::Matrix<S, Eigen::Dynamic, 1>& v) {
    return std::vector<S>(v.data(), v.data() + v.size());
}

}  // namespace

std::string surface_group_name(const std::string& mesh_name) {
    std::string s = mesh_name.empty() ? "surface" : mesh_name;
    std::replace(s.begin(), s.end(), '/', '_');
    return s;
}

void write_mesh(H5Group&& group, const TriangleMesh& mesh) {
    const hsize_t nv = mesh.vertices.size(), nt = mesh.size();
    std::vector<double> vertices, centroid, normal, area;
    for (const Vec3& v : mesh.vertices) vertices.insert(vertices.end(), {v.x(), v.y(), v.z()});
    std::vector<std::int32_t> triangles, region;
    for (std::size_t t = 0; t < nt; ++t) {
        for (int k = 0; k < 3; ++k) triangles.push_back(mesh.triangles[t][k]);
        region.push_back(t < mesh.region.size() ? mesh.region[t] : 0);
        const Vec3 c = mesh.centroid(t), n = mesh.normal(t);
        centroid.insert(centroid.end(), {c.x(), c.y(), c.z()});
        normal.insert(normal.end(), {n.x(), n.y(), n.z()});
        area.push_back(mesh.area(t));
    }
    group.write("vertices", vertices, {nv, 3}, "m", "vertex coordinates");
    group.write("triangles", triangles, {nt, 3}, "1", "vertex indices of each panel, counter-clockwise seen from outside");
    group.write("region", region, {nt}, "1", "region tag of each panel");
    group.write("centroid", centroid, {nt, 3}, "m", "panel centroid (collocation point)");
    group.write("normal", normal, {nt, 3}, "1", "outward unit normal of each panel");
    group.write("area", area, {nt}, "m2", "panel area");
    std::string names;
    for (std::size_t i = 0; i < mesh.region_names.size(); ++i) names += (i ? "," : "") + mesh.region_names[i];
    group.set_attribute("region_names", names);
}

template <class S>
void write_surface_values(H5Group&& group, const Surface<S>& surface, const SurfaceSolution<S>& values) {
    group.write("outer_potential", to_vector(values.outer_potential), "V", "potential on the water side of each panel");
    group.write("current_density", to_vector(values.current_density), "A m-2",
                "normal current density leaving the interior through each panel");
    if (values.inner_potential.size() > 0)
        group.write("inner_potential", to_vector(values.inner_potential), "V", "potential on the inner side of each panel");
    if (surface.kind == InterfaceKind::membrane)
        group.write("transdermal_voltage", to_vector(Eigen::Matrix<S, Eigen::Dynamic, 1>(values.inner_potential - values.outer_potential)),
                    "V", "transdermal voltage, inside minus outside, at each panel");
}

template void write_surface_values(H5Group&&, const Surface<double>&, const SurfaceSolution<double>&);
template void write_surface_values(H5Group&&, const Surface<Complex>&, const SurfaceSolution<Complex>&);

}  // namespace murk
