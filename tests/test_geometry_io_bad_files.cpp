// Mesh files from strangers: every count a file states is checked before it is
// believed (geometry/input_limits.hpp), and every refusal is one short line naming
// the file and the line (binary STL: the byte). One test per class of defect and
// format: a truncated file, a huge claimed count, a negative or overflowing count,
// a count that disagrees with the content. The files are written by the tests.
#include "geometry/input_error.hpp"
#include "geometry/input_limits.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_quality.hpp"

#include <doctest/doctest.h>

#include "tests/temp_dir.hpp"

#include <climits>
#include <cstdint>
#include <cstring>
#include <functional>
#include <string>

using namespace murk;

namespace {

std::string error_of(const std::function<void()>& f) {
    try {
        f();
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

// The message of reading `content` as `name`, checked to be one short line.
std::string refusal(const murk::testing::TempDir& tmp, const std::string& name, const std::string& content) {
    const std::string m = error_of([&] { read_mesh(tmp.file(name, content)); });
    CAPTURE(m);
    CHECK(!m.empty());
    CHECK(m.find('\n') == std::string::npos);
    CHECK(m.size() <= 240);  // the temporary folder's name takes about 40
    return m;
}

// Checks that `message` contains `words`, showing the message when it does not.
void expect_has(const std::string& message, const std::string& words) {
    CAPTURE(message);
    CHECK(message.find(words) != std::string::npos);
}

void put_u32(std::string& s, std::uint32_t v) { s.append(reinterpret_cast<const char*>(&v), 4); }
void put_f32(std::string& s, float v) { s.append(reinterpret_cast<const char*>(&v), 4); }

// A binary STL of the unit tetrahedron with `claimed` in the header's count.
std::string binary_tet(std::uint32_t claimed) {
    std::string b(80, ' ');
    put_u32(b, claimed);
    const float v[4][3] = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
    const int f[4][3] = {{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}};
    for (const auto& t : f) {
        for (int k = 0; k < 3; ++k) put_f32(b, 0.0f);
        for (int k = 0; k < 3; ++k)
            for (int d = 0; d < 3; ++d) put_f32(b, v[t[k]][d]);
        b.append(2, '\0');
    }
    return b;
}

const std::string kMsh2Head = "$MeshFormat\n2.2 0 8\n$EndMeshFormat\n";
const std::string kMsh41Head = "$MeshFormat\n4.1 0 8\n$EndMeshFormat\n";
const std::string kMsh2Nodes = "$Nodes\n4\n1 0 0 0\n2 1 0 0\n3 0 1 0\n4 0 0 1\n$EndNodes\n";
const std::string kMsh2Elements = "$Elements\n4\n1 2 2 7 1 1 3 2\n2 2 2 7 1 1 2 4\n3 2 2 7 1 1 4 3\n4 2 2 7 1 2 3 4\n$EndElements\n";
const std::string kMsh41Nodes = "$Nodes\n1 4 1 4\n2 1 0 4\n1\n2\n3\n4\n0 0 0\n1 0 0\n0 1 0\n0 0 1\n$EndNodes\n";
const std::string kMsh41Elements = "$Elements\n1 4 1 4\n2 1 2 4\n1 1 3 2\n2 1 2 4\n3 1 4 3\n4 2 3 4\n$EndElements\n";

}  // namespace

TEST_CASE("mesh limits: checked_count refuses negative, capped and unaffordable counts") {
    CHECK(checked_count(0, 8, 0, 10, "f:1", "n") == 0);
    CHECK(checked_count(10, 8, 80, 10, "f:1", "n") == 10);  // exactly fits, exactly at the cap
    CHECK(error_of([] { checked_count(-1, 8, 80, 10, "f:1", "the number of nodes"); }) ==
          "f:1: the number of nodes is -1; a count cannot be negative");
    CHECK(error_of([] { checked_count(11, 8, 800, 10, "f:1", "n"); }) == "f:1: n is 11; murk reads at most 10");
    CHECK(error_of([] { checked_count(10, 8, 79, 10, "f:1", "n"); }) ==
          "f:1: n is 10; the 79 bytes left in the file hold at most 9 (each takes at least 8 bytes)");
    // A product that would overflow 64 bits is never formed.
    expect_has(error_of([] { checked_count(LLONG_MAX, 1u << 20, 100, ~std::uint64_t{0}, "f:1", "n"); }), "hold at most 0");
    expect_has(error_of([] { checked_count(LLONG_MIN, 8, 100, 10, "f:1", "n"); }), "cannot be negative");
}

TEST_CASE("binary STL: a truncated file names the byte of the count and both sizes") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    const std::string whole = binary_tet(4);
    CHECK(read_mesh(tmp.file("whole.stl", whole)).size() == 4);
    const std::string m = refusal(tmp, "cut.stl", whole.substr(0, whole.size() - 20));
    expect_has(m, "cut.stl: byte 80: ");
    expect_has(m, "announces 4 triangles (284 bytes), but the file has 264");
    expect_has(refusal(tmp, "tiny.stl", std::string(50, '\0')), "50 bytes, fewer than the 84-byte header");
}

TEST_CASE("binary STL: a huge or wrong triangle count in the header is refused, nothing allocated") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    // 4 billion triangles claimed by a file of 284 bytes.
    expect_has(refusal(tmp, "huge.stl", binary_tet(0xFFFFFFFFu)), "announces 4294967295 triangles (214748364834 bytes)");
    // A count that disagrees with the content by one triangle either way.
    expect_has(refusal(tmp, "three.stl", binary_tet(3)), "announces 3 triangles (234 bytes), but the file has 284");
    expect_has(refusal(tmp, "five.stl", binary_tet(5)), "announces 5 triangles");
    // The header may start with "solid" (some exporters do): the size still decides.
    std::string solid = binary_tet(5);
    std::memcpy(&solid[0], "solid x", 7);
    expect_has(refusal(tmp, "solid5.stl", solid), "solid5.stl:");
}

TEST_CASE("binary STL: a non-finite coordinate names its byte") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    std::string b = binary_tet(4);
    const float nan = std::numeric_limits<float>::quiet_NaN();
    std::memcpy(&b[84 + 50 + 12 + 4], &nan, 4);  // second triangle, first corner, y
    expect_has(refusal(tmp, "nan.stl", b), "nan.stl: byte 146: triangle 2 has a non-finite coordinate");
}

TEST_CASE("ASCII STL: a file cut inside a facet names the last line") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    const std::string m = refusal(tmp, "cut.stl", "solid t\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0");
    expect_has(m, "cut.stl:5: file ends where 'a number' was expected");
}

TEST_CASE("ASCII STL: absurd content gives one short line") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    // A megabyte where a number belongs.
    const std::string big = "solid t\nfacet normal 0 0 1\nouter loop\nvertex 0 0 " + std::string(1 << 20, '7') + "x\n";
    expect_has(refusal(tmp, "big.stl", big), "big.stl:4: expected a finite number, found '777");
    // A NUL byte inside a number is not the end of it.
    const std::string nul = std::string("solid t\nfacet normal 0 0 1\nouter loop\nvertex 0 0 1") + '\0' + "5\n";
    expect_has(refusal(tmp, "nul.stl", nul), "found '1\\x005'");
    // Numbers beyond double range, and coordinates that overflow once scaled.
    expect_has(refusal(tmp, "inf.stl", "solid t\nfacet normal 0 0 1\nouter loop\nvertex 1e400 0 0\n"), "inf.stl:4: expected a finite number");
    const std::string far =
        "solid t\nfacet normal 0 0 1\nouter loop\nvertex 1e300 0 0\nvertex 0 1 0\nvertex 0 0 1\nendloop\nendfacet\nendsolid t\n";
    expect_has(error_of([&] { read_stl(tmp.file("far.stl", far), 10.0); }), "far.stl: a coordinate times the length scale 10 exceeds 1e100 m");
    // Control characters in a keyword are echoed escaped.
    expect_has(refusal(tmp, "esc.stl", "solid t\n\x1b[2Jfacet\n"), "found '\\x1B[2Jfacet'");
}

TEST_CASE("ASCII STL: a small mesh far from the origin is welded without overflow") {
    // A tetrahedron of 32 m edges, 1e17 m out along x (1e17 + 32 is exact in double).
    // Weld cells counted from the origin would need numbers near 1e21, beyond 64 bits
    // (undefined behaviour, reported by the sanitizers of the fuzz build); counted
    // from the lowest corner they stay small.
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    const char* v[4] = {"1e17 0 0", "100000000000000032 0 0", "1e17 32 0", "1e17 0 32"};
    const int f[4][3] = {{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}};
    std::string text = "solid far\n";
    for (const auto& t : f) {
        text += "facet normal 0 0 0\nouter loop\n";
        for (int k = 0; k < 3; ++k) text += std::string("vertex ") + v[t[k]] + "\n";
        text += "endloop\nendfacet\n";
    }
    text += "endsolid far\n";
    const TriangleMesh m = read_stl(tmp.file("far.stl", text));
    CHECK(m.size() == 4);
    CHECK(m.vertices.size() == 4);  // 12 corners at 4 places
    CHECK(m.vertices[0].x() == 1e17);
}

TEST_CASE("MSH 2: a truncated file names the line where it ends") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    CHECK(read_mesh(tmp.file("ok.msh", kMsh2Head + kMsh2Nodes + kMsh2Elements)).size() == 4);
    // Cut short of the nodes its count announces: the bytes left cannot hold them.
    expect_has(refusal(tmp, "cut.msh", kMsh2Head + "$Nodes\n4\n1 0 0 0\n2 1 0 0\n"),
               "cut.msh:5: the number of nodes is 4; the 17 bytes left in the file hold at most 2 (each takes at least 8 bytes)");
    // Cut inside a record, and before the section's end.
    expect_has(refusal(tmp, "record.msh", kMsh2Head + "$Nodes\n2\n1 0 0 0\n2 1.000000 0"),
               "record.msh:7: expected 'node-number x y z' (at least 4 values), found 3");
    expect_has(refusal(tmp, "end.msh", kMsh2Head + "$Nodes\n1\n1 0 0 0\n"), "end.msh:6: file ends where $EndNodes was expected");
}

TEST_CASE("MSH 2: huge claimed counts are refused before anything is allocated") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    expect_has(refusal(tmp, "nodes.msh", kMsh2Head + "$Nodes\n1000000000\n1 0 0 0\n$EndNodes\n"),
              "nodes.msh:5: the number of nodes is 1000000000; murk reads at most 20000000");
    expect_has(refusal(tmp, "few.msh", kMsh2Head + "$Nodes\n1000\n1 0 0 0\n$EndNodes\n"),
              "few.msh:5: the number of nodes is 1000; the 19 bytes left in the file hold at most 2");
    expect_has(refusal(tmp, "elements.msh", kMsh2Head + kMsh2Nodes + "$Elements\n99999999\n$EndElements\n"),
              "the number of elements is 99999999; the 14 bytes left");
    expect_has(refusal(tmp, "names.msh", kMsh2Head + "$PhysicalNames\n5000000\n$EndPhysicalNames\n"),
              "the number of physical names is 5000000; murk reads at most 1000000");
}

TEST_CASE("MSH 2: negative and overflowing counts and tags") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    expect_has(refusal(tmp, "neg.msh", kMsh2Head + "$Nodes\n-1\n$EndNodes\n"), "neg.msh:5: the number of nodes is -1; a count cannot be negative");
    expect_has(refusal(tmp, "big.msh", kMsh2Head + "$Nodes\n99999999999999999999\n$EndNodes\n"),
              "big.msh:5: the integer '99999999999999999999' is out of range");
    // A tag count near 2^63: 3 + tags + 3 used to wrap around and index far past the line.
    std::string tags = kMsh2Head + kMsh2Nodes + kMsh2Elements;
    tags.replace(tags.find("1 2 2 7 1 1 3 2"), 15, "1 2 9223372036854775806 7 1 1 3 2");
    expect_has(refusal(tmp, "tags.msh", tags), "tags.msh:13: the number of tags is 9223372036854775806; murk reads at most 1000");
    std::string few = kMsh2Head + kMsh2Nodes + kMsh2Elements;
    few.replace(few.find("1 2 2 7 1 1 3 2"), 15, "1 2 4 7 1 1 3 2");
    expect_has(refusal(tmp, "few.msh", few), "few.msh:13: triangle needs 4 tags and 3 nodes, found 5 values");
    std::string tag = kMsh2Head + kMsh2Nodes + kMsh2Elements;
    tag.replace(tag.find("1 2 2 7 1 1 3 2"), 15, "1 2 2 -7 1 1 3 2");
    expect_has(refusal(tmp, "tag.msh", tag), "tag.msh:13: physical tag must lie in 0..100000, found '-7'");
}

TEST_CASE("MSH 2: counts that disagree with the content") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    // Fewer records than announced: the section's end marker comes early.
    std::string fewer = kMsh2Head + kMsh2Nodes + kMsh2Elements;
    fewer.replace(fewer.find("$Nodes\n4\n"), 9, "$Nodes\n5\n");
    expect_has(refusal(tmp, "fewer.msh", fewer),
               "fewer.msh:10: '$EndNodes' where 'node-number x y z' was expected: $Nodes holds fewer than the 5 nodes it announces");
    std::string more = kMsh2Head + kMsh2Nodes + kMsh2Elements;
    more.replace(more.find("$Nodes\n4\n"), 9, "$Nodes\n3\n");
    expect_has(refusal(tmp, "more.msh", more), "more.msh:9: expected $EndNodes, found '4' ($Nodes holds more than the 3 nodes it announces)");
    std::string twice = kMsh2Head + kMsh2Nodes + kMsh2Elements;
    twice.replace(twice.find("4 0 0 1"), 7, "3 0 0 1");
    expect_has(refusal(tmp, "twice.msh", twice), "twice.msh:9: node 3 is defined twice");
    expect_has(refusal(tmp, "again.msh", kMsh2Head + kMsh2Nodes + kMsh2Nodes + kMsh2Elements), "again.msh:11: a second $Nodes section");
    expect_has(refusal(tmp, "open.msh", kMsh2Head + "$Comments\nhello\n"), "open.msh:5: file ends inside the section '$Comments'");
}

TEST_CASE("MSH 4.1: a file cut inside a node block") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    CHECK(read_mesh(tmp.file("ok.msh", kMsh41Head + kMsh41Nodes + kMsh41Elements)).size() == 4);
    expect_has(refusal(tmp, "cut.msh", kMsh41Head + "$Nodes\n1 4 1 4\n2 1 0 4\n1\n2\n3\n4\n0 0 0\n1 0 0\n"),
               "cut.msh:5: the number of nodes is 4; the 29 bytes left in the file hold at most 3");
    // A block cut short inside a file that goes on: its end marker comes early.
    expect_has(refusal(tmp, "short.msh", kMsh41Head + "$Nodes\n1 4 1 4\n2 1 0 4\n1\n2\n3\n4\n0 0 0\n1 0 0\n$EndNodes\n" + kMsh41Elements),
               "short.msh:13: '$EndNodes' where 'x y z' was expected: $Nodes holds fewer than the 4 nodes of the block it announces");
}

TEST_CASE("MSH 4.1: huge claimed counts in headers, blocks and entities") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    // The file: a block claiming a billion nodes used to reserve 8 GB.
    expect_has(refusal(tmp, "billion.msh", kMsh41Head + "$Nodes\n1 1000000000 1 1000000000\n2 1 0 1000000000\n1\n0 0 0\n$EndNodes\n"),
              "billion.msh:5: the number of nodes is 1000000000; murk reads at most 20000000");
    expect_has(refusal(tmp, "block.msh", kMsh41Head + "$Nodes\n1 10000 1 10000\n2 1 0 10000\n1\n0 0 0\n$EndNodes\n"),
              "block.msh:5: the number of nodes is 10000; the ");
    expect_has(refusal(tmp, "inblock.msh", kMsh41Head + "$Nodes\n1 4 1 4\n2 1 0 1000000\n1\n0 0 0\n$EndNodes\n"),
              "inblock.msh:6: the number of nodes in the block is 1000000; the ");
    expect_has(refusal(tmp, "blocks.msh", kMsh41Head + "$Nodes\n999999 4 1 4\n$EndNodes\n"), "blocks.msh:5: the number of node blocks is 999999; the ");
    expect_has(refusal(tmp, "ent.msh", kMsh41Head + "$Entities\n0 0 500000 0\n$EndEntities\n"), "ent.msh:5: the number of surfaces is 500000; the ");
    expect_has(refusal(tmp, "elts.msh", kMsh41Head + kMsh41Nodes + "$Elements\n1 99999999 1 4\n2 1 2 99999999\n$EndElements\n"),
              "the number of elements is 99999999; the ");
}

TEST_CASE("MSH 4.1: negative and overflowing counts") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    // Physical tags near 2^63: 8 + count used to wrap around and read past the line.
    expect_has(refusal(tmp, "phys.msh", kMsh41Head + "$Entities\n0 0 1 0\n1 0 0 0 1 1 1 9223372036854775807 5\n$EndEntities\n"),
              "phys.msh:6: the number of physical tags is 9223372036854775807; murk reads at most 1000");
    expect_has(refusal(tmp, "physfew.msh", kMsh41Head + "$Entities\n0 0 1 0\n1 0 0 0 1 1 1 3 5\n$EndEntities\n"),
              "physfew.msh:6: surface entity lists 3 physical tags but has only 1 values after the count");
    // Point and curve counts whose sum used to overflow.
    expect_has(refusal(tmp, "sum.msh", kMsh41Head + "$Entities\n9223372036854775807 9223372036854775807 0 0\n$EndEntities\n"),
              "sum.msh:5: the number of points is 9223372036854775807; murk reads at most 1000000");
    expect_has(refusal(tmp, "negblock.msh", kMsh41Head + "$Nodes\n1 0 1 4\n2 1 0 -4\n$EndNodes\n"),
              "negblock.msh:6: the number of nodes in the block is -4; a count cannot be negative");
    expect_has(refusal(tmp, "negent.msh", kMsh41Head + "$Entities\n0 -1 0 0\n$EndEntities\n"), "the number of curves is -1; a count cannot be negative");
}

TEST_CASE("MSH 4.1: block sizes that disagree with the header") {
    murk::testing::TempDir tmp("murk-test-bad-mesh");
    // The header says 5 nodes, the one block holds 4.
    std::string nodes = kMsh41Head + kMsh41Nodes + kMsh41Elements;
    nodes.replace(nodes.find("$Nodes\n1 4 1 4\n"), 15, "$Nodes\n1 5 1 4\n");
    expect_has(refusal(tmp, "total.msh", nodes), "total.msh:14: the blocks hold 4 nodes, the header announces 5");
    // The header says 3 elements, the block claims 4.
    std::string elements = kMsh41Head + kMsh41Nodes + kMsh41Elements;
    elements.replace(elements.find("$Elements\n1 4 1 4\n"), 18, "$Elements\n1 3 1 4\n");
    expect_has(refusal(tmp, "over.msh", elements),
              "over.msh:18: the block holds 4 elements, but the header announces 3 in all and the blocks before held 0");
    // Two blocks announced, one given.
    std::string blocks = kMsh41Head + kMsh41Nodes + kMsh41Elements;
    blocks.replace(blocks.find("$Elements\n1 4 1 4\n"), 18, "$Elements\n2 4 1 4\n");
    expect_has(refusal(tmp, "blocks.msh", blocks), "blocks.msh:23: '$EndElements' where");
    expect_has(refusal(tmp, "blocks.msh", blocks), "$Elements holds fewer than the 2 element blocks it announces");
}
