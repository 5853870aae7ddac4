#pragma once
// What `murk layout` knows about one layout after evaluating it: plain data, kept
// together so that later analyses (Fisher information and position bounds, sensor
// placement) can take the lead fields at the grid points and the baseline field
// from here instead of solving again. Written to the result file by layout_output.
#include "cases/detection/detectability.hpp"
#include "cases/layout/detectable_region.hpp"
#include "cases/layout/layout_readout.hpp"
#include "cases/output/image_attributes.hpp"
#include "cases/output/solver_attributes.hpp"

#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

namespace murk {

// Per target size.
struct SizeQuantities {
    Eigen::MatrixXd reading_change;       // readings x points: L (M E_b(c)); NaN where blocked
    std::vector<double> snr;              // d' per point; NaN where blocked
    std::vector<double> detection_probability;  // P_D per point; NaN where blocked
    std::vector<std::uint8_t> blocked;    // 1: the target would touch the hull (or the plane) there
    std::vector<std::uint8_t> detectable; // 1: P_D >= the probability level
    double detectable_area_m2 = 0;        // area (planar grid, m^2) or volume (3-D grid, m^3) of the detectable cells
    double detection_range_m = NAN;       // largest clearance to the hull of a detectable point
    std::vector<OutlineRing> outline;     // the detectable region, in grid offsets (planar grids only)
    // Cramer-Rao bound on the target's position (layout_localization.hpp); empty unless
    // [detection] gives localization_accuracy.
    std::vector<std::uint8_t> bound_status;   // LocalizationStatus code per point
    Eigen::Matrix3Xd position_sd;             // m: standard deviation along x, y, z; NaN where not computed
    Eigen::Matrix3Xd semi_axes;               // m: error-ellipsoid semi-axes, descending; NaN where not computed
    Eigen::MatrixXd axes;                     // 9 x points: per semi-axis its unit direction (x, y, z), in the
                                              // order of semi_axes; NaN where not computed
    std::vector<std::uint8_t> within_accuracy;  // 1: the largest semi-axis is at most the accuracy
    std::vector<double> size_sd;              // m: bound on the target's size when it is unknown
                                              // (localization_size = "unknown"); NaN where not computed
    double localizable_area_m2 = 0;           // area (m^2) or volume (m^3) of the cells within the accuracy
};

// /layouts/<name>/localization_status: the first three codes are those of BoundStatus
// (cases/design/localization_bound.hpp).
enum class LocalizationStatus : std::uint8_t {
    ok = 0,
    ill_conditioned = 1,
    singular = 2,
    not_computed = 3,  // the target does not fit, or lies closer than kMinBoundClearance panel diameters
};

struct LayoutQuantities {
    std::string name;
    LayoutReadout readout;                    // rows, names, units of the readings
    std::vector<std::string> electrodes;      // emitters, sensors, reference (layout_case order)
    std::vector<int> electrode_part;          // ElectrodePart code of each
    std::vector<double> electrode_potential_V, electrode_current_A;  // baseline: drives and readings
    Eigen::VectorXd baseline_reading;         // R x0
    Eigen::MatrixXd sensitivity;              // readings x (3 * points): change per unit dipole (V m^2)
    Eigen::Matrix3Xd baseline_field;          // V/m at every grid point (with every emitter driving)
    Eigen::MatrixXd water_leads;              // lead fields on the water rows (readings x rows)
    Eigen::Matrix3Xd row_points;              // the water rows' collocation points
    NoiseModel noise;
    double channel_noise = 0;                 // rms noise of one reading (V or A)
    double false_alarm_probability = 0, probability_level = 0;
    double localization_accuracy_m = 0;       // 0: no localization bound asked for
    bool localization_size_unknown = false;   // the size is a fourth parameter of the bound
    std::vector<SizeQuantities> sizes;        // one per target size
    // [placement] with mean_log_det only: d(reading change)/d(x, y, z) of the target of the
    // placement's size, readings x grid points each, NaN where it does not fit (layout_placement.hpp).
    std::vector<Eigen::MatrixXd> placement_gradient;
    double factor_seconds = 0, map_seconds = 0;
    SystemSolverUsed solver_used;             // how the layout's body system was solved
    WaterBoundsSummary water;                 // the images of the water's planes in its system
};

// The part an electrode plays in a layout (/layouts/<name>/electrode_part).
enum class ElectrodePart : std::uint8_t {
    emitter_current = 0,  // driven by a given current
    emitter_voltage = 1,  // driven at a given potential
    sensor = 2,           // floating (voltage read)
    held_sensor = 3,      // held at a potential (current read)
    reference = 4,        // floating reference of read = "reference"
};

}  // namespace murk
