// libFuzzer target: the Gmsh MSH reader (2.2 and 4.1, ASCII) on arbitrary bytes.
#include "geometry/input_error.hpp"
#include "geometry/mesh_io.hpp"
#include "tests/fuzz/fuzz_check.hpp"

#include <cstdint>
#include <string>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    try {
        const murk::TriangleMesh m = murk::read_msh_text(text, "fuzz.msh");
        murk::fuzz::require_valid_mesh_result(m);
        murk::fuzz::require(m.region_names.size() <= 100001, "region names are indexed by tags 0..100000");
    } catch (const murk::InputError&) {
        // a refusal is a valid answer
    }
    return 0;
}
