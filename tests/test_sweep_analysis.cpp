// Stage `analysis` of murk run (cases/sweep/sweep_analysis): from what /sweep holds,
// the falloff per line along the distance axis (/falloff) and the detection range
// (/detection). The sweep values are written here by hand from closed forms: a
// peak that falls exactly as distance^-4 (so every exponent is -4 to rounding),
// and detection probabilities linear in ln(distance) that cross the level at a
// distance known in closed form.
#include "cases/output/hdf5_file.hpp"
#include "cases/sweep/sweep_analysis.hpp"
#include "temp_dir.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <vector>

using namespace murk;

namespace {

// Axes: size (2 values) x distance (6 values, 1 cm .. 32 cm doubling).
std::vector<SweepAxis> axes() {
    SweepAxis size{AxisKind::size, "size", "m", "size", {0.001, 0.002}};
    SweepAxis distance{AxisKind::distance, "distance", "m", "distance", {}};
    for (int k = 0; k < 6; ++k) distance.values.push_back(0.01 * std::pow(2.0, k));
    return {size, distance};
}

void write_sweep(H5Group& root, const std::vector<SweepAxis>& ax, const std::vector<double>& peak,
                 const std::vector<double>& pd) {
    H5Group sweep = root.group("sweep");
    for (const SweepAxis& a : ax) sweep.write(a.name, a.values, a.units, a.long_name).make_scale(a.name);
    sweep.write("peak_perturbation", peak, {2, 6}, "V", "peak");
    sweep.write("detection_probability", pd, {2, 6}, "1", "P_D");
}

}  // namespace

TEST_CASE("analysis: an exact fourth-power falloff gives exponent -4 and a range where P_D crosses the level") {
    testing::TempDir dir;
    const std::vector<SweepAxis> ax = axes();
    std::vector<double> peak, pd;
    for (std::size_t s = 0; s < 2; ++s)
        for (double d : ax[1].values) {
            peak.push_back(1e-6 * (s + 1) * std::pow(d / 0.01, -4.0));
            // Size 0: P_D = 0.9 - 0.1 ln(d / 1 cm) / ln 2, which is 0.5 at d = 16 cm
            // exactly (a computed distance). Size 1: 1 everywhere (beyond the sweep).
            pd.push_back(s == 0 ? 0.9 - 0.1 * std::log(d / 0.01) / std::log(2.0) : 1.0);
        }
    {
        H5File file = H5File::create((dir.path / "a.h5").string());
        H5Group root = file.root();
        write_sweep(root, ax, peak, pd);
        DetectionSpec detection;
        detection.probability_level = 0.5;
        write_sweep_analysis(root, ax, detection);
        file.close();
    }
    const H5File file = H5File::open_readonly((dir.path / "a.h5").string());
    const H5Group root = file.root();
    for (double e : root.read<double>("falloff/exponent").values) CHECK(e == doctest::Approx(-4.0).epsilon(1e-9));
    for (double e : root.read<double>("falloff/local_exponent").values) CHECK(e == doctest::Approx(-4.0).epsilon(1e-9));
    for (std::uint8_t f : root.read<std::uint8_t>("falloff/near_fourth_power").values) CHECK(f == 1);
    const std::vector<double> range = root.read<double>("detection/range").values;
    const std::vector<std::uint8_t> status = root.read<std::uint8_t>("detection/status").values;
    REQUIRE(range.size() == 2);
    CHECK(status[0] == 1);  // crossed inside the sweep
    CHECK(range[0] == doctest::Approx(0.16).epsilon(1e-9));
    CHECK(status[1] == 2);  // detectable at every distance swept
    CHECK(std::isnan(range[1]));
}

TEST_CASE("analysis: points not computed (NaN) leave a line unknown, and nothing is made up") {
    testing::TempDir dir;
    const std::vector<SweepAxis> ax = axes();
    const double nan = std::nan("");
    std::vector<double> peak(12, nan), pd(12, nan);
    for (int k = 0; k < 6; ++k) peak[6 + k] = std::pow(ax[1].values[k], -3.0), pd[6 + k] = 0.0;
    {
        H5File file = H5File::create((dir.path / "b.h5").string());
        H5Group root = file.root();
        write_sweep(root, ax, peak, pd);
        DetectionSpec detection;
        detection.probability_level = 0.5;
        write_sweep_analysis(root, ax, detection);
        file.close();
    }
    const H5File file = H5File::open_readonly((dir.path / "b.h5").string());
    const H5Group root = file.root();
    const std::vector<double> exponent = root.read<double>("falloff/exponent").values;
    CHECK(std::isnan(exponent[0]));
    CHECK(exponent[1] == doctest::Approx(-3.0).epsilon(1e-9));
    const std::vector<std::uint8_t> status = root.read<std::uint8_t>("detection/status").values;
    CHECK(status[0] == 0);  // no point computed
    CHECK(status[1] == 3);  // never detectable within the sweep
}
