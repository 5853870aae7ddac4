// Quantities with units from case files. Expected values are conversions done by
// hand here from the SI prefix and unit definitions (BIPM, "The International
// System of Units", 9th edition, 2019); each line shows the arithmetic.
#include "cases/input/units.hpp"
#include "geometry/input_error.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <thread>
#include <vector>

using murk::Dimension;
using murk::parse_quantity;

namespace {

double q(const std::string& text, Dimension d) { return parse_quantity(text, d, "test.toml:1: key"); }

// The message of the InputError thrown by parsing `text`, or "" if none.
std::string error_of(const std::string& text, Dimension d) {
    try {
        parse_quantity(text, d, "case.toml:12: water.conductivity");
    } catch (const murk::InputError& e) {
        return e.what();
    }
    return "";
}

}  // namespace

TEST_CASE("units: conversions to SI") {
    // 1 uS/cm = 1e-6 S / 1e-2 m = 1e-4 S/m
    CHECK(q("1 uS/cm", Dimension::conductivity) == doctest::Approx(1e-4).epsilon(1e-12));
    CHECK(q("100 uS/cm", Dimension::conductivity) == doctest::Approx(1e-2).epsilon(1e-12));
    // 1 mS/cm = 1e-3 / 1e-2 = 0.1 S/m
    CHECK(q("1 mS/cm", Dimension::conductivity) == doctest::Approx(0.1).epsilon(1e-12));
    // micro sign written as the Unicode letter: 50 µS/cm = 5e-3 S/m
    CHECK(q("50 µS/cm", Dimension::conductivity) == doctest::Approx(5e-3).epsilon(1e-12));
    // 1 kohm*cm^2 = 1e3 ohm * 1e-4 m^2 = 0.1 ohm m^2
    CHECK(q("1 kohm*cm^2", Dimension::specific_resistance) == doctest::Approx(0.1).epsilon(1e-12));
    CHECK(q("1 kohm.cm2", Dimension::specific_resistance) == doctest::Approx(0.1).epsilon(1e-12));
    CHECK(q("0.3 ohm*m^2", Dimension::specific_resistance) == doctest::Approx(0.3).epsilon(1e-12));
    CHECK(q("0.3 ohm m^2", Dimension::specific_resistance) == doctest::Approx(0.3).epsilon(1e-12));
    // 100 ohm*cm = 100 * 1e-2 = 1 ohm m
    CHECK(q("100 ohm*cm", Dimension::resistivity) == doctest::Approx(1.0).epsilon(1e-12));
    // 1 uF/cm^2 = 1e-6 F / 1e-4 m^2 = 1e-2 F/m^2
    CHECK(q("1 uF/cm^2", Dimension::capacitance_per_area) == doctest::Approx(1e-2).epsilon(1e-12));
    CHECK(q("2 mm", Dimension::length) == doctest::Approx(2e-3).epsilon(1e-12));
    CHECK(q("-3.5 cm", Dimension::length) == doctest::Approx(-3.5e-2).epsilon(1e-12));
    CHECK(q("+1.5e1 mm", Dimension::length) == doctest::Approx(1.5e-2).epsilon(1e-12));
    CHECK(q(".5 m", Dimension::length) == doctest::Approx(0.5).epsilon(1e-12));
    CHECK(q("2mm", Dimension::length) == doctest::Approx(2e-3).epsilon(1e-12));
    // 1 inch = 0.0254 m exactly (international inch, 1959)
    CHECK(q("1 inch", Dimension::length) == doctest::Approx(0.0254).epsilon(1e-12));
    CHECK(q("1 kHz", Dimension::frequency) == doctest::Approx(1e3).epsilon(1e-12));
    CHECK(q("250 uA", Dimension::current) == doctest::Approx(2.5e-4).epsilon(1e-12));
    CHECK(q("1 mV", Dimension::voltage) == doctest::Approx(1e-3).epsilon(1e-12));
    CHECK(q("2 ms", Dimension::time) == doctest::Approx(2e-3).epsilon(1e-12));
    // 30 deg = 30 * pi / 180 rad
    CHECK(q("30 deg", Dimension::angle) == doctest::Approx(30.0 * M_PI / 180.0).epsilon(1e-12));
    CHECK(q("90 degree", Dimension::angle) == doctest::Approx(M_PI / 2.0).epsilon(1e-12));
    CHECK(q("1 rad", Dimension::angle) == doctest::Approx(1.0).epsilon(1e-12));
    CHECK(q("80", Dimension::permittivity_relative) == doctest::Approx(80.0).epsilon(1e-12));
    CHECK(q("0.25", Dimension::dimensionless) == doctest::Approx(0.25).epsilon(1e-12));
}

TEST_CASE("units: noise densities per root hertz") {
    // 10 nV/sqrt(Hz) = 1e-8 V/sqrt(Hz)
    CHECK(q("10 nV/sqrt(Hz)", Dimension::voltage_noise_density) == doctest::Approx(1e-8).epsilon(1e-12));
    CHECK(q("10 nV / sqrt( Hz )", Dimension::voltage_noise_density) == doctest::Approx(1e-8).epsilon(1e-12));
    CHECK(q("10 nV/√Hz", Dimension::voltage_noise_density) == doctest::Approx(1e-8).epsilon(1e-12));
    CHECK(q("3 fA/sqrt(Hz)", Dimension::current_noise_density) == doctest::Approx(3e-15).epsilon(1e-12));
    // A power density: sqrt(100 nV^2/Hz) = 10 nV/sqrt(Hz) = 1e-8
    CHECK(q("100 nV^2/Hz", Dimension::voltage_noise_density) == doctest::Approx(1e-8).epsilon(1e-12));
    CHECK(q("100 nV2/Hz", Dimension::voltage_noise_density) == doctest::Approx(1e-8).epsilon(1e-12));
}

TEST_CASE("units: bad quantities are refused with the key and the reason") {
    // A bare number for a dimensioned quantity.
    std::string m = error_of("100", Dimension::conductivity);
    CHECK(m.find("case.toml:12: water.conductivity:") == 0);
    CHECK(m.find("no unit") != std::string::npos);
    CHECK(m.find("100 uS/cm") != std::string::npos);  // the example of a good form

    // Wrong dimension: names what was expected and what was found.
    m = error_of("3 mA", Dimension::length);
    CHECK(m.find("case.toml:12: water.conductivity:") == 0);
    CHECK(m.find("expected a length") != std::string::npos);
    CHECK(m.find("'3 mA'") != std::string::npos);
    CHECK(m.find("a current") != std::string::npos);

    // Reciprocal units: UDUNITS-2 would convert them by inversion.
    m = error_of("1 ms", Dimension::frequency);
    CHECK(m.find("expected a frequency") != std::string::npos);
    CHECK(m.find("(a time)") != std::string::npos);
    CHECK(error_of("4 ohm*m", Dimension::conductivity).find("(a resistivity)") != std::string::npos);
    CHECK(error_of("2 S/m", Dimension::resistivity).find("(a conductivity)") != std::string::npos);
    CHECK(error_of("2 /m", Dimension::length).find("expected a length") != std::string::npos);

    // Fractional exponents, which UDUNITS-2 would read as a scale factor.
    for (const char* bad : {"5 nV/Hz^0.5", "5 nV/Hz0.5", "5 nV/Hz^.5", "5 nV/Hz**0.5", "5 m^1/2", "5 nV/Hz^(1/2)"}) {
        CAPTURE(bad);
        CHECK(error_of(bad, Dimension::voltage_noise_density).find("fractional exponent") != std::string::npos);
    }
    // Numbers inside the unit ("m 1e3" would be read as 1000 m).
    CHECK(error_of("2 m 1e3", Dimension::length).find("contains a number") != std::string::npos);
    // A square root anywhere but at the end of a noise density.
    CHECK(error_of("2 sqrt(Hz)/V", Dimension::voltage_noise_density).find("square root") != std::string::npos);
    // A noise density where a plain voltage is wanted.
    CHECK(error_of("10 nV/sqrt(Hz)", Dimension::voltage).find("noise density") != std::string::npos);
    // A plain voltage where a noise density is wanted.
    CHECK(error_of("10 nV", Dimension::voltage_noise_density).find("expected a voltage noise density") !=
          std::string::npos);
    // Garbage.
    CHECK(error_of("fast", Dimension::length).find("does not start with a number") != std::string::npos);
    CHECK(error_of("2 furlongsx", Dimension::length).find("unknown unit 'furlongsx'") != std::string::npos);
    CHECK(error_of("", Dimension::length).find("empty") != std::string::npos);
    // Not finite.
    CHECK(error_of("nan S/m", Dimension::conductivity).find("not a finite number") != std::string::npos);
    CHECK(error_of("-inf m", Dimension::length).find("not a finite number") != std::string::npos);
    CHECK(error_of("1e999 m", Dimension::length).find("out of range") != std::string::npos);
    // Finite number, infinite once converted: 1e300 of 1e12 m each.
    CHECK(error_of("1e300 Tm", Dimension::length).find("out of range") != std::string::npos);
    // Angular frequency: rad is dimensionless in UDUNITS-2, so rad/s would pass as Hz.
    CHECK(error_of("6283 rad/s", Dimension::frequency).find("angular") != std::string::npos);
    // Offsets and logarithmic units.
    CHECK(error_of("2 m @ 3", Dimension::length).find("not a plain unit") != std::string::npos);
}

TEST_CASE("units: every message is one line and starts with the place") {
    for (const char* bad : {"100", "3 mA", "5 nV/Hz^0.5", "fast", "nan S/m", "1 parsec/fortnight"}) {
        CAPTURE(bad);
        const std::string m = error_of(bad, Dimension::conductivity);
        REQUIRE(!m.empty());
        CHECK(m.find('\n') == std::string::npos);
        CHECK(m.rfind("case.toml:12: water.conductivity: ", 0) == 0);
    }
}

TEST_CASE("units: parsing from several threads at once") {
    std::vector<double> results(4, 0.0);
    std::vector<std::thread> threads;
    for (int i = 0; i < 4; ++i)
        threads.emplace_back([&results, i] {
            double sum = 0.0;
            for (int k = 0; k < 200; ++k) sum += q("1 uS/cm", Dimension::conductivity);
            results[i] = sum;
        });
    for (auto& t : threads) t.join();
    // 200 * 1e-4 S/m, as in the conversion test above
    for (double r : results) CHECK(r == doctest::Approx(200 * 1e-4).epsilon(1e-12));
}
