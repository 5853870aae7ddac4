#include "cases/output/surface_output.hpp"

#include "cases/output/coordinates.hpp"
#include "cases/output/result_layout.hpp"

#include <algorithm>
#include <cctype>
#include <complex>
#include <stdexcept>

namespace murk {

namespace {

template <class S>
std::vector<S> to_vector(const Eigen::Matrix<S, Eigen::Dynamic, 1>& v) {
    return std::vector<S>(v.data(), v.data() + v.size());
}

// A region name as one flag_meanings word: CF words hold no spaces.
std::string as_word(const std::string& name) {
    std::string word = name;
    for (char& c : word)
        if (std::isspace(static_cast<unsigned char>(c))) c = '_';
    return word;
}

// Region tags with their names: the named tags, and 0 as "untagged" unless it has a name.
void write_region_flags(const H5Dataset& region, const std::vector<std::string>& names) {
    std::vector<std::int32_t> values;
    std::string meanings;
    for (std::size_t tag = 0; tag < names.size(); ++tag) {
        if (names[tag].empty() && tag != 0) continue;
        values.push_back(static_cast<std::int32_t>(tag));
        meanings += (meanings.empty() ? "" : " ") + (names[tag].empty() ? std::string("untagged") : as_word(names[tag]));
    }
    region.set_flags(values, meanings);
}

}  // namespace

std::string surface_group_name(const std::string& mesh_name) {
    std::string s = mesh_name.empty() ? "surface" : mesh_name;
    std::replace(s.begin(), s.end(), '/', '_');
    return s;
}

void write_mesh(const H5Group& group, const TriangleMesh& mesh) {
    using namespace layout;
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
    index_coordinate(group, kVertex, nv, "vertex index");
    index_coordinate(group, kPanel, nt, "panel (triangle) index");
    index_coordinate(group, kCorner, 3, "corner of a triangle");
    xyz_coordinate(group);
    group.write("vertices", vertices, {nv, 3}, "m", "vertex coordinates").label_dimensions({kVertex, kXyz});
    group.write("triangles", triangles, {nt, 3}, "1", "vertex indices of each panel, counter-clockwise seen from outside")
        .label_dimensions({kPanel, kCorner});
    const H5Dataset tags = group.write("region", region, {nt}, "1", "region tag of each panel");
    tags.label_dimensions({kPanel});
    if (!mesh.region_names.empty()) write_region_flags(tags, mesh.region_names);
    group.write("centroid", centroid, {nt, 3}, "m", "panel centroid (collocation point)").label_dimensions({kPanel, kXyz});
    group.write("normal", normal, {nt, 3}, "1", "outward unit normal of each panel").label_dimensions({kPanel, kXyz});
    group.write("area", area, {nt}, "m2", "panel area").label_dimensions({kPanel});
    std::string names;
    for (std::size_t i = 0; i < mesh.region_names.size(); ++i) names += (i ? "," : "") + mesh.region_names[i];
    group.set_attribute("region_names", names);
}

template <class S>
void write_surface_values(const H5Group& group, const Surface<S>& surface, const SurfaceSolution<S>& values) {
    using layout::kPanel;
    index_coordinate(group, kPanel, surface.mesh.size(), "panel (triangle) index");
    group.write("outer_potential", to_vector(values.outer_potential), "V", "potential on the water side of each panel")
        .label_dimensions({kPanel});
    group.write("current_density", to_vector(values.current_density), "A m-2",
                "normal current density leaving the interior through each panel")
        .label_dimensions({kPanel});
    if (values.inner_potential.size() > 0)
        group.write("inner_potential", to_vector(values.inner_potential), "V", "potential on the inner side of each panel")
            .label_dimensions({kPanel});
    if (surface.kind == InterfaceKind::membrane)
        group.write(layout::kTransdermal,
                    to_vector(Eigen::Matrix<S, Eigen::Dynamic, 1>(values.inner_potential - values.outer_potential)), "V",
                    "transdermal voltage, inside minus outside, at each panel")
            .label_dimensions({kPanel});
}

template void write_surface_values(const H5Group&, const Surface<double>&, const SurfaceSolution<double>&);
template void write_surface_values(const H5Group&, const Surface<Complex>&, const SurfaceSolution<Complex>&);

std::vector<XdmfAttribute> sidecar_fields(const H5Group& group, const std::string& name, const std::string& label,
                                          const char* dimension) {
    const H5Dataset source = group.dataset(name);
    const std::string units = source.string_attribute("units");
    const bool complex_values = source.kind() == H5Kind::complex;
    std::vector<double> size;
    if (complex_values) {
        for (const auto& z : source.read<std::complex<double>>().values) size.push_back(std::abs(z));
    } else {
        for (double v : source.read<double>().values) size.push_back(std::abs(v));
    }
    const std::string magnitude = name + "_magnitude";
    group.write(magnitude, size, source.shape(), units, "magnitude of the " + source.string_attribute("long_name"))
        .label_dimensions({dimension});
    const std::string prefix = group.path() + "/";
    if (complex_values) return {{"|" + label + "| (" + units + ", magnitude of a complex value)", prefix + magnitude}};
    return {{label + " (" + units + ")", prefix + name}, {"|" + label + "| (" + units + ")", prefix + magnitude}};
}

}  // namespace murk
