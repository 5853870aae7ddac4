#pragma once
// The most a case file may ask for, wherever a number or a list in it decides how
// much memory is allocated (points, values, stations). Each limit lies well beyond
// any case murk can solve in reasonable time; it stops a slip or a hostile file
// (a few lines asking for billions of points) with one clear line instead of an
// allocation that fails or takes the machine's memory. Listed in cases/README.md.
#include <cstddef>
#include <cstdint>

namespace murk {

constexpr std::uint64_t kMaxCaseFileBytes = std::uint64_t{16} << 20;  // 16 MiB of TOML
constexpr std::size_t kMaxLinePoints = 1000;       // points (or weights) of the organ, a source line, a probe line, a grid edge
constexpr std::size_t kMaxPointSources = 100000;   // all point sources of a case: the organ's and every [[source]]'s
constexpr std::size_t kMaxProbePoints = 1000000;   // all probe points of a case
constexpr std::size_t kMaxProfileStations = 1000;  // stations of a fish profile
constexpr std::size_t kMaxReceptorZones = 1000;    // [detection] receptor_zones
constexpr std::size_t kMaxMeshZones = 1000;        // [[mesh.zone]] tables
constexpr std::size_t kMaxAxisValues = 100000;     // values of one sweep axis (array or range); their product,
                                                   // the sweep's points, murk run checks against memory
constexpr std::size_t kMaxLayoutTargets = 2000000;  // murk layout's target positions (grid points in all)
constexpr std::size_t kMaxLayouts = 1000;          // [[layout]] tables
constexpr std::size_t kMaxLayoutElectrodes = 1000; // entries of a layout's emitters, sensors or pairs
constexpr std::size_t kMaxWaveformSamples = 4096;  // [signal] samples, harmonics and synthesis_samples
constexpr std::size_t kMaxNameBytes = 64;          // names of objects, probes and electrodes
constexpr std::size_t kMaxDenseLimit = 1000000000; // [mesh] dense_limit (unknowns); a dense system of
                                                   // that size would need 8 EB, so larger means "never"

// Every quantity with a unit, except an object's conductivity, is zero or lies
// between these magnitudes in SI units. Potentials are products and quotients of a
// few such quantities (current / (conductivity x length)); within this window they
// stay far inside double precision, so no solve can overflow or underflow. Real
// cases sit many orders of magnitude inside it. An object's conductivity may be any
// normal number: beyond a contrast of 1e8 it is solved as its limit (insulator or
// perfect conductor, cases/scene/scene_rules.hpp), whatever its value.
constexpr double kSmallestQuantity = 1e-30;
constexpr double kLargestQuantity = 1e30;

}  // namespace murk
