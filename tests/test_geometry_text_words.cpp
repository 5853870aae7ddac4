// Tests of geometry/text_words: words and lines of a text, their line numbers and
// the bytes left, as the mesh readers use them.
#include "geometry/text_words.hpp"

#include <doctest/doctest.h>

#include <string>
#include <vector>

using namespace murk;

TEST_CASE("text words: words in order with their lines") {
    TextWords w("solid a\r\n\n  facet\tnormal\n");
    CHECK(w.next_word() == "solid");
    CHECK(w.line() == 1);
    CHECK(w.next_word() == "a");
    CHECK(w.next_word() == "facet");
    CHECK(w.line() == 3);
    CHECK(w.next_word() == "normal");
    CHECK(w.next_word().empty());
    CHECK(w.bytes_left() == 0);
    CHECK(w.last_line() == 3);  // the line of the last word, not of the final line break
}

TEST_CASE("text words: lines skip blank ones and keep their numbers") {
    const std::string text = "$Nodes\n\n 2 \n1 0 0 0\n";
    TextWords w(text);
    std::vector<std::string_view> line;
    REQUIRE(w.next_line(line));
    CHECK(line == std::vector<std::string_view>{"$Nodes"});
    CHECK(w.line() == 1);
    REQUIRE(w.next_line(line));
    CHECK(line == std::vector<std::string_view>{"2"});
    CHECK(w.line() == 3);
    CHECK(w.bytes_left() == 9);  // "\n1 0 0 0\n": the line break after "2" is not read yet
    REQUIRE(w.next_line(line));
    CHECK(line.size() == 4);
    CHECK(w.line() == 4);
    CHECK(!w.next_line(line));
    CHECK(line.empty());
}

TEST_CASE("text words: skip_line drops the rest of a line, NUL bytes are part of words") {
    const std::string text("solid my name\nfacet 1\0002\n", 24);  // TextWords keeps a view of it
    TextWords w(text);
    CHECK(w.next_word() == "solid");
    w.skip_line();
    CHECK(w.next_word() == "facet");
    CHECK(w.next_word() == std::string_view("1\0002", 3));
    CHECK(w.line() == 2);
    CHECK(TextWords("").last_line() == 1);
    CHECK(TextWords("").next_word().empty());
}
