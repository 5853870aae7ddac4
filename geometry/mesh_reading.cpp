#include "geometry/mesh_reading.hpp"

#include "geometry/input_error.hpp"
#include "geometry/input_limits.hpp"
#include "geometry/message_text.hpp"

#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdlib>
#include <sstream>

namespace murk {
namespace {

std::string shortest(double v) {
    std::ostringstream out;
    out << v;
    return out.str();
}

}  // namespace

std::string file_line(const std::string& path, std::size_t line) { return printable(path) + ":" + std::to_string(line); }

double parse_finite(std::string_view word, const std::string& where) {
    // strtod needs a terminated string; words are short (a longer one is no number).
    const std::string text(word.substr(0, 64));
    char* end = nullptr;
    errno = 0;
    const double v = std::strtod(text.c_str(), &end);
    const bool whole = word.size() <= 64 && end == text.c_str() + text.size() && !text.empty();
    const bool overflow = errno == ERANGE && std::abs(v) > 1.0;  // ERANGE also reports underflow, which is harmless
    if (!whole || overflow || !std::isfinite(v))
        throw InputError(where + ": expected a finite number, found " + in_quotes(word));
    return v;
}

long long parse_integer(std::string_view word, const std::string& where) {
    long long v = 0;
    const auto [end, error] = std::from_chars(word.data(), word.data() + word.size(), v);
    if (error == std::errc::result_out_of_range)
        throw InputError(where + ": the integer " + in_quotes(word) + " is out of range");
    if (error != std::errc() || end != word.data() + word.size() || word.empty())
        throw InputError(where + ": expected an integer, found " + in_quotes(word));
    return v;
}

void check_scale(const std::string& path, double scale) {
    if (!(std::isfinite(scale) && scale > 0.0))
        throw InputError(printable(path) + ": length scale must be a positive number, got " + shortest(scale));
}

void apply_scale(TriangleMesh& mesh, double scale, const std::string& path) {
    for (Vec3& v : mesh.vertices) {
        v *= scale;
        if (!(v.cwiseAbs().maxCoeff() <= kMaxMeshCoordinate_m))
            throw InputError(printable(path) + ": a coordinate times the length scale " + shortest(scale) +
                             " exceeds 1e100 m, beyond which areas and volumes overflow");
    }
}

std::string mesh_name_of(const std::string& path) {
    const std::size_t slash = path.find_last_of("/\\");
    std::string name = slash == std::string::npos ? path : path.substr(slash + 1);
    const std::size_t dot = name.find_last_of('.');
    return dot == std::string::npos || dot == 0 ? name : name.substr(0, dot);
}

std::string lower_case(std::string_view text) {
    std::string out(text);
    for (char& c : out)
        if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
    return out;
}

}  // namespace murk
