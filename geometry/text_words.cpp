#include "geometry/text_words.hpp"

#include <algorithm>

namespace murk {
namespace {

bool is_space(char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\v' || c == '\f'; }

}  // namespace

void TextWords::skip_space() {
    while (at_ < text_.size() && is_space(text_[at_])) {
        if (text_[at_] == '\n') ++line_;
        ++at_;
    }
}

std::string_view TextWords::next_word() {
    skip_space();
    const std::size_t start = at_;
    while (at_ < text_.size() && !is_space(text_[at_])) ++at_;
    word_line_ = line_;
    return text_.substr(start, at_ - start);
}

bool TextWords::next_line(std::vector<std::string_view>& words) {
    words.clear();
    skip_space();
    if (at_ >= text_.size()) return false;
    word_line_ = line_;
    while (at_ < text_.size() && text_[at_] != '\n') {
        if (is_space(text_[at_])) {
            ++at_;
            continue;
        }
        const std::size_t start = at_;
        while (at_ < text_.size() && !is_space(text_[at_])) ++at_;
        words.push_back(text_.substr(start, at_ - start));
    }
    return true;
}

void TextWords::skip_line() {
    while (at_ < text_.size() && text_[at_] != '\n') ++at_;
}

std::size_t TextWords::last_line() const {
    std::size_t end = text_.size();
    while (end > 0 && is_space(text_[end - 1])) --end;
    return 1 + static_cast<std::size_t>(std::count(text_.begin(), text_.begin() + static_cast<std::ptrdiff_t>(end), '\n'));
}

}  // namespace murk
