#include "cases/input/units.hpp"

#include "geometry/input_error.hpp"
#include "geometry/message_text.hpp"

#include <udunits2.h>

#include <array>
#include <cctype>
#include <charconv>
#include <cmath>
#include <memory>
#include <mutex>
#include <optional>
#include <stdexcept>
#include <vector>

namespace murk {

namespace {

constexpr std::size_t kMaxQuantityBytes = 200;

// The unit database, loaded once on first use. UDUNITS-2 keeps global state
// (status, parser), so every call into it holds `mutex`.
struct UnitSystem {
    ut_system* system = nullptr;
    std::mutex mutex;

    UnitSystem() {
        // Without this the loader prints nine harmless warnings about
        // overlapping definitions in the Debian database.
        ut_set_error_message_handler(ut_ignore);
        system = ut_read_xml(nullptr);
        if (!system) system = ut_read_xml("/usr/share/xml/udunits/udunits2.xml");
        if (!system)
            throw std::runtime_error(
                "cannot load the UDUNITS-2 unit database (set UDUNITS2_XML_PATH to udunits2.xml)");
    }
    ~UnitSystem() { ut_free_system(system); }
};

UnitSystem& unit_system() {
    static UnitSystem instance;  // thread-safe lazy initialisation (C++11)
    return instance;
}

struct UnitFree {
    void operator()(ut_unit* u) const { ut_free(u); }
};
using UnitPtr = std::unique_ptr<ut_unit, UnitFree>;

// Caller holds the mutex. Null when the expression is not a known unit.
UnitPtr parse_unit_locked(const std::string& expression) {
    return UnitPtr(ut_parse(unit_system().system, expression.c_str(), UT_UTF8));
}

std::string trim(const std::string& s) {
    const auto first = s.find_first_not_of(" \t\r\n");
    if (first == std::string::npos) return {};
    const auto last = s.find_last_not_of(" \t\r\n");
    return s.substr(first, last - first + 1);
}

bool is_digit(char c) { return c >= '0' && c <= '9'; }
// Letters of unit names, including the UTF-8 bytes of µ, Ω, ° and ².
bool is_unit_letter(char c) {
    return std::isalpha(static_cast<unsigned char>(c)) || static_cast<unsigned char>(c) >= 0x80 ||
           c == '_';
}

// The SI unit of a dimension as a UDUNITS-2 expression. Noise densities are
// handled through their numerator (V or A) or their square (V^2/Hz).
std::string reference_expression(Dimension d) {
    switch (d) {
        case Dimension::length: return "m";
        case Dimension::conductivity: return "S/m";
        case Dimension::resistivity: return "ohm*m";
        case Dimension::specific_resistance: return "ohm*m^2";
        case Dimension::capacitance_per_area: return "F/m^2";
        case Dimension::permittivity_relative: return "1";
        case Dimension::frequency: return "Hz";
        case Dimension::current: return "A";
        case Dimension::voltage: return "V";
        case Dimension::voltage_noise_density: return "V";
        case Dimension::current_noise_density: return "A";
        case Dimension::time: return "s";
        case Dimension::angle: return "rad";
        case Dimension::areal_density: return "m^-2";
        case Dimension::dimensionless: return "1";
    }
    return "1";
}

bool is_noise_density(Dimension d) {
    return d == Dimension::voltage_noise_density || d == Dimension::current_noise_density;
}

bool allows_bare_number(Dimension d) {
    return d == Dimension::permittivity_relative || d == Dimension::dimensionless;
}

[[noreturn]] void fail(const std::string& where, const std::string& what) {
    throw InputError(where + ": " + what);
}

std::string expected_phrase(Dimension d) {
    return "expected " + dimension_name(d) + " like '" + example_quantity(d) + "'";
}

// Splits a leading decimal number off `text`. Returns the number's length, or 0
// when the text does not start with one. Accepts 12, -1.5, .5, 2e-3, +3.
std::size_t number_length(const std::string& text) {
    std::size_t i = 0;
    if (i < text.size() && (text[i] == '+' || text[i] == '-')) ++i;
    std::size_t digits = 0;
    while (i < text.size() && is_digit(text[i])) ++i, ++digits;
    if (i < text.size() && text[i] == '.') {
        ++i;
        while (i < text.size() && is_digit(text[i])) ++i, ++digits;
    }
    if (digits == 0) return 0;
    if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
        std::size_t j = i + 1;
        if (j < text.size() && (text[j] == '+' || text[j] == '-')) ++j;
        if (j < text.size() && is_digit(text[j])) {
            while (j < text.size() && is_digit(text[j])) ++j;
            i = j;
        }
    }
    return i;
}

// Recognises a trailing "/sqrt(Hz)" or "/√Hz" (spaces allowed). On success
// returns the unit in front of it.
std::optional<std::string> strip_root_hertz(const std::string& unit) {
    std::string squeezed;  // the unit without spaces, and where each char came from
    std::vector<std::size_t> origin;
    for (std::size_t i = 0; i < unit.size(); ++i)
        if (unit[i] != ' ' && unit[i] != '\t') squeezed += unit[i], origin.push_back(i);
    for (const std::string suffix : {"/sqrt(Hz)", "/√Hz", "/√(Hz)"}) {
        if (squeezed.size() >= suffix.size() &&
            squeezed.compare(squeezed.size() - suffix.size(), suffix.size(), suffix) == 0) {
            const std::size_t cut = squeezed.size() - suffix.size();
            return trim(unit.substr(0, cut == 0 ? 0 : origin[cut - 1] + 1));
        }
    }
    return std::nullopt;
}

// Refuses what UDUNITS-2 would misread without complaint: numbers inside the
// unit ("m 1e3" is read as 1000 m, "m^1/2" as 0.5 m), fractional exponents
// ("Hz^0.5" is read as 5), offsets and logarithms. Returns an error text, or
// an empty string when the unit is acceptable.
std::string unit_syntax_problem(const std::string& unit) {
    const std::string fractional =
        "fractional exponents are not supported in " + in_quotes(unit) +
        " (only integer powers such as m^2 or m^-1; write noise densities as 'nV/sqrt(Hz)')";
    if (unit.find('@') != std::string::npos || unit.find("since") != std::string::npos)
        return in_quotes(unit) + " is not a plain unit (offsets and time origins are not allowed)";
    for (const char* log : {"lg(", "ln(", "lb(", "log("})
        if (unit.find(log) != std::string::npos)
            return in_quotes(unit) + " is not a plain unit (logarithmic units are not allowed)";
    if (unit.find("sqrt") != std::string::npos || unit.find("√") != std::string::npos)
        return "a square root is only understood as a trailing '/sqrt(Hz)' of a noise density, not in " +
               in_quotes(unit);
    for (std::size_t i = 0; i < unit.size(); ++i) {
        const bool power = unit[i] == '^' || (unit[i] == '*' && i + 1 < unit.size() && unit[i + 1] == '*');
        if (power) {
            std::size_t j = i + (unit[i] == '^' ? 1 : 2);
            if (j < unit.size() && (unit[j] == '+' || unit[j] == '-')) ++j;
            if (j >= unit.size() || !is_digit(unit[j])) return fractional;
            i = j - 1;
            continue;
        }
        if (!is_digit(unit[i])) continue;
        // Start of a run of digits: it must be an exponent, i.e. follow a
        // letter (m2), a letter and a sign (m-1), or a power sign (m^2, m**2).
        std::size_t p = i;
        if (p > 0 && (unit[p - 1] == '-' || unit[p - 1] == '+') && p > 1 &&
            (is_unit_letter(unit[p - 2]) || unit[p - 2] == '^' || unit[p - 2] == '*'))
            --p;
        const bool exponent =
            p > 0 && (is_unit_letter(unit[p - 1]) || unit[p - 1] == '^' ||
                      (unit[p - 1] == '*' && p > 1 && unit[p - 2] == '*'));
        if (!exponent)
            return "the unit " + in_quotes(unit) + " contains a number; put the whole number in front of the unit";
        std::size_t end = i;
        while (end < unit.size() && is_digit(unit[end])) ++end;
        if (end + 1 < unit.size() && (unit[end] == '.' || unit[end] == '/') && is_digit(unit[end + 1]))
            return fractional;
        i = end - 1;
    }
    return {};
}

// "deg" is the usual short name of the degree but not in the UDUNITS-2
// database; replace it where it stands as a whole word.
std::string with_degree_names(const std::string& unit) {
    std::string out;
    for (std::size_t i = 0; i < unit.size();) {
        const bool starts_word = i == 0 || !is_unit_letter(unit[i - 1]);
        if (starts_word && unit.compare(i, 3, "deg") == 0 &&
            (i + 3 == unit.size() || !is_unit_letter(unit[i + 3]))) {
            out += "degree";
            i += 3;
        } else {
            out += unit[i++];
        }
    }
    return out;
}

// Caller holds the mutex. True when a and b measure the same kind of quantity.
// ut_are_convertible is not enough: it also accepts reciprocal units, and would
// turn "1 ms" into a frequency of 1000 Hz or "4 ohm*m" into 0.25 S/m.
bool same_dimension_locked(const ut_unit* a, const ut_unit* b) {
    const UnitPtr ratio(ut_divide(a, b));
    return ratio && ut_is_dimensionless(ratio.get()) != 0;
}

// Caller holds the mutex. Value of `number unit` in units of `target`, or
// nullopt when the two do not measure the same kind of quantity.
std::optional<double> convert_locked(double number, const ut_unit* unit, const std::string& target) {
    const UnitPtr to = parse_unit_locked(target);
    if (!to || !same_dimension_locked(unit, to.get())) return std::nullopt;
    cv_converter* converter = ut_get_converter(const_cast<ut_unit*>(unit), to.get());
    if (!converter) return std::nullopt;
    const double value = cv_convert_double(converter, number);
    cv_free(converter);
    return value;
}

// Caller holds the mutex. Names what a unit measures, for messages: the first
// dimension it converts to, or its definition in base units.
std::string describe_locked(const ut_unit* unit) {
    static const std::array<Dimension, 11> candidates = {
        Dimension::length,  Dimension::conductivity,        Dimension::resistivity,
        Dimension::specific_resistance, Dimension::capacitance_per_area, Dimension::frequency,
        Dimension::current, Dimension::voltage,             Dimension::time,
        Dimension::angle,   Dimension::dimensionless};
    if (ut_is_dimensionless(unit)) return "a dimensionless number";
    for (Dimension d : candidates) {
        const UnitPtr ref = parse_unit_locked(reference_expression(d));
        if (ref && same_dimension_locked(unit, ref.get())) return dimension_name(d);
    }
    char buffer[128];
    const int length = ut_format(unit, buffer, sizeof buffer, UT_ASCII | UT_DEFINITION);
    if (length > 0 && static_cast<std::size_t>(length) < sizeof buffer) {
        // The definition starts with the scale ("1000 m.s-1"); the base units say enough.
        std::string definition(buffer);
        if (is_digit(definition[0]) && definition.find(' ') != std::string::npos)
            definition = definition.substr(definition.find(' ') + 1);
        return "a quantity in " + definition;
    }
    return "a quantity of another kind";
}

}  // namespace

std::string dimension_name(Dimension d) {
    switch (d) {
        case Dimension::length: return "a length";
        case Dimension::conductivity: return "a conductivity";
        case Dimension::resistivity: return "a resistivity";
        case Dimension::specific_resistance: return "a specific resistance (resistance times area)";
        case Dimension::capacitance_per_area: return "a capacitance per area";
        case Dimension::permittivity_relative: return "a relative permittivity";
        case Dimension::frequency: return "a frequency";
        case Dimension::current: return "a current";
        case Dimension::voltage: return "a voltage";
        case Dimension::voltage_noise_density: return "a voltage noise density";
        case Dimension::current_noise_density: return "a current noise density";
        case Dimension::time: return "a time";
        case Dimension::angle: return "an angle";
        case Dimension::areal_density: return "a number per area";
        case Dimension::dimensionless: return "a dimensionless number";
    }
    return "a quantity";
}

std::string si_unit(Dimension d) {
    switch (d) {
        case Dimension::voltage_noise_density: return "V/sqrt(Hz)";
        case Dimension::current_noise_density: return "A/sqrt(Hz)";
        default: return reference_expression(d);
    }
}

std::string example_quantity(Dimension d) {
    switch (d) {
        case Dimension::length: return "2 mm";
        case Dimension::conductivity: return "100 uS/cm";
        case Dimension::resistivity: return "100 ohm*m";
        case Dimension::specific_resistance: return "0.3 ohm*m^2";
        case Dimension::capacitance_per_area: return "1 uF/cm^2";
        case Dimension::permittivity_relative: return "80";
        case Dimension::frequency: return "1 kHz";
        case Dimension::current: return "10 uA";
        case Dimension::voltage: return "1 mV";
        case Dimension::voltage_noise_density: return "10 nV/sqrt(Hz)";
        case Dimension::current_noise_density: return "1 pA/sqrt(Hz)";
        case Dimension::time: return "1 ms";
        case Dimension::angle: return "30 deg";
        case Dimension::areal_density: return "200 cm^-2";
        case Dimension::dimensionless: return "0.5";
    }
    return "1";
}

double parse_quantity(const std::string& text, Dimension expected, const std::string& where) {
    const std::string trimmed = trim(text);
    if (trimmed.empty()) fail(where, "empty text; " + expected_phrase(expected));
    // UDUNITS-2 reads C strings: a NUL byte would hide the rest of the unit from it.
    // A quantity is a short line of text; refusing more keeps that library on safe ground.
    if (trimmed.size() > kMaxQuantityBytes)
        fail(where, "a quantity is at most " + std::to_string(kMaxQuantityBytes) + " bytes of text, got " + in_quotes(trimmed));
    for (const char c : trimmed)
        if ((static_cast<unsigned char>(c) < 0x20 && c != ' ' && c != '\t') || c == 0x7F)
            fail(where, "a quantity is one line of text without control characters, got " + in_quotes(trimmed));

    const std::size_t n = number_length(trimmed);
    if (n == 0) {
        std::string lower;
        for (char c : trimmed) lower += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
        const std::size_t skip = (lower[0] == '+' || lower[0] == '-') ? 1 : 0;
        if (lower.compare(skip, 3, "nan") == 0 || lower.compare(skip, 3, "inf") == 0)
            fail(where, in_quotes(trimmed) + " is not a finite number; " + expected_phrase(expected));
        fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (it does not start with a number)");
    }
    double number = 0.0;
    const std::string number_text = trimmed.substr(trimmed[0] == '+' ? 1 : 0, n - (trimmed[0] == '+' ? 1 : 0));
    const auto [end, error] = std::from_chars(number_text.data(), number_text.data() + number_text.size(), number);
    if (error != std::errc() || end != number_text.data() + number_text.size() || !std::isfinite(number))
        fail(where, "the number in " + in_quotes(trimmed) + " is out of range; " + expected_phrase(expected));

    std::string unit = trim(trimmed.substr(n));
    const std::optional<std::string> root_hertz_base = strip_root_hertz(unit);
    if (root_hertz_base) unit = *root_hertz_base;

    if (unit.empty()) {
        if (root_hertz_base)
            fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (no unit before /sqrt(Hz))");
        if (allows_bare_number(expected)) return number;
        fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (no unit)");
    }
    if (const std::string problem = unit_syntax_problem(unit); !problem.empty()) fail(where, problem);
    if (expected == Dimension::frequency &&
        (unit.find("rad") != std::string::npos || unit.find("rpm") != std::string::npos))
        fail(where, "angular frequencies are ambiguous (" + in_quotes(trimmed) + "); give the frequency in Hz");

    const std::string expression = with_degree_names(unit);
    UnitSystem& units = unit_system();
    std::lock_guard<std::mutex> lock(units.mutex);
    const UnitPtr parsed = parse_unit_locked(expression);
    if (!parsed) fail(where, "unknown unit " + in_quotes(unit) + "; " + expected_phrase(expected));

    std::optional<double> value;
    if (root_hertz_base) {
        if (!is_noise_density(expected))
            fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (a noise density)");
        value = convert_locked(number, parsed.get(), reference_expression(expected));
        if (!value)
            fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (" +
                            describe_locked(parsed.get()) + " per root hertz)");
    } else if (is_noise_density(expected)) {
        // A power spectral density such as "100 nV^2/Hz": its square root.
        const std::string squared = reference_expression(expected) + "^2/Hz";
        value = convert_locked(number, parsed.get(), squared);
        if (!value) fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (" +
                                    describe_locked(parsed.get()) + ")");
        if (*value < 0.0)
            fail(where, "a power spectral density cannot be negative, got " + in_quotes(trimmed));
        value = std::sqrt(*value);
    } else {
        value = convert_locked(number, parsed.get(), reference_expression(expected));
        if (!value)
            fail(where, expected_phrase(expected) + ", got " + in_quotes(trimmed) + " (" +
                            describe_locked(parsed.get()) + ")");
    }
    if (!std::isfinite(*value))
        fail(where, in_quotes(trimmed) + " is out of range once converted to " + si_unit(expected));
    // A subnormal number has lost digits already and turns into zero or infinity in
    // the first product or quotient it enters: refuse it rather than compute with it.
    if (std::fpclassify(number) == FP_SUBNORMAL || std::fpclassify(*value) == FP_SUBNORMAL)
        fail(where, in_quotes(trimmed) + " is too small for double precision once converted to " + si_unit(expected) +
                        " (below 2.2e-308; write 0 if zero is meant)");
    return *value;
}

}  // namespace murk
