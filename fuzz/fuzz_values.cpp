// Fuzz target: the value parsers (resistance, quantity, temperature, span, plain number). The first
// byte picks the parser (and the quantity's unit), the rest is the text. Properties: a parsed value is
// finite and in its domain, it survives a round trip through its formatter, and a refusal is an
// InputError that names the field and quotes the text exactly as given.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "check.hpp"
#include "rtline/error.hpp"
#include "rtline/units.hpp"

namespace {

void resistance(std::string_view text) {
    const double r = rtline::parse_resistance(text, "--rs");
    FUZZ_CHECK(std::isnormal(r) && r > 0.0);
    // Six significant figures: the text read back is within half a unit of the sixth figure.
    const double back = rtline::parse_resistance(rtline::format_resistance(r, 6), "--rs");
    FUZZ_CHECK(std::abs(back - r) <= 5.000001e-6 * r);
}

void quantity(std::string_view text, std::string_view unit) {
    const double q = rtline::parse_quantity(text, "--excitation", unit);
    FUZZ_CHECK(std::isfinite(q));
    FUZZ_CHECK(q == 0.0 || std::isnormal(q));
}

void temperature(std::string_view text) {
    const double t = rtline::parse_temperature(text, "--t0");
    FUZZ_CHECK(std::isfinite(t) && t > 0.0);
}

void span(std::string_view text) {
    const rtline::Span s = rtline::parse_span(text, "--span");
    FUZZ_CHECK(std::isfinite(s.lo_k) && std::isfinite(s.hi_k) && s.lo_k > 0.0 && s.lo_k < s.hi_k);
}

void number(std::string_view text) {
    const double v = rtline::parse_number(text, "--step");
    FUZZ_CHECK(std::isfinite(v));
    // Seventeen significant figures identify a double exactly.
    FUZZ_CHECK(rtline::parse_number(rtline::format_number(v, 17), "--step") == v);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size == 0) return 0;
    const std::string_view text(reinterpret_cast<const char*>(data + 1), size - 1);
    const char* const fields[] = {"--rs", "--excitation", "--t0", "--span", "--step"};
    const std::string_view units[] = {"V", "A", "W", ""};
    const int which = data[0] % 5;
    try {
        switch (which) {
            case 0: resistance(text); break;
            case 1: quantity(text, units[(data[0] / 5) % 4]); break;
            case 2: temperature(text); break;
            case 3: span(text); break;
            default: number(text); break;
        }
    } catch (const rtline::InputError& e) {
        FUZZ_CHECK(e.field() == fields[which]);
        FUZZ_CHECK(e.value() == text);
        FUZZ_CHECK(!e.why().empty());
    }
    return 0;
}
