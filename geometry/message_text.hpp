#pragma once
// How text taken from a file or the command line appears inside an error message.
// A message is one line of about 200 characters at most (see input_error.hpp), so
// an echoed value must not bring its own line breaks or a megabyte of text along:
// every reader passes what it echoes through these two functions.
#include <cstddef>
#include <string>
#include <string_view>

namespace murk {

// Longest echoed value, in characters of the escaped text (quotes not counted).
constexpr std::size_t kEchoedValueChars = 40;
// Longest file name or key that frames a message ("file:line: key: ...").
constexpr std::size_t kEchoedNameChars = 80;

// `text` made printable on one line: control characters written as \n, \r, \t or
// \xNN, bytes that are not valid UTF-8 as \xNN (valid UTF-8 such as "µS/cm" is
// kept). Longer than `max_chars`, its middle is replaced by "...", keeping the
// start and the end (where paths keep the file name).
std::string printable(std::string_view text, std::size_t max_chars = kEchoedNameChars);

// A value as a message quotes it: printable(value) in single quotes; when it had to
// be shortened, followed by its length in bytes ("'xxxx...xx' (1048576 bytes)").
std::string in_quotes(std::string_view value, std::size_t max_chars = kEchoedValueChars);

}  // namespace murk
