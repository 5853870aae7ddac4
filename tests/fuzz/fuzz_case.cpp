// libFuzzer target: the case-file reader (TOML and units) on arbitrary text. Mesh
// files named in the text are looked for in the current folder, which tools/fuzz.sh
// makes an empty one.
#include "cases/input/case_limits.hpp"
#include "cases/input/case_reader.hpp"
#include "geometry/input_error.hpp"
#include "tests/fuzz/fuzz_check.hpp"

#include <cstdint>
#include <string>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using murk::fuzz::require;
    const std::string text(reinterpret_cast<const char*>(data), size);
    try {
        const murk::CaseSpec spec = murk::read_case_text(text, "fuzz.toml");
        std::size_t probe_points = 0;
        for (const murk::ProbeSpec& p : spec.probes) {
            require(p.first_point == probe_points, "probes' points follow each other");
            probe_points += p.point_count;
        }
        require(probe_points == spec.probe_points.size(), "the probes' points are all listed");
        require(probe_points <= murk::kMaxProbePoints, "at most kMaxProbePoints probe points");
        if (spec.fish) require(spec.fish->organ.points >= 2 && spec.fish->organ.points <= 1000, "2..1000 organ points");
        for (const murk::SourceSpec& s : spec.sources)
            require(s.form == murk::SourceForm::point || (s.points >= 2 && s.points <= 1000), "2..1000 points per line");
        require(spec.text == text, "the case keeps its text");
    } catch (const murk::InputError&) {
        // a refusal is a valid answer
    }
    return 0;
}
