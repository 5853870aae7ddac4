// MURK_CHECK and MURK_ASSERT (geometry/internal_check.hpp): a failed check throws
// murk::InternalError, whose message names the file, the line, the condition and
// why it should have held, and which is never mistaken for bad input.
#include "geometry/input_error.hpp"
#include "geometry/internal_check.hpp"

#include <doctest/doctest.h>

#include <string>
#include <type_traits>

namespace {

// Halves an even count; the check is on the line `check_line` says.
int half_of_even(int n, int& check_line) {
    check_line = __LINE__ + 1;
    MURK_CHECK(n % 2 == 0, "only even counts are halved");
    return n / 2;
}

}  // namespace

TEST_CASE("a failing MURK_CHECK throws InternalError naming file, line, condition and why") {
    int line = 0;
    CHECK(half_of_even(4, line) == 2);
    try {
        (void)half_of_even(3, line);
        FAIL("a failing check did not throw");
    } catch (const murk::InternalError& e) {
        // The build maps the source directory away (CMakeLists.txt), so the path is
        // the one inside the repository.
        CHECK(std::string(e.file()) == "tests/test_internal_check.cpp");
        CHECK(e.line() == line);
        CHECK(std::string(e.condition()) == "n % 2 == 0");
        CHECK(std::string(e.what()) == "internal error at tests/test_internal_check.cpp:" + std::to_string(line) +
                                           ": n % 2 == 0 (only even counts are halved)");
    }
}

TEST_CASE("an internal error is not an input error") {
    static_assert(!std::is_base_of_v<murk::InputError, murk::InternalError>);
    int line = 0;
    bool taken_for_input = false, internal = false;
    try {
        (void)half_of_even(5, line);
    } catch (const murk::InputError&) {
        taken_for_input = true;
    } catch (const murk::InternalError&) {
        internal = true;
    }
    CHECK_FALSE(taken_for_input);
    CHECK(internal);
}

TEST_CASE("MURK_CHECK evaluates its condition once in every build") {
    int evaluations = 0;
    MURK_CHECK(++evaluations > 0, "counting");
    CHECK(evaluations == 1);
}

TEST_CASE("MURK_ASSERT runs only in builds with assertions") {
    int evaluations = 0;
    const auto fails = [&] {
        ++evaluations;
        return false;
    };
#ifdef NDEBUG
    MURK_ASSERT(fails(), "compiled out in Release builds");
    CHECK(evaluations == 0);
#else
    CHECK_THROWS_WITH_AS(MURK_ASSERT(fails(), "on in builds with assertions"),
                         doctest::Contains("fails() (on in builds with assertions)"), murk::InternalError);
    CHECK(evaluations == 1);
#endif
}
