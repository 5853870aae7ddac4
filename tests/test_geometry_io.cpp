// Tests of geometry/mesh_io: STL, Gmsh MSH and VTK files written by the tests.
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "geometry/mesh_quality.hpp"
#include "geometry/shapes.hpp"

#include <doctest/doctest.h>

#include "tests/temp_dir.hpp"

#include <cstdint>
#include <cstring>
#include <filesystem>
#include <functional>
#include <fstream>
#include <sstream>
#include <string>
#include <unistd.h>

using namespace murk;
namespace fs = std::filesystem;

namespace {

// A fresh folder per test case, removed at the end.

std::string error_of(const std::function<void()>& f) {
    try {
        f();
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

// Unit right tetrahedron, outward: volume 1/6, the textbook a b c / 6.
const char* kTetStl =
    "solid my tet\r\n"
    "  facet normal 0 0 -1\r\n    outer loop\r\n      vertex 0 0 0\r\n      vertex 0 1 0\r\n      vertex 1 0 0\r\n    endloop\r\n  endfacet\r\n"
    "  facet normal 0 -1 0\n outer loop\n vertex 0 0 0\n vertex 1 0 0\n vertex 0 0 1\n endloop\n endfacet\n"
    "  FACET NORMAL 0 0 0\n OUTER LOOP\n VERTEX 0 0 0\n VERTEX 0 0 1\n VERTEX 0 1 0\n ENDLOOP\n ENDFACET\n"
    "  facet normal 0.577 0.577 0.577\n outer loop\n vertex 1.0e0 0 0\n vertex 0 1 0\n vertex 0 0 1\n endloop\n endfacet\n"
    "endsolid my tet\n";

void put_u32(std::string& s, std::uint32_t v) { s.append(reinterpret_cast<const char*>(&v), 4); }
void put_f32(std::string& s, float v) { s.append(reinterpret_cast<const char*>(&v), 4); }

}  // namespace

TEST_CASE("geometry: read a hand-written ASCII STL") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    const std::string p = tmp.file("tet.stl", kTetStl);
    const TriangleMesh m = read_stl(p);
    CHECK(m.name == "tet");
    CHECK(m.size() == 4);
    CHECK(m.vertices.size() == 4);  // 12 corners welded
    CHECK(mesh_volume(m) == doctest::Approx(1.0 / 6.0).epsilon(1e-14));
    CHECK(inspect_mesh(m).problems.empty());
    const TriangleMesh mm = read_stl(p, 1e-3);  // file in millimetres
    CHECK(mesh_volume(mm) == doctest::Approx(1e-9 / 6.0).epsilon(1e-12));
    CHECK(read_mesh(p).size() == 4);
}

TEST_CASE("geometry: read a binary STL whose header starts with 'solid'") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    std::string b(80, ' ');
    std::memcpy(&b[0], "solid but binary", 16);
    const float v[4][3] = {{0, 0, 0}, {2, 0, 0}, {0, 2, 0}, {0, 0, 2}};
    const int f[4][3] = {{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}};
    put_u32(b, 4);
    for (const auto& t : f) {
        for (int k = 0; k < 3; ++k) put_f32(b, 0.0f);
        for (int k = 0; k < 3; ++k)
            for (int d = 0; d < 3; ++d) put_f32(b, v[t[k]][d]);
        b.append(2, '\0');
    }
    const std::string p = tmp.file("bin.STL", b);
    const TriangleMesh m = read_stl(p);
    CHECK(m.size() == 4);
    CHECK(m.vertices.size() == 4);
    CHECK(mesh_volume(m) == doctest::Approx(8.0 / 6.0).epsilon(1e-14));
    CHECK(inspect_mesh(m).problems.empty());
    // Truncated by one byte: neither ASCII nor a consistent binary file.
    const std::string q = tmp.file("cut.stl", b.substr(0, b.size() - 1));
    CHECK(error_of([&] { read_stl(q); }).find("cut.stl") != std::string::npos);
}

TEST_CASE("geometry: write_stl then read_stl gives the mesh back") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    const TriangleMesh s = make_icosphere(0.05, 2);
    const std::string p = tmp / ("sphere.stl");
    write_stl(p, s);
    CHECK(fs::file_size(p) == 84 + 50 * s.size());  // binary STL layout
    const TriangleMesh r = read_stl(p);
    REQUIRE(r.size() == s.size());
    CHECK(r.vertices.size() == s.vertices.size());
    for (std::size_t t = 0; t < s.size(); ++t)
        for (int k = 0; k < 3; ++k)
            for (int d = 0; d < 3; ++d) CHECK(r.corner(t, k)[d] == static_cast<double>(static_cast<float>(s.corner(t, k)[d])));
    CHECK(mesh_volume(r) == doctest::Approx(mesh_volume(s)).epsilon(1e-6));  // float precision
    CHECK(inspect_mesh(r).problems.empty());
}

TEST_CASE("geometry: STL errors name the file and line") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    const std::string bad = tmp.file("bad.stl", "solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0\nvertex 0 1 0\n");
    const std::string e = error_of([&] { read_stl(bad); });
    CHECK(e.find("bad.stl:6:") != std::string::npos);  // 'vertex' where the third number of line 5 belongs
    const std::string nan_file = tmp.file("nan.stl", "solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 abc\n");
    CHECK(error_of([&] { read_stl(nan_file); }).find("nan.stl:4: expected a finite number, found 'abc'") != std::string::npos);
    const std::string empty = tmp.file("empty.stl", "solid x\nendsolid x\n");
    CHECK(error_of([&] { read_stl(empty); }).find("no triangles") != std::string::npos);
    const std::string open = tmp.file("open.stl", "solid x\n");
    CHECK(error_of([&] { read_stl(open); }).find("endsolid") != std::string::npos);
    CHECK(error_of([&] { read_stl(tmp / ("missing.stl")); }).find("missing.stl") != std::string::npos);
    CHECK_THROWS_AS(read_stl(bad, -1.0), InputError);
    CHECK_THROWS_AS(read_mesh(tmp.file("x.obj", "o x\n")), InputError);
}

namespace {

// Tetrahedron surface in MSH 2.2 (Gmsh reference manual, "MSH file format version 2"):
// physical surface 5 "electrode" = the face x + y + z = 1, physical 7 "skin" = the
// rest; a point element, a line element and an unused node 99 are to be ignored; the
// electrode face appears twice (also in physical group 8), as Gmsh writes elements
// belonging to two groups.
const char* kTetMsh2 =
    "$MeshFormat\n2.2 0 8\n$EndMeshFormat\n"
    "$PhysicalNames\n3\n2 5 \"electrode\"\n2 7 \"skin zone\"\n3 9 \"body\"\n$EndPhysicalNames\n"
    "$Nodes\n5\n1 0 0 0\n2 1 0 0\n3 0 1 0\n4 0 0 1\n99 5 5 5\n$EndNodes\n"
    "$Elements\n7\n"
    "1 15 2 0 1 1\n"
    "2 1 2 0 1 1 2\n"
    "3 2 2 7 1 1 3 2\n"
    "4 2 2 7 1 1 2 4\n"
    "5 2 2 7 1 1 4 3\n"
    "6 2 2 5 2 2 3 4\n"
    "7 2 2 8 2 2 3 4\n"
    "$EndElements\n";

// The same in MSH 4.1 (Gmsh reference manual, "MSH file format"): surfaces 1 and 2
// with physical tags 7 and 5, nodes and elements in blocks, a tetrahedron block ignored.
const char* kTetMsh41 =
    "$MeshFormat\n4.1 0 8\n$EndMeshFormat\n"
    "$PhysicalNames\n2\n2 5 \"electrode\"\n2 7 \"skin zone\"\n$EndPhysicalNames\n"
    "$Entities\n0 0 2 1\n"
    "1 0 0 0 1 1 1 1 7 0\n"
    "2 0 0 0 1 1 1 1 5 0\n"
    "1 0 0 0 1 1 1 0 2 1 2\n"
    "$EndEntities\n"
    "$Nodes\n2 4 1 4\n"
    "2 1 0 3\n1\n2\n3\n0 0 0\n1 0 0\n0 1 0\n"
    "2 2 0 1\n4\n0 0 1\n"
    "$EndNodes\n"
    "$Elements\n3 5 1 5\n"
    "2 1 2 3\n1 1 3 2\n2 1 2 4\n3 1 4 3\n"
    "2 2 2 1\n4 2 3 4\n"
    "3 1 4 1\n5 1 2 3 4\n"
    "$EndElements\n";

void check_tet_regions(const TriangleMesh& m) {
    REQUIRE(m.size() == 4);
    CHECK(m.vertices.size() == 4);
    CHECK(mesh_volume(m) == doctest::Approx(1.0 / 6.0).epsilon(1e-14));
    CHECK(m.region == std::vector<int>{7, 7, 7, 5});
    REQUIRE(m.region_names.size() >= 8);
    CHECK(m.region_names[5] == "electrode");
    CHECK(m.region_names[7] == "skin zone");
    // The electrode panel is the slanted face.
    CHECK(m.centroid(3).sum() == doctest::Approx(1.0));
    CHECK(inspect_mesh(m).problems.empty());
}

}  // namespace

TEST_CASE("geometry: read Gmsh MSH 2.2 with physical names") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    const TriangleMesh m = read_msh(tmp.file("tet2.msh", kTetMsh2));
    CHECK(m.name == "tet2");
    check_tet_regions(m);
    const TriangleMesh mm = read_msh(tmp.file("tet2mm.msh", kTetMsh2), 1e-3);
    CHECK(mesh_volume(mm) == doctest::Approx(1e-9 / 6.0).epsilon(1e-12));
}

TEST_CASE("geometry: read Gmsh MSH 4.1 with physical names") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    const std::string p = tmp.file("tet41.msh", kTetMsh41);
    check_tet_regions(read_msh(p));
    check_tet_regions(read_mesh(p));
}

TEST_CASE("geometry: MSH errors name the file and line") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    std::string bad = kTetMsh2;
    bad.replace(bad.find("6 2 2 5 2 2 3 4"), 15, "6 2 2 5 2 2 3 6");  // node 6 does not exist
    CHECK(error_of([&] { read_msh(tmp.file("bad.msh", bad)); }).find("bad.msh:25: triangle uses node 6") != std::string::npos);
    std::string word = kTetMsh41;
    word.replace(word.find("0 1 0\n"), 5, "0 x 0");
    CHECK(error_of([&] { read_msh(tmp.file("word.msh", word)); }).find("word.msh:23: expected a finite number, found 'x'") !=
          std::string::npos);
    CHECK(error_of([&] { read_msh(tmp.file("v3.msh", "$MeshFormat\n3.0 0 8\n$EndMeshFormat\n")); }).find("v3.msh:2") !=
          std::string::npos);
    CHECK(error_of([&] { read_msh(tmp.file("bin.msh", "$MeshFormat\n4.1 1 8\n$EndMeshFormat\n")); }).find("ASCII") !=
          std::string::npos);
    CHECK(error_of([&] { read_msh(tmp.file("none.msh", "$MeshFormat\n2.2 0 8\n$EndMeshFormat\n")); }).find("no triangles") !=
          std::string::npos);
    CHECK(error_of([&] { read_msh(tmp.file("cut.msh", "$MeshFormat\n2.2 0 8\n$EndMeshFormat\n$Nodes\n2\n1 0 0 0\n")); })
              .find("cut.msh:") != std::string::npos);
}

TEST_CASE("geometry: write_vtk writes legacy POLYDATA with cell arrays") {
    murk::testing::TempDir tmp("murk-test-geometry-io");
    TriangleMesh m = make_icosphere(1.0, 0);
    m.region[3] = 2;
    std::vector<double> values(m.size());
    for (std::size_t t = 0; t < m.size(); ++t) values[t] = 0.5 * static_cast<double>(t);
    const std::string p = tmp / ("s.vtk");
    write_vtk(p, m, {{"transdermal voltage", values}});
    std::ifstream in(p);
    std::string line;
    std::getline(in, line);
    CHECK(line == "# vtk DataFile Version 3.0");  // legacy VTK format, Kitware "VTK file formats"
    std::stringstream all;
    all << in.rdbuf();
    const std::string text = all.str();
    CHECK(text.find("DATASET POLYDATA\nPOINTS 12 double\n") != std::string::npos);
    CHECK(text.find("POLYGONS 20 80\n") != std::string::npos);
    CHECK(text.find("CELL_DATA 20\nSCALARS region int 1\nLOOKUP_TABLE default\n0\n0\n0\n2\n") != std::string::npos);
    const std::size_t at = text.find("SCALARS transdermal_voltage double 1\nLOOKUP_TABLE default\n");
    REQUIRE(at != std::string::npos);
    std::istringstream rest(text.substr(text.find("default\n", at) + 8));
    double v = 0;
    std::size_t count = 0;
    while (rest >> v) CHECK(v == 0.5 * static_cast<double>(count++));
    CHECK(count == m.size());
    CHECK_THROWS_AS(write_vtk(p, m, {{"short", {1.0}}}), InputError);
    CHECK_THROWS_AS(write_vtk(tmp / ("no/such/dir/x.vtk"), m), InputError);
}
