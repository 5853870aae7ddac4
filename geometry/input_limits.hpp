#pragma once
// What murk reads from files, at most, and the check every count read from a file
// passes before anything is allocated for it. A count is believed only when it is
// not negative, within its cap, and the bytes left in the file can hold that many
// records of the smallest possible size: a 3 KB file cannot claim a billion nodes.
//
// The caps lie far beyond what the dense solver can use (its memory grows with the
// square of the panel count), so they only stop files that could not be meant.
#include <cstdint>
#include <string>

namespace murk {

constexpr std::uint64_t kMaxMeshFileBytes = std::uint64_t{2} << 30;  // 2 GiB
constexpr std::uint64_t kMaxMeshTriangles = 5'000'000;               // panels of one mesh file
constexpr std::uint64_t kMaxMeshNodes = 20'000'000;                  // nodes of an MSH file (volume nodes too)
constexpr std::uint64_t kMaxMeshElements = 100'000'000;              // elements of an MSH file, every type
constexpr std::uint64_t kMaxMeshEntities = 1'000'000;                // MSH 4.1 entities of each dimension
constexpr std::uint64_t kMaxMeshNames = 1'000'000;                   // MSH $PhysicalNames
constexpr std::uint64_t kMaxTagsPerRecord = 1000;                    // tags of an MSH element or entity
// Largest coordinate of a mesh read from a file, in metres after scaling: squares
// and products of coordinates (areas, volumes, distances) stay finite.
constexpr double kMaxMeshCoordinate_m = 1e100;

// The smallest record that is a line of `words` whitespace-separated words: one
// character each and a separator after each (the last one the line's end).
constexpr std::uint64_t line_bytes(std::uint64_t words) { return 2 * words; }

// `count` as a size when 0 <= count <= cap and count records of at least
// `record_bytes` bytes each fit into `bytes_left`; otherwise throws InputError
// "<where>: <what> is <count>; <why it cannot be>". Overflow-safe for any count.
std::uint64_t checked_count(long long count, std::uint64_t record_bytes, std::uint64_t bytes_left, std::uint64_t cap,
                            const std::string& where, const std::string& what);

}  // namespace murk
