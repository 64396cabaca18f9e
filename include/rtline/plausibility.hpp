// Plausibility of a thermistor as typed: the values a hurried engineer gets wrong in a way that still
// parses (kelvin typed where °C is meant, a B-value or resistance a digit or a prefix off, an R–T file
// in kelvin or °F under a °C heading). Each judge says nothing, warns (a real part could have it, but it
// is unusual) or refuses (no NTC part has it), with the reason and, where one is likely, the mistake.
// The limits are common practice for NTC sensing thermistors (docs/model.md, "Plausibility").
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "rtline/thermistor.hpp"

namespace rtline {

// B-values of NTC sensing parts: most lie from 2000 to 6000 K; outside 1000..10000 K none does.
inline constexpr double kUsualBMinK = 2000.0;
inline constexpr double kUsualBMaxK = 6000.0;
inline constexpr double kPossibleBMinK = 1000.0;
inline constexpr double kPossibleBMaxK = 10000.0;
// Resistances at 25 °C of NTC sensing parts: most lie from 100 ohm to 10 Mohm; outside 1 ohm..1 Gohm
// none does (power thermistors for inrush limiting reach down to about 1 ohm, and are not sensors).
inline constexpr double kUsualR25MinOhm = 100.0;
inline constexpr double kUsualR25MaxOhm = 10e6;
inline constexpr double kPossibleR25MinOhm = 1.0;
inline constexpr double kPossibleR25MaxOhm = 1e9;
// The hottest most NTC parts are rated for (glass-encapsulated parts, about 300 °C; epoxy-coated ones
// stop at 125 to 150 °C).
inline constexpr double kNtcMaxCelsius = 300.0;

struct Judgement {
    enum class Level { fine, unusual, impossible };
    Level level = Level::fine;
    std::string why;  // empty when fine
    [[nodiscard]] bool fine() const { return level == Level::fine; }
    [[nodiscard]] bool impossible() const { return level == Level::impossible; }
};

// A B-value against the ranges above.
[[nodiscard]] Judgement judge_b_value(double b_k);
// A resistance at 25 °C against the ranges above.
[[nodiscard]] Judgement judge_r25(double r25_ohm);
// A beta model: its B-value, then its resistance at 25 °C (whatever temperature r0 is stated at).
[[nodiscard]] Judgement judge_beta_model(const BetaModel& m);

// A temperature as typed (as parse_temperature reads it) that reads as kelvin written without its K.
// Refused when it has no K and its value less 273.15 is a whole number of degrees from -100 °C up
// (298.15, 233.15: kelvin as tables print it); warned when it lies above kNtcMaxCelsius and, read as
// kelvin, within -100..300 °C (a high-temperature part could be meant). The reason gives the reading
// as kelvin and both ways to write it.
[[nodiscard]] Judgement kelvin_typed_as_celsius(std::string_view typed);
// The same for a span "LO:HI" as parse_span reads it: both ends without K, the low end from 173.15 up
// (kelvin from -100 °C); refused when an end is kelvin as tables print it, warned when the high end
// lies above kNtcMaxCelsius.
[[nodiscard]] Judgement span_kelvin_typed_as_celsius(std::string_view typed);

// R–T points (validated, temperatures as read) judged by the beta model fitted to them: a B-value or a
// resistance at 25 °C that no NTC part has, or a fit that improves several-fold when the temperature
// column is read as kelvin or as °F, points at the likely mistake and is refused; an unusual B-value
// or resistance is warned. The residual comparison takes three points or more; two are judged by B and
// R25 alone. Points the beta model cannot be fitted to are left to the fit that follows.
[[nodiscard]] Judgement judge_rt_points(const std::vector<RtPoint>& points);

}  // namespace rtline
