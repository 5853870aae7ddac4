#pragma once
// Checks of murk's own invariants, as opposed to checks of what users and files give
// it (those throw murk::InputError). A failed invariant means murk has a bug: the
// run stops with murk::InternalError, which names the source file and line, the
// condition that failed and why it should have held; the command line prints it as
// one line and exits with status 1.
//
//   MURK_CHECK(cond, "why")   always on: cheap checks (sizes, index ranges, shapes)
//                             that guard against silent wrong numbers.
//   MURK_ASSERT(cond, "why")  only in builds without NDEBUG (the sanitizer build of
//                             tools/test.sh): checks that cost time of their own
//                             (a residual, a pass over a whole matrix). In a Release
//                             build the condition is not evaluated.
//
// Neither may be used inside an OpenMP parallel region: an exception cannot leave
// one, so check before the region or after it.
#include <stdexcept>
#include <string>

namespace murk {

class InternalError : public std::logic_error {
public:
    InternalError(const char* file, int line, const char* condition, const char* why);
    const char* file() const { return file_; }
    int line() const { return line_; }
    const char* condition() const { return condition_; }

private:
    const char* file_;  // string literals of the failed check, which outlive it
    int line_;
    const char* condition_;
};

// Throws InternalError; out of line so that each check costs only a compare and a
// branch at its call site.
[[noreturn]] void fail_internal_check(const char* file, int line, const char* condition, const char* why);

}  // namespace murk

#define MURK_CHECK(condition, why) \
    ((condition) ? static_cast<void>(0) : ::murk::fail_internal_check(__FILE__, __LINE__, #condition, why))

#ifdef NDEBUG
// sizeof keeps the condition compiled (names in it stay checked and count as used)
// without evaluating it.
#define MURK_ASSERT(condition, why) static_cast<void>(sizeof((condition) ? true : false))
#else
#define MURK_ASSERT(condition, why) MURK_CHECK(condition, why)
#endif
