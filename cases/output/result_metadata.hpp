#pragma once
// Root attributes every murk result file carries (cases/RESULT_LAYOUT.md): what made it,
// from which case, when, and under which approximation and accuracy switches.
#include "cases/input/case_spec.hpp"
#include "cases/output/hdf5_file.hpp"
#include "solver/quadrature_options.hpp"

#include <string>

namespace murk {

// Hex SHA-256 of a text (OpenSSL's implementation).
std::string sha256_hex(const std::string& text);

// Current time as ISO 8601 UTC, e.g. "2026-12-01T22:39:51Z".
std::string utc_now_iso8601();

void write_result_metadata(H5Group root, const CaseSpec& spec, const std::string& command,
                           const std::string& approximation, const QuadratureOptions& quadrature);

}  // namespace murk
