#include "geometry/message_text.hpp"

#include <cstdio>
#include <vector>

namespace murk {
namespace {

std::string hex_escape(unsigned char c) {
    char buffer[5];
    std::snprintf(buffer, sizeof buffer, "\\x%02X", c);
    return buffer;
}

// Length of the valid UTF-8 sequence of two or more bytes starting at text[i], or
// 0 when there is none. C1 control characters (U+0080..U+009F) count as invalid:
// some terminals act on them.
std::size_t utf8_length(std::string_view text, std::size_t i) {
    const auto lead = static_cast<unsigned char>(text[i]);
    const std::size_t n = lead >= 0xC2 && lead <= 0xDF ? 2 : lead >= 0xE0 && lead <= 0xEF ? 3 : lead >= 0xF0 && lead <= 0xF4 ? 4 : 0;
    if (n == 0 || i + n > text.size()) return 0;
    for (std::size_t k = 1; k < n; ++k)
        if ((static_cast<unsigned char>(text[i + k]) & 0xC0) != 0x80) return 0;
    if (lead == 0xC2 && static_cast<unsigned char>(text[i + 1]) < 0xA0) return 0;
    return n;
}

// `text` cut into pieces that must stay whole: one character each, escaped.
std::vector<std::string> pieces(std::string_view text) {
    std::vector<std::string> out;
    for (std::size_t i = 0; i < text.size();) {
        const auto c = static_cast<unsigned char>(text[i]);
        if (c == '\n') out.emplace_back("\\n");
        else if (c == '\r') out.emplace_back("\\r");
        else if (c == '\t') out.emplace_back("\\t");
        else if (c < 0x20 || c == 0x7F) out.push_back(hex_escape(c));
        else if (c < 0x80) out.emplace_back(1, static_cast<char>(c));
        else if (const std::size_t n = utf8_length(text, i)) {
            out.emplace_back(text.substr(i, n));
            i += n;
            continue;
        } else {
            out.push_back(hex_escape(c));
        }
        ++i;
    }
    return out;
}

std::size_t length_of(const std::vector<std::string>& parts) {
    std::size_t n = 0;
    for (const std::string& p : parts) n += p.size();
    return n;
}

// `text` escaped; when longer than `max_chars`, its start and end around "...".
struct Shown {
    std::string text;
    bool cut = false;
};

Shown shorten(std::string_view text, std::size_t max_chars) {
    // Each piece has at least one character per byte of `text`, so the start and the
    // end of a long text are enough: a megabyte is never escaped as a whole.
    const std::size_t window = max_chars + 4;
    const bool long_text = text.size() > 2 * window;
    std::string_view head_bytes = long_text ? text.substr(0, window) : text;
    std::string_view tail_bytes = long_text ? text.substr(text.size() - window) : std::string_view();
    while (!tail_bytes.empty() && (static_cast<unsigned char>(tail_bytes.front()) & 0xC0) == 0x80)
        tail_bytes.remove_prefix(1);  // start the end part at a whole character
    const std::vector<std::string> head = pieces(head_bytes);
    const std::vector<std::string> tail = pieces(tail_bytes);
    if (!long_text && length_of(head) <= max_chars) {
        std::string out;
        for (const std::string& p : head) out += p;
        return {out, false};
    }
    // Two thirds of the room for the start, the rest for the end, "..." between.
    const std::size_t room = max_chars > 3 ? max_chars - 3 : 0;
    const std::size_t head_room = room * 2 / 3;
    const std::size_t tail_room = room - head_room;
    const std::vector<std::string>& ending = long_text ? tail : head;
    std::string start, end;
    for (const std::string& p : head) {
        if (start.size() + p.size() > head_room) break;
        start += p;
    }
    for (std::size_t k = ending.size(); k-- > 0;) {
        if (end.size() + ending[k].size() > tail_room) break;
        end.insert(0, ending[k]);
    }
    return {start + "..." + end, true};
}

}  // namespace

std::string printable(std::string_view text, std::size_t max_chars) { return shorten(text, max_chars).text; }

std::string in_quotes(std::string_view value, std::size_t max_chars) {
    const Shown shown = shorten(value, max_chars);
    return "'" + shown.text + "'" + (shown.cut ? " (" + std::to_string(value.size()) + " bytes)" : "");
}

}  // namespace murk
