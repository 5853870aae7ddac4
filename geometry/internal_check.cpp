#include "geometry/internal_check.hpp"

namespace murk {

namespace {
std::string internal_error_message(const char* file, int line, const char* condition, const char* why) {
    return std::string("internal error at ") + file + ":" + std::to_string(line) + ": " + condition + " (" + why + ")";
}
}  // namespace

InternalError::InternalError(const char* file, int line, const char* condition, const char* why)
    : std::logic_error(internal_error_message(file, line, condition, why)),
      file_(file),
      line_(line),
      condition_(condition) {}

void fail_internal_check(const char* file, int line, const char* condition, const char* why) {
    throw InternalError(file, line, condition, why);
}

}  // namespace murk
