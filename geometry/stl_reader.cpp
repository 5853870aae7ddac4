// read_stl (mesh_io.hpp): ASCII and binary STL.
#include "geometry/file_bytes.hpp"
#include "geometry/input_error.hpp"
#include "geometry/input_limits.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_reading.hpp"
#include "geometry/message_text.hpp"
#include "geometry/text_words.hpp"
#include "geometry/vertex_welding.hpp"

#include <algorithm>
#include <cstdint>
#include <cstring>

namespace murk {
namespace {

constexpr std::uint64_t kBinaryHeaderBytes = 84;  // 80 bytes of text, then the triangle count
constexpr std::uint64_t kBinaryTriangleBytes = 50;

// True when `w` is `keyword` (lower case) in any letter case.
bool is_keyword(std::string_view w, std::string_view keyword) {
    return w.size() == keyword.size() && lower_case(w) == keyword;
}

TriangleMesh read_stl_ascii(const std::string& path, const std::string& text) {
    TextWords words(text);
    auto where = [&] { return file_line(path, words.line()); };
    // The next word, skipping the names that follow "solid" and "endsolid" on their line.
    auto next = [&](const char* expected) {
        const std::string_view w = words.next_word();
        if (w.empty())
            throw InputError(file_line(path, words.last_line()) + ": file ends where '" + expected + "' was expected");
        return w;
    };
    auto expect = [&](const char* word) {
        const std::string_view w = next(word);
        if (!is_keyword(w, word)) throw InputError(where() + ": expected '" + word + "', found " + in_quotes(w));
    };
    auto number = [&] {
        const std::string_view w = next("a number");
        return parse_finite(w, where());
    };

    TriangleMesh m;
    bool in_solid = false;
    for (std::string_view w = words.next_word(); !w.empty(); w = words.next_word()) {
        if (!in_solid) {
            if (!is_keyword(w, "solid")) throw InputError(where() + ": expected 'solid', found " + in_quotes(w));
            words.skip_line();  // the solid's name
            in_solid = true;
        } else if (is_keyword(w, "endsolid")) {
            words.skip_line();
            in_solid = false;
        } else if (is_keyword(w, "facet")) {
            if (m.triangles.size() >= kMaxMeshTriangles)
                throw InputError(where() + ": more than " + std::to_string(kMaxMeshTriangles) +
                                 " triangles, the most murk reads from one mesh file");
            expect("normal");
            for (int k = 0; k < 3; ++k) number();  // orientation comes from the vertex order
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
            throw InputError(where() + ": expected 'facet' or 'endsolid', found " + in_quotes(w));
        }
    }
    if (in_solid) throw InputError(file_line(path, words.last_line()) + ": file ends without 'endsolid'");
    return m;
}

template <class T>
T load_le(const std::string& bytes, std::uint64_t at) {
    T v;
    std::memcpy(&v, bytes.data() + at, sizeof v);  // STL is little-endian, like every host murk targets
    return v;
}

TriangleMesh read_stl_binary(const std::string& path, const std::string& bytes) {
    const std::string name = printable(path);
    if (bytes.size() < kBinaryHeaderBytes)
        throw InputError(name + ": not an STL file: it does not start with 'solid' (ASCII STL) and has " +
                         std::to_string(bytes.size()) + " bytes, fewer than the 84-byte header of a binary STL");
    const std::uint32_t n = load_le<std::uint32_t>(bytes, 80);
    const std::uint64_t expected = kBinaryHeaderBytes + kBinaryTriangleBytes * std::uint64_t{n};
    if (bytes.size() != expected)
        throw InputError(name + ": byte 80: not an STL file: its binary header announces " + std::to_string(n) +
                         " triangles (" + std::to_string(expected) + " bytes), but the file has " +
                         std::to_string(bytes.size()) + " (an ASCII STL starts with 'solid')");
    checked_count(n, kBinaryTriangleBytes, bytes.size() - kBinaryHeaderBytes, kMaxMeshTriangles, name + ": byte 80",
                  "the number of triangles");
    TriangleMesh m;
    m.vertices.reserve(3 * std::size_t{n});
    m.triangles.reserve(n);
    for (std::uint32_t t = 0; t < n; ++t) {
        const std::uint64_t base = kBinaryHeaderBytes + kBinaryTriangleBytes * t + 12;  // skip the facet normal
        Triangle tri;
        for (int k = 0; k < 3; ++k) {
            Vec3 v;
            for (int d = 0; d < 3; ++d) v[d] = load_le<float>(bytes, base + 12 * k + 4 * d);
            if (!v.allFinite())
                throw InputError(name + ": byte " + std::to_string(base + 12 * k) + ": triangle " + std::to_string(t + 1) +
                                 " has a non-finite coordinate");
            m.vertices.push_back(v);
            tri[k] = static_cast<int>(m.vertices.size()) - 1;
        }
        m.triangles.push_back(tri);
    }
    return m;
}

// Text: no control characters but white space in the first 4 KB (bytes of UTF-8
// names are allowed). A binary file's count and attribute bytes are zeros.
bool looks_like_text(const std::string& bytes) {
    const std::size_t n = std::min<std::size_t>(bytes.size(), 4096);
    for (std::size_t i = 0; i < n; ++i) {
        const auto c = static_cast<unsigned char>(bytes[i]);
        const bool space = c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\v' || c == '\f';
        if ((c < 0x20 && !space) || c == 0x7F) return false;
    }
    return true;
}

bool starts_with_solid(const std::string& bytes) {
    TextWords words(std::string_view(bytes).substr(0, 4096));
    return lower_case(words.next_word().substr(0, 5)) == "solid";
}

}  // namespace

TriangleMesh read_stl(const std::string& path, double scale) {
    check_scale(path, scale);
    return read_stl_bytes(read_file_bytes(path, kMaxMeshFileBytes, "mesh file"), path, scale);
}

TriangleMesh read_stl_bytes(const std::string& bytes, const std::string& path, double scale) {
    check_scale(path, scale);
    // Some binary files also start with "solid": their size decides, unless they are text.
    const bool solid = starts_with_solid(bytes);
    const bool binary_size = bytes.size() >= kBinaryHeaderBytes &&
                             bytes.size() == kBinaryHeaderBytes + kBinaryTriangleBytes * std::uint64_t{load_le<std::uint32_t>(bytes, 80)};
    TriangleMesh m = (solid && (looks_like_text(bytes) || !binary_size)) ? read_stl_ascii(path, bytes)
                                                                          : read_stl_binary(path, bytes);
    if (m.triangles.empty()) throw InputError(printable(path) + ": contains no triangles");
    apply_scale(m, scale, path);
    weld_vertices(m, default_weld_tolerance(m));
    m.region.assign(m.triangles.size(), 0);
    m.name = printable(mesh_name_of(path));
    return m;
}

}  // namespace murk
