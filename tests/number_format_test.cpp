// One number format for text tables and summaries (src/cli/report.cpp): a fixed count of significant
// figures, small values never a bare 0.000, resistances in the IEC 60062 letter code at any size,
// decimal points aligned within a column; and inputs echoed without floating-point dust. Every
// expected string below is written out by hand from the rule it checks.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "report.hpp"
#include "support.hpp"

using rtline::cli::Column;
using rtline::cli::format_decimals;
using rtline::cli::format_significant;
using rtline::cli::Table;

namespace {
// A table row cell by cell (GCC 12 warns, wrongly, on a braced list of variants here).
std::vector<rtline::cli::Cell> row(double r, double x, double e) {
    std::vector<rtline::cli::Cell> cells;
    cells.emplace_back(r);
    cells.emplace_back(x);
    cells.emplace_back(e);
    return cells;
}
}  // namespace

TEST_CASE("format_significant keeps the same count of figures, trailing zeros included") {
    CHECK(format_significant(0.0623, 4) == "0.06230");
    CHECK(format_significant(2.81449968, 4) == "2.814");
    CHECK(format_significant(33620.6037, 6) == "33620.6");
    CHECK(format_significant(-0.00207183, 4) == "-0.002072");
    // Rounding that carries into a new decade keeps the count: 9.9996 to four figures is 10.00.
    CHECK(format_significant(9.9996, 4) == "10.00");
    // Below 1e-4 and from 10^digits up: exponent form with the same figures.
    CHECK(format_significant(3.61294e-6, 4) == "3.613e-06");
    CHECK(format_significant(1234567.0, 4) == "1.235e+06");
    CHECK(format_significant(0.0, 4) == "0");
}

TEST_CASE("format_decimals never shows a small value as a bare 0.000 or with a single figure") {
    CHECK(format_decimals(2.3456, 3) == "2.346");
    CHECK(format_decimals(-1.2666, 3) == "-1.267");
    // Exactly zero is zero; a value the decimals would hide keeps three significant figures.
    CHECK(format_decimals(0.0, 3) == "0.000");
    CHECK(format_decimals(0.000412, 3) == "0.000412");
    CHECK(format_decimals(-0.000412, 3) == "-0.000412");
    CHECK(format_decimals(4.2e-6, 3) == "4.20e-06");
    CHECK(format_decimals(0.004, 2) == "0.0040");
    // Fewer than two figures would show: 0.000866 is not "0.001", 0.0086 not "0.009".
    CHECK(format_decimals(0.000866, 3) == "0.000866");
    CHECK(format_decimals(0.0086, 3) == "0.00860");
    CHECK(format_decimals(0.087, 3) == "0.087");
    // Without decimals a whole number stays whole; only what would round to zero keeps figures.
    CHECK(format_decimals(2.0, 0) == "2");
    CHECK(format_decimals(0.3, 0) == "0.30");
}

TEST_CASE("a text table aligns a column's decimal points and writes resistances in the letter code") {
    Table t({{"R (ohm)", "r_ohm", -1, 4, true}, {"x (V)", "x_v", -1, 4}, {"e (K)", "e_k", 3}});
    t.add_row(row(2.53391e8, 0.0623, 2.3456));
    t.add_row(row(33620.6, 12.5, 0.0));
    t.add_row(row(4.7, 0.0, 0.000412));
    auto last = row(0.0, 3.61294e-6, -10.5);
    last[0] = std::string("none");
    t.add_row(last);
    // Letter code at any size (253M4, not 2.53391e+08); in x and e the points line up: each number is
    // padded to the widest integer part on the left and the widest fraction on the right.
    // x: integer parts up to 2 wide, fractions up to 8 ("3.613e-06" counts from its point), so 10 wide;
    // e: up to 3 and 7, so 10 wide; R: the header's 7. Columns two spaces apart, no trailing blanks.
    const std::string want =
        "R (ohm)       x (V)       e (K)\n"
        "  253M4   0.06230      2.346\n"
        "  33k62  12.50         0.000\n"
        "    4R7   0            0.000412\n"
        "   none   3.613e-06  -10.500\n";
    CHECK(t.text() == want);
}

TEST_CASE("inputs echo without floating-point dust: 10u is 1e-05 and 10M is 1e7 in the JSON") {
    const auto r = rtline::test::run_rtline({"check", "--r25", "10k", "--beta", "3950", "--span", "0:40", "--step",
                                             "10", "--circuit", "divider-low", "--rs", "10k", "--load", "10M",
                                             "--excitation", "3.3", "--format", "json"});
    REQUIRE(r.code == 0);
    const auto doc = nlohmann::json::parse(r.out);
    CHECK(doc["circuit"]["load_ohm"].dump() == "10000000.0");
    const auto c = rtline::test::run_rtline({"check", "--r25", "10k", "--beta", "3950", "--span", "0:40", "--step",
                                             "10", "--circuit", "bare", "--current", "10u", "--format", "json"});
    REQUIRE(c.code == 0);
    CHECK(nlohmann::json::parse(c.out)["circuit"]["drive"]["current_a"].dump() == "1e-05");
    // The text echoes it with its SI prefix, as typed.
    const auto t = rtline::test::run_rtline({"check", "--r25", "10k", "--beta", "3950", "--span", "0:40", "--step",
                                             "10", "--circuit", "bare", "--current", "10u"});
    REQUIRE(t.code == 0);
    CHECK(t.out.find("circuit: bare; current drive 10 \xC2\xB5" "A\n") != std::string::npos);
}

TEST_CASE("inputs echoed after a unit conversion carry no dust: 50 ppm/K is 50, 0.1 % is 0.1") {
    // 1e6 * (50 * 1e-6) is 49.99999999999999 and 1e6 * (25 * 1e-6) is 24.999999999999996 (python3): each
    // echo must be the value typed.
    const auto r = rtline::test::run_rtline({"budget", "--r25", "10k", "--beta", "3950", "--span", "0:40", "--step",
                                             "10", "--circuit", "divider-low", "--rs", "10k", "--trials", "0",
                                             "--excitation", "3.3", "--adc-bits", "12", "--adc-ref", "3.0",
                                             "--ref-tc", "50", "--resistor-tc", "25", "--resistor-tol", "0.1",
                                             "--dissipation", "1.1", "--format", "json"});
    REQUIRE(r.code == 0);
    const auto a = nlohmann::json::parse(r.out)["assumptions"];
    CHECK(a["coefficients_ppm_per_k"]["reference"].dump() == "50.0");
    CHECK(a["coefficients_ppm_per_k"]["resistors"].dump() == "25.0");
    CHECK(a["tolerances_pct"]["resistors"].dump() == "0.1");
    CHECK(a["dissipation_mw_per_k"].dump() == "1.1");
}

TEST_CASE("a summary prints its figures in the same format: a small error keeps its figures") {
    // Over one kelvin the endpoint line misses by under a millikelvin: the summary must not round it
    // to 0.001 or 0.000. The JSON has the figure; the text stands for it to three significant figures.
    const std::vector<std::string> args = {"check", "--r25", "10k",         "--beta", "3950", "--span",
                                           "25:26", "--step", "0.2", "--circuit", "divider-low", "--rs", "10k"};
    const auto text = rtline::test::run_rtline(args);
    REQUIRE(text.code == 0);
    auto json_args = args;
    json_args.insert(json_args.end(), {"--format", "json"});
    const auto doc = nlohmann::json::parse(rtline::test::run_rtline(json_args).out);
    const double e = doc["summary"]["max_error_k"].get<double>();
    REQUIRE(e < 1e-3);
    const std::string line = "largest |error|         ";
    const std::size_t at = text.out.find(line);
    REQUIRE(at != std::string::npos);
    const std::string shown = text.out.substr(at + line.size(), text.out.find(' ', at + line.size()) - at - line.size());
    // Three significant figures of a value below 1e-3: six decimals, within half a unit of the last.
    CHECK(shown.rfind("0.000", 0) == 0);
    CHECK(shown.size() == 8);
    CHECK(std::abs(std::stod(shown) - e) <= 0.5e-6);
}
