#include "rtline/units.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>

#include "rtline/error.hpp"

namespace rtline {

namespace {

std::string_view trim(std::string_view s) {
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
    return s;
}

bool strip_suffix(std::string_view& s, std::string_view suffix) {
    if (s.size() >= suffix.size() && s.substr(s.size() - suffix.size()) == suffix) {
        s.remove_suffix(suffix.size());
        s = trim(s);
        return true;
    }
    return false;
}

// Parses the whole of `s` as a finite decimal number; false when it is not one.
bool read_number(std::string_view s, double& out) {
    if (!s.empty() && s.front() == '+') s.remove_prefix(1);
    if (s.empty() || s.front() == '+') return false;
    const char* first = s.data();
    const char* last = s.data() + s.size();
    const auto [ptr, ec] = std::from_chars(first, last, out, std::chars_format::general);
    return ec == std::errc() && ptr == last && std::isfinite(out);
}

// A finite result a double cannot hold to full precision (a subnormal) or at all (an overflow after
// a multiplier) is refused with its own reason; the callers have already checked the syntax.
void require_representable(double value, std::string_view field, std::string_view text) {
    if (!std::isfinite(value)) {
        throw InputError(std::string(field), std::string(text), "is too large for a double");
    }
    if (value != 0.0 && std::abs(value) < std::numeric_limits<double>::min()) {
        throw InputError(std::string(field), std::string(text),
                         "is too close to zero for a double (the smallest is about 2.2e-308)");
    }
}

// Reads `s` (a decimal number) times 10^exponent as the double nearest that decimal value: the prefix
// goes into the text as an exponent, so "10u" is 1e-05 and "4k7" is 4700 exactly, where multiplying by
// 1e-6 gives 9.999999999999999e-06. Text that has an exponent of its own is read, then multiplied.
bool read_scaled(std::string_view s, int exponent, double& out) {
    if (exponent == 0) return read_number(s, out);
    if (s.find_first_of("eE") == std::string_view::npos) {
        const std::string scaled = std::string(s) + "e" + std::to_string(exponent);
        if (read_number(scaled, out)) return true;
    }
    // An exponent of its own, or a value past a double once scaled (require_representable says so).
    if (!read_number(s, out)) return false;
    out *= std::pow(10.0, exponent);
    return true;
}

bool all_digits(std::string_view s) {
    for (const char c : s) {
        if (c < '0' || c > '9') return false;
    }
    return true;
}

double multiplier_of(char letter) {
    switch (letter) {
        case 'R':
        case 'r': return 1.0;
        case 'k':
        case 'K': return 1e3;
        case 'M': return 1e6;
        case 'G': return 1e9;
        default: return 0.0;
    }
}

int exponent_of(double multiplier) { return static_cast<int>(std::lround(std::log10(multiplier))); }

}  // namespace

double parse_number(std::string_view text, std::string_view field) {
    double value = 0.0;
    if (!read_number(trim(text), value)) {
        throw InputError(std::string(field), std::string(text), "expected a finite number");
    }
    require_representable(value, field, text);
    return value;
}

double parse_resistance(std::string_view text, std::string_view field) {
    const std::string f(field);
    const std::string t(text);
    std::string_view s = trim(text);
    if (!strip_suffix(s, "ohms") && !strip_suffix(s, "ohm") && !strip_suffix(s, "Ohm") &&
        !strip_suffix(s, "\xCE\xA9") && !strip_suffix(s, "\xE2\x84\xA6")) {
        // no unit suffix: fine
    }
    if (s.empty()) throw InputError(f, t, "expected a resistance such as 470, 4k7, 10k or 1M5");

    std::size_t letter_pos = std::string_view::npos;
    for (std::size_t i = 0; i < s.size(); ++i) {
        const char c = s[i];
        if (multiplier_of(c) != 0.0) {
            if (letter_pos != std::string_view::npos) {
                throw InputError(f, t, "two multiplier letters in one value");
            }
            letter_pos = i;
        } else if (c == 'm') {
            throw InputError(f, t, "'m' would mean milli; resistances take R, k, M or G");
        }
    }

    double value = 0.0;
    if (letter_pos == std::string_view::npos) {
        if (!read_number(s, value)) {
            throw InputError(f, t, "expected a resistance such as 470, 4k7, 10k or 1M5");
        }
    } else {
        const double mult = multiplier_of(s[letter_pos]);
        const std::string_view head = s.substr(0, letter_pos);
        const std::string_view tail = s.substr(letter_pos + 1);
        if (tail.empty()) {
            // suffix form: 10k, 1.5M, 2R; a space before the prefix as SI writes it ("10 kΩ")
            if (!read_scaled(trim(head), exponent_of(mult), value)) {
                throw InputError(f, t, "expected a resistance such as 470, 4k7, 10k or 1M5");
            }
        } else {
            // letter as decimal marker: 4k7, 2R2, R47
            if (!all_digits(head) || !all_digits(tail)) {
                throw InputError(f, t, "the letter code takes digits on both sides, as in 4k7 or 2R2");
            }
            const std::string joined = std::string(head.empty() ? "0" : head) + "." + std::string(tail);
            if (!read_scaled(joined, exponent_of(mult), value)) {
                throw InputError(f, t, "expected a resistance such as 470, 4k7, 10k or 1M5");
            }
        }
    }
    if (value <= 0.0) throw InputError(f, t, "a resistance must be positive");
    require_representable(value, field, text);
    return value;
}

double parse_quantity(std::string_view text, std::string_view field, std::string_view unit) {
    std::string_view s = trim(text);
    if (!unit.empty()) strip_suffix(s, unit);
    double mult = 1.0;
    if (strip_suffix(s, "\xC2\xB5")) {
        mult = 1e-6;
    } else if (!s.empty()) {
        switch (s.back()) {
            case 'p': mult = 1e-12; break;
            case 'n': mult = 1e-9; break;
            case 'u': mult = 1e-6; break;
            case 'm': mult = 1e-3; break;
            case 'k': mult = 1e3; break;
            case 'M': mult = 1e6; break;
            case 'G': mult = 1e9; break;
            default: break;
        }
        if (mult != 1.0) s.remove_suffix(1);
    }
    double value = 0.0;
    if (!read_scaled(s, exponent_of(mult), value)) {
        std::string example = "a number with an optional SI prefix";
        if (!unit.empty()) example += ", e.g. 100u" + std::string(unit) + " or 0.5";
        throw InputError(std::string(field), std::string(text), "expected " + example);
    }
    require_representable(value, field, text);
    return value;
}

double parse_temperature(std::string_view text, std::string_view field) {
    std::string_view s = trim(text);
    bool kelvin = false;
    if (strip_suffix(s,
                     "\xC2\xB0"
                     "C") ||
        strip_suffix(s, "C")) {
        kelvin = false;
    } else if (strip_suffix(s, "K")) {
        kelvin = true;
    }
    double value = 0.0;
    if (!read_number(s, value)) {
        throw InputError(std::string(field), std::string(text),
                         "expected a temperature in \xC2\xB0"
                         "C (e.g. -40 or 25) or in kelvin (e.g. 298.15K)");
    }
    const double t_k = kelvin ? value : celsius_to_kelvin(value);
    if (!(t_k > 0.0)) {
        throw InputError(std::string(field), std::string(text),
                         "is at or below absolute zero (-273.15 \xC2\xB0"
                         "C)");
    }
    return t_k;
}

Span parse_span(std::string_view text, std::string_view field) {
    const std::string_view s = trim(text);
    // The separator is the first ':' (a temperature never contains one).
    const std::size_t colon = s.find(':');
    if (colon == std::string_view::npos || s.find(':', colon + 1) != std::string_view::npos) {
        throw InputError(std::string(field), std::string(text),
                         "expected LO:HI in \xC2\xB0"
                         "C, e.g. -30:5 or 0:100");
    }
    // An end that is not a temperature is reported with the whole span as typed.
    Span span;
    try {
        span = {parse_temperature(s.substr(0, colon), field), parse_temperature(s.substr(colon + 1), field)};
    } catch (const InputError& e) {
        throw InputError(std::string(field), std::string(text), e.why());
    }
    if (!(span.lo_k < span.hi_k)) {
        throw InputError(std::string(field), std::string(text), "the low end must be below the high end");
    }
    return span;
}

std::string format_span(const Span& span) {
    return format_number(kelvin_to_celsius(span.lo_k)) + ":" + format_number(kelvin_to_celsius(span.hi_k));
}

std::string format_number(double value, int digits) {
    char buffer[64];
    std::snprintf(buffer, sizeof buffer, "%.*g", digits, value);
    std::string s = buffer;
    if (s == "-0") s = "0";
    return s;
}

std::string format_fixed(double value, int decimals) {
    char buffer[64];
    std::snprintf(buffer, sizeof buffer, "%.*f", decimals, value);
    std::string s = buffer;
    // "-0.00" reads as a sign error in a table; print it as zero.
    if (s.front() == '-' && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
    return s;
}

std::string format_resistance(double ohms, int digits) {
    if (!std::isfinite(ohms) || ohms <= 0.0) return format_number(ohms, digits);
    // Round to the significant figures first, so 999.96 becomes 1k and not 1000.
    const double rounded = std::stod(format_number(ohms, digits));
    // Beyond the letter code's reach (%.9f keeps nine decimals; G is the largest letter) the number
    // is written in exponent form, which parse_resistance reads back: 1e-12, 5e+15.
    if (rounded < 1e-3 || rounded >= 1e12) return format_number(rounded, digits);
    struct Scale {
        double factor;
        char letter;
    };
    static constexpr Scale scales[] = {{1e9, 'G'}, {1e6, 'M'}, {1e3, 'k'}, {1.0, 'R'}};
    Scale scale = scales[3];
    for (const Scale& s : scales) {
        if (rounded >= s.factor) {
            scale = s;
            break;
        }
    }
    char buffer[64];
    std::snprintf(buffer, sizeof buffer, "%.*f", 9, rounded / scale.factor);
    std::string mantissa = buffer;
    // Drop trailing zeros, then rebuild with the letter in place of the decimal point.
    while (!mantissa.empty() && mantissa.back() == '0') mantissa.pop_back();
    if (!mantissa.empty() && mantissa.back() == '.') mantissa.pop_back();
    // Limit to `digits` significant figures (the %.9f can carry representation noise).
    const std::size_t dot = mantissa.find('.');
    if (dot != std::string::npos) {
        std::size_t significant = 0;
        std::size_t keep = mantissa.size();
        bool leading = true;
        for (std::size_t i = 0; i < mantissa.size(); ++i) {
            if (mantissa[i] == '.') continue;
            if (leading && mantissa[i] == '0') continue;
            leading = false;
            if (++significant == static_cast<std::size_t>(digits)) {
                keep = i + 1;
                break;
            }
        }
        mantissa.resize(std::max(keep, dot));
        while (mantissa.back() == '0') mantissa.pop_back();
        if (mantissa.back() == '.') mantissa.pop_back();
    }
    const std::size_t point = mantissa.find('.');
    if (point == std::string::npos) {
        return scale.letter == 'R' ? mantissa : mantissa + scale.letter;
    }
    mantissa[point] = scale.letter;
    return mantissa;
}

}  // namespace rtline
