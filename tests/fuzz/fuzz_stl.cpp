// libFuzzer target: the STL reader (ASCII and binary) on arbitrary bytes.
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "tests/fuzz/fuzz_check.hpp"

#include <cstdint>
#include <string>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string bytes(reinterpret_cast<const char*>(data), size);
    try {
        murk::fuzz::require_valid_mesh_result(murk::read_stl_bytes(bytes, "fuzz.stl"));
    } catch (const murk::InputError&) {
        // a refusal is a valid answer
    }
    return 0;
}
