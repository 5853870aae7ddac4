#pragma once
// Physical quantities written as text in case files ("100 uS/cm", "2 mm",
// "10 nV/sqrt(Hz)") turned into SI numbers. Unit expressions are parsed by
// UDUNITS-2; this wrapper adds what it lacks (noise densities per root hertz,
// the short angle unit "deg") and refuses the forms it would misread silently
// (fractional exponents, numbers hidden inside the unit).
#include <string>

namespace murk {

// What a quantity measures; each has one SI unit that parse_quantity returns.
enum class Dimension {
    length,                  // m
    conductivity,            // S/m
    resistivity,             // ohm m
    specific_resistance,     // ohm m^2 (membrane or skin, resistance times area)
    capacitance_per_area,    // F/m^2 (membrane or skin capacitance)
    permittivity_relative,   // 1 (relative to the vacuum permittivity)
    frequency,               // Hz
    current,                 // A
    voltage,                 // V
    voltage_noise_density,   // V/sqrt(Hz)
    current_noise_density,   // A/sqrt(Hz)
    time,                    // s
    angle,                   // rad
    areal_density,           // 1/m^2 (receptors per skin area)
    dimensionless,           // 1
};

// Plain words for a dimension, as used in messages ("a conductivity").
std::string dimension_name(Dimension d);

// The SI unit returned for a dimension, as text ("S/m").
std::string si_unit(Dimension d);

// An example of a well-formed quantity of this dimension, for messages.
std::string example_quantity(Dimension d);

// Parses "number unit" and returns the value in the SI unit of `expected`.
//  - the number is a decimal (optionally signed, with exponent); it must be finite;
//  - the unit is a UDUNITS-2 expression (prefixes, products with '*', '.' or space,
//    quotients with '/', integer powers as m^2, m2 or m^-1), plus "deg" for degrees
//    and a trailing "/sqrt(Hz)" or "/√Hz" for the two noise densities; a noise
//    density may also be given as a power density ("100 nV^2/Hz"), whose square
//    root is taken;
//  - a bare number is accepted only for permittivity_relative and dimensionless;
//  - the value, in SI, is finite and not subnormal (zero, or at least 2.2e-308).
// Throws InputError with one line "<where>: <what is wrong>" otherwise.
// Thread-safe (UDUNITS-2 calls are serialized).
double parse_quantity(const std::string& text, Dimension expected, const std::string& where);

}  // namespace murk
