#include "cases/output/xdmf_writer.hpp"

#include "cases/output/hdf5_file.hpp"
#include "geometry/input_error.hpp"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <stdexcept>
#include <system_error>

namespace murk {

namespace {

namespace fs = std::filesystem;

// Names and paths come from case files, so they may hold any character XML reserves.
std::string xml_escaped(const std::string& text) {
    std::string out;
    for (char c : text) {
        switch (c) {
        case '&': out += "&amp;"; break;
        case '<': out += "&lt;"; break;
        case '>': out += "&gt;"; break;
        case '"': out += "&quot;"; break;
        case '\'': out += "&apos;"; break;
        default: out += c;
        }
    }
    return out;
}

std::string absolute_dataset(const std::string& path) { return path.empty() || path[0] != '/' ? "/" + path : path; }

// Last component of a group path: the grid's name ("/mesh/fish" -> "fish").
std::string grid_name(const std::string& mesh_group) {
    std::string g = mesh_group;
    while (g.size() > 1 && g.back() == '/') g.pop_back();
    const std::size_t slash = g.rfind('/');
    return slash == std::string::npos ? g : g.substr(slash + 1);
}

// One <DataItem> pointing into the HDF5 file. XDMF 3 calls the element type DataType.
std::string data_item(const std::string& indent, const std::string& dimensions, const char* type, int bytes,
                      const std::string& h5_file, const std::string& dataset) {
    return indent + "<DataItem Dimensions=\"" + dimensions + "\" DataType=\"" + type + "\" Precision=\"" +
           std::to_string(bytes) + "\" Format=\"HDF\">" + xml_escaped(h5_file) + ":" +
           xml_escaped(absolute_dataset(dataset)) + "</DataItem>\n";
}

std::string uniform_grid(const std::string& indent, const std::string& h5_file, const XdmfSurface& s) {
    if (s.vertex_count == 0 || s.triangle_count == 0)
        throw std::invalid_argument("XDMF sidecar: surface " + s.mesh_group + " has no vertices or no triangles");
    const std::string in1 = indent + "  ", in2 = indent + "    ";
    const std::string t = std::to_string(s.triangle_count), n = std::to_string(s.vertex_count);
    std::string group = absolute_dataset(s.mesh_group);
    if (group.back() != '/') group += '/';
    std::string x = indent + "<Grid Name=\"" + xml_escaped(grid_name(s.mesh_group)) + "\" GridType=\"Uniform\">\n";
    x += in1 + "<Topology TopologyType=\"Triangle\" NumberOfElements=\"" + t + "\">\n";
    x += data_item(in2, t + " 3", "Int", 4, h5_file, group + "triangles");
    x += in1 + "</Topology>\n";
    x += in1 + "<Geometry GeometryType=\"XYZ\">\n";
    x += data_item(in2, n + " 3", "Float", 8, h5_file, group + "vertices");
    x += in1 + "</Geometry>\n";
    for (const XdmfAttribute& a : s.cell_attributes) {
        x += in1 + "<Attribute Name=\"" + xml_escaped(a.name) + "\" AttributeType=\"Scalar\" Center=\"Cell\">\n";
        x += data_item(in2, t, "Float", 8, h5_file, a.dataset);
        x += in1 + "</Attribute>\n";
    }
    return x + indent + "</Grid>\n";
}

}  // namespace

void check_xdmf_file_name(const std::string& h5_file_name) {
    if (h5_file_name.find(':') != std::string::npos)
        throw InputError(h5_file_name + ": the XDMF sidecar cannot refer to a file whose name contains ':' "
                                        "(XDMF separates file and dataset with ':'); choose another output name");
}

std::string xdmf_text(const std::string& h5_file_name, const std::vector<XdmfSurface>& surfaces) {
    check_xdmf_file_name(h5_file_name);
    if (surfaces.empty()) throw std::invalid_argument("XDMF sidecar: no surfaces to describe");
    std::string x = "<?xml version=\"1.0\" encoding=\"utf-8\"?>\n";
    x += "<Xdmf Version=\"3.0\">\n  <Domain>\n";
    if (surfaces.size() == 1) {
        x += uniform_grid("    ", h5_file_name, surfaces.front());
    } else {
        x += "    <Grid Name=\"surfaces\" GridType=\"Collection\" CollectionType=\"Spatial\">\n";
        for (const XdmfSurface& s : surfaces) x += uniform_grid("      ", h5_file_name, s);
        x += "    </Grid>\n";
    }
    return x + "  </Domain>\n</Xdmf>\n";
}

void write_xdmf_sidecar(const std::string& xdmf_path, const std::string& h5_file_name_relative,
                        const std::vector<XdmfSurface>& surfaces) {
    const std::string text = xdmf_text(h5_file_name_relative, surfaces);  // fails before touching the disk
    const std::string partial = xdmf_path + ".partial";
    {
        std::ofstream out(partial, std::ios::binary | std::ios::trunc);
        if (!out) throw InputError(xdmf_path + ": cannot write the XDMF sidecar (folder missing or not writable)");
        out << text;
        out.flush();
        if (!out) {
            std::remove(partial.c_str());
            throw std::runtime_error(xdmf_path + ": writing the XDMF sidecar failed (disk full?)");
        }
    }
    std::error_code error;
    fs::rename(partial, xdmf_path, error);
    if (error) {
        std::remove(partial.c_str());
        throw InputError(xdmf_path + ": cannot put the XDMF sidecar there (" + error.message() + ")");
    }
}

std::string xdmf_sidecar_path(const std::string& h5_path) {
    return fs::path(h5_path).replace_extension(".xdmf").string();
}

void commit_with_sidecar(H5Output& output, const std::vector<XdmfSurface>& surfaces,
                         const std::function<void()>& once_named) {
    const std::string xdmf_path = xdmf_sidecar_path(output.path());
    if (!surfaces.empty()) write_xdmf_sidecar(xdmf_path, fs::path(output.path()).filename().string(), surfaces);
    try {
        output.commit(once_named);
    } catch (...) {
        std::error_code error;
        if (!surfaces.empty()) fs::remove(xdmf_path, error);
        throw;
    }
}

}  // namespace murk
