// IEC 60063:2015 preferred number series E3 to E192 for resistors. E3–E24 are hard-coded (eight E24
// values depart from the rounding rule); E48–E192 are 10^(i/n) rounded to three figures, with the one
// exception of E192 i = 185, which the standard fixes at 9.20.
#pragma once

#include <string_view>
#include <vector>

namespace rtline {

enum class Series { e3, e6, e12, e24, e48, e96, e192 };

[[nodiscard]] std::string_view series_name(Series s);  // "E24"
// Parses "E24" (or "e24"); throws InputError naming `field`.
[[nodiscard]] Series parse_series(std::string_view text, std::string_view field);
// Values per decade (3, 6, …, 192).
[[nodiscard]] int series_size(Series s);
// The series' mantissas in one decade, ascending, from 1.0 up to below 10.
[[nodiscard]] std::vector<double> series_mantissas(Series s);
// Every value of the series in [lo_ohm, hi_ohm], ascending, exact to the series' figures (4k7 is 4700).
[[nodiscard]] std::vector<double> series_values(Series s, double lo_ohm, double hi_ohm);
// The tolerance customarily paired with the series, percent (E6 20, E12 10, E24 5, E48 2, E96 1, E192 0.5;
// E3 has none in IEC 60063 and is given 20 as common practice).
[[nodiscard]] double nominal_tolerance_pct(Series s);

}  // namespace rtline
