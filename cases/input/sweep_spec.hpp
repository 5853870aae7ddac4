#pragma once
// The [sweep] and [detection] sections of a case: which object changes, along
// which axes, and the noise model that turns perturbations into detectability.
// Plain data in SI units; read by the case reader, expanded by sweep_axes.
#include <array>
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace murk {

// A planar grid of object centre positions: origin + u * u_direction + v * v_direction
// (+ w * w_direction for murk layout's volume grids).
struct SweepGridSpec {
    std::array<double, 3> origin_m{};
    std::array<double, 3> u_direction{1, 0, 0};  // unit vectors, not parallel
    std::array<double, 3> v_direction{0, 1, 0};
    std::vector<double> u_m, v_m;
    // A third axis, for murk layout only (a volume of target positions); empty: planar.
    std::array<double, 3> w_direction{0, 0, 1};  // unit vector, out of the u-v plane
    std::vector<double> w_m;
};

// Conductivity axis values: 0 means "insulator", +infinity means "conductor".
constexpr double kInsulatorConductivity = 0.0;
constexpr double kConductorConductivity = std::numeric_limits<double>::infinity();

// How the points of a sweep are solved (DEVELOPERS.md, "How a sweep is solved").
enum class SweepMethod {
    exact,      // factored body, object coupled by GMRES: no approximation beyond the discretization
    dipole,     // every point by the induced-dipole path
    automatic,  // dipole where the object is small against its distance, exact elsewhere
    full,       // the whole system assembled and factored at every point (the reference)
};

// The boundary a distance-to-boundary axis moves.
enum class MovedBoundary { surface, bottom, wall };

// The [sweep] key of the axis that moves it (also the axis's name in result files).
inline const char* boundary_axis_key(MovedBoundary b) {
    switch (b) {
        case MovedBoundary::surface: return "surface_distance";
        case MovedBoundary::bottom: return "bottom_distance";
        case MovedBoundary::wall: return "wall_distance";
    }
    return "surface_distance";
}

struct SweepSpec {
    std::string object;                        // the object that moves or changes (default: the first)
    std::vector<std::string> alternatives;     // axis of alternative objects (shapes): at each point
                                               // only the one named is in the water
    std::vector<double> water_conductivity_S_per_m;  // axis; the baseline is solved once per value
    std::vector<double> frequency_Hz;          // axis; a fixed part per (water, frequency) pair
    // Axis surface_distance, bottom_distance or wall_distance: the gap (m) between the
    // sensing body and the water surface (above its highest point), the bottom (below its
    // lowest point) or one side wall of a box or cylinder [tank] (beyond its farthest point
    // towards that wall); a fixed part per value, with that boundary moved to it.
    std::vector<double> boundary_distance_m;
    MovedBoundary moved = MovedBoundary::surface;  // which boundary the axis moves
    int wall_axis = 0;                         // wall_distance: the wall faces +-x (0) or +-y (1)
    int wall_sign = 1;                         // wall_distance: +1 the wall on the positive side
    std::vector<double> conductivity_S_per_m;  // axis; 0 insulator, inf conductor
    std::vector<double> permittivity_relative; // axis; the object's relative permittivity (needs a frequency)
    std::vector<double> size_m;                // axis; sphere radius, or the largest half-extent
    std::vector<double> distance_m;            // axis; clearance between object and body surfaces
    std::optional<std::array<double, 3>> direction;  // distance axis: unit direction of travel
                                                     // (default: away from the nearest body point)
    std::optional<SweepGridSpec> grid;         // axes grid_u, grid_v (not together with distance)
    bool electrode_pairs = false;              // robot: read differences of neighbouring sensors
    SweepMethod method = SweepMethod::exact;
    double dipole_accuracy = 0.02;             // automatic: target relative error of a dipole point
    int dipole_checks = 8;                     // dipole, automatic: dipole points re-solved exactly
    double coupling_tolerance = 1e-10;         // exact: GMRES relative residual
    int line = 0;                              // line of [sweep] in the case file
};

// A stretch of the skin, by fraction of the body length from the nose, with its
// own receptor density.
struct ReceptorZone {
    double from_fraction = 0.0, to_fraction = 1.0;
    double density_per_m2 = 0.0;
};

struct DetectionSpec {
    enum class Noise { receptors, voltage_amplifier, current_amplifier };
    Noise noise = Noise::receptors;
    double receptor_noise_V = 0.0;            // fish: rms noise per receptor
    double receptor_density_per_m2 = 0.0;     // fish: receptors per skin area
    std::vector<ReceptorZone> receptor_zones; // fish: densities that replace it along stretches
    double noise_density = 0.0;               // robot: V/sqrt(Hz) or A/sqrt(Hz)
    double integration_time_s = 0.0;          // robot: lock-in averaging time
    // Which parts of each sensor's perturbation are read (cases/detection/detectability.hpp):
    // both quadratures (default), the amplitude change alone, or amplitude and phase changes.
    enum class Channels { quadratures, amplitude, amplitude_and_phase };
    Channels channels = Channels::quadratures;
    double phase_noise_rad = 0.0;             // amplitude_and_phase: rms phase noise, or
    double timing_jitter_s = 0.0;             // an rms timing jitter (phase noise 2 pi f jitter)
    double false_alarm_probability = 1e-3;
    double probability_level = 0.5;           // detection range: where P_D crosses this
    double localization_accuracy_m = 0.0;     // murk layout: the position error wanted (0: no bound computed)
    bool localization_size_unknown = false;   // murk layout: the target's size is estimated with its position
    int line = 0;
};

}  // namespace murk
