#include "geometry/input_limits.hpp"

#include "geometry/input_error.hpp"

namespace murk {

std::uint64_t checked_count(long long count, std::uint64_t record_bytes, std::uint64_t bytes_left, std::uint64_t cap,
                            const std::string& where, const std::string& what) {
    const std::string head = where + ": " + what + " is " + std::to_string(count) + "; ";
    if (count < 0) throw InputError(head + "a count cannot be negative");
    const auto n = static_cast<std::uint64_t>(count);
    if (n > cap) throw InputError(head + "murk reads at most " + std::to_string(cap));
    // n * record_bytes > bytes_left, without forming the product.
    if (record_bytes > 0 && n > bytes_left / record_bytes)
        throw InputError(head + "the " + std::to_string(bytes_left) + " bytes left in the file hold at most " +
                         std::to_string(bytes_left / record_bytes) + " (each takes at least " + std::to_string(record_bytes) +
                         " bytes)");
    return n;
}

}  // namespace murk
