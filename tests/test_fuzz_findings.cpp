// Regression tests of what fuzzing the readers found (tools/fuzz.sh); each input is
// also in tests/fuzz/corpus/. One test per finding, named after what was fixed.
#include "cases/input/case_reader.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <string>

using namespace murk;

namespace {

std::string case_error(const std::string& text) {
    try {
        read_case_text(text, "case.toml");
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

}  // namespace

TEST_CASE("fuzz finding: a character outside ASCII outside quotes is refused before toml++ reads it") {
    // toml++ 3.3.0 reached an "unreachable" branch of its whitespace test on these.
    CHECK(case_error("\xCE\x95t") == "case.toml:1: TOML syntax: characters outside the ASCII range belong inside quotes or "
                                      "comments, found '\xCE\x95'");
    CHECK(case_error("title = \"t\"\nx = 1\xC2\xA7\n").rfind("case.toml:2: TOML syntax: characters outside the ASCII", 0) == 0);
    CHECK(case_error("[w\xD0\x90ter]\n").rfind("case.toml:1: TOML syntax:", 0) == 0);
    // A quote inside a bare value opens no string: what follows it is outside quotes.
    CHECK(case_error("[water]\nconductivity =  0Su1\"0\xC9\x9Cm\"\n").rfind("case.toml:2: TOML syntax: characters outside", 0) == 0);
    CHECK(case_error("x = \"a\"b\"\xC3\xA9\"\n").rfind("case.toml:1: TOML syntax: characters outside", 0) == 0);
    // A number is read up to white space, ']', '}', ',' or '#', quotes and '=' included.
    CHECK(case_error(std::string("_aJ= 888889") + '\0' + "'tshape=\"ope'\xF3\x9D\x9A\x9C\"\n")
              .rfind("case.toml:1: TOML syntax: characters outside the ASCII range", 0) == 0);
    CHECK(case_error("x = [1, -2e\"\xC2\xA7\"]\n").rfind("case.toml:1: TOML syntax: characters outside", 0) == 0);
    // ... and after a line-ending backslash in a multi-line string.
    CHECK(case_error("title = \"\"\"\\\n  \xC2\xA7\"\"\"\n") ==
          "case.toml:2: TOML syntax: a character outside the ASCII range cannot follow a line-ending backslash (the TOML "
          "reader murk uses mishandles it); write it as a \\u escape, found '\xC2\xA7'");
    // ... and after a backslash in a multi-line string, directly or after blanks.
    CHECK(case_error("s = \"\"\"\n\\\xC2\xA7\"\"\"\n") ==
          "case.toml:2: TOML syntax: a backslash in a multi-line string cannot precede a character outside the ASCII "
          "range, found '\xC2\xA7'");
    CHECK(case_error("s = \"\"\"\\  \t\xC2\xA7\"\"\"\n").rfind("case.toml:1: TOML syntax: a backslash", 0) == 0);
    // Inside strings and comments, and after a byte-order mark, such characters are fine:
    // the case fails later, on its first unknown key, not on its text.
    const std::string fine = "\xEF\xBB\xBFtitle = \"Fisch \xC3\xA4\" # \xCE\xA9\ndescription = '\xC2\xB5' \n"
                             "a = \"\"\"\n\xC2\xA7 \\\n x\xC2\xA7\"\"\"\nb = '''\xC2\xA7'''''\n\"k\xC3\xA9y\" = 1\n"
                             "c = [\n  \"\xC2\xA7\",\n  { d.\"\xC2\xA7\" = '\xC2\xA7' }, 1, \"\xC2\xA7\"]\n"
                             "e = 1979-05-27 07:32:00 # \xC2\xA7\nf = -1_000 # \xC2\xA7\ng=\"\xC2\xA7\"\n";
    CHECK(case_error(fine).find("TOML syntax") == std::string::npos);
    CHECK(case_error(fine).rfind("case.toml:3: a: unknown key", 0) == 0);
}

TEST_CASE("fuzz finding: a table header without a key is a TOML syntax error") {
    // toml++ 3.3.0 asserts on these in its debug build; the release build murk links
    // reports them, and so must every build of murk.
    CHECK(case_error("title = \"t\"\n[\bwater]\n").rfind("case.toml:2: TOML syntax: ", 0) == 0);
    CHECK(case_error("[[[1]]]\n").rfind("case.toml:1: TOML syntax: ", 0) == 0);
    CHECK(case_error("[[=\n").rfind("case.toml:1: TOML syntax: ", 0) == 0);
}
