// Numerical guards: every command, over extreme but valid designs — spans hundreds of
// kelvin wide, thermistors from 1e-200 ohm to 1e200 ohm — prints only finite numbers in text, CSV,
// JSON and C. A NaN or an infinity in a result is a defect even when the run "succeeds".
#include <doctest/doctest.h>

#include <cctype>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "support.hpp"

using rtline::test::run_rtline;

namespace {

// The first word of `text` that spells a non-finite number ("nan", "-nan", "inf", "infinity" in any
// case), or empty. Words such as "infeasible" or "information" are not numbers.
std::string non_finite_word(const std::string& text) {
    std::string word;
    for (std::size_t i = 0; i <= text.size(); ++i) {
        const char c = i < text.size() ? text[i] : ' ';
        if (std::isalpha(static_cast<unsigned char>(c))) {
            word += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
            continue;
        }
        if (word == "nan" || word == "inf" || word == "infinity") return word;
        word.clear();
    }
    return "";
}

struct Design {
    const char* what;
    std::vector<std::string> model;  // the thermistor and its span
    std::string r;                   // a resistor value of the thermistor's order, for the circuits
    bool standard_values = true;     // E-series values (0.01 ohm to 9.88e12 ohm) can size its circuits
};

std::vector<std::string> with(std::vector<std::string> a, const std::vector<std::string>& b) {
    a.insert(a.end(), b.begin(), b.end());
    return a;
}

// The thermistors no NTC part could be are given as Steinhart-Hart coefficients, which the plausibility
// rules for --r25 and --beta do not judge: the beta model R0, B at 25 °C is a = 1/298.15 - ln(R0)/B,
// b = 1/B, c = 0 (docs/sources.md), here to 17 digits (Python's repr).
const std::vector<Design> kDesigns = {
    {"a span 750 K wide", {"--r25", "10k", "--beta", "3950", "--span", "-250:500", "--step", "5"}, "10k"},
    {"a 1 Gohm thermistor with a steep B", {"--r25", "1G", "--beta", "6000", "--span", "-80:300", "--step", "5"}, "1G"},
    // R0 = 0.1 ohm, B = 2000 K.
    {"a 0.1 ohm thermistor",
     {"--sh", "0.0045053089811775528,0.00050000000000000001,0", "--span", "-150:400", "--step", "5"},
     "0R1"},
    {"Steinhart-Hart over 600 K", {"--sh", "1.1e-3,2.4e-4,1e-7", "--span", "-200:400", "--step", "5"}, "10k"},
    // R0 = 1e-200 ohm, B = 3950 K.
    {"a 1e-200 ohm thermistor",
     {"--sh", "0.11994060342172082,0.00025316455696202533,0", "--span", "-250:500", "--step", "5"},
     "1e-200",
     false},
    // R0 = 1e200 ohm, B = 20000 K.
    {"a 1e200 ohm thermistor",
     {"--sh", "-0.019671834495259929,5.0000000000000002e-05,0", "--span", "-150:300", "--step", "5"},
     "1e200",
     false},
    // R0 = 10k, B = 20000 K.
    {"B = 20000 K over 1200 K",
     {"--sh", "0.0028934994160817211,5.0000000000000002e-05,0", "--span", "-200:1000", "--step", "10"},
     "10k"},
};

// Every command line to try on a design (its table runs drop --step, which table does not take).
std::vector<std::vector<std::string>> runs_of(const Design& d) {
    std::vector<std::vector<std::string>> runs;
    const std::vector<std::string> table_model(d.model.begin(), d.model.end() - 2);
    for (const char* f : {"text", "csv", "json"}) {
        runs.push_back(with(with({"model"}, d.model), {"--format", f}));
        runs.push_back(with(with({"check"}, d.model), {"--circuit", "divider-low", "--rs", d.r, "--format", f}));
        runs.push_back(with(with({"check"}, d.model), {"--circuit", "bridge", "--r1", d.r, "--line", "minimax",
                                                       "--excitation", "5", "--dissipation", "1", "--format", f}));
        runs.push_back(with(with({"check"}, d.model),
                            {"--circuit", "bare", "--current", "1u", "--line", "least-squares", "--format", f}));
        if (d.standard_values) {
            runs.push_back(
                with(with({"size"}, d.model), {"--circuit", "divider-low", "--range", "1e-250:1e250", "--format", f}));
            runs.push_back(with(with({"size"}, d.model), {"--compare", "--format", f}));
            runs.push_back(with(with({"size"}, d.model),
                                {"--circuit", "divider-high", "--tradeoff", "--range", "1e-250:1e250", "--format", f}));
        }
        runs.push_back(with(with({"table"}, table_model),
                            {"--circuit", "divider-low", "--rs", d.r, "--adc-bits", "12", "--format", f}));
    }
    runs.push_back(with(with({"check"}, d.model), {"--circuit", "shunt", "--rp", d.r}));
    runs.push_back(with(with({"check"}, d.model), {"--circuit", "shunt-divider", "--rp", d.r, "--rs", d.r,
                                                   "--excitation", "3.3", "--format", "json"}));
    if (d.standard_values) {
        runs.push_back(with(with({"size"}, d.model),
                            {"--circuit", "shunt-divider", "--range", "1e-250:1e250", "--format", "json"}));
    }
    runs.push_back(with(with({"table"}, table_model), {"--circuit", "divider-high", "--rs", d.r, "--adc-bits", "12",
                                                       "--degree", "12", "--fit", "minimax", "--format", "json"}));
    runs.push_back(with(with({"table"}, table_model), {"--circuit", "divider-low", "--rs", d.r, "--adc-bits", "12",
                                                       "--max-error", "0.05", "--spacing", "error", "--emit", "c"}));
    return runs;
}

void check_finite(const std::vector<std::string>& args, const std::string& input = "") {
    std::string line;
    for (const std::string& a : args) line += " " + a;
    INFO("rtline" << line);
    const auto r = run_rtline(args, input);
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    // Warnings are allowed (a sliver of a span at these extremes is one); any other stderr is not.
    for (std::size_t at = 0; at < r.err.size(); at = r.err.find('\n', at) + 1) {
        CHECK(r.err.compare(at, 17, "rtline: warning: ") == 0);
    }
    CHECK(!r.out.empty());
    CHECK(non_finite_word(r.out) == "");
}

void check_designs(std::size_t first, std::size_t last) {
    for (std::size_t i = first; i < last; ++i) {
        INFO("design: " << std::string(kDesigns[i].what));
        for (const auto& args : runs_of(kDesigns[i])) check_finite(args);
    }
}

}  // namespace

TEST_CASE("the scan for non-finite numbers finds nan and inf but not words that contain them") {
    CHECK(non_finite_word("T,R\n1,-nan\n") == "nan");
    CHECK(non_finite_word("{\"x\": Infinity}") == "infinity");
    CHECK(non_finite_word("span inf V") == "inf");
    CHECK(non_finite_word("infeasible; information; 1e+300; nanometre") == "");
}

// Two halves, so that ctest -j runs them side by side.
TEST_CASE("every command prints only finite numbers over spans of 600 K and more, from 0.1 ohm to 1 Gohm") {
    check_designs(0, 4);
}

TEST_CASE("every command prints only finite numbers for thermistors of 1e-200 and 1e200 ohm, and B = 20000 K") {
    check_designs(4, kDesigns.size());
}

TEST_CASE("fit and the table model print only finite numbers for R-T points spanning 1e-3 to 1e20 ohm") {
    // Points of a beta model (R25 = 10k, B = 8000 K) from -200 to 400 °C: R = 10k·exp(8000·(1/T − 1/298.15)),
    // which runs from 3.8e20 ohm down to 2.8e-3 ohm (by hand at the ends).
    std::string csv = "t_c,r_ohm\n";
    for (int t = -200; t <= 400; t += 25) {
        char row[64];
        std::snprintf(row, sizeof row, "%d,%.17g\n", t, 1e4 * std::exp(8000.0 * (1.0 / (t + 273.15) - 1.0 / 298.15)));
        csv += row;
    }
    for (const char* f : {"text", "csv", "json"}) {
        check_finite({"fit", "--points", "-", "--format", f}, csv);
        check_finite({"fit", "--points", "-", "--model", "beta", "--format", f}, csv);
        check_finite({"model", "--points", "-", "--model", "table", "--span", "-200:400", "--step", "5", "--format", f},
                     csv);
        check_finite({"check", "--points", "-", "--model", "table", "--span", "-200:400", "--step", "5", "--circuit",
                      "divider-low", "--rs", "10k", "--format", f},
                     csv);
    }
}

TEST_CASE("size says so when no standard value can reach the thermistor's resistance") {
    // A 1e-200 ohm thermistor (R0 = 1e-200 ohm, B = 3950 K, as Steinhart-Hart as above) under any E24
    // value from 1 ohm to 10 Mohm: divider-high gives rs/(rs + R_T) = 1 − 1e-200/rs, which is 1 in a
    // double at every temperature (by hand).
    const auto r = run_rtline(
        {"size", "--sh", "0.11994060342172082,0.00025316455696202533,0", "--span", "0:50", "--circuit", "divider-high",
         "--tradeoff"});
    CHECK(r.code == 1);
    CHECK(r.out.empty());
    CHECK(r.err ==
          "rtline: no E24 combination gives an output that changes over the span; the values searched run "
          "from 1 to 10M ohm, out of reach of the thermistor\n");
}
