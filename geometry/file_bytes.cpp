#include "geometry/file_bytes.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>

namespace murk {

std::string read_file_bytes(const std::string& path, std::uint64_t max_bytes, const std::string& kind) {
    const std::string name = printable(path);
    const auto too_large = [&] {
        return InputError(name + ": larger than " + std::to_string(max_bytes) + " bytes, the most murk reads for a " + kind);
    };
    std::error_code error;
    if (std::filesystem::is_directory(path, error)) throw InputError(name + ": is a folder, not a " + kind);
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(name + ": cannot open the " + kind + " for reading (" + std::strerror(errno) + ")");
    // The size is known for a regular file; pipes and devices are read up to the cap.
    const auto size = std::filesystem::is_regular_file(path, error) ? std::filesystem::file_size(path, error) : 0;
    if (!error && size > max_bytes) throw too_large();
    std::string bytes;
    if (!error) bytes.reserve(static_cast<std::size_t>(size));
    char chunk[1 << 16];
    while (in.read(chunk, sizeof chunk) || in.gcount() > 0) {
        if (bytes.size() + static_cast<std::uint64_t>(in.gcount()) > max_bytes) throw too_large();
        bytes.append(chunk, static_cast<std::size_t>(in.gcount()));
    }
    if (in.bad()) throw InputError(name + ": error while reading the " + kind);
    return bytes;
}

}  // namespace murk
