#include "geometry/mesh_io.hpp"

#include "geometry/input_error.hpp"
#include "geometry/vertex_welding.hpp"

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <iomanip>
#include <limits>
#include <map>
#include <set>
#include <sstream>
#include <tuple>
#include <unordered_map>

namespace murk {
namespace {

constexpr long long kMaxRegionTag = 100000;

std::string read_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path + ": cannot open file for reading (" + std::strerror(errno) + ")");
    std::ostringstream s;
    s << in.rdbuf();
    if (in.bad()) throw InputError(path + ": error while reading the file");
    return s.str();
}

std::string stem(const std::string& path) {
    const std::size_t slash = path.find_last_of("/\\");
    std::string name = slash == std::string::npos ? path : path.substr(slash + 1);
    const std::size_t dot = name.find_last_of('.');
    return dot == std::string::npos || dot == 0 ? name : name.substr(0, dot);
}

std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

void check_scale(const std::string& path, double scale) {
    if (!(std::isfinite(scale) && scale > 0.0))
        throw InputError(path + ": length scale must be a positive number, got " + std::to_string(scale));
}

std::string shown(const std::string& token) {
    return token.size() > 40 ? "'" + token.substr(0, 40) + "...'" : "'" + token + "'";
}

// A whitespace-separated token with its 1-based line.
struct Token {
    std::string text;
    std::size_t line;
};

std::vector<std::vector<Token>> tokenize_lines(const std::string& text) {
    std::vector<std::vector<Token>> lines;
    std::size_t line = 1, i = 0;
    lines.emplace_back();
    while (i < text.size()) {
        const char c = text[i];
        if (c == '\n') {
            ++line;
            lines.emplace_back();
            ++i;
        } else if (std::isspace(static_cast<unsigned char>(c))) {
            ++i;
        } else {
            const std::size_t start = i;
            while (i < text.size() && !std::isspace(static_cast<unsigned char>(text[i]))) ++i;
            lines.back().push_back({text.substr(start, i - start), line});
        }
    }
    return lines;
}

double parse_double(const std::string& path, const Token& t) {
    const char* s = t.text.c_str();
    char* end = nullptr;
    errno = 0;
    const double v = std::strtod(s, &end);
    if (end == s || *end != '\0' || !std::isfinite(v) || errno == ERANGE)
        throw InputError(path + ":" + std::to_string(t.line) + ": expected a finite number, found " + shown(t.text));
    return v;
}

long long parse_int(const std::string& path, const Token& t) {
    const char* s = t.text.c_str();
    char* end = nullptr;
    errno = 0;
    const long long v = std::strtoll(s, &end, 10);
    if (end == s || *end != '\0' || errno == ERANGE)
        throw InputError(path + ":" + std::to_string(t.line) + ": expected an integer, found " + shown(t.text));
    return v;
}

// ---------------------------------------------------------------- STL

TriangleMesh read_stl_ascii(const std::string& path, const std::string& text) {
    // Flatten to a token stream, dropping solid names (the rest of "solid"/"endsolid" lines).
    std::vector<Token> toks;
    for (const auto& line : tokenize_lines(text)) {
        if (line.empty()) continue;
        const std::string head = lower(line[0].text);
        if (head == "solid" || head == "endsolid")
            toks.push_back({head, line[0].line});
        else
            for (const Token& t : line) toks.push_back(t);
    }
    TriangleMesh m;
    std::size_t i = 0;
    const std::size_t last_line = toks.empty() ? 1 : toks.back().line;
    auto next = [&](const char* expected) -> const Token& {
        if (i >= toks.size())
            throw InputError(path + ":" + std::to_string(last_line) + ": file ends where '" + expected + "' was expected");
        return toks[i++];
    };
    auto expect = [&](const char* word) {
        const Token& t = next(word);
        if (lower(t.text) != word)
            throw InputError(path + ":" + std::to_string(t.line) + ": expected '" + word + "', found " + shown(t.text));
    };
    auto number = [&]() { return parse_double(path, next("a number")); };
    bool in_solid = false;
    while (i < toks.size()) {
        const Token& t = toks[i++];
        const std::string w = lower(t.text);
        if (!in_solid) {
            if (w != "solid")
                throw InputError(path + ":" + std::to_string(t.line) + ": expected 'solid', found " + shown(t.text));
            in_solid = true;
        } else if (w == "endsolid") {
            in_solid = false;
        } else if (w == "facet") {
            expect("normal");
            for (int k = 0; k < 3; ++k) number();
            expect("outer");
            expect("loop");
            Triangle tri;
            for (int k = 0; k < 3; ++k) {
                expect("vertex");
                const double x = number(), y = number(), z = number();
                m.vertices.emplace_back(x, y, z);
                tri[k] = static_cast<int>(m.vertices.size()) - 1;
            }
            expect("endloop");
            expect("endfacet");
            m.triangles.push_back(tri);
        } else {
            throw InputError(path + ":" + std::to_string(t.line) + ": expected 'facet' or 'endsolid', found " + shown(t.text));
        }
    }
    if (in_solid) throw InputError(path + ":" + std::to_string(last_line) + ": file ends without 'endsolid'");
    return m;
}

template <class T>
T load_le(const std::string& bytes, std::size_t at) {
    T v;
    std::memcpy(&v, bytes.data() + at, sizeof v);  // STL is little-endian, like every host murk targets
    return v;
}

TriangleMesh read_stl_binary(const std::string& path, const std::string& bytes) {
    const std::uint32_t n = load_le<std::uint32_t>(bytes, 80);
    TriangleMesh m;
    m.vertices.reserve(3 * std::size_t{n});
    m.triangles.reserve(n);
    for (std::uint32_t t = 0; t < n; ++t) {
        const std::size_t base = 84 + 50 * std::size_t{t} + 12;  // skip the facet normal
        Triangle tri;
        for (int k = 0; k < 3; ++k) {
            Vec3 v;
            for (int d = 0; d < 3; ++d) v[d] = load_le<float>(bytes, base + 12 * k + 4 * d);
            if (!v.allFinite())
                throw InputError(path + ": binary STL triangle " + std::to_string(t + 1) + " (byte " + std::to_string(base) +
                                 ") has a non-finite coordinate");
            m.vertices.push_back(v);
            tri[k] = static_cast<int>(m.vertices.size()) - 1;
        }
        m.triangles.push_back(tri);
    }
    return m;
}

bool looks_like_text(const std::string& bytes) {
    const std::size_t n = std::min<std::size_t>(bytes.size(), 4096);
    for (std::size_t i = 0; i < n; ++i) {
        const auto c = static_cast<unsigned char>(bytes[i]);
        if (!(std::isprint(c) || std::isspace(c))) return false;
    }
    return true;
}

bool starts_with_solid(const std::string& bytes) {
    std::size_t i = 0;
    while (i < bytes.size() && std::isspace(static_cast<unsigned char>(bytes[i]))) ++i;
    return lower(bytes.substr(i, 5)) == "solid";
}

// ---------------------------------------------------------------- MSH

struct MshLines {
    const std::string& path;
    std::vector<std::vector<Token>> lines;
    std::size_t at = 0;  // next line index

    std::string where(std::size_t index) const { return path + ":" + std::to_string(index + 1); }
    // Next non-empty line; `what` describes what was expected, for the error.
    const std::vector<Token>& next(const std::string& what) {
        while (at < lines.size() && lines[at].empty()) ++at;
        if (at >= lines.size()) throw InputError(path + ":" + std::to_string(lines.size()) + ": file ends where " + what + " was expected");
        return lines[at++];
    }
    const std::vector<Token>& need(const std::string& what, std::size_t min_tokens) {
        const auto& l = next(what);
        if (l.size() < min_tokens)
            throw InputError(where(at - 1) + ": expected " + what + " (at least " + std::to_string(min_tokens) + " values), found " +
                             std::to_string(l.size()));
        return l;
    }
    void expect_end(const std::string& section) {
        const auto& l = next("$End" + section);
        if (l[0].text != "$End" + section)
            throw InputError(where(at - 1) + ": expected $End" + section + ", found " + shown(l[0].text));
    }
    void skip_section(const std::string& section) {
        while (true) {
            const auto& l = next("$End" + section);
            if (l[0].text == "$End" + section) return;
        }
    }
    long long count(const Token& t, const char* what) {
        const long long v = parse_int(path, t);
        if (v < 0) throw InputError(path + ":" + std::to_string(t.line) + ": " + what + " must not be negative, found " + t.text);
        return v;
    }
};

struct MshTriangle {
    long long nodes[3];
    long long region;
    std::size_t line;
};

int region_tag(const std::string& path, const Token& t) {
    const long long v = parse_int(path, t);
    if (v < 0 || v > kMaxRegionTag)
        throw InputError(path + ":" + std::to_string(t.line) + ": physical tag must lie in 0.." + std::to_string(kMaxRegionTag) +
                         ", found " + t.text);
    return static_cast<int>(v);
}

void read_physical_names(MshLines& in, std::vector<std::string>& names) {
    const auto& head = in.need("the number of physical names", 1);
    const long long n = in.count(head[0], "number of physical names");
    for (long long k = 0; k < n; ++k) {
        const auto& l = in.need("'dimension tag \"name\"'", 3);
        const long long dim = parse_int(in.path, l[0]);
        const int tag = region_tag(in.path, l[1]);
        std::string name = l[2].text;
        for (std::size_t j = 3; j < l.size(); ++j) name += " " + l[j].text;
        if (name.size() < 2 || name.front() != '"' || name.back() != '"')
            throw InputError(in.where(in.at - 1) + ": expected a physical name in double quotes, found " + shown(name));
        if (dim != 2) continue;  // volumes, curves, points: not panels
        if (names.size() <= static_cast<std::size_t>(tag)) names.resize(tag + 1);
        names[tag] = name.substr(1, name.size() - 2);
    }
    in.expect_end("PhysicalNames");
}

void read_nodes_v2(MshLines& in, std::unordered_map<long long, Vec3>& nodes) {
    const long long n = in.count(in.need("the number of nodes", 1)[0], "number of nodes");
    for (long long k = 0; k < n; ++k) {
        const auto& l = in.need("'node-number x y z'", 4);
        nodes[parse_int(in.path, l[0])] = Vec3(parse_double(in.path, l[1]), parse_double(in.path, l[2]), parse_double(in.path, l[3]));
    }
    in.expect_end("Nodes");
}

void read_elements_v2(MshLines& in, std::vector<MshTriangle>& tris) {
    const long long n = in.count(in.need("the number of elements", 1)[0], "number of elements");
    std::set<std::tuple<long long, long long, long long, long long>> seen;  // nodes + elementary tag
    for (long long k = 0; k < n; ++k) {
        const auto& l = in.need("'elm-number elm-type number-of-tags tags... nodes...'", 3);
        if (parse_int(in.path, l[1]) != 2) continue;
        const long long ntags = in.count(l[2], "number of tags");
        if (static_cast<long long>(l.size()) < 3 + ntags + 3)
            throw InputError(in.where(in.at - 1) + ": triangle needs " + std::to_string(ntags) + " tags and 3 nodes, found " +
                             std::to_string(l.size() - 3) + " values");
        MshTriangle t;
        t.region = ntags >= 1 ? region_tag(in.path, l[3]) : 0;
        const long long elementary = ntags >= 2 ? parse_int(in.path, l[4]) : 0;
        for (int j = 0; j < 3; ++j) t.nodes[j] = parse_int(in.path, l[3 + ntags + j]);
        t.line = l[0].line;
        // Repeats of one element for several physical groups carry the same elementary tag.
        if (ntags < 2 || seen.emplace(t.nodes[0], t.nodes[1], t.nodes[2], elementary).second) tris.push_back(t);
    }
    in.expect_end("Elements");
}

void read_entities_v4(MshLines& in, std::map<long long, int>& surface_region) {
    const auto& head = in.need("'numPoints numCurves numSurfaces numVolumes'", 4);
    long long count[4];
    for (int d = 0; d < 4; ++d) count[d] = in.count(head[d], "number of entities");
    for (long long k = 0; k < count[0] + count[1]; ++k) in.next("a point or curve entity");
    for (long long k = 0; k < count[2]; ++k) {
        // surfaceTag minX minY minZ maxX maxY maxZ numPhysicalTags physicalTag ... numBoundingCurves ...
        const auto& l = in.need("a surface entity", 8);
        const long long nphys = in.count(l[7], "number of physical tags");
        if (static_cast<long long>(l.size()) < 8 + nphys)
            throw InputError(in.where(in.at - 1) + ": surface entity lists " + std::to_string(nphys) + " physical tags but has only " +
                             std::to_string(l.size() - 8) + " values after the count");
        surface_region[parse_int(in.path, l[0])] = nphys > 0 ? region_tag(in.path, l[8]) : 0;
    }
    for (long long k = 0; k < count[3]; ++k) in.next("a volume entity");
    in.expect_end("Entities");
}

void read_nodes_v4(MshLines& in, std::unordered_map<long long, Vec3>& nodes) {
    const auto& head = in.need("'numEntityBlocks numNodes minNodeTag maxNodeTag'", 4);
    const long long blocks = in.count(head[0], "number of node blocks");
    for (long long b = 0; b < blocks; ++b) {
        const auto& bl = in.need("'entityDim entityTag parametric numNodesInBlock'", 4);
        const long long nb = in.count(bl[3], "number of nodes in block");
        std::vector<long long> tags(nb);
        for (long long k = 0; k < nb; ++k) tags[k] = parse_int(in.path, in.need("a node tag", 1)[0]);
        for (long long k = 0; k < nb; ++k) {
            const auto& l = in.need("'x y z'", 3);
            nodes[tags[k]] = Vec3(parse_double(in.path, l[0]), parse_double(in.path, l[1]), parse_double(in.path, l[2]));
        }
    }
    in.expect_end("Nodes");
}

void read_elements_v4(MshLines& in, const std::map<long long, int>& surface_region, std::vector<MshTriangle>& tris) {
    const auto& head = in.need("'numEntityBlocks numElements minElementTag maxElementTag'", 4);
    const long long blocks = in.count(head[0], "number of element blocks");
    for (long long b = 0; b < blocks; ++b) {
        const auto& bl = in.need("'entityDim entityTag elementType numElementsInBlock'", 4);
        const long long entity = parse_int(in.path, bl[1]);
        const long long type = parse_int(in.path, bl[2]);
        const long long ne = in.count(bl[3], "number of elements in block");
        long long region = 0;
        if (type == 2) {
            const auto it = surface_region.find(entity);
            region = it == surface_region.end() ? 0 : it->second;
        }
        for (long long k = 0; k < ne; ++k) {
            const auto& l = in.need("an element line", 1);
            if (type != 2) continue;
            if (l.size() < 4)
                throw InputError(in.where(in.at - 1) + ": triangle needs a tag and 3 nodes, found " + std::to_string(l.size()) + " values");
            MshTriangle t;
            t.region = region;
            for (int j = 0; j < 3; ++j) t.nodes[j] = parse_int(in.path, l[1 + j]);
            t.line = l[0].line;
            tris.push_back(t);
        }
    }
    in.expect_end("Elements");
}

void write_or_fail(std::ofstream& out, const std::string& path) {
    out.close();
    if (!out) throw InputError(path + ": error while writing the file");
}

}  // namespace

TriangleMesh read_stl(const std::string& path, double scale) {
    check_scale(path, scale);
    const std::string bytes = read_file(path);
    const bool text = starts_with_solid(bytes) && looks_like_text(bytes);
    bool binary_size = false;
    std::uint32_t n = 0;
    if (bytes.size() >= 84) {
        n = load_le<std::uint32_t>(bytes, 80);
        binary_size = bytes.size() == 84 + 50 * std::uint64_t{n};
    }
    TriangleMesh m;
    if (text || (!binary_size && starts_with_solid(bytes)))
        m = read_stl_ascii(path, bytes);
    else if (binary_size)
        m = read_stl_binary(path, bytes);
    else
        throw InputError(path + ": not an STL file: it neither starts with 'solid' (ASCII STL) nor has the size of a binary STL (" +
                         std::to_string(bytes.size()) + " bytes" +
                         (bytes.size() >= 84 ? ", but its header announces " + std::to_string(n) + " triangles = " +
                                                   std::to_string(84 + 50 * std::uint64_t{n}) + " bytes)"
                                             : ", less than the 84-byte binary header)"));
    if (m.triangles.empty()) throw InputError(path + ": contains no triangles");
    for (Vec3& v : m.vertices) v *= scale;
    weld_vertices(m, default_weld_tolerance(m));
    m.region.assign(m.triangles.size(), 0);
    m.name = stem(path);
    return m;
}

TriangleMesh read_msh(const std::string& path, double scale) {
    check_scale(path, scale);
    MshLines in{path, tokenize_lines(read_file(path))};
    const auto& first = in.next("$MeshFormat");
    if (first[0].text != "$MeshFormat")
        throw InputError(in.where(in.at - 1) + ": not a Gmsh MSH file: expected $MeshFormat, found " + shown(first[0].text));
    const auto& fmt = in.need("'version file-type data-size'", 3);
    const std::string version = fmt[0].text;
    const bool v2 = version.size() >= 2 && version.compare(0, 2, "2.") == 0;
    const bool v41 = version == "4.1";
    if (!v2 && !v41)
        throw InputError(in.where(in.at - 1) + ": MSH version " + version + " is not supported; save as version 2.2 or 4.1 ASCII");
    if (fmt[1].text != "0")
        throw InputError(in.where(in.at - 1) + ": binary MSH is not supported; save the mesh as ASCII (file-type 0)");
    in.expect_end("MeshFormat");

    std::vector<std::string> names;
    std::unordered_map<long long, Vec3> nodes;
    std::map<long long, int> surface_region;
    std::vector<MshTriangle> tris;
    bool have_nodes = false, have_elements = false;
    while (true) {
        while (in.at < in.lines.size() && in.lines[in.at].empty()) ++in.at;
        if (in.at >= in.lines.size()) break;
        const auto& l = in.lines[in.at++];
        const std::string& s = l[0].text;
        if (s == "$PhysicalNames") {
            read_physical_names(in, names);
        } else if (s == "$Entities" && v41) {
            read_entities_v4(in, surface_region);
        } else if (s == "$Nodes") {
            v2 ? read_nodes_v2(in, nodes) : read_nodes_v4(in, nodes);
            have_nodes = true;
        } else if (s == "$Elements") {
            if (!have_nodes) throw InputError(in.where(in.at - 1) + ": $Elements before $Nodes");
            v2 ? read_elements_v2(in, tris) : read_elements_v4(in, surface_region, tris);
            have_elements = true;
        } else if (s.size() > 1 && s[0] == '$' && s.compare(0, 4, "$End") != 0) {
            in.skip_section(s.substr(1));
        } else {
            throw InputError(in.where(in.at - 1) + ": expected a section such as $Nodes or $Elements, found " + shown(s));
        }
    }
    if (!have_elements || tris.empty()) throw InputError(path + ": contains no triangles (element type 2)");

    TriangleMesh m;
    std::unordered_map<long long, int> index;
    for (const MshTriangle& t : tris) {
        Triangle tri;
        for (int j = 0; j < 3; ++j) {
            auto it = index.find(t.nodes[j]);
            if (it == index.end()) {
                const auto node = nodes.find(t.nodes[j]);
                if (node == nodes.end())
                    throw InputError(path + ":" + std::to_string(t.line) + ": triangle uses node " + std::to_string(t.nodes[j]) +
                                     ", which $Nodes does not define");
                m.vertices.push_back(node->second * scale);
                it = index.emplace(t.nodes[j], static_cast<int>(m.vertices.size()) - 1).first;
            }
            tri[j] = it->second;
        }
        m.triangles.push_back(tri);
        m.region.push_back(static_cast<int>(t.region));
    }
    m.region_names = names;
    m.name = stem(path);
    return m;
}

TriangleMesh read_mesh(const std::string& path, double scale) {
    const std::size_t dot = path.find_last_of('.');
    const std::string ext = dot == std::string::npos ? "" : lower(path.substr(dot));
    if (ext == ".stl") return read_stl(path, scale);
    if (ext == ".msh") return read_msh(path, scale);
    throw InputError(path + ": unknown mesh format '" + ext + "'; expected .stl or .msh");
}

void write_stl(const std::string& path, const TriangleMesh& mesh) {
    std::ofstream out(path, std::ios::binary);
    if (!out) throw InputError(path + ": cannot open file for writing (" + std::strerror(errno) + ")");
    char header[80];
    std::memset(header, ' ', sizeof header);
    const std::string title = "murk: " + mesh.name;
    std::memcpy(header, title.data(), std::min(title.size(), sizeof header));
    out.write(header, sizeof header);
    const auto n = static_cast<std::uint32_t>(mesh.size());
    out.write(reinterpret_cast<const char*>(&n), 4);
    for (std::size_t t = 0; t < mesh.size(); ++t) {
        float rec[12];
        const Vec3 a2 = mesh.area_vector2(t);
        const double len = a2.norm();
        for (int d = 0; d < 3; ++d) rec[d] = len > 0.0 ? static_cast<float>(a2[d] / len) : 0.0f;
        for (int k = 0; k < 3; ++k)
            for (int d = 0; d < 3; ++d) rec[3 + 3 * k + d] = static_cast<float>(mesh.corner(t, k)[d]);
        out.write(reinterpret_cast<const char*>(rec), sizeof rec);
        const std::uint16_t attribute = 0;
        out.write(reinterpret_cast<const char*>(&attribute), 2);
    }
    write_or_fail(out, path);
}

void write_vtk(const std::string& path, const TriangleMesh& mesh, const CellArrays& cell_arrays) {
    for (const auto& a : cell_arrays)
        if (a.second.size() != mesh.size())
            throw InputError(path + ": cell array '" + a.first + "' has " + std::to_string(a.second.size()) + " values for " +
                             std::to_string(mesh.size()) + " panels");
    std::ofstream out(path);
    if (!out) throw InputError(path + ": cannot open file for writing (" + std::strerror(errno) + ")");
    out << std::setprecision(std::numeric_limits<double>::max_digits10);
    out << "# vtk DataFile Version 3.0\n";
    std::string title = "murk mesh " + mesh.name;
    std::replace(title.begin(), title.end(), '\n', ' ');
    out << title.substr(0, 255) << "\nASCII\nDATASET POLYDATA\n";
    out << "POINTS " << mesh.vertices.size() << " double\n";
    for (const Vec3& v : mesh.vertices) out << v.x() << ' ' << v.y() << ' ' << v.z() << '\n';
    out << "POLYGONS " << mesh.size() << ' ' << 4 * mesh.size() << '\n';
    for (const Triangle& t : mesh.triangles) out << "3 " << t[0] << ' ' << t[1] << ' ' << t[2] << '\n';
    out << "CELL_DATA " << mesh.size() << '\n';
    out << "SCALARS region int 1\nLOOKUP_TABLE default\n";
    for (std::size_t t = 0; t < mesh.size(); ++t) out << (t < mesh.region.size() ? mesh.region[t] : 0) << '\n';
    for (std::size_t k = 0; k < cell_arrays.size(); ++k) {
        std::string name = cell_arrays[k].first.empty() ? "array_" + std::to_string(k) : cell_arrays[k].first;
        for (char& c : name)
            if (std::isspace(static_cast<unsigned char>(c))) c = '_';
        out << "SCALARS " << name << " double 1\nLOOKUP_TABLE default\n";
        for (double v : cell_arrays[k].second) out << v << '\n';
    }
    write_or_fail(out, path);
}

}  // namespace murk
