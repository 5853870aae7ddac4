#pragma once
// A look at case text before toml++ reads it. toml++ 3.3.0 (Debian 12) reaches
// undefined behaviour on some input that is not valid TOML: a character outside
// the ASCII range where only ASCII may stand (outside quotes and comments) sends its
// whitespace test into an "unreachable" branch, and so does such a character after a
// backslash in a multi-line string, directly or after white space (found by fuzzing
// tests/fuzz/fuzz_case.cpp; fixed upstream after 3.3.0). This check refuses both
// with one line before the parser sees them; everything else is left to toml++.
#include <string>
#include <string_view>

namespace murk {

// Throws InputError "<file>:<line>: TOML syntax: ..." for the two cases above.
// `file` is the name for messages, already printable.
void precheck_toml_text(std::string_view text, const std::string& file);

}  // namespace murk
