#pragma once
// A fresh directory per test, removed afterwards, for tests that write files.
#include <unistd.h>

#include <atomic>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace murk::testing {

struct TempDir {
    std::filesystem::path path;

    explicit TempDir(const std::string& tag = "murk-test") {
        static std::atomic<int> counter{0};
        path = std::filesystem::temp_directory_path() /
               (tag + "-" + std::to_string(::getpid()) + "-" + std::to_string(counter++));
        std::filesystem::remove_all(path);
        std::filesystem::create_directories(path);
    }
    ~TempDir() {
        std::error_code error;
        std::filesystem::remove_all(path, error);
    }
    TempDir(const TempDir&) = delete;
    TempDir& operator=(const TempDir&) = delete;

    // Path of a file in the directory.
    std::string operator/(const std::string& name) const { return (path / name).string(); }
    // Writes `content` to a file in the directory and returns its path.
    std::string file(const std::string& name, const std::string& content) const {
        const std::string p = *this / name;
        std::ofstream(p, std::ios::binary) << content;
        return p;
    }
};

inline std::string read_text(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::stringstream text;
    text << in.rdbuf();
    return text.str();
}

}  // namespace murk::testing
