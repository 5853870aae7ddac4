// Tests of murk's HDF5 layer (cases/output/hdf5_file.hpp). Every file is checked two ways: read back
// through the layer, and read by h5py, an independent implementation of the reading side, so
// that a bug shared by writer and reader cannot hide.
#include "cases/output/hdf5_file.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include "tests/temp_dir.hpp"

#include <fcntl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <cmath>
#include <complex>
#include <cstdio>
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

void write_text(const std::string& path, const std::string& text) { std::ofstream(path, std::ios::binary) << text; }

// The inputs of the sample file. Every expected value in the checks below is one of these or
// computed from them by the test, never by the code under test.
const std::string kVersion = "0.1.0-test";
// Non-ASCII on purpose: the attribute must come back as UTF-8 text.
const std::string kCaseHead = "# σ = 100 µS/cm, Ω\n";
std::string case_text() { return kCaseHead + std::string(100000, 'x'); }  // larger than HDF5's 64 KiB header messages
const std::int64_t kCount = 1234567890123;  // needs more than 32 bits
const std::vector<double> kWindow = {1e-3, 2.5, -7.0};

const std::vector<double> kVertices = {0, 0, 0, 0.01, 0, 0, 0, 0.01, 0, 0, 0, 0.01};  // tetrahedron, 4 x 3, m
const std::vector<std::int32_t> kTriangles = {0, 2, 1, 0, 1, 3, 0, 3, 2, 1, 2, 3};     // 4 x 3
const std::vector<std::int64_t> kIds = {0, 5000000000, -3, 42};
const std::vector<std::uint8_t> kMask = {0, 1, 255, 7};
const std::vector<std::complex<double>> kPotential = {{1, 2}, {-0.5, 0}, {0, -3.25}};
const std::vector<double> kX = {-0.02, -0.01, 0, 0.01, 0.02};
const std::vector<double> kY = {0.01, 0.02, 0.03};
constexpr std::size_t kBigRows = 400, kBigCols = 500;
// Exactly representable, so both readers must return it bit for bit.
double big_value(std::size_t i, std::size_t j) { return static_cast<double>(i) + static_cast<double>(j) / 512.0; }
const std::vector<double> kSnrBlock = {1.5, 2.5, 3.5, 4.5, 5.5, 6.5};  // rows 1..2 of the 5 x 3 map
const std::vector<double> kPerturbation = {1e-6, -2e-6};             // point (2, 1), sensors 0..1

// Writes one file holding every kind of data the layer supports. Handles on groups and
// datasets are still alive at commit(), as they will be in real code.
void write_sample(const std::string& path) {
    H5Output out(path, false);
    H5Group root = out.root();
    root.set_attribute("murk_version", kVersion);
    root.set_attribute("case", case_text());
    root.set_attribute("count", kCount);
    root.set_attribute("threshold", 0.125);
    root.set_attribute("window", kWindow);

    H5Group body = root.group("/mesh/body");
    body.write("vertices", kVertices, {4, 3}, "m", "vertex position");
    body.write("triangles", kTriangles.data(), {4, 3}, "1", "vertex indices of each triangle");
    body.write("vertex_ids", kIds, "1", "vertex identifier");
    root.write("baseline/mask", kMask, "1", "panel is on the skin");
    root.write("baseline/potential", kPotential, "V", "electrode potential phasor");
    root.write("baseline/empty", std::vector<double>{}, "A m-2", "current density at no panels");

    H5Group sweep = root.group("sweep");
    H5Dataset x = sweep.write("x", kX, "m", "object position along the fish");
    H5Dataset y = sweep.write("y", kY, "m", "object distance from the skin");
    x.make_scale("x");
    y.make_scale("y");

    std::vector<double> big(kBigRows * kBigCols);
    for (std::size_t i = 0; i < kBigRows; ++i)
        for (std::size_t j = 0; j < kBigCols; ++j) big[i * kBigCols + j] = big_value(i, j);
    sweep.write("big", big, {kBigRows, kBigCols}, "V", "compressed test array", H5Layout::compressed(4));

    H5Dataset snr = sweep.create_filled<double>("snr", {5, 3}, "1", "signal-to-noise ratio");
    snr.attach_scale(x, 0);
    snr.attach_scale(y, 1);
    snr.write_slab<double>({1, 0}, {2, 3}, kSnrBlock);

    H5Dataset perturbation = sweep.create_filled<double>("perturbation", {5, 3, 4}, "V", "perturbation per sensor");
    perturbation.write_slab<double>({2, 1, 0}, {1, 1, 2}, kPerturbation);

    H5Dataset status = sweep.create_filled<std::uint8_t>("status", {5, 3}, "1", "1 where computed");
    status.write_slab<std::uint8_t>({2, 1}, {1, 1}, {1});
    H5Dataset peak = sweep.create_filled<std::int32_t>("peak", {5, 3}, "1", "peak sensor", {}, std::int32_t{-1});
    peak.label_dimensions({"x", "y"});
    peak.write_slab<std::int32_t>({2, 1}, {1, 1}, std::vector<std::int32_t>{0});

    out.commit();
}

// Runs `script` with Debian's Python (the first python3 on PATH cannot see h5py) on `file`;
// returns the exit status and puts what it printed in `log`.
int run_python(const TempDir& dir, const std::string& script, const std::string& file, std::string& log) {
    const std::string script_path = dir / "check.py";
    const std::string log_path = dir / "check.log";
    write_text(script_path, script);
    const std::string command = "/usr/bin/python3 '" + script_path + "' '" + file + "' > '" + log_path + "' 2>&1";
    const int status = std::system(command.c_str());
    log = read_text(log_path);
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

// Redirects stderr (the file descriptor HDF5 prints to) into a file while it lives.
class StderrCapture {
public:
    explicit StderrCapture(std::string path) : path_(std::move(path)) {
        std::fflush(stderr);
        saved_ = ::dup(2);
        const int fd = ::open(path_.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0600);
        ::dup2(fd, 2);
        ::close(fd);
    }
    ~StderrCapture() { restore(); }
    std::string finish() {
        restore();
        return read_text(path_);
    }

private:
    void restore() {
        if (saved_ < 0) return;
        std::fflush(stderr);
        ::dup2(saved_, 2);
        ::close(saved_);
        saved_ = -1;
    }
    std::string path_;
    int saved_ = -1;
};

template <class F>
std::string input_error_message(F&& f) {
    try {
        f();
    } catch (const InputError& error) {
        return error.what();
    }
    return "(no InputError)";
}

}  // namespace

TEST_CASE("hdf5: every kind of data survives a round trip through the layer") {
    // Expected values: the inputs written by write_sample (round trip).
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "sample.h5";
    write_sample(path);
    CHECK(fs::exists(path));
    CHECK_FALSE(fs::exists(H5Output::partial_path(path)));

    H5File file = H5File::open_readonly(path);
    H5Group root = file.root();
    CHECK(root.string_attribute("murk_version") == kVersion);
    CHECK(root.string_attribute("case") == case_text());
    CHECK(root.int_attribute("count") == kCount);
    CHECK(root.double_attribute("threshold") == 0.125);
    CHECK(root.double_array_attribute("window") == kWindow);

    const auto vertices = root.read<double>("/mesh/body/vertices");
    CHECK(vertices.shape == H5Shape{4, 3});
    CHECK(vertices.values == kVertices);
    const auto triangles = root.read<std::int32_t>("mesh/body/triangles");
    CHECK(triangles.shape == H5Shape{4, 3});
    CHECK(triangles.values == kTriangles);
    CHECK(root.read<std::int64_t>("mesh/body/triangles").values ==
          std::vector<std::int64_t>(kTriangles.begin(), kTriangles.end()));  // widening is allowed
    CHECK(root.read<std::int64_t>("mesh/body/vertex_ids").values == kIds);
    CHECK(root.read<std::uint8_t>("baseline/mask").values == kMask);
    CHECK(root.read<std::complex<double>>("baseline/potential").values == kPotential);
    const auto empty = root.read<double>("baseline/empty");
    CHECK(empty.shape == H5Shape{0});
    CHECK(empty.values.empty());

    H5Dataset vertices_set = root.open_group("mesh").dataset("body/vertices");
    CHECK(vertices_set.string_attribute("units") == "m");
    CHECK(vertices_set.string_attribute("long_name") == "vertex position");
    CHECK(vertices_set.kind() == H5Kind::real);
    CHECK(root.dataset("baseline/potential").kind() == H5Kind::complex);
    CHECK(root.dataset("baseline/mask").kind() == H5Kind::integer);

    const auto big = root.read<double>("sweep/big");
    REQUIRE(big.shape == H5Shape{kBigRows, kBigCols});
    std::size_t wrong = 0;
    for (std::size_t i = 0; i < kBigRows; ++i)
        for (std::size_t j = 0; j < kBigCols; ++j) wrong += big.values[i * kBigCols + j] != big_value(i, j);
    CHECK(wrong == 0);

    const auto snr = root.read<double>("sweep/snr");
    REQUIRE(snr.shape == H5Shape{5, 3});
    for (std::size_t i = 0; i < 5; ++i)
        for (std::size_t j = 0; j < 3; ++j) {
            CAPTURE(i);
            CAPTURE(j);
            if (i == 1 || i == 2) CHECK(snr.values[i * 3 + j] == kSnrBlock[(i - 1) * 3 + j]);
            else CHECK(std::isnan(snr.values[i * 3 + j]));  // never written: the fill value
        }

    H5Dataset perturbation = root.dataset("sweep/perturbation");
    CHECK(perturbation.shape() == H5Shape{5, 3, 4});
    CHECK(perturbation.read_slab<double>({2, 1, 0}, {1, 1, 2}) == kPerturbation);
    const auto unwritten = perturbation.read_slab<double>({2, 1, 2}, {1, 1, 2});  // the fill value
    CHECK(std::isnan(unwritten[0]));
    CHECK(std::isnan(unwritten[1]));
    const auto status = root.read<std::uint8_t>("sweep/status");
    CHECK(status.values == std::vector<std::uint8_t>{0, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0});
    const auto peak = root.read<std::int32_t>("sweep/peak");
    CHECK(peak.values == std::vector<std::int32_t>{-1, -1, -1, -1, -1, -1, -1, 0, -1, -1, -1, -1, -1, -1, -1});
}

TEST_CASE("hdf5: h5py reads the file as numpy types with units and named dimensions") {
    // Independent reader: h5py 3.7 on HDF5 1.10.8 (Debian python3-h5py). complex128 from the
    // compound {r, i}: h5py documentation, "Complex numbers"; dimension scales: HDF5 Dimension
    // Scale Specification (H5DS); units and long_name: CF conventions 1.10, section 3.
    // Expected values in the script are typed in again or computed by numpy from the same rules.
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "sample.h5";
    write_sample(path);
    const std::string script = R"PY(
import sys
import h5py
import numpy as np

failures = []
def check(condition, what):
    if not condition:
        failures.append(what)

f = h5py.File(sys.argv[1], "r")
a = f.attrs
for name in ("murk_version", "case"):
    check(isinstance(a[name], str), name + " attribute is " + str(type(a[name])) + ", not str")
check(a["murk_version"] == "0.1.0-test", "murk_version")
check(a["case"] == "# \u03c3 = 100 \u00b5S/cm, \u03a9\n" + "x" * 100000, "case text")
check(a["count"] == 1234567890123 and a["count"].dtype == np.int64, "count")
check(a["threshold"] == 0.125 and a["threshold"].dtype == np.float64, "threshold")
check(np.array_equal(a["window"], [1e-3, 2.5, -7.0]), "window")
check(list(a.keys()) == ["murk_version", "case", "count", "threshold", "window"], "attribute order " + str(list(a.keys())))

v = f["/mesh/body/vertices"]
check(v.dtype == np.float64 and v.shape == (4, 3), "vertices dtype/shape")
check(np.array_equal(v[...], 0.01 * np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0], [0, 0, 1]])), "vertices")
t = f["/mesh/body/triangles"]
check(t.dtype == np.int32 and np.array_equal(t[...], [[0, 2, 1], [0, 1, 3], [0, 3, 2], [1, 2, 3]]), "triangles")
ids = f["/mesh/body/vertex_ids"]
check(ids.dtype == np.int64 and list(ids[...]) == [0, 5000000000, -3, 42], "vertex_ids")
check(list(f["/mesh/body"].keys()) == ["vertices", "triangles", "vertex_ids"], "creation order " + str(list(f["/mesh/body"].keys())))
m = f["/baseline/mask"]
check(m.dtype == np.uint8 and list(m[...]) == [0, 1, 255, 7], "mask")
p = f["/baseline/potential"]
check(p.dtype == np.complex128, "potential dtype " + str(p.dtype))
check(np.array_equal(p[...], np.array([1 + 2j, -0.5 + 0j, -3.25j])), "potential")
e = f["/baseline/empty"]
check(e.shape == (0,) and e.dtype == np.float64, "empty")

big = f["/sweep/big"]
i, j = np.meshgrid(np.arange(400), np.arange(500), indexing="ij")
check(big.compression == "gzip" and big.shuffle and big.chunks is not None, "big layout")
check(np.array_equal(big[...], i + j / 512.0), "big values")

def walk(name, obj):
    if isinstance(obj, h5py.Dataset):
        for key in ("units", "long_name"):
            value = obj.attrs.get(key)
            check(isinstance(value, str) and value != "", name + " " + key + " = " + repr(value))
f.visititems(walk)
check(f["/mesh/body/vertices"].attrs["units"] == "m", "vertex units")
check(f["/baseline/potential"].attrs["units"] == "V", "potential units")
check(f["/baseline/empty"].attrs["units"] == "A m-2", "empty units")
check(f["/sweep/snr"].attrs["long_name"] == "signal-to-noise ratio", "snr long_name")

x, y, snr = f["/sweep/x"], f["/sweep/y"], f["/sweep/snr"]
check(h5py.h5ds.is_scale(x.id) and h5py.h5ds.is_scale(y.id), "x, y are dimension scales")
check(h5py.h5ds.get_scale_name(x.id) == b"x" and h5py.h5ds.get_scale_name(y.id) == b"y", "scale names")
check(len(snr.dims[0]) == 1 and snr.dims[0][0].name == "/sweep/x", "snr dim 0 -> x")
check(len(snr.dims[1]) == 1 and snr.dims[1][0].name == "/sweep/y", "snr dim 1 -> y")
check(h5py.h5ds.is_attached(snr.id, y.id, 1) and not h5py.h5ds.is_attached(snr.id, y.id, 0), "is_attached")
check(np.array_equal(x[...], [-0.02, -0.01, 0, 0.01, 0.02]), "x values")
check(snr.maxshape == (5, 3) and snr.chunks is not None, "snr chunked, of fixed size")
check("_FillValue" in snr.attrs and snr.attrs["_FillValue"].dtype == np.float64 and np.isnan(snr.attrs["_FillValue"]).all(),
      "snr _FillValue NaN")
expected = np.full((5, 3), np.nan)
expected[1:3, :] = [[1.5, 2.5, 3.5], [4.5, 5.5, 6.5]]
check(np.array_equal(snr[...], expected, equal_nan=True), "snr values")

pert = f["/sweep/perturbation"]
check(pert.shape == (5, 3, 4) and pert.maxshape == (5, 3, 4), "perturbation shape")
expected = np.full((5, 3, 4), np.nan)
expected[2, 1, 0:2] = [1e-6, -2e-6]
check(np.array_equal(pert[...], expected, equal_nan=True), "perturbation values")
status = f["/sweep/status"]
expected = np.zeros((5, 3), dtype=np.uint8)
expected[2, 1] = 1
check(status.dtype == np.uint8 and np.array_equal(status[...], expected), "status")
check("_FillValue" not in status.attrs, "status has a _FillValue, but its 0 is a code")
peak = f["/sweep/peak"]
check(list(peak.attrs["_FillValue"]) == [-1] and peak.attrs["_FillValue"].dtype == np.int32, "peak _FillValue -1 as int32")
check(peak[2, 1] == 0 and peak[0, 0] == -1, "peak values")
# The complex compound is the named datatype /complex (h5py: Datatype objects, "committed").
check(isinstance(f["complex"], h5py.Datatype) and f["complex"].dtype == np.complex128, "/complex is a named complex type")
check(p.id.get_type().committed(), "/baseline/potential uses the named type")

for failure in failures:
    print("FAILED:", failure)
sys.exit(1 if failures else 0)
)PY";
    std::string log;
    const int status = run_python(dir, script, path, log);
    INFO(log);
    CHECK(status == 0);
}

// A small file laid out as murk's results are: every group self-contained (each dimension a
// coordinate of the group), a named complex type, fixed-size filled datasets, a scalar, flags.
void write_netcdf_sample(const std::string& path) {
    H5Output out(path, false);
    H5Group root = out.root();
    root.set_attribute("Conventions", "CF-1.8");
    H5Group sweep = root.group("sweep");
    sweep.write_coordinate("distance", kY, "m", "distance");
    sweep.write_coordinate("sensor", std::vector<std::int32_t>{0, 1}, "1", "sensor index");
    sweep.write_label_coordinate("xyz", {"x", "y", "z"}, "Cartesian component");
    sweep.create_filled<std::complex<double>>("perturbation", {3, 2}, "V", "perturbation", H5Layout::compressed(4, {1, 2}))
        .label_dimensions({"distance", "sensor"})
        .write_slab<std::complex<double>>({1, 0}, {1, 2}, {{1, 2}, {-0.5, 0}});
    const H5Dataset status = sweep.create_filled<std::uint8_t>("status", {3}, "1", "what happened");
    status.label_dimensions({"distance"}).set_flags<std::uint8_t>({0, 1, 2}, "not_computed computed masked");
    status.write_slab<std::uint8_t>({1}, {1}, {1});
    sweep.create_filled<double>("peak", {3}, "V", "peak").label_dimensions({"distance"}).write_slab<double>({1}, {1}, {2.5});
    sweep.write("position", std::vector<double>{0, 0, 0.01, 0, 0, 0.02, 0, 0, 0.03}, {3, 3}, "m", "position")
        .label_dimensions({"distance", "xyz"});
    sweep.write("exponent", std::vector<double>{-3.9}, {}, "1", "fitted exponent");
    H5Group detection = root.group("detection");
    detection.write_coordinate("size", kX, "m", "size");
    detection.write("range", std::vector<double>{0.01, NAN, 0.02, 0.03, 0.04}, "m", "range")
        .label_dimensions({"size"})
        .set_fill_value(std::numeric_limits<double>::quiet_NaN());
    out.commit();
}

TEST_CASE("hdf5: xarray (h5netcdf and netCDF4 engines) and ncdump read self-contained groups") {
    // Independent readers: xarray 2023.01 with h5netcdf 1.1 and with netCDF4-python 1.6.2 on
    // netCDF-C 4.9.0, and ncdump (Debian python3-xarray, python3-h5netcdf, python3-netcdf4,
    // netcdf-bin). Expected values are the inputs of write_netcdf_sample, typed in again.
    // What a netCDF reader makes of HDF5: dimension scales become named dimensions (netCDF
    // User's Guide, "Interoperability with HDF5"); a named compound becomes a user-defined type,
    // which netCDF4-python returns as a numpy structured array (its documentation, "Compound
    // data types") and h5netcdf, through h5py, as complex128 (h5py documentation, "Complex numbers").
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "netcdf.h5";
    write_netcdf_sample(path);
    const std::string script = R"PY(
import subprocess, sys, warnings
import numpy as np
import xarray as xr
warnings.simplefilter("ignore")  # xarray's notes about engines are not failures
path = sys.argv[1]
failures = []
def check(condition, what):
    if not condition:
        failures.append(what)

for engine in ("h5netcdf", "netcdf4"):
    for group in ("/", "sweep", "detection"):
        try:
            xr.open_dataset(path, group=group, engine=engine).close()
        except Exception as error:
            failures.append(f"{engine} cannot open {group}: {error}")
    s = xr.open_dataset(path, group="sweep", engine=engine)
    check(s.perturbation.dims == ("distance", "sensor"), engine + " perturbation dims " + str(s.perturbation.dims))
    check(list(s.distance.values) == [0.01, 0.02, 0.03] and s.distance.attrs["units"] == "m", engine + " distance")
    check(list(s.xyz.values) == ["x", "y", "z"], engine + " xyz labels " + str(s.xyz.values))
    check(s.position.sel(xyz="z", distance=0.02).item() == 0.02, engine + " position by label")
    check(s.status.dtype == np.uint8 and list(s.status.values) == [0, 1, 0], engine + " status, 0 not masked")
    check(list(s.status.attrs["flag_values"]) == [0, 1, 2], engine + " flag_values")
    check(s.status.attrs["flag_meanings"] == "not_computed computed masked", engine + " flag_meanings")
    check(s.peak.values[1] == 2.5 and np.isnan(s.peak.values[[0, 2]]).all(), engine + " peak")
    check(s.exponent.shape == () and s.exponent.item() == -3.9, engine + " scalar")
    p = s.perturbation.values
    if engine == "h5netcdf":
        check(p.dtype == np.complex128 and p[1, 0] == 1 + 2j and p[1, 1] == -0.5, "h5netcdf complex " + str(p.dtype))
        check(np.isnan(p[0]).all(), "h5netcdf complex fill")
    else:
        check(p.dtype.names == ("r", "i"), "netCDF4 complex as a structured array: " + str(p.dtype))
        check(p["r"][1, 0] == 1 and p["i"][1, 0] == 2 and p["r"][1, 1] == -0.5, "netCDF4 complex parts")
    d = xr.open_dataset(path, group="detection", engine=engine)
    check(list(d.size.values) == [-0.02, -0.01, 0, 0.01, 0.02], engine + " detection has its own size axis")
    check(np.isnan(d.range.values[1]) and d.range.values[2] == 0.02, engine + " range")

header = subprocess.run(["ncdump", "-h", path], capture_output=True, text=True)
check(header.returncode == 0, "ncdump -h failed: " + header.stderr)
check("compound complex" in header.stdout and "complex perturbation(distance, sensor)" in header.stdout,
      "ncdump does not show the named complex type and the complex variable")
for failure in failures:
    print("FAILED:", failure)
sys.exit(1 if failures else 0)
)PY";
    std::string log;
    const int status = run_python(dir, script, path, log);
    INFO(log);
    CHECK(status == 0);
}

TEST_CASE("hdf5: an output abandoned before commit leaves no file behind") {
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "out.h5";
    const std::string partial = H5Output::partial_path(path);
    {
        H5Output out(path, false);
        out.root().write("a", std::vector<double>{1, 2, 3}, "m", "something");
        out.file().flush();
        CHECK(fs::exists(partial));  // written under the temporary name ...
        CHECK_FALSE(fs::exists(path));  // ... never under the final one
    }
    CHECK_FALSE(fs::exists(path));
    CHECK_FALSE(fs::exists(partial));

    // The same when an exception unwinds through the writer.
    CHECK_THROWS_AS(
        [&] {
            H5Output out(path, false);
            H5Group g = out.root().group("mesh");
            g.write("a", std::vector<std::int32_t>{1, 2}, "1", "something");
            throw std::runtime_error("solver failed");
        }(),
        std::runtime_error);
    CHECK_FALSE(fs::exists(path));
    CHECK_FALSE(fs::exists(partial));
    CHECK(fs::is_empty(dir.path));
}

TEST_CASE("hdf5: an existing output is kept unless overwrite is asked for") {
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "out.h5";
    write_text(path, "an earlier result");

    CHECK(input_error_message([&] { H5Output(path, false, "pass --force to replace it"); }) ==
          path + " exists; pass --force to replace it");
    CHECK(input_error_message([&] { H5Output(path, false); }) == path + " exists");
    CHECK(read_text(path) == "an earlier result");
    CHECK_FALSE(fs::exists(H5Output::partial_path(path)));

    {
        H5Output out(path, true);
        H5Group root = out.root();
        root.set_attribute("murk_version", "new");
        CHECK(read_text(path) == "an earlier result");  // untouched until commit
        out.commit();
        // commit() closed the file under the group still in scope: no writing after the end.
        CHECK_THROWS_AS(root.set_attribute("late", 1.0), std::runtime_error);
        CHECK_THROWS_AS(out.file(), std::logic_error);
    }
    CHECK(H5File::open_readonly(path).root().string_attribute("murk_version") == "new");
    CHECK_FALSE(fs::exists(H5Output::partial_path(path)));
}

TEST_CASE("hdf5: an output that appears while running is not replaced, and the result is kept") {
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "out.h5";
    const std::string partial = H5Output::partial_path(path);
    {
        H5Output out(path, false, "pass --force to replace it");
        out.root().set_attribute("murk_version", "mine");
        write_text(path, "someone else's");
        const std::string message = input_error_message([&] { out.commit(); });
        CHECK(message.find(path + " exists") == 0);
        CHECK(message.find(partial) != std::string::npos);
    }
    CHECK(read_text(path) == "someone else's");
    REQUIRE(fs::exists(partial));
    CHECK(H5File::open_readonly(partial).root().string_attribute("murk_version") == "mine");
}

TEST_CASE("hdf5: a partial file left by a dead run is replaced by a new run") {
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "out.h5";
    write_text(H5Output::partial_path(path), "debris of a killed run");
    {
        H5Output out(path, false);
        out.root().set_attribute("count", 7);
        out.commit();
    }
    CHECK(H5File::open_readonly(path).root().int_attribute("count") == 7);
    CHECK_FALSE(fs::exists(H5Output::partial_path(path)));
}

TEST_CASE("hdf5: an output can be written under a temporary name of the caller's choosing") {
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "out.h5";
    const std::string temp = dir / "out.h5.writing";
    {
        H5Output out(path, false, "", temp);
        out.root().set_attribute("count", 3);
        CHECK(fs::exists(temp));
        CHECK_FALSE(fs::exists(H5Output::partial_path(path)));
        out.commit();
    }
    CHECK_FALSE(fs::exists(temp));
    CHECK(H5File::open_readonly(path).root().int_attribute("count") == 3);
    {
        H5Output abandoned(dir / "other.h5", false, "", dir / "other.h5.writing");
    }
    CHECK_FALSE(fs::exists(dir / "other.h5.writing"));
}

TEST_CASE("hdf5: bad files and paths are InputErrors naming the file") {
    TempDir dir("murk-test-hdf5");
    const std::string missing = dir / "missing.h5";
    CHECK(input_error_message([&] { H5File::open_readonly(missing); }) == missing + ": no such file");
    const std::string text = dir / "text.h5";
    write_text(text, "not HDF5 at all");
    CHECK(input_error_message([&] { H5File::open_readwrite(text); }) == text + " is not an HDF5 file");
    CHECK(input_error_message([&] { H5File::create(text); }) == text + " exists");
    const std::string nowhere = dir / "no/such/dir/out.h5";
    CHECK(input_error_message([&] { H5Output(nowhere, false); }) ==
          nowhere + ": directory " + (dir.path / "no/such/dir").string() + " does not exist");

    const std::string path = dir / "sample.h5";
    {
        H5Output out(path, false);
        out.root().set_attribute("threshold", 0.5);
        out.root().write("ids", std::vector<std::int64_t>{1, 2}, "1", "ids");
        out.root().write("grid", std::vector<double>{1, 2}, "m", "grid");
        out.commit();
    }
    H5File file = H5File::open_readonly(path);
    H5Group r = file.root();
    CHECK(input_error_message([&] { r.string_attribute("nope"); }) == path + ": / has no attribute 'nope'");
    CHECK(input_error_message([&] { r.int_attribute("threshold"); }) ==
          path + ": attribute 'threshold' of / holds 64-bit reals, expected an integer");
    CHECK(input_error_message([&] { r.string_attribute("threshold"); }) ==
          path + ": attribute 'threshold' of / holds 64-bit reals, expected a string");
    CHECK(input_error_message([&] { r.read<std::int32_t>("ids"); }) ==
          path + ": dataset /ids holds 64-bit signed integers, which cannot be read as int32");
    CHECK(input_error_message([&] { r.read<double>("ids"); }) ==
          path + ": dataset /ids holds 64-bit signed integers, which cannot be read as double");
    CHECK(input_error_message([&] { r.dataset("sweep/snr"); }) == path + ": no dataset /sweep/snr");
    CHECK(input_error_message([&] { r.open_group("mesh"); }) == path + ": no group /mesh");
    CHECK(input_error_message([&] { r.open_group("grid"); }) == path + ": /grid is not a group");
    CHECK(input_error_message([&] { r.dataset("/"); }) == path + ": / is not a dataset");
}

TEST_CASE("hdf5: HDF5 failures are exceptions naming the call and object, and print nothing") {
    TempDir dir("murk-test-hdf5");
    const std::string path = dir / "out.h5";
    H5Output out(path, false);
    H5Group body = out.root().group("mesh/body");
    body.write("vertices", kVertices, {4, 3}, "m", "vertex position");

    StderrCapture capture(dir / "stderr.txt");
    std::string message;
    try {
        body.write("vertices", kVertices, {4, 3}, "m", "vertex position");  // exists already
    } catch (const std::runtime_error& error) {
        message = error.what();
    }
    const std::string printed = capture.finish();
    CHECK(message.find("H5Dcreate2") != std::string::npos);
    CHECK(message.find(H5Output::partial_path(path) + ":/mesh/body/vertices") != std::string::npos);
    CHECK(printed.empty());

    // Misuse by the calling code is caught before HDF5 sees it.
    H5Dataset map = out.root().create_filled<double>("map", {5, 3}, "V", "map");
    H5Dataset x = out.root().write("x", kX, "m", "x");
    H5Dataset y = out.root().write("y", kY, "m", "y");
    CHECK_THROWS_AS(map.attach_scale(x, 0), std::invalid_argument);  // not yet a scale
    x.make_scale("x");
    y.make_scale("y");
    CHECK_THROWS_AS(map.attach_scale(y, 0), std::invalid_argument);  // 3 values for a dimension of 5
    CHECK_THROWS_AS(map.attach_scale(x, 2), std::invalid_argument);  // no dimension 2
    CHECK_THROWS_AS(map.write_slab<double>({4, 0}, {2, 3}, std::vector<double>(6)), std::out_of_range);
    CHECK_THROWS_AS(map.write_slab<std::int64_t>({0, 0}, {1, 1}, {1}), std::invalid_argument);  // wrong kind
    CHECK_THROWS_AS(out.root().write("bad", kX, {2, 2}, "m", "x"), std::invalid_argument);     // 5 values for 4
    CHECK_THROWS_AS(out.root().write("nounits", kX, "", "x"), std::invalid_argument);
    CHECK_THROWS_AS(map.label_dimensions({"x"}), std::invalid_argument);          // two dimensions, one name
    CHECK_THROWS_AS(map.label_dimensions({"x", "z"}), std::invalid_argument);     // no coordinate z
    CHECK_THROWS_AS(map.label_dimensions({"y", "x"}), std::invalid_argument);     // lengths 3 and 5 for 5 and 3
    CHECK_THROWS_AS(map.set_flags<double>({0, 1}, "one"), std::invalid_argument);  // two codes, one word
    CHECK_THROWS_AS(map.set_fill_value<std::int32_t>(-1), std::invalid_argument);  // not the data's type
    CHECK_THROWS_AS(out.root().create_filled<double>("scalar", {}, "V", "s"), std::invalid_argument);
}

TEST_CASE("hdf5: no HDF5 identifier outlives its owner, also when an exception is thrown") {
    // HDF5 1.10 has no public count of open dataspaces, datatypes and property lists
    // (H5Inmembers refuses library types). But each kind of identifier is numbered by its own
    // counter (observed in HDF5 1.10.8, H5I.c), so every identifier made between two probes
    // lies between their numbers: any of those still valid afterwards has leaked.
    struct Probe {
        hid_t (*make)();
        herr_t (*close)(hid_t);
    };
    const Probe probes[] = {
        {[] { return H5Screate(H5S_SCALAR); }, H5Sclose},
        {[] { return H5Tcopy(H5T_NATIVE_INT); }, H5Tclose},
        {[] { return H5Pcreate(H5P_DATASET_CREATE); }, H5Pclose},
    };
    auto probe_all = [&] {
        std::vector<hid_t> ids;
        for (const Probe& probe : probes) {
            ids.push_back(probe.make());
            probe.close(ids.back());
        }
        return ids;
    };
    TempDir dir("murk-test-hdf5");
    const std::vector<hid_t> first = probe_all();
    {
        const std::string path = dir / "sample.h5";
        write_sample(path);
        H5File file = H5File::open_readonly(path);
        H5Group root = file.root();
        CHECK(root.string_attribute("case") == case_text());
        CHECK(root.read<std::complex<double>>("baseline/potential").values == kPotential);
        CHECK(root.dataset("sweep/perturbation").read_slab<double>({2, 1, 0}, {1, 1, 2}) == kPerturbation);
        CHECK_THROWS_AS(root.read<std::int32_t>("mesh/body/vertex_ids"), InputError);

        // Groups, datasets and attributes would be closed with their file in any case; count
        // them while it is open, with HDF5's own count.
        H5Output out(dir / "failing.h5", false);
        H5Group out_root = out.root();
        {
            H5Dataset a = out_root.write("sweep/a", kX, "m", "a");
            a.make_scale("a");
            out_root.create_filled<double>("sweep/b", {5}, "V", "b").attach_scale(a, 0);
            out_root.group("mesh/body").set_attribute("n", 3);
            // Copies share one identifier; the last one closes it.
            H5Group copy = out_root.group("mesh");
            {
                H5Group original = out_root.group("mesh/body");
                copy = original;
                H5Dataset scale_copy(a);
                scale_copy.set_attribute("copied", 1.0);
            }
            CHECK(copy.path() == "/mesh/body");
            copy.set_attribute("still", "open");
            CHECK(copy.string_attribute("still") == "open");
            CHECK(a.double_attribute("copied") == 1.0);
            CHECK_THROWS_AS(out_root.write("sweep/a", kX, "m", "a"), std::runtime_error);
            CHECK_THROWS_AS(out_root.dataset("nothing"), InputError);
        }
        const hid_t file_id = H5Iget_file_id(out_root.id());
        const ssize_t open_objects =
            H5Fget_obj_count(file_id, H5F_OBJ_GROUP | H5F_OBJ_DATASET | H5F_OBJ_ATTR | H5F_OBJ_DATATYPE);
        H5Fclose(file_id);
        CHECK(open_objects == 1);  // out_root itself
    }
    const std::vector<hid_t> last = probe_all();
    for (std::size_t k = 0; k < first.size(); ++k) {
        CAPTURE(k);
        REQUIRE(last[k] > first[k]);
        std::size_t leaked = 0;
        for (hid_t id = first[k] + 1; id < last[k]; ++id) leaked += H5Iis_valid(id) > 0;
        CHECK(leaked == 0);
    }
}
