#pragma once
// Reads a case file (TOML, every quantity a string with a unit) into a CaseSpec.
// Each key is checked on its own: unknown keys, missing required keys, wrong TOML
// types, wrong dimensions and out-of-range values throw InputError with one line
// "file:line: dotted.key: what was found, what was expected". The format is
// documented in cases/README.md.
#include "cases/input/case_spec.hpp"

#include <string>

namespace murk {

// Reads the file at `path`. Mesh files named in the case are resolved against
// the folder of `path` and must exist.
CaseSpec read_case_file(const std::string& path);

// Reads case text; `name_for_messages` stands for the file in messages and in
// CaseSpec::path. Mesh files are resolved against the current directory.
CaseSpec read_case_text(const std::string& text, const std::string& name_for_messages);

}  // namespace murk
