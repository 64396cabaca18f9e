// IEC 60063 preferred values: the hard-coded E3–E24 lists, E48–E192 from the rounding rule with its one
// exception, values over a resistance range, the series parser and the nominal tolerances.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "rtline/error.hpp"
#include "rtline/eseries.hpp"

using namespace rtline;

namespace {

// The IEC 60063 rule for E48–E192, computed here independently of rtline: 10^(i/n) to three figures,
// in hundredths (long double, so a value near a rounding boundary is not decided by double noise).
int rule_hundredths(int i, int n) {
    return static_cast<int>(std::lround(100.0L * std::pow(10.0L, i / static_cast<long double>(n))));
}

std::vector<int> hundredths(const std::vector<double>& mantissas) {
    std::vector<int> h;
    for (const double m : mantissas) h.push_back(static_cast<int>(std::lround(m * 100.0)));
    return h;
}

}  // namespace

TEST_CASE("E3, E6, E12 and E24 are exactly the IEC 60063 lists") {
    // IEC 60063:2015, as quoted in docs/sources.md.
    CHECK(hundredths(series_mantissas(Series::e3)) == std::vector<int>{100, 220, 470});
    CHECK(hundredths(series_mantissas(Series::e6)) == std::vector<int>{100, 150, 220, 330, 470, 680});
    CHECK(hundredths(series_mantissas(Series::e12)) ==
          std::vector<int>{100, 120, 150, 180, 220, 270, 330, 390, 470, 560, 680, 820});
    CHECK(hundredths(series_mantissas(Series::e24)) == std::vector<int>{100, 110, 120, 130, 150, 160, 180, 200,
                                                                        220, 240, 270, 300, 330, 360, 390, 430,
                                                                        470, 510, 560, 620, 680, 750, 820, 910});
    // Each mantissa is the double nearest its two-figure value (h/100), not an approximation of it.
    for (const double m : series_mantissas(Series::e24)) CHECK(m == std::round(m * 100.0) / 100.0);
}

TEST_CASE("eight E24 values depart from 10^(i/24) rounded to two figures, so E24 cannot be derived") {
    // docs/sources.md: "eight of these differ from 10^(i/24) rounded". The rule computed here; the
    // departures (by hand: 2.61→2.7, 2.87→3.0, 3.16→3.3, 3.48→3.6, 3.83→3.9, 4.22→4.3, 4.64→4.7, 8.25→8.2).
    const std::vector<int> e24 = hundredths(series_mantissas(Series::e24));
    REQUIRE(e24.size() == 24);
    std::vector<int> differ;
    for (int i = 0; i < 24; ++i) {
        const int rule = static_cast<int>(std::lround(10.0L * std::pow(10.0L, i / 24.0L))) * 10;
        if (rule != e24[static_cast<std::size_t>(i)]) differ.push_back(e24[static_cast<std::size_t>(i)]);
    }
    CHECK(differ == std::vector<int>{270, 300, 330, 360, 390, 430, 470, 820});
}

TEST_CASE("each series has its number of values per decade, ascending from 1.00 to below 10") {
    const struct {
        Series s;
        int n;
    } cases[] = {{Series::e3, 3},   {Series::e6, 6},   {Series::e12, 12},  {Series::e24, 24},
                 {Series::e48, 48}, {Series::e96, 96}, {Series::e192, 192}};  // the series' names (IEC 60063)
    for (const auto& c : cases) {
        CAPTURE(series_name(c.s));
        const std::vector<double> m = series_mantissas(c.s);
        CHECK(series_size(c.s) == c.n);
        CHECK(static_cast<int>(m.size()) == c.n);
        CHECK(m.front() == 1.0);
        CHECK(m.back() < 10.0);
        for (std::size_t i = 1; i < m.size(); ++i) CHECK(m[i] > m[i - 1]);
    }
}

TEST_CASE("E192 follows 10^(i/192) to three figures except i = 185, which is 9.20 (the formula gives 9.19)") {
    const std::vector<int> e192 = hundredths(series_mantissas(Series::e192));
    REQUIRE(e192.size() == 192);
    // IEC 60063 (docs/sources.md): the one exception. The rule computed here gives 919.
    CHECK(rule_hundredths(185, 192) == 919);
    CHECK(e192[185] == 920);
    for (int i = 0; i < 192; ++i) {
        if (i == 185) continue;
        CAPTURE(i);
        CHECK(e192[static_cast<std::size_t>(i)] == rule_hundredths(i, 192));
    }
    // From memory (the top of the E192 decade), and equal to the rule above except 9.20.
    CHECK(std::vector<int>(e192.begin() + 184, e192.end()) == std::vector<int>{909, 920, 931, 942, 953, 965, 976, 988});
    // From memory: the first values.
    CHECK(std::vector<int>(e192.begin(), e192.begin() + 8) == std::vector<int>{100, 101, 102, 104, 105, 106, 107, 109});
}

TEST_CASE("E96 is every second E192 value and E48 every fourth") {
    // IEC 60063 (docs/sources.md).
    const std::vector<double> e192 = series_mantissas(Series::e192);
    const std::vector<double> e96 = series_mantissas(Series::e96);
    const std::vector<double> e48 = series_mantissas(Series::e48);
    REQUIRE(e96.size() == 96);
    REQUIRE(e48.size() == 48);
    for (std::size_t i = 0; i < 96; ++i) CHECK(e96[i] == e192[2 * i]);
    for (std::size_t i = 0; i < 48; ++i) CHECK(e48[i] == e192[4 * i]);
    // And each equals the rule for its own n (10^(j/96) = 10^(2j/192)).
    for (int j = 0; j < 96; ++j)
        CHECK(static_cast<int>(std::lround(e96[static_cast<std::size_t>(j)] * 100)) == rule_hundredths(j, 96));
    for (int j = 0; j < 48; ++j)
        CHECK(static_cast<int>(std::lround(e48[static_cast<std::size_t>(j)] * 100)) == rule_hundredths(j, 48));
}

TEST_CASE("the whole E96 decade matches the list from memory and the rounding rule") {
    // From memory (the E96 decade as printed in resistor catalogues of many makers); each value also
    // checked against 10^(j/96) to three figures computed here.
    const std::vector<int> remembered = {
        100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158,
        162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255,
        261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412,
        422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665,
        681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976};
    REQUIRE(remembered.size() == 96);
    for (int j = 0; j < 96; ++j) CHECK(remembered[static_cast<std::size_t>(j)] == rule_hundredths(j, 96));
    CHECK(hundredths(series_mantissas(Series::e96)) == remembered);
    // Spot values of IEC 60063 E96 (from memory): 1.00 1.02 1.05 … 4.99 … 9.76.
    const std::vector<double> e96 = series_mantissas(Series::e96);
    CHECK(e96[0] == 1.00);
    CHECK(e96[1] == 1.02);
    CHECK(e96[2] == 1.05);
    CHECK(e96[67] == 4.99);
    CHECK(e96[95] == 9.76);
}

TEST_CASE("E24 from 1 ohm to 10 Mohm has 7 decades x 24 + 1 values, both ends included") {
    // Hand count: 1 Ω … 9.1 MΩ is 7 decades of 24, plus 10 MΩ itself.
    const std::vector<double> v = series_values(Series::e24, 1.0, 10e6);
    REQUIRE(v.size() == 7 * 24 + 1);
    CHECK(v.front() == 1.0);
    CHECK(v.back() == 10e6);
    for (std::size_t i = 1; i < v.size(); ++i) CHECK(v[i] > v[i - 1]);
}

TEST_CASE("series values are exact: 4k7 is 4700, 1M5 is 1500000, 2R2 is 2.2") {
    const std::vector<double> v = series_values(Series::e24, 1.0, 10e6);
    auto has = [&](double x) { return std::find(v.begin(), v.end(), x) != v.end(); };
    // The letter-code values (IEC 60062) of E24 members, as exact doubles.
    CHECK(has(4700.0));
    CHECK(has(1500000.0));
    CHECK(has(2.2));
    CHECK(has(91.0));
    CHECK(has(33000.0));
    CHECK_FALSE(has(4699.999999999999));
    // E192 with its exception, in the 10 kΩ decade: 92k0 present, 91k9 absent.
    const std::vector<double> w = series_values(Series::e192, 10e3, 100e3);
    CHECK(std::find(w.begin(), w.end(), 92000.0) != w.end());
    CHECK(std::find(w.begin(), w.end(), 91900.0) == w.end());
    CHECK(w.size() == 193);  // hand count: one decade of 192 plus 100 kΩ
}

TEST_CASE("a range keeps the values inside it, its ends included when they are series values") {
    // Hand lists from the E12 decade (IEC 60063).
    CHECK(series_values(Series::e12, 1e3, 4.7e3) ==
          std::vector<double>{1000, 1200, 1500, 1800, 2200, 2700, 3300, 3900, 4700});
    CHECK(series_values(Series::e12, 1.1e3, 4.6e3) == std::vector<double>{1200, 1500, 1800, 2200, 2700, 3300, 3900});
    CHECK(series_values(Series::e6, 9e3, 16e3) == std::vector<double>{10000, 15000});
    CHECK(series_values(Series::e3, 5e3, 9e3).empty());
}

TEST_CASE("parse_series accepts E3 to E192 in either case and names the field when it rejects") {
    const struct {
        const char* text;
        Series s;
        const char* name;
    } good[] = {{"E3", Series::e3, "E3"},       {"E6", Series::e6, "E6"},    {"E12", Series::e12, "E12"},
                {"E24", Series::e24, "E24"},    {"E48", Series::e48, "E48"}, {"E96", Series::e96, "E96"},
                {"E192", Series::e192, "E192"}, {"e24", Series::e24, "E24"}, {"e96", Series::e96, "E96"},
                {"e192", Series::e192, "E192"}};
    for (const auto& g : good) {
        CAPTURE(g.text);
        CHECK(parse_series(g.text, "--series") == g.s);
        CHECK(series_name(g.s) == g.name);
    }
    for (const char* bad : {"", "E", "E25", "E1", "24", "E24 ", " E24", "E-24", "EE24", "e2", "E192x", "x24", "E06"}) {
        CAPTURE(bad);
        try {
            (void)parse_series(bad, "--series");
            FAIL("accepted");
        } catch (const InputError& e) {
            CHECK(e.field() == "--series");
            CHECK(e.value() == bad);
            CHECK(std::string(e.what()).find("E3, E6, E12, E24, E48, E96 or E192") != std::string::npos);
        }
    }
}

TEST_CASE("nominal tolerances follow the customary pairing") {
    // docs/sources.md: E6 20 %, E12 10 %, E24 5 %, E48 2 %, E96 1 %, E192 0.5 %.
    CHECK(nominal_tolerance_pct(Series::e6) == 20.0);
    CHECK(nominal_tolerance_pct(Series::e12) == 10.0);
    CHECK(nominal_tolerance_pct(Series::e24) == 5.0);
    CHECK(nominal_tolerance_pct(Series::e48) == 2.0);
    CHECK(nominal_tolerance_pct(Series::e96) == 1.0);
    CHECK(nominal_tolerance_pct(Series::e192) == 0.5);
    // E3: no tolerance in IEC 60063; 20 % is common practice (no source), as the header says.
    CHECK(nominal_tolerance_pct(Series::e3) == 20.0);
}
