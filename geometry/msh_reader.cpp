// read_msh (mesh_io.hpp): Gmsh MSH 2.x and 4.1, ASCII. Every count in the file is
// checked (input_limits.hpp) before the reader relies on it or allocates for it.
#include "geometry/file_bytes.hpp"
#include "geometry/input_error.hpp"
#include "geometry/input_limits.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_reading.hpp"
#include "geometry/message_text.hpp"
#include "geometry/text_words.hpp"

#include <map>
#include <set>
#include <tuple>
#include <unordered_map>

namespace murk {
namespace {

constexpr long long kMaxRegionTag = 100000;

struct MshTriangle {
    long long nodes[3];
    long long region;
    std::size_t line;
};

// An MSH file read line by line. Within a section, `record` reads the lines its
// counts announce and says so when the section ends before them.
class MshLines {
public:
    MshLines(const std::string& path, const std::string& text) : path_(path), words_(text) {}

    const std::string& path() const { return path_; }
    std::size_t line() const { return words_.line(); }
    std::string where() const { return file_line(path_, words_.line()); }
    std::uint64_t bytes_left() const { return words_.bytes_left(); }

    // Moves to the next line with words; false at the end of the file.
    bool advance() { return words_.next_line(line_); }
    const std::vector<std::string_view>& current() const { return line_; }
    // The next line with words; `what` names what was expected, for the message.
    const std::vector<std::string_view>& next(const std::string& what) {
        if (!advance())
            throw InputError(file_line(path_, words_.last_line()) + ": file ends where " + what + " was expected");
        return line_;
    }
    // The next line, which must have at least `min_words` words.
    const std::vector<std::string_view>& need(const std::string& what, std::size_t min_words) {
        next(what);
        if (line_.size() < min_words)
            throw InputError(where() + ": expected " + what + " (at least " + std::to_string(min_words) + " values), found " +
                             std::to_string(line_.size()));
        return line_;
    }
    // Starts a list of `count` records of section `section` ("Nodes"), named `items` in messages.
    void begin_list(const std::string& section, std::uint64_t count, const std::string& items) {
        section_ = section;
        announced_ = count;
        items_ = items;
    }
    // The next record of the list: not a section marker, at least `min_words` words.
    const std::vector<std::string_view>& record(const std::string& what, std::size_t min_words) {
        next(what);
        if (line_[0].front() == '$')
            throw InputError(where() + ": " + in_quotes(line_[0]) + " where " + what + " was expected: $" + section_ +
                             " holds fewer than the " + std::to_string(announced_) + " " + items_ + " it announces");
        return need_words(what, min_words);
    }
    void expect_end() {
        next("$End" + section_);
        if (line_[0] != "$End" + section_)
            throw InputError(where() + ": expected $End" + section_ + ", found " + in_quotes(line_[0]) +
                             (items_.empty() ? std::string()
                                             : " ($" + section_ + " holds more than the " + std::to_string(announced_) + " " +
                                                   items_ + " it announces)"));
    }
    // Skips a section murk does not read, up to its end marker.
    void skip_section(const std::string& section) {
        const std::string end = "$End" + section;
        do {
            if (!advance())
                throw InputError(file_line(path_, words_.last_line()) + ": file ends inside the section " +
                                 in_quotes("$" + section) + ", before its end marker");
        } while (line_[0] != end);
    }
    // A count at word `word` of the current line, checked against the bytes left.
    std::uint64_t count(std::string_view word, std::uint64_t record_bytes, std::uint64_t cap, const std::string& what) {
        return checked_count(parse_integer(word, where()), record_bytes, bytes_left(), cap, where(), what);
    }
    long long integer(std::string_view word) const { return parse_integer(word, where()); }
    double number(std::string_view word) const { return parse_finite(word, where()); }

private:
    const std::vector<std::string_view>& need_words(const std::string& what, std::size_t min_words) {
        if (line_.size() < min_words)
            throw InputError(where() + ": expected " + what + " (at least " + std::to_string(min_words) + " values), found " +
                             std::to_string(line_.size()));
        return line_;
    }

    const std::string& path_;
    TextWords words_;
    std::vector<std::string_view> line_;
    std::string section_, items_;
    std::uint64_t announced_ = 0;
};

int region_tag(const MshLines& in, std::string_view word) {
    const long long v = in.integer(word);
    if (v < 0 || v > kMaxRegionTag)
        throw InputError(in.where() + ": physical tag must lie in 0.." + std::to_string(kMaxRegionTag) + ", found " +
                         in_quotes(word));
    return static_cast<int>(v);
}

void add_triangle(const MshLines& in, std::vector<MshTriangle>& tris, const MshTriangle& t) {
    if (tris.size() >= kMaxMeshTriangles)
        throw InputError(in.where() + ": more than " + std::to_string(kMaxMeshTriangles) +
                         " triangles, the most murk reads from one mesh file");
    tris.push_back(t);
}

void add_node(const MshLines& in, std::unordered_map<long long, Vec3>& nodes, long long tag, const Vec3& x) {
    if (!nodes.emplace(tag, x).second) throw InputError(in.where() + ": node " + std::to_string(tag) + " is defined twice");
}

void read_physical_names(MshLines& in, std::vector<std::string>& names) {
    const std::uint64_t n =
        in.count(in.need("the number of physical names", 1)[0], line_bytes(3), kMaxMeshNames, "the number of physical names");
    in.begin_list("PhysicalNames", n, "physical names");
    for (std::uint64_t k = 0; k < n; ++k) {
        const auto& l = in.record("'dimension tag \"name\"'", 3);
        const long long dim = in.integer(l[0]);
        const int tag = region_tag(in, l[1]);
        std::string name(l[2]);
        for (std::size_t j = 3; j < l.size(); ++j) (name += ' ') += l[j];
        if (name.size() < 2 || name.front() != '"' || name.back() != '"')
            throw InputError(in.where() + ": expected a physical name in double quotes, found " + in_quotes(name));
        if (dim != 2) continue;  // volumes, curves, points: not panels
        if (names.size() <= static_cast<std::size_t>(tag)) names.resize(static_cast<std::size_t>(tag) + 1);
        names[static_cast<std::size_t>(tag)] = name.substr(1, name.size() - 2);
    }
    in.expect_end();
}

void read_nodes_v2(MshLines& in, std::unordered_map<long long, Vec3>& nodes) {
    const std::uint64_t n = in.count(in.need("the number of nodes", 1)[0], line_bytes(4), kMaxMeshNodes, "the number of nodes");
    in.begin_list("Nodes", n, "nodes");
    for (std::uint64_t k = 0; k < n; ++k) {
        const auto& l = in.record("'node-number x y z'", 4);
        add_node(in, nodes, in.integer(l[0]), Vec3(in.number(l[1]), in.number(l[2]), in.number(l[3])));
    }
    in.expect_end();
}

void read_elements_v2(MshLines& in, std::vector<MshTriangle>& tris) {
    const std::uint64_t n =
        in.count(in.need("the number of elements", 1)[0], line_bytes(3), kMaxMeshElements, "the number of elements");
    in.begin_list("Elements", n, "elements");
    std::set<std::tuple<long long, long long, long long, long long>> seen;  // nodes + elementary tag
    for (std::uint64_t k = 0; k < n; ++k) {
        const auto& l = in.record("'elm-number elm-type number-of-tags tags... nodes...'", 3);
        if (in.integer(l[1]) != 2) continue;
        const std::uint64_t ntags = in.count(l[2], 0, kMaxTagsPerRecord, "the number of tags");
        if (l.size() - 3 < ntags + 3)
            throw InputError(in.where() + ": triangle needs " + std::to_string(ntags) + " tags and 3 nodes, found " +
                             std::to_string(l.size() - 3) + " values");
        MshTriangle t;
        t.region = ntags >= 1 ? region_tag(in, l[3]) : 0;
        const long long elementary = ntags >= 2 ? in.integer(l[4]) : 0;
        for (std::size_t j = 0; j < 3; ++j) t.nodes[j] = in.integer(l[3 + ntags + j]);
        t.line = in.line();
        // Repeats of one element for several physical groups carry the same elementary tag.
        if (ntags < 2 || seen.emplace(t.nodes[0], t.nodes[1], t.nodes[2], elementary).second) add_triangle(in, tris, t);
    }
    in.expect_end();
}

void read_entities_v4(MshLines& in, std::map<long long, int>& surface_region) {
    const auto& head = in.need("'numPoints numCurves numSurfaces numVolumes'", 4);
    const char* kinds[4] = {"points", "curves", "surfaces", "volumes"};
    std::uint64_t count[4];
    for (int d = 0; d < 4; ++d)
        count[d] = in.count(head[d], d == 2 ? line_bytes(8) : line_bytes(1), kMaxMeshEntities,
                            std::string("the number of ") + kinds[d]);
    checked_count(static_cast<long long>(count[0] + count[1] + count[2] + count[3]), line_bytes(1), in.bytes_left(),
                  4 * kMaxMeshEntities, in.where(), "the number of entities");
    in.begin_list("Entities", count[0] + count[1], "point and curve entities");
    for (std::uint64_t k = 0; k < count[0] + count[1]; ++k) in.record("a point or curve entity", 1);
    in.begin_list("Entities", count[2], "surface entities");
    for (std::uint64_t k = 0; k < count[2]; ++k) {
        // surfaceTag minX minY minZ maxX maxY maxZ numPhysicalTags physicalTag ... numBoundingCurves ...
        const auto& l = in.record("a surface entity", 8);
        const std::uint64_t nphys = in.count(l[7], 0, kMaxTagsPerRecord, "the number of physical tags");
        if (l.size() - 8 < nphys)
            throw InputError(in.where() + ": surface entity lists " + std::to_string(nphys) + " physical tags but has only " +
                             std::to_string(l.size() - 8) + " values after the count");
        const long long tag = in.integer(l[0]);
        if (!surface_region.emplace(tag, nphys > 0 ? region_tag(in, l[8]) : 0).second)
            throw InputError(in.where() + ": surface entity " + std::to_string(tag) + " is listed twice");
    }
    in.begin_list("Entities", count[3], "volume entities");
    for (std::uint64_t k = 0; k < count[3]; ++k) in.record("a volume entity", 1);
    in.expect_end();
}

// The blocks of $Nodes or $Elements must add up to the total of the section's header.
void check_block_total(const MshLines& in, std::uint64_t in_blocks, std::uint64_t total, const std::string& items) {
    if (in_blocks != total)
        throw InputError(in.where() + ": the blocks hold " + std::to_string(in_blocks) + " " + items + ", the header announces " +
                         std::to_string(total));
}

void read_nodes_v4(MshLines& in, std::unordered_map<long long, Vec3>& nodes) {
    // Each node takes a tag line and a coordinate line.
    const std::uint64_t node_bytes = line_bytes(1) + line_bytes(3);
    const auto& head = in.need("'numEntityBlocks numNodes minNodeTag maxNodeTag'", 4);
    const std::uint64_t blocks = in.count(head[0], line_bytes(4), 4 * kMaxMeshEntities, "the number of node blocks");
    const std::uint64_t total = in.count(head[1], node_bytes, kMaxMeshNodes, "the number of nodes");
    std::uint64_t read = 0;
    for (std::uint64_t b = 0; b < blocks; ++b) {
        in.begin_list("Nodes", blocks, "node blocks");
        const auto& bl = in.record("'entityDim entityTag parametric numNodesInBlock'", 4);
        const std::uint64_t nb = in.count(bl[3], node_bytes, kMaxMeshNodes, "the number of nodes in the block");
        if (nb > total - read)
            throw InputError(in.where() + ": the block holds " + std::to_string(nb) + " nodes, but the header announces " +
                             std::to_string(total) + " in all and the blocks before held " + std::to_string(read));
        in.begin_list("Nodes", nb, "nodes of the block");
        std::vector<long long> tags(nb);
        for (std::uint64_t k = 0; k < nb; ++k) tags[k] = in.integer(in.record("a node tag", 1)[0]);
        for (std::uint64_t k = 0; k < nb; ++k) {
            const auto& l = in.record("'x y z'", 3);
            add_node(in, nodes, tags[k], Vec3(in.number(l[0]), in.number(l[1]), in.number(l[2])));
        }
        read += nb;
    }
    check_block_total(in, read, total, "nodes");
    in.begin_list("Nodes", blocks, "node blocks");
    in.expect_end();
}

void read_elements_v4(MshLines& in, const std::map<long long, int>& surface_region, std::vector<MshTriangle>& tris) {
    const auto& head = in.need("'numEntityBlocks numElements minElementTag maxElementTag'", 4);
    const std::uint64_t blocks = in.count(head[0], line_bytes(4), 4 * kMaxMeshEntities, "the number of element blocks");
    const std::uint64_t total = in.count(head[1], line_bytes(2), kMaxMeshElements, "the number of elements");
    std::uint64_t read = 0;
    for (std::uint64_t b = 0; b < blocks; ++b) {
        in.begin_list("Elements", blocks, "element blocks");
        const auto& bl = in.record("'entityDim entityTag elementType numElementsInBlock'", 4);
        const long long entity = in.integer(bl[1]);
        const long long type = in.integer(bl[2]);
        const std::uint64_t ne = in.count(bl[3], line_bytes(2), kMaxMeshElements, "the number of elements in the block");
        if (ne > total - read)
            throw InputError(in.where() + ": the block holds " + std::to_string(ne) + " elements, but the header announces " +
                             std::to_string(total) + " in all and the blocks before held " + std::to_string(read));
        long long region = 0;
        if (type == 2) {
            const auto it = surface_region.find(entity);
            region = it == surface_region.end() ? 0 : it->second;
        }
        in.begin_list("Elements", ne, "elements of the block");
        for (std::uint64_t k = 0; k < ne; ++k) {
            const auto& l = in.record("'elementTag nodeTag...'", 2);
            if (type != 2) continue;
            if (l.size() < 4)
                throw InputError(in.where() + ": triangle needs a tag and 3 nodes, found " + std::to_string(l.size()) + " values");
            MshTriangle t;
            t.region = region;
            for (std::size_t j = 0; j < 3; ++j) t.nodes[j] = in.integer(l[1 + j]);
            t.line = in.line();
            add_triangle(in, tris, t);
        }
        read += ne;
    }
    check_block_total(in, read, total, "elements");
    in.begin_list("Elements", blocks, "element blocks");
    in.expect_end();
}

// The panels: the triangles' nodes in order of first use, scaled.
TriangleMesh assemble(const std::string& path, const std::vector<MshTriangle>& tris,
                      const std::unordered_map<long long, Vec3>& nodes) {
    TriangleMesh m;
    std::unordered_map<long long, int> index;
    for (const MshTriangle& t : tris) {
        Triangle tri;
        for (int j = 0; j < 3; ++j) {
            auto it = index.find(t.nodes[j]);
            if (it == index.end()) {
                const auto node = nodes.find(t.nodes[j]);
                if (node == nodes.end())
                    throw InputError(file_line(path, t.line) + ": triangle uses node " + std::to_string(t.nodes[j]) +
                                     ", which $Nodes does not define");
                m.vertices.push_back(node->second);
                it = index.emplace(t.nodes[j], static_cast<int>(m.vertices.size()) - 1).first;
            }
            tri[j] = it->second;
        }
        m.triangles.push_back(tri);
        m.region.push_back(static_cast<int>(t.region));
    }
    return m;
}

}  // namespace

TriangleMesh read_msh(const std::string& path, double scale) {
    check_scale(path, scale);
    return read_msh_text(read_file_bytes(path, kMaxMeshFileBytes, "mesh file"), path, scale);
}

TriangleMesh read_msh_text(const std::string& text, const std::string& path, double scale) {
    check_scale(path, scale);
    MshLines in(path, text);
    const std::string first(in.next("$MeshFormat")[0]);
    if (first != "$MeshFormat") throw InputError(in.where() + ": not a Gmsh MSH file: expected $MeshFormat, found " + in_quotes(first));
    const auto& fmt = in.need("'version file-type data-size'", 3);
    const std::string version(fmt[0]);
    const bool v2 = version.size() >= 2 && version.compare(0, 2, "2.") == 0;
    const bool v41 = version == "4.1";
    if (!v2 && !v41)
        throw InputError(in.where() + ": MSH version " + in_quotes(version) + " is not supported; save as version 2.2 or 4.1 ASCII");
    if (fmt[1] != "0") throw InputError(in.where() + ": binary MSH is not supported; save the mesh as ASCII (file-type 0)");
    in.begin_list("MeshFormat", 0, "");
    in.expect_end();

    std::vector<std::string> names;
    std::unordered_map<long long, Vec3> nodes;
    std::map<long long, int> surface_region;
    std::vector<MshTriangle> tris;
    bool have_nodes = false, have_elements = false;
    while (in.advance()) {
        const std::string section(in.current()[0]);
        if (section == "$PhysicalNames") {
            read_physical_names(in, names);
        } else if (section == "$Entities" && v41) {
            read_entities_v4(in, surface_region);
        } else if (section == "$Nodes") {
            if (have_nodes) throw InputError(in.where() + ": a second $Nodes section");
            v2 ? read_nodes_v2(in, nodes) : read_nodes_v4(in, nodes);
            have_nodes = true;
        } else if (section == "$Elements") {
            if (!have_nodes) throw InputError(in.where() + ": $Elements before $Nodes");
            if (have_elements) throw InputError(in.where() + ": a second $Elements section");
            v2 ? read_elements_v2(in, tris) : read_elements_v4(in, surface_region, tris);
            have_elements = true;
        } else if (section.size() > 1 && section[0] == '$' && section.compare(0, 4, "$End") != 0) {
            in.skip_section(section.substr(1));
        } else {
            throw InputError(in.where() + ": expected a section such as $Nodes or $Elements, found " + in_quotes(section));
        }
    }
    if (!have_elements || tris.empty()) throw InputError(printable(path) + ": contains no triangles (element type 2)");

    TriangleMesh m = assemble(path, tris, nodes);
    apply_scale(m, scale, path);
    m.region_names = names;
    m.name = printable(mesh_name_of(path));
    return m;
}

}  // namespace murk
