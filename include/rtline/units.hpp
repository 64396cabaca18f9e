// Engineering values at the edges of rtline: resistances in the IEC 60062 letter code (4k7, 2R2, 1M5),
// quantities with SI prefixes (100u, 3.3V), temperatures in °C or kelvin, and spans LO:HI.
// Inside the library everything is SI: ohm, volt, ampere, watt, kelvin.
#pragma once

#include <string>
#include <string_view>

namespace rtline {

inline constexpr double kZeroCelsiusK = 273.15;  // 0 °C in kelvin (SI definition)
inline constexpr double k25CelsiusK = 298.15;    // the usual reference temperature T0

[[nodiscard]] constexpr double celsius_to_kelvin(double t_c) { return t_c + kZeroCelsiusK; }
[[nodiscard]] constexpr double kelvin_to_celsius(double t_k) { return t_k - kZeroCelsiusK; }

// Parses a resistance: plain (470, 0.1, 1e3), letter code with R/k/K/M/G as decimal marker or suffix
// (4k7, 2R2, 10k, 1.5M), optional "ohm", "Ohm" or "Ω" suffix. Returns ohms (> 0, finite, not
// subnormal).
// Throws InputError naming `field` and `text` otherwise.
[[nodiscard]] double parse_resistance(std::string_view text, std::string_view field);

// Parses a plain finite number (the whole text; no prefixes). Throws InputError naming `field`.
[[nodiscard]] double parse_number(std::string_view text, std::string_view field);

// Parses a quantity with an optional SI prefix (p n u µ m k M G) and an optional unit symbol `unit`
// (e.g. "100u", "100uA", "0.5mW", "3.3V"). Returns the value in the base unit.
[[nodiscard]] double parse_quantity(std::string_view text, std::string_view field, std::string_view unit);

// Parses a temperature in °C ("25", "-40", "25C", "25°C") or kelvin ("298.15K"). Returns kelvin (> 0).
[[nodiscard]] double parse_temperature(std::string_view text, std::string_view field);

// A closed temperature interval in kelvin, lo < hi.
struct Span {
    double lo_k = 0.0;
    double hi_k = 0.0;
    [[nodiscard]] double centre_k() const { return 0.5 * (lo_k + hi_k); }
};

// Parses "LO:HI" (each a temperature as parse_temperature takes it; "-30:5" works). Requires LO < HI.
[[nodiscard]] Span parse_span(std::string_view text, std::string_view field);

// A span as "LO:HI" in °C ("0:50"), as parse_span reads it back and as error messages quote it.
[[nodiscard]] std::string format_span(const Span& span);

// Formats a resistance in the letter code with `digits` significant figures, trailing zeros dropped:
// 4700 -> "4k7", 10000 -> "10k", 2.2 -> "2R2", 470 -> "470", 1.5e6 -> "1M5", 18513.4 (4) -> "18k51";
// below 1 mΩ or from 1 TΩ up in exponent form ("1e-06", "2.5e+12"), which parse_resistance reads too.
[[nodiscard]] std::string format_resistance(double ohms, int digits = 4);

// Formats a number with `digits` significant figures (%g style, no trailing zeros).
[[nodiscard]] std::string format_number(double value, int digits = 6);

// Formats a number with a fixed count of decimals.
[[nodiscard]] std::string format_fixed(double value, int decimals);

}  // namespace rtline
