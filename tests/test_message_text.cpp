// Tests of geometry/message_text: values echoed in messages stay on one short line.
#include "geometry/message_text.hpp"

#include <doctest/doctest.h>

#include <string>

using namespace murk;

TEST_CASE("message text: short printable values are kept as they are") {
    CHECK(in_quotes("100 uS/cm") == "'100 uS/cm'");
    CHECK(printable("case.toml") == "case.toml");
    CHECK(in_quotes("") == "''");
    CHECK(in_quotes("10 nV/√Hz") == "'10 nV/√Hz'");  // UTF-8 (U+221A) is kept
    CHECK(in_quotes("1 µS/cm") == "'1 µS/cm'");
}

TEST_CASE("message text: control characters and broken UTF-8 are escaped") {
    CHECK(in_quotes("a\nb") == "'a\\nb'");
    CHECK(in_quotes("a\r\tb") == "'a\\r\\tb'");
    CHECK(in_quotes(std::string("a\0b", 3)) == "'a\\x00b'");
    CHECK(in_quotes("a\x1b[2Jb") == "'a\\x1B[2Jb'");  // a terminal escape sequence
    CHECK(in_quotes("\x7f") == "'\\x7F'");
    CHECK(in_quotes("\xff\xfe") == "'\\xFF\\xFE'");       // never valid in UTF-8
    CHECK(in_quotes("x\xe2\x88") == "'x\\xE2\\x88'");     // a sequence cut short
    CHECK(in_quotes("\xc2\x85") == "'\\xC2\\x85'");       // U+0085, a C1 control character
}

TEST_CASE("message text: a megabyte value becomes its start and end and its length") {
    std::string value(1 << 20, 'x');
    value.replace(0, 5, "start");
    value.replace(value.size() - 3, 3, "end");
    const std::string shown = in_quotes(value);
    CAPTURE(shown);
    CHECK(shown.size() <= kEchoedValueChars + 2 + 20);  // quotes and " (1048576 bytes)"
    CHECK(shown.rfind("'start", 0) == 0);
    CHECK(shown.find("end' (1048576 bytes)") != std::string::npos);
    CHECK(shown.find("...") != std::string::npos);
}

TEST_CASE("message text: a long value of line breaks stays one short line") {
    const std::string value(100000, '\n');
    const std::string shown = in_quotes(value);
    CAPTURE(shown);
    CHECK(shown.find('\n') == std::string::npos);
    CHECK(shown.size() <= kEchoedValueChars + 2 + 20);
    CHECK(shown.find("(100000 bytes)") != std::string::npos);
}

TEST_CASE("message text: a long path keeps its file name") {
    const std::string path = "/" + std::string(300, 'd') + "/body.msh";
    const std::string shown = printable(path);
    CHECK(shown.size() <= kEchoedNameChars);
    CHECK(shown.size() >= kEchoedNameChars - 4);  // cut where needed, not much shorter
    CHECK(shown.substr(shown.size() - 9) == "/body.msh");
    CHECK(shown.find("...") != std::string::npos);
}

TEST_CASE("message text: shortening never splits an escape or a UTF-8 character") {
    // 60 copies of the two-byte "µ" (C2 B5): the cut must fall between characters.
    std::string micro;
    for (int k = 0; k < 60; ++k) micro += "µ";
    const std::string shown = printable(micro, 20);
    CAPTURE(shown);
    CHECK(shown.find("...") != std::string::npos);
    CHECK(shown.size() <= 20);
    const std::size_t dots = shown.find("...");  // every byte around it belongs to a whole µ
    CHECK(dots % 2 == 0);
    CHECK((shown.size() - dots - 3) % 2 == 0);
    for (std::size_t i = 0; i < dots; i += 2) CHECK(shown.compare(i, 2, "µ") == 0);
    const std::string tabs = printable(std::string(50, '\t'), 20);
    CAPTURE(tabs);
    CHECK(tabs.find("\\...") == std::string::npos);  // no "\" left without its letter
    CHECK(tabs.size() <= 20);
}
