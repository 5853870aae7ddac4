// murk layout's bound on the target's position: what the result file holds at one grid point
// against the Cramér-Rao bound worked out here from a finite-difference gradient of the
// dipole model's reading changes, and the masking of points the bound does not trust.
#include "cases/design/localization_bound.hpp"
#include "cases/input/case_reader.hpp"
#include "cases/layout/layout_evaluation.hpp"
#include "cases/layout/layout_localization.hpp"
#include "cases/layout/layout_readout.hpp"
#include "cases/layout/layout_run.hpp"
#include "cases/layout/target_grid.hpp"
#include "cases/output/hdf5_file.hpp"
#include "cases/scene/scene_builder.hpp"
#include "solver/target_derivatives.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <string>

using namespace murk;
namespace fs = std::filesystem;

namespace {

// A 40 cm capsule at a coarse 3 cm panel size, read by two rings and two patches (rings
// alone, being axially symmetric, cannot tell where around the axis the target is: their
// bound is singular); the grid lies 16-20 cm from its axis, more
// than kMinBoundClearance panel diameters from every panel, except one row close to the hull.
const std::string kCase = R"toml(title = "t"
[water]
conductivity = "200 uS/cm"
[mesh]
panel_size = "3 cm"
[robot]
shape = "capsule"
radius = "2.5 cm"
overall_length = "40 cm"
[[robot.electrode]]
name = "nose"
form = "ring"
from = "14 cm"
to = "18 cm"
[[robot.electrode]]
name = "tail"
form = "ring"
from = "-18 cm"
to = "-14 cm"
[[robot.electrode]]
name = "a"
form = "ring"
from = "-10 cm"
to = "-7 cm"
[[robot.electrode]]
name = "b"
form = "ring"
from = "7 cm"
to = "10 cm"
[[robot.electrode]]
name = "top"
form = "patch"
at = ["4.25 cm", "0 cm", "2.5 cm"]
radius = "1.5 cm"
[[robot.electrode]]
name = "side"
form = "patch"
at = ["-4.25 cm", "2.5 cm", "0 cm"]
radius = "1.5 cm"
[[robot.electrode]]
name = "mid"
form = "ring"
from = "-1.5 cm"
to = "1.5 cm"
[[layout]]
name = "ref"
emitters = [{ electrode = "nose", current = "50 uA" }, { electrode = "tail", current = "-50 uA" }]
read = "reference"
sensors = ["a", "b", "top", "side"]
reference = "mid"
[[object]]
name = "target"
shape = "sphere"
radius = "1 cm"
position = ["0 cm", "8 cm", "0 cm"]
conductivity = "conductor"
[sweep]
object = "target"
[sweep.grid]
origin = ["0 cm", "0 cm", "1 cm"]
u_direction = [1, 0, 0]
v_direction = [0, 1, 0]
u = { from = "-6 cm", to = "6 cm", count = 2 }
v = { from = "5 cm", to = "20 cm", count = 2 }
[detection]
amplifier_noise = "30 nV/sqrt(Hz)"
integration_time = "2 ms"
localization_accuracy = "5 mm"
)toml";

// Central differences (step h = 0.1 mm) of the dipole model's reading changes at x with
// respect to x, y, z and, given `sizes` (the case with two target sizes a - h_a and a + h_a),
// the size: reading changes with the closed-form tensors at those two sizes.
Eigen::MatrixXd finite_difference_gradient(const CaseSpec& spec, const TargetGrid& grid, const Eigen::Vector3d& x,
                                           const TargetGrid* sizes = nullptr) {
    const FixedPart<double> fixed(build_scene<double>(layout_fixed_case(spec, 0, grid), true), QuadratureOptions{});
    const LayoutReadout readout = layout_readout(spec.layouts[0], fixed);
    const LeadFields<double> lead(fixed, readout.rows);
    const double h = 1e-4;
    Eigen::MatrixXd G(readout.rows.rows(), sizes ? 4 : 3);
    for (int k = 0; k < 3; ++k) {
        Eigen::Matrix3Xd pm(3, 2);
        pm.col(0) = x + h * Eigen::Vector3d::Unit(k);
        pm.col(1) = x - h * Eigen::Vector3d::Unit(k);
        const TargetResponse<double> r = target_response(lead, pm, Eigen::Matrix3d(grid.polarization[0]));
        G.col(k) = (r.change.col(0) - r.change.col(1)) / (2 * h);
    }
    if (sizes) {
        const Eigen::Matrix3Xd at = x;
        const double step = sizes->size_m[1] - sizes->size_m[0];
        G.col(3) = (target_response(lead, at, Eigen::Matrix3d(sizes->polarization[1])).change.col(0) -
                    target_response(lead, at, Eigen::Matrix3d(sizes->polarization[0])).change.col(0)) / step;
    }
    return G;
}

}  // namespace

// The bound is the Cramér-Rao bound J^-1, J = G^T C^-1 G (Kay 1993, "Fundamentals of
// Statistical Signal Processing, Vol. I: Estimation Theory", ch. 3). Here G is formed by
// central differences of the dipole model's reading changes (common practice; step 0.1 mm
// against a 16 cm distance: truncation ~(h/r)^2 ~ 1e-7), not by target_response's gradient.
TEST_CASE("layout localization: the written bound equals the bound from a finite-difference gradient") {
    const fs::path dir = fs::temp_directory_path() / "murk_test_layout_localization";
    fs::create_directories(dir);
    const std::string path = (dir / "bound.h5").string();
    fs::remove(path);
    const CaseSpec spec = read_case_text(kCase, "case.toml");
    LayoutOptions options;
    options.output_path = path;
    options.quiet = true;
    run_layouts(spec, options);

    const H5File file = H5File::open_readonly(path);
    const H5Group g = file.root().open_group("layouts/ref");
    const H5Array<double> sd = g.read<double>("position_sd");
    const H5Array<double> axes = g.read<double>("error_semi_axes");
    const H5Array<double> directions = g.read<double>("error_axes");
    const H5Array<std::uint8_t> status = g.read<std::uint8_t>("localization_status");
    const double rms = g.read<double>("channel_noise").values.at(0);
    REQUIRE(sd.shape == H5Shape{1, 2, 2, 3});
    REQUIRE(directions.shape == H5Shape{1, 2, 2, 3, 3});
    REQUIRE(status.values.size() == 4);

    // Grid point (u = 6 cm, v = 20 cm): flat index 1 * 2 + 1.
    const std::size_t j = 3;
    REQUIRE(status.values[j] == static_cast<std::uint8_t>(LocalizationStatus::ok));
    const TargetGrid grid = target_grid(spec);
    const Eigen::Vector3d x = grid.points.col(static_cast<Eigen::Index>(j));
    CHECK(x.isApprox(Eigen::Vector3d(0.06, 0.20, 0.01)));

    const Eigen::MatrixXd G = finite_difference_gradient(spec, grid, x);
    const Eigen::VectorXd noise = Eigen::VectorXd::Constant(G.rows(), rms);
    BoundOptions bo;
    bo.position_parameters = 3;
    const LocalizationBound want = localization_bound(fisher_information_independent(G, noise), bo);
    REQUIRE(want.status == BoundStatus::ok);
    for (int k = 0; k < 3; ++k) {
        CAPTURE(k);
        const double got_sd = sd.values[3 * j + static_cast<std::size_t>(k)];
        const double got_axis = axes.values[3 * j + static_cast<std::size_t>(k)];
        CHECK(std::isfinite(got_sd));
        CHECK(std::abs(got_sd - want.standard_deviation(k)) <= 1e-4 * want.standard_deviation(k));
        CHECK(std::abs(got_axis - want.semi_axes(k)) <= 1e-4 * want.semi_axes(k));
        // The axis direction, up to its sign (an eigenvector's sign is arbitrary). The
        // semi-axes here differ by far more than 1e-4, so each direction is well defined.
        Eigen::Vector3d got_direction;
        for (int i = 0; i < 3; ++i) got_direction(i) = directions.values[9 * j + 3 * static_cast<std::size_t>(k) + static_cast<std::size_t>(i)];
        CHECK(std::abs(got_direction.norm() - 1) <= 1e-12);
        CHECK(std::abs(std::abs(got_direction.dot(want.axes.col(k))) - 1) <= 1e-4);
    }
    if (want.semi_axes(0) < 1.01 * want.semi_axes(1) || want.semi_axes(1) < 1.01 * want.semi_axes(2))
        FAIL("semi-axes too close for the direction check: ", want.semi_axes.transpose());

    // The row 5 cm from the axis (2.5 cm from the hull) is closer than kMinBoundClearance
    // panel diameters: not computed, NaN (the fill value) in the maps.
    for (std::size_t near : {std::size_t(0), std::size_t(2)}) {
        CAPTURE(near);
        CHECK(status.values[near] == static_cast<std::uint8_t>(LocalizationStatus::not_computed));
        CHECK(std::isnan(sd.values[3 * near]));
    }
    fs::remove(path);
}

// With the size unknown, the bound is that of the 4 x 4 information of x, y, z and the size
// (Kay 1993, ch. 3, as above); the size's column by central differences of the closed-form
// tensor of a conducting sphere, 4 pi a^3 (Jackson 1999, section 4.4), at a -+ 0.1 mm.
TEST_CASE("layout localization: an unknown size is a fourth parameter, its bound and the larger position bound") {
    const fs::path dir = fs::temp_directory_path() / "murk_test_layout_localization";
    fs::create_directories(dir);
    const std::string path = (dir / "size.h5").string();
    fs::remove(path);
    std::string text = kCase;
    const auto swap_text = [](std::string& in, const std::string& from, const std::string& to) {
        REQUIRE(in.find(from) != std::string::npos);
        in.replace(in.find(from), from.size(), to);
    };
    swap_text(text, "localization_accuracy = \"5 mm\"\n", "localization_accuracy = \"5 mm\"\nlocalization_size = \"unknown\"\n");
    const CaseSpec spec = read_case_text(text, "case.toml");
    REQUIRE(spec.detection->localization_size_unknown);
    LayoutOptions options;
    options.output_path = path;
    options.quiet = true;
    run_layouts(spec, options);
    const H5File file = H5File::open_readonly(path);
    const H5Group g = file.root().open_group("layouts/ref");
    const H5Array<double> sd = g.read<double>("position_sd");
    const H5Array<double> size_sd = g.read<double>("size_sd");
    const H5Array<std::uint8_t> status = g.read<std::uint8_t>("localization_status");
    const double rms = g.read<double>("channel_noise").values.at(0);
    REQUIRE(size_sd.shape == H5Shape{1, 2, 2});

    const std::size_t j = 3;  // u = 6 cm, v = 20 cm, as above
    REQUIRE(status.values[j] == static_cast<std::uint8_t>(LocalizationStatus::ok));
    const TargetGrid grid = target_grid(spec);
    std::string two_sizes = text;
    swap_text(two_sizes, "object = \"target\"\n", "object = \"target\"\nsize = [\"9.9 mm\", \"10.1 mm\"]\n");
    const TargetGrid sizes = target_grid(read_case_text(two_sizes, "case.toml"));
    const Eigen::MatrixXd G = finite_difference_gradient(spec, grid, grid.points.col(static_cast<Eigen::Index>(j)), &sizes);
    const Eigen::VectorXd noise = Eigen::VectorXd::Constant(G.rows(), rms);
    BoundOptions bo;
    bo.position_parameters = 3;
    const LocalizationBound unknown = localization_bound(fisher_information_independent(G, noise), bo);
    const LocalizationBound known = localization_bound(fisher_information_independent(G.leftCols(3), noise), bo);
    REQUIRE(unknown.status == BoundStatus::ok);
    CHECK(std::abs(size_sd.values[j] - unknown.standard_deviation(3)) <= 1e-4 * unknown.standard_deviation(3));
    for (int k = 0; k < 3; ++k) {
        CAPTURE(k);
        const double got = sd.values[3 * j + static_cast<std::size_t>(k)];
        CHECK(std::abs(got - unknown.standard_deviation(k)) <= 1e-4 * unknown.standard_deviation(k));
        CHECK(got >= known.standard_deviation(k) * (1 - 1e-9));
    }
    // The size trades against the distance from the hull (a nearer small target reads like a
    // farther large one): the bound along the line to the hull (y here) grows markedly.
    CHECK(sd.values[3 * j + 1] > 1.2 * known.standard_deviation(1));
    CHECK(std::isnan(size_sd.values[0]));  // not computed next to the hull
    fs::remove(path);
}
