#pragma once
// The words of a text file in order, without copying them: a word is a run of
// characters that are not white space (space, tab, CR, LF, VT, FF). Lines are
// numbered from 1, for messages. The readers of text formats (ASCII STL, Gmsh MSH)
// walk a file with it and learn how many bytes remain, to check counts against.
#include <cstdint>
#include <string_view>
#include <vector>

namespace murk {

class TextWords {
public:
    explicit TextWords(std::string_view text) : text_(text) {}

    // The next word, or an empty view at the end of the text.
    std::string_view next_word();
    // The words of the next line that has any; false at the end of the text.
    bool next_line(std::vector<std::string_view>& words);
    // Skips what is left of the current line.
    void skip_line();

    // Line of the last word or line returned.
    std::size_t line() const { return word_line_; }
    // Line of the last word of the text (for "the file ends" messages).
    std::size_t last_line() const;
    // Bytes not read yet.
    std::uint64_t bytes_left() const { return text_.size() - at_; }

private:
    void skip_space();

    std::string_view text_;
    std::size_t at_ = 0;         // next byte to read
    std::size_t line_ = 1;       // line of text_[at_]
    std::size_t word_line_ = 0;  // line of the last word returned
};

}  // namespace murk
