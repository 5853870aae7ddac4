#pragma once
// Reading a whole input file into memory, refusing one larger than the reader's
// cap before reading it (a file named by mistake may be many gigabytes).
#include <cstdint>
#include <string>

namespace murk {

// The bytes of the file at `path`. Throws InputError "<path>: ..." when it cannot
// be opened or read, is a folder, or holds more than `max_bytes`; `kind` names
// what the file should be in that message ("mesh file").
std::string read_file_bytes(const std::string& path, std::uint64_t max_bytes, const std::string& kind);

}  // namespace murk
