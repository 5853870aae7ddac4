#include "cases/input/toml_precheck.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

namespace murk {
namespace {

bool non_ascii(char c) { return static_cast<unsigned char>(c) >= 0x80; }

// What ends a value for toml++: white space (line breaks too), ']', '}', ',', '#'.
bool ends_value(char c) {
    return c == ' ' || c == '\t' || (c >= '\n' && c <= '\r') || c == ']' || c == '}' || c == ',' || c == '#';
}

// What surrounds the current byte, as TOML sees it.
enum class Context { code, comment, basic_string, literal_string, multi_line_basic, multi_line_literal };

class Scanner {
public:
    Scanner(std::string_view text, const std::string& file) : text_(text), file_(file) {}

    void run() {
        if (starts_with("\xEF\xBB\xBF")) at_ = 3;  // a byte-order mark, which toml++ skips
        while (at_ < text_.size()) step();
    }

private:
    char peek(std::size_t ahead = 0) const { return at_ + ahead < text_.size() ? text_[at_ + ahead] : '\0'; }
    void advance(std::size_t n = 1) {
        for (std::size_t k = 0; k < n && at_ < text_.size(); ++k)
            if (text_[at_++] == '\n') ++line_;
    }
    bool starts_with(std::string_view s) const { return text_.substr(at_, s.size()) == s; }
    void back_to_code(char last) {
        context_ = Context::code;
        before_ = last;
    }
    // Three or more quotes close a multi-line string; up to two more belong to it.
    void close_multi_line(char quote) {
        std::size_t run = 0;
        while (run < 5 && peek(run) == quote) ++run;
        advance(run);
        back_to_code(quote);
    }
    [[noreturn]] void refuse(const std::string& what) const {
        // The character as it stands in the file: its UTF-8 bytes, at most four.
        std::size_t n = 1;
        while (n < 4 && at_ + n < text_.size() && (static_cast<unsigned char>(text_[at_ + n]) & 0xC0) == 0x80) ++n;
        throw InputError(file_ + ":" + std::to_string(line_) + ": TOML syntax: " + what + ", found " +
                         in_quotes(text_.substr(at_, n)));
    }

    void step() {
        const char c = peek();
        switch (context_) {
            case Context::code: return code(c);
            case Context::comment:
                if (c == '\n') back_to_code('\n');
                advance();
                return;
            case Context::basic_string:
                if (c == '\\') advance();  // the escaped character
                else if (c == '"' || c == '\n') back_to_code(c);
                advance();
                return;
            case Context::literal_string:
                if (c == '\'' || c == '\n') back_to_code(c);
                advance();
                return;
            case Context::multi_line_basic:
                if (c == '\\') return line_ending_backslash();
                if (starts_with("\"\"\"")) return close_multi_line('"');
                advance();
                return;
            case Context::multi_line_literal:
                if (starts_with("'''")) return close_multi_line('\'');
                advance();
                return;
        }
    }

    void code(char c) {
        // A value starting with a digit or a sign is scanned by toml++ up to the next
        // white space, ']', '}', ',' or '#', whatever lies between (quotes included).
        if (in_number_) {
            if (!ends_value(c)) {
                if (non_ascii(c)) refuse("characters outside the ASCII range belong inside quotes or comments");
                before_ = c;
                advance();
                return;
            }
            in_number_ = false;
        }
        if ((before_ == '=' || before_ == '[' || before_ == ',') && ((c >= '0' && c <= '9') || c == '+' || c == '-')) {
            in_number_ = true;
            before_ = c;
            advance();
            return;
        }
        // A quote opens a string only where TOML allows one: at the start of a line, after
        // '=', '[', ',', '{' or the '.' of a dotted key. Inside a bare word (1"x") it does
        // not, and toml++ reads on as if outside quotes.
        const bool string_may_start =
            before_ == '\n' || before_ == '=' || before_ == '[' || before_ == ',' || before_ == '{' || before_ == '.';
        if (c == '#') context_ = Context::comment;
        else if (string_may_start && starts_with("\"\"\"")) context_ = Context::multi_line_basic, advance(2);
        else if (string_may_start && starts_with("'''")) context_ = Context::multi_line_literal, advance(2);
        else if (string_may_start && c == '"') context_ = Context::basic_string;
        else if (string_may_start && c == '\'') context_ = Context::literal_string;
        else if (non_ascii(c)) refuse("characters outside the ASCII range belong inside quotes or comments");
        if (c != ' ' && c != '\t' && c != '\r') before_ = c;
        advance();
    }

    // A backslash in a multi-line basic string: an escape, or a line-ending backslash
    // that swallows the white space and line breaks after it. toml++ tests the first
    // character after the backslash, after blanks following it, and after the
    // swallowed white space, for being white space.
    void line_ending_backslash() {
        std::size_t k = 1;
        while (peek(k) == ' ' || peek(k) == '\t') ++k;
        if (non_ascii(peek(k))) {
            advance(k);
            refuse("a backslash in a multi-line string cannot precede a character outside the ASCII range");
        }
        if (peek(k) != '\n' && !(peek(k) == '\r' && peek(k + 1) == '\n')) {
            advance(2);  // an escape such as \" or \n, or a mistake toml++ reports
            return;
        }
        advance(k);
        while (at_ < text_.size() && (peek() == ' ' || peek() == '\t' || peek() == '\r' || peek() == '\n')) advance();
        if (at_ < text_.size() && non_ascii(peek()))
            refuse("a character outside the ASCII range cannot follow a line-ending backslash (the TOML reader murk uses "
                   "mishandles it); write it as a \\u escape");
    }

    std::string_view text_;
    const std::string& file_;
    std::size_t at_ = 0;
    std::size_t line_ = 1;
    Context context_ = Context::code;
    char before_ = '\n';     // in code: the last character but blanks on this line, or '\n' at its start
    bool in_number_ = false;  // in code: inside a value that starts with a digit or a sign
};

}  // namespace

void precheck_toml_text(std::string_view text, const std::string& file) { Scanner(text, file).run(); }

}  // namespace murk
