// Engineering values at the edges: resistances in the IEC 60062 letter code, quantities with SI
// prefixes, temperatures in °C or kelvin, spans LO:HI. Check values are the letter code and SI prefixes
// worked by hand (IEC 60062 from memory: the multiplier letter R, k, M, G stands where the decimal
// point would be, or after the digits; SI prefixes per the SI brochure: u = 1e-6, m = 1e-3, k = 1e3).
#include <doctest/doctest.h>

#include <string>

#include "rtline/error.hpp"
#include "rtline/units.hpp"

using namespace rtline;

namespace {

// The message an InputError carries for `text` parsed by `parse`, or "" when it did not throw.
template <class F>
std::string error_of(F parse) {
    try {
        (void)parse();
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

}  // namespace

TEST_CASE("parse_resistance reads plain numbers, the letter code and an ohm suffix") {
    struct Case {
        const char* text;
        double ohms;  // worked by hand from IEC 60062 (from memory) and plain decimal reading
    };
    const Case cases[] = {
        {"10k", 10.0e3},     // 10 × 10³
        {"4k7", 4.7e3},      // k as decimal marker: 4.7 × 10³
        {"1.5M", 1.5e6},     // 1.5 × 10⁶
        {"1M5", 1.5e6},      // M as decimal marker: 1.5 × 10⁶
        {"2R2", 2.2},        // R as decimal marker: 2.2 × 1
        {"R47", 0.47},       // leading R: 0.47
        {"470", 470.0},      // plain
        {"0.1", 0.1},        // plain
        {"1e3", 1.0e3},      // plain, exponent form
        {"10K", 10.0e3},     // capital K accepted for kilo
        {"1G", 1.0e9},       // 10⁹
        {"2R", 2.0},         // R as a suffix
        {"10kohm", 10.0e3},  // unit suffix
        {"10k ohm", 10.0e3},
        {"4k7 Ohm", 4.7e3},
        {"10 k\xCE\xA9", 10.0e3},  // "10 kΩ" as the SI brochure writes it (space, prefix, symbol)
        {"10 kΩ", 10.0e3},
        {"100\xE2\x84\xA6", 100.0},  // U+2126 OHM SIGN
        {"  4k7  ", 4.7e3},          // surrounding blanks
    };
    for (const Case& c : cases) {
        INFO("text: '" << c.text << "'");
        CHECK(parse_resistance(c.text, "--r25") == doctest::Approx(c.ohms).epsilon(1e-15));
    }
}

TEST_CASE("parse_resistance rejects text that is not a positive finite resistance") {
    // Each is not a value in the letter code, or not positive and finite: common practice, no source.
    const char* rejected[] = {"",    "abc",   "10kk", "4k7k", "-10k", "0",    "nan",   "inf",  "1e400",
                              "10m", "4.7k7", "R",    "k",    "0R0",  "4 k7", "10 kk", "0x10", "  "};
    for (const char* text : rejected) {
        INFO("text: '" << text << "'");
        CHECK_THROWS_AS((void)parse_resistance(text, "--r25"), InputError);
    }
}

TEST_CASE("a rejected resistance names the field, the text as typed and why") {
    CHECK(error_of([] { return parse_resistance("10kk", "--rs"); }) ==
          "--rs '10kk': two multiplier letters in one value");
    CHECK(error_of([] { return parse_resistance("10m", "--r25"); }) ==
          "--r25 '10m': 'm' would mean milli; resistances take R, k, M or G");
    CHECK(error_of([] { return parse_resistance("-10k", "--rp"); }) == "--rp '-10k': a resistance must be positive");
    CHECK(error_of([] { return parse_resistance("abc", "--r25"); }) ==
          "--r25 'abc': expected a resistance such as 470, 4k7, 10k or 1M5");
}

TEST_CASE("the InputError of a bad resistance carries field, value and reason separately") {
    try {
        (void)parse_resistance("4.7k7", "--r1");
        FAIL("4.7k7 was accepted");
    } catch (const InputError& e) {
        CHECK(e.field() == "--r1");
        CHECK(e.value() == "4.7k7");
        CHECK(e.why() == "the letter code takes digits on both sides, as in 4k7 or 2R2");
    }
}

TEST_CASE("format_resistance writes the letter code with trailing zeros dropped") {
    struct Case {
        double ohms;
        int digits;
        const char* text;  // IEC 60062 letter code (from memory), rounding worked by hand
    };
    const Case cases[] = {
        {4700.0, 4, "4k7"},
        {10000.0, 4, "10k"},
        {2.2, 4, "2R2"},
        {470.0, 4, "470"},
        {1.5e6, 4, "1M5"},
        {1.0e9, 4, "1G"},
        {100.0, 4, "100"},
        {0.47, 4, "0R47"},
        {999.96, 4, "1k"},      // 999.96 to 4 figures is
                                // 1000.0 (not 999.9 nor
                                // "1000")
        {18513.4, 4, "18k51"},  // 18513.4 to 4 figures is 18510
        {999999.0, 4, "1M"},    // to 4 figures: 1.000e6
        {18513.4, 6, "18k5134"},
    };
    for (const Case& c : cases) {
        INFO("ohms: " << c.ohms << " digits: " << c.digits);
        CHECK(format_resistance(c.ohms, c.digits) == c.text);
    }
}

TEST_CASE("format_resistance and parse_resistance round trip the preferred values") {
    // E12 decade values times several decades (IEC 60063 E12: 1.0 1.2 … 8.2).
    const double e12[] = {1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2};
    for (const double base : e12) {
        for (const double decade : {1.0, 10.0, 100.0, 1e3, 1e4, 1e5, 1e6}) {
            const double ohms = base * decade;
            INFO("ohms: " << ohms << " text: " << format_resistance(ohms));
            CHECK(parse_resistance(format_resistance(ohms), "x") == doctest::Approx(ohms).epsilon(1e-12));
        }
    }
}

TEST_CASE("parse_temperature reads degrees Celsius and returns kelvin") {
    struct Case {
        const char* text;
        double kelvin;  // T/K = t/°C + 273.15 (SI brochure definition of the degree Celsius)
    };
    const Case cases[] = {
        {"25", 298.15},
        {"-40", 233.15},
        {"0", 273.15},
        {"25C", 298.15},
        {"25\xC2\xB0"
         "C",
         298.15},
        {" -30 ", 243.15},
        {"-273.14", 0.01},
        {"298.15K", 298.15},
        {"300 K", 300.0},
        {"77K", 77.0},
    };
    for (const Case& c : cases) {
        INFO("text: '" << c.text << "'");
        CHECK(parse_temperature(c.text, "--t0") == doctest::Approx(c.kelvin).epsilon(1e-12));
    }
}

TEST_CASE("parse_temperature rejects absolute zero, colder, and text that is not a temperature") {
    // 0 K = -273.15 °C is absolute zero (SI brochure); no thermistor works there.
    const char* rejected[] = {"-273.15", "-274", "0K", "-5K", "abc", "", "nan", "inf", "25F", "1e400"};
    for (const char* text : rejected) {
        INFO("text: '" << text << "'");
        CHECK_THROWS_AS((void)parse_temperature(text, "--t0"), InputError);
    }
    CHECK(error_of([] { return parse_temperature("-300", "--t0"); }) ==
          "--t0 '-300': is at or below absolute zero (-273.15 \xC2\xB0"
          "C)");
}

TEST_CASE("parse_span reads LO:HI with a negative low end as typed") {
    const Span s = parse_span("-30:5", "--span");
    CHECK(s.lo_k == doctest::Approx(243.15).epsilon(1e-12));        // -30 + 273.15
    CHECK(s.hi_k == doctest::Approx(278.15).epsilon(1e-12));        // 5 + 273.15
    CHECK(s.centre_k() == doctest::Approx(260.65).epsilon(1e-12));  // (243.15 + 278.15)/2

    const Span both_negative = parse_span("-40:-10", "--span");
    CHECK(both_negative.lo_k == doctest::Approx(233.15).epsilon(1e-12));
    CHECK(both_negative.hi_k == doctest::Approx(263.15).epsilon(1e-12));

    const Span kelvin = parse_span("250K:300K", "--span");
    CHECK(kelvin.lo_k == doctest::Approx(250.0).epsilon(1e-12));
    CHECK(kelvin.hi_k == doctest::Approx(300.0).epsilon(1e-12));
}

TEST_CASE("parse_span rejects a reversed, empty, single or three-part span, naming it whole") {
    struct Case {
        const char* text;
        const char* message;
    };
    const Case cases[] = {
        {"5:-30", "--span '5:-30': the low end must be below the high end"},
        {"0:0", "--span '0:0': the low end must be below the high end"},
        {"",
         "--span: expected LO:HI in \xC2\xB0"
         "C, e.g. -30:5 or 0:100"},
        {"5",
         "--span '5': expected LO:HI in \xC2\xB0"
         "C, e.g. -30:5 or 0:100"},
        {"1:2:3",
         "--span '1:2:3': expected LO:HI in \xC2\xB0"
         "C, e.g. -30:5 or 0:100"},
        {":5",
         "--span ':5': expected a temperature in \xC2\xB0"
         "C (e.g. -40 or 25) or in kelvin (e.g. 298.15K)"},
        {"-300:10",
         "--span '-300:10': is at or below absolute zero (-273.15 \xC2\xB0"
         "C)"},
    };
    for (const Case& c : cases) {
        INFO("text: '" << c.text << "'");
        CHECK(error_of([&] { return parse_span(c.text, "--span"); }) == c.message);
    }
}

TEST_CASE("parse_quantity applies an SI prefix and strips the unit symbol") {
    struct Case {
        const char* text;
        const char* unit;
        double value;  // SI prefixes (SI brochure): u/µ = 1e-6, m = 1e-3, k = 1e3
    };
    const Case cases[] = {
        {"100u", "A", 100e-6},
        {"100uA", "A", 100e-6},
        {"100\xC2\xB5"
         "A",
         "A", 100e-6},
        {"3.3V", "V", 3.3},
        {"3.3", "V", 3.3},
        {"0.5m", "W", 0.5e-3},
        {"0.5mW", "W", 0.5e-3},
        {"2k", "", 2e3},
        {"10n", "A", 10e-9},
    };
    for (const Case& c : cases) {
        INFO("text: '" << c.text << "' unit: " << c.unit);
        CHECK(parse_quantity(c.text, "--x", c.unit) == doctest::Approx(c.value).epsilon(1e-12));
    }
}

TEST_CASE("a prefixed value reads as the double nearest the decimal typed, without floating-point dust") {
    // The C++ compiler reads a decimal literal such as 1e-05 as the nearest double (C++20 [lex.fcon]);
    // 10 * 1e-6 is 9.999999999999999e-06 and 2.2 * 1e-9 is 2.2000000000000003e-09 (python3), the dust
    // this avoids.
    CHECK(10 * 1e-6 != 1e-05);
    CHECK(2.2 * 1e-9 != 2.2e-09);
    CHECK(parse_quantity("10u", "--current", "A") == 1e-05);
    CHECK(parse_quantity("0.1u", "--x", "") == 1e-07);
    CHECK(parse_quantity("2.2n", "--x", "") == 2.2e-09);
    CHECK(parse_quantity("10p", "--sample-cap", "F") == 1e-11);
    CHECK(parse_quantity("3m", "--x", "") == 0.003);
    CHECK(parse_quantity("10M", "--x", "") == 1e7);
    CHECK(parse_resistance("10.1M", "--rs") == 10100000.0);
    CHECK(parse_resistance("4k7", "--rs") == 4700.0);
    CHECK(parse_resistance("1M5", "--rs") == 1500000.0);
    CHECK(parse_resistance("0.33k", "--rs") == 330.0);
    // A value with an exponent of its own is scaled after reading: 1e1u is 10 µA within a rounding.
    CHECK(parse_quantity("1e1u", "--x", "") == doctest::Approx(1e-05).epsilon(1e-15));
}

TEST_CASE("parse_quantity rejects a wrong unit symbol and text that is not a number") {
    const char* rejected[] = {"3.3A", "abc", "", "u", "5mA", "1e400"};
    for (const char* text : rejected) {
        INFO("text: '" << text << "'");
        CHECK_THROWS_AS((void)parse_quantity(text, "--excitation", "V"), InputError);
    }
    CHECK(error_of([] { return parse_quantity("abc", "--current", "A"); }) ==
          "--current 'abc': expected a number with an optional SI prefix, e.g. 100uA or 0.5");
}

TEST_CASE("celsius and kelvin convert by 273.15 both ways") {
    // SI brochure: t/°C = T/K − 273.15.
    CHECK(celsius_to_kelvin(25.0) == doctest::Approx(298.15).epsilon(1e-15));
    CHECK(kelvin_to_celsius(233.15) == doctest::Approx(-40.0).epsilon(1e-12));
}
