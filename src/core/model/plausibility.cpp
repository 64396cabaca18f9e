#include "rtline/plausibility.hpp"

#include <cmath>
#include <optional>

#include "rtline/error.hpp"
#include "rtline/fit.hpp"
#include "rtline/units.hpp"

namespace rtline {

namespace {

const char* const kDegC =
    " \xC2\xB0"
    "C";

// The lowest temperature a kelvin reading is taken for: -100 °C (no sensing NTC is rated colder).
constexpr double kKelvinReadingMinK = 173.15;

std::string ohm(double r) { return format_resistance(r, 4) + " ohm"; }

std::string usual_b() {
    return "most lie from " + format_number(kUsualBMinK) + " to " + format_number(kUsualBMaxK) + " K";
}
std::string usual_r25() { return "most lie from " + ohm(kUsualR25MinOhm) + " to " + ohm(kUsualR25MaxOhm); }

// A temperature as typed, in °C as typed, or nothing when it carries a K or does not parse.
std::optional<double> typed_celsius(std::string_view typed) {
    std::string_view s = typed;
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
    if (s.empty() || s.back() == 'K') return std::nullopt;
    try {
        return kelvin_to_celsius(parse_temperature(s, "temperature"));
    } catch (const InputError&) {
        return std::nullopt;
    }
}

// 298.15, 233.15: a kelvin value as tables print it (its °C reading a whole number of degrees).
bool printed_kelvin(double c) {
    const double as_c = c - 273.15;
    return c >= kKelvinReadingMinK && std::abs(as_c - std::round(as_c)) < 1e-9;
}

// Above the hottest NTC part, and a sensor's temperature when read as kelvin.
bool beyond_ntc_but_kelvin(double c) { return c > kNtcMaxCelsius && c - 273.15 <= kNtcMaxCelsius; }

std::string c_text(double c) { return format_number(c, 6); }

struct Reading {
    bool usable = false;  // the temperatures can be read this way and the beta model fitted
    double b_k = 0.0;
    double r25_ohm = 0.0;
    double max_residual_k = 0.0;
    Judgement judgement;
};

// The beta fit to the points; with `min_k`, only when every point is at least that warm.
Reading read_as(const std::vector<RtPoint>& points, double min_k = 0.0) {
    Reading r;
    for (const RtPoint& p : points) {
        if (!(p.t_k >= min_k - 1e-9)) return r;
    }
    try {
        const BetaFit fit = fit_beta(points, k25CelsiusK);
        r.usable = true;
        r.b_k = fit.model.b_k;
        r.r25_ohm = fit.model.r0_ohm;
        r.max_residual_k = fit.max_residual_k;
        r.judgement = judge_beta_model(fit.model);
    } catch (const InputError&) {
        r.usable = false;
    }
    return r;
}

std::string implies(const Reading& r) {
    return "B = " + format_fixed(r.b_k, 0) + " K and " + ohm(r.r25_ohm) + " at 25" + kDegC;
}

}  // namespace

Judgement judge_b_value(double b_k) {
    const std::string b = "a B-value of " + format_number(b_k, 6) + " K";
    if (!(b_k >= kPossibleBMinK && b_k <= kPossibleBMaxK)) {
        std::string why = b + " is outside what NTC parts have (" + format_number(kPossibleBMinK) + " to " +
                          format_number(kPossibleBMaxK) + " K; " + usual_b() + ")";
        if (b_k * 10.0 >= kUsualBMinK && b_k * 10.0 <= kUsualBMaxK) why += "; a digit missing?";
        if (b_k / 10.0 >= kUsualBMinK && b_k / 10.0 <= kUsualBMaxK) why += "; a digit too many?";
        return {Judgement::Level::impossible, why};
    }
    if (!(b_k >= kUsualBMinK && b_k <= kUsualBMaxK)) {
        return {Judgement::Level::unusual, b + " is unusual for an NTC part (" + usual_b() + ")"};
    }
    return {};
}

Judgement judge_r25(double r25_ohm) {
    const std::string r = "a resistance of " + ohm(r25_ohm) + " at 25" + kDegC;
    // A value typed in kilohm without its k is the likeliest slip.
    const bool kilo = r25_ohm < kUsualR25MinOhm && r25_ohm * 1e3 >= kUsualR25MinOhm && r25_ohm * 1e3 <= kUsualR25MaxOhm;
    const std::string hint = kilo ? "; did you mean " + format_resistance(r25_ohm * 1e3, 4) + "?" : std::string();
    if (!(r25_ohm >= kPossibleR25MinOhm && r25_ohm <= kPossibleR25MaxOhm)) {
        return {Judgement::Level::impossible, r + " is outside what NTC parts have (" + ohm(kPossibleR25MinOhm) +
                                                  " to " + ohm(kPossibleR25MaxOhm) + "; " + usual_r25() + ")" + hint};
    }
    if (!(r25_ohm >= kUsualR25MinOhm && r25_ohm <= kUsualR25MaxOhm)) {
        return {Judgement::Level::unusual, r + " is unusual for an NTC sensor (" + usual_r25() + ")" + hint};
    }
    return {};
}

Judgement judge_beta_model(const BetaModel& m) {
    Judgement b = judge_b_value(m.b_k);
    if (b.impossible()) return b;
    Judgement r = judge_r25(m.r0_ohm * std::exp(m.b_k * (1.0 / k25CelsiusK - 1.0 / m.t0_k)));
    if (r.impossible() || b.fine()) return r;
    return b;
}

Judgement kelvin_typed_as_celsius(std::string_view typed) {
    const std::optional<double> c = typed_celsius(typed);
    if (!c) return {};
    const std::string as_k = c_text(*c) + " K = " + c_text(*c - 273.15) + kDegC;
    const std::string fix = "write " + c_text(*c - 273.15) + " or " + c_text(*c) + "K";
    if (printed_kelvin(*c)) return {Judgement::Level::impossible, "looks like kelvin without its K (" + as_k + "); " + fix};
    if (beyond_ntc_but_kelvin(*c)) {
        return {Judgement::Level::unusual, std::string("is above ") + format_number(kNtcMaxCelsius) + kDegC +
                                               ", beyond most NTC parts; if it is kelvin (" + as_k + "), " + fix};
    }
    return {};
}

Judgement span_kelvin_typed_as_celsius(std::string_view typed) {
    const std::size_t colon = typed.find(':');
    if (colon == std::string_view::npos) return {};
    const std::optional<double> lo = typed_celsius(typed.substr(0, colon));
    const std::optional<double> hi = typed_celsius(typed.substr(colon + 1));
    if (!lo || !hi || !(*lo < *hi) || *lo < kKelvinReadingMinK || *hi - 273.15 > kNtcMaxCelsius) return {};
    const std::string as_k = c_text(*lo) + " to " + c_text(*hi) + " K = " + c_text(*lo - 273.15) + " to " +
                             c_text(*hi - 273.15) + kDegC;
    const std::string fix = "write " + c_text(*lo - 273.15) + ":" + c_text(*hi - 273.15) + " or " + c_text(*lo) +
                            "K:" + c_text(*hi) + "K";
    if (printed_kelvin(*lo) || printed_kelvin(*hi)) {
        return {Judgement::Level::impossible, "looks like kelvin without its K (" + as_k + "); " + fix};
    }
    if (*hi > kNtcMaxCelsius) {
        return {Judgement::Level::unusual, std::string("reaches above ") + format_number(kNtcMaxCelsius) + kDegC +
                                               ", beyond most NTC parts; if it is kelvin (" + as_k + "), " + fix};
    }
    return {};
}

Judgement judge_rt_points(const std::vector<RtPoint>& points) {
    const Reading given = read_as(points);
    if (!given.usable) return {};
    // The typed numbers read as kelvin, and as °F.
    std::vector<RtPoint> kelvin = points;
    std::vector<RtPoint> fahrenheit = points;
    for (RtPoint& p : kelvin) p.t_k = kelvin_to_celsius(p.t_k);
    for (RtPoint& p : fahrenheit) p.t_k = celsius_to_kelvin((kelvin_to_celsius(p.t_k) - 32.0) / 1.8);
    struct Alternative {
        const char* unit;
        const char* fix;
        Reading reading;
    };
    const Alternative alternatives[] = {
        {"kelvin", "give them in \xC2\xB0""C, or head the column t_k", read_as(kelvin, kKelvinReadingMinK)},
        {"\xC2\xB0""F", "convert them to \xC2\xB0""C", read_as(fahrenheit, kKelvinReadingMinK)},
    };
    const auto plausible = [](const Reading& r) { return r.usable && !r.judgement.impossible(); };
    if (given.judgement.impossible()) {
        for (const Alternative& a : alternatives) {
            if (!plausible(a.reading)) continue;
            return {Judgement::Level::impossible,
                    std::string("the temperatures read as ") + a.unit + ", not \xC2\xB0""C: as \xC2\xB0""C the points imply " +
                        implies(given) + ", as " + a.unit + " " + implies(a.reading) + "; " + a.fix};
        }
        return {Judgement::Level::impossible, "fitted to the points, " + given.judgement.why};
    }
    // A mistaken scale bends ln R against 1/T: the beta model misses the points several times more than
    // when they are read in the right unit (5 times or more; from 50 mK, below which no reading is
    // worth doubting). Real parts, whose local B rises a few per cent over a span, stay well inside 5.
    constexpr double kWorseBy = 5.0;
    constexpr double kDoubtK = 0.05;
    if (points.size() >= 3 && given.max_residual_k > kDoubtK) {
        for (const Alternative& a : alternatives) {
            if (!plausible(a.reading) || !(a.reading.max_residual_k * kWorseBy <= given.max_residual_k)) continue;
            return {Judgement::Level::impossible,
                    std::string("the temperatures read as ") + a.unit +
                        ", not \xC2\xB0""C: a beta model misses the points by up to " +
                        format_fixed(1e3 * given.max_residual_k, 0) + " mK as \xC2\xB0""C and " +
                        format_fixed(1e3 * a.reading.max_residual_k, 0) + " mK as " + a.unit + "; " + a.fix};
        }
    }
    if (!given.judgement.fine()) return {Judgement::Level::unusual, "fitted to the points, " + given.judgement.why};
    return {};
}

}  // namespace rtline
