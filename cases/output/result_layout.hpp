#pragma once
// The layout of murk's result files in one place (cases/RESULT_LAYOUT.md describes it): the
// codes of the coded datasets with the word that means each code, the names of the datasets
// and dimensions that the writers and `murk inspect` share. The files carry the codes'
// meanings themselves, as CF flag_values / flag_meanings attributes (flags_of below), so a
// reader maps words to codes through the file: `murk inspect` and tools/plot_results.py look
// up the words given here, never the numbers.
#include "cases/detection/detectability.hpp"
#include "cases/detection/falloff.hpp"

#include <array>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace murk {

// /sweep/status: what happened at a point.
enum class PointStatus : std::uint8_t { not_computed = 0, computed = 1, masked = 2 };

// /sweep/path: what computed a point.
enum class PathCode : std::uint8_t { none = 0, exact = 1, dipole = 2, full = 3 };

// /sweep/mask_reason: why a point was masked (the object had no valid place).
enum class MaskReason : std::uint8_t {
    none = 0,            // not masked
    touches_body = 1,    // would touch, enter or enclose the sensing body
    touches_object = 2,  // would touch, enter or enclose an object that does not move
    beyond_plane = 3,    // would reach through the water surface or bottom
    unreachable = 4,     // the clearance cannot be reached along the sweep direction
    near_source = 5,     // would hold, or come too close to, a source or probe point
};
inline constexpr int kMaskReasonCount = 6;

// The word of each code, in code order (codes run 0, 1, 2, ...). CF asks for words without
// spaces; they are what flag_meanings holds and what readers look codes up by.
template <class Code>
struct CodeWords;
template <>
struct CodeWords<PointStatus> {
    static constexpr std::array<std::string_view, 3> words{"not_computed", "computed", "masked"};
};
template <>
struct CodeWords<PathCode> {
    static constexpr std::array<std::string_view, 4> words{"none", "exact", "dipole", "full"};
};
template <>
struct CodeWords<MaskReason> {
    static constexpr std::array<std::string_view, kMaskReasonCount> words{
        "not_masked", "touches_body", "touches_object", "beyond_plane", "unreachable", "near_source"};
};
// /detection/status
template <>
struct CodeWords<RangeStatus> {
    static constexpr std::array<std::string_view, 4> words{"no_point_computed", "crossed", "beyond_sweep",
                                                           "never_detectable"};
};
// /falloff/near_fourth_power
template <>
struct CodeWords<FourthPower> {
    static constexpr std::array<std::string_view, 3> words{"no", "yes", "unknown"};
};

template <class Code>
constexpr std::string_view word_of(Code code) {
    return CodeWords<Code>::words[static_cast<std::size_t>(code)];
}

// The CF flag attributes of a coded dataset of uint8 codes.
struct FlagTable {
    std::vector<std::uint8_t> values;
    std::string meanings;  // words separated by single spaces
};
template <class Code>
FlagTable flags_of() {
    FlagTable table;
    for (std::size_t k = 0; k < CodeWords<Code>::words.size(); ++k) {
        table.values.push_back(static_cast<std::uint8_t>(k));
        table.meanings += std::string(k ? " " : "") + std::string(CodeWords<Code>::words[k]);
    }
    return table;
}

// Names shared by the writers and `murk inspect`.
namespace layout {

// Root attributes.
inline constexpr const char* kConventions = "CF-1.8";

// Dimensions (each the name of a coordinate in the group of the datasets it labels).
inline constexpr const char* kXyz = "xyz";            // labels "x", "y", "z"
inline constexpr const char* kVertex = "vertex";      // vertex index of a mesh
inline constexpr const char* kPanel = "panel";        // panel (triangle) index of a surface
inline constexpr const char* kCorner = "corner";      // corner of a triangle, 0..2
inline constexpr const char* kElectrode = "electrode";  // labels: electrode names
inline constexpr const char* kSensor = "sensor";      // sensor index of a sweep
inline constexpr const char* kCheckPoint = "point";   // /sweep/dipole_check: flat index of a checked point
inline constexpr const char* kWater = "water_conductivity";  // baseline_reading's first dimension

// Groups and datasets.
inline constexpr const char* kMesh = "mesh";
inline constexpr const char* kTriangles = "triangles";
inline constexpr const char* kCentroid = "centroid";
inline constexpr const char* kDifference = "difference";
inline constexpr const char* kTransdermal = "transdermal_voltage";
inline constexpr const char* kElectrodes = "electrodes";
inline constexpr const char* kPotential = "potential";
inline constexpr const char* kCurrent = "current";
inline constexpr const char* kSweep = "sweep";
inline constexpr const char* kStatus = "status";
inline constexpr const char* kMaskReason = "mask_reason";
inline constexpr const char* kPath = "path";
inline constexpr const char* kDipoleCheck = "dipole_check";
inline constexpr const char* kDiscrepancy = "discrepancy";
inline constexpr const char* kPeakPerturbation = "peak_perturbation";
inline constexpr const char* kDetection = "detection";
inline constexpr const char* kRange = "range";
inline constexpr const char* kFalloff = "falloff";

// Attributes.
inline constexpr const char* kFlagValues = "flag_values";
inline constexpr const char* kFlagMeanings = "flag_meanings";
inline constexpr const char* kElectrodeNames = "electrode_names";
inline constexpr const char* kSensorNames = "sensor_names";
inline constexpr const char* kAlternativeNames = "alternative_names";

}  // namespace layout

}  // namespace murk
