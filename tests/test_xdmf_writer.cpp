// Tests of the XDMF sidecar (cases/output/xdmf_writer.hpp). The sidecar is read back by independent
// readers, never by murk: meshio's XDMF reader (the one ParaView users also meet in Python
// pipelines) for a single surface, and Python's XML parser with h5py for a collection of
// surfaces, which meshio does not read. Expected values are the test's own inputs.
#include "cases/output/hdf5_file.hpp"
#include "cases/output/xdmf_writer.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include "tests/temp_dir.hpp"

#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

namespace fs = std::filesystem;
using namespace murk;
using murk::testing::read_text;
using murk::testing::TempDir;

namespace {

// An octahedron of radius 1 cm: 6 vertices, 8 triangles, outward counter-clockwise.
const std::vector<double> kVertices = {0.01, 0, 0, -0.01, 0, 0, 0, 0.01, 0, 0, -0.01, 0, 0, 0, 0.01, 0, 0, -0.01};
const std::vector<std::int32_t> kTriangles = {0, 2, 4, 2, 1, 4, 1, 3, 4, 3, 0, 4,
                                              2, 0, 5, 1, 2, 5, 3, 1, 5, 0, 3, 5};
// One value per panel; exactly representable, so the readers must return them bit for bit.
const std::vector<double> kVoltage = {1.5e-3, 1.25e-3, -0.5e-3, 0.0, 2.0e-3, -1.0e-3, 0.75e-3, 0.125e-3};
const std::vector<double> kChange = {0.5e-6, 0.25e-6, 0.125e-6, 1.0e-6, 2.0e-6, 4.0e-6, 8.0e-6, 16.0e-6};

// Writes the octahedron as /mesh/<name> with two per-panel datasets, as murk solve lays them out.
void write_mesh_file(const std::string& path, const std::vector<std::string>& names) {
    H5File file = H5File::create(path);
    for (const std::string& name : names) {
        H5Group mesh = file.root().group("mesh/" + name);
        mesh.write("vertices", kVertices, {6, 3}, "m", "vertex coordinates");
        mesh.write("triangles", kTriangles, {8, 3}, "1", "vertex indices of each panel");
        file.root().write("baseline/" + name + "/transdermal_voltage", kVoltage, "V", "transdermal voltage");
        file.root().write("difference/" + name + "/transdermal_voltage", kChange, "V", "change of it");
    }
    file.close();
}

XdmfSurface octahedron(const std::string& name) {
    return {"/mesh/" + name, 6, 8,
            {{"baseline transdermal voltage (V)", "/baseline/" + name + "/transdermal_voltage"},
             {"change of transdermal voltage (V)", "/difference/" + name + "/transdermal_voltage"}}};
}

// Runs a Python script with Debian's Python (the one that sees h5py and meshio); returns its
// exit status and puts what it printed in `log`.
int run_python(const TempDir& dir, const std::string& script, const std::string& argument, std::string& log) {
    const std::string script_path = dir / "check.py", log_path = dir / "check.log";
    std::ofstream(script_path) << script;
    const std::string command =
        "/usr/bin/python3 '" + script_path + "' '" + argument + "' > '" + log_path + "' 2>&1";
    const int status = std::system(command.c_str());
    log = read_text(log_path);
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string python_list(const std::vector<double>& values) {
    std::ostringstream s;
    s.precision(17);
    s << "[";
    for (double v : values) s << v << ",";
    return s.str() + "]";
}

}  // namespace

TEST_CASE("xdmf: meshio reads a one-surface sidecar: points, triangles and per-panel values") {
    TempDir dir("murk-test-xdmf");
    write_mesh_file(dir / "result.h5", {"fish"});
    write_xdmf_sidecar(dir / "result.xdmf", "result.h5", {octahedron("fish")});
    CHECK_FALSE(fs::exists(dir / "result.xdmf.partial"));

    // Run from another folder: the file name in the sidecar must resolve against the sidecar.
    const std::string script =
        "import sys, numpy as np, meshio\n"
        "m = meshio.read(sys.argv[1])\n"
        "assert m.points.shape == (6, 3), m.points.shape\n"
        "assert np.array_equal(m.points.ravel(), " + python_list(kVertices) + "), m.points\n"
        "assert len(m.cells) == 1 and m.cells[0].type == 'triangle', m.cells\n"
        "assert m.cells[0].data.shape == (8, 3), m.cells[0].data.shape\n"
        "assert m.cells[0].data[3].tolist() == [3, 0, 4], m.cells[0].data\n"
        "v = m.cell_data['baseline transdermal voltage (V)'][0]\n"
        "assert np.array_equal(v, " + python_list(kVoltage) + "), v\n"
        "d = m.cell_data['change of transdermal voltage (V)'][0]\n"
        "assert d[7] == 16e-6, d\n";
    std::string log;
    CHECK_MESSAGE(run_python(dir, script, dir / "result.xdmf", log) == 0, log);
}

TEST_CASE("xdmf: several surfaces form a spatial collection whose references resolve in the HDF5 file") {
    TempDir dir("murk-test-xdmf");
    write_mesh_file(dir / "two.h5", {"fish", "prey"});
    write_xdmf_sidecar(dir / "two.xdmf", "two.h5", {octahedron("fish"), octahedron("prey")});

    // Every DataItem names a dataset that h5py finds with the declared dimensions and type.
    const std::string script =
        "import sys, os, h5py, xml.etree.ElementTree as ET\n"
        "root = ET.parse(sys.argv[1]).getroot()\n"
        "assert root.tag == 'Xdmf' and root.get('Version') == '3.0'\n"
        "coll = root.find('Domain/Grid')\n"
        "assert coll.get('GridType') == 'Collection' and coll.get('CollectionType') == 'Spatial'\n"
        "grids = coll.findall('Grid')\n"
        "assert [g.get('Name') for g in grids] == ['fish', 'prey'], [g.get('Name') for g in grids]\n"
        "kinds = {'Float': 'f', 'Int': 'i'}\n"
        "items = 0\n"
        "for g in grids:\n"
        "    assert g.find('Topology').get('TopologyType') == 'Triangle'\n"
        "    assert g.find('Geometry').get('GeometryType') == 'XYZ'\n"
        "    assert len(g.findall('Attribute')) == 2\n"
        "    for item in g.iter('DataItem'):\n"
        "        name, path = item.text.split(':')\n"
        "        with h5py.File(os.path.join(os.path.dirname(sys.argv[1]), name), 'r') as f:\n"
        "            d = f[path]\n"
        "            assert list(d.shape) == [int(x) for x in item.get('Dimensions').split()], (path, d.shape)\n"
        "            assert d.dtype.kind == kinds[item.get('DataType')], (path, d.dtype)\n"
        "            assert d.dtype.itemsize == int(item.get('Precision')), (path, d.dtype)\n"
        "        items += 1\n"
        "assert items == 8, items\n";
    std::string log;
    CHECK_MESSAGE(run_python(dir, script, dir / "two.xdmf", log) == 0, log);
}

TEST_CASE("xdmf: names that XML reserves are escaped") {
    XdmfSurface s = octahedron("fish");
    s.cell_attributes = {{"|dV| <peak> & \"more\"", "/difference/fish/transdermal_voltage"}};
    const std::string text = xdmf_text("r.h5", {s});
    CHECK(text.find("Name=\"|dV| &lt;peak&gt; &amp; &quot;more&quot;\"") != std::string::npos);
}

TEST_CASE("xdmf: a sidecar replaces an older one, and bad names and folders are input errors") {
    TempDir dir("murk-test-xdmf");
    std::ofstream(dir / "r.xdmf") << "old";
    write_xdmf_sidecar(dir / "r.xdmf", "r.h5", {octahedron("fish")});
    CHECK(read_text(dir / "r.xdmf").rfind("<?xml", 0) == 0);

    CHECK_THROWS_AS(write_xdmf_sidecar(dir / "no_such_dir/r.xdmf", "r.h5", {octahedron("fish")}), InputError);
    CHECK_THROWS_AS(write_xdmf_sidecar(dir / "c.xdmf", "run:1.h5", {octahedron("fish")}), InputError);
    CHECK_FALSE(fs::exists(dir / "c.xdmf"));
    CHECK_THROWS_AS(xdmf_text("r.h5", {}), std::invalid_argument);
    CHECK(xdmf_sidecar_path("out/run.h5") == "out/run.xdmf");
}
