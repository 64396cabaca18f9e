// rtline size with an amplifier between each candidate and the converter: the resolution objective
// through an amplifier fitted to each candidate against Ohm's law written here, and the total-error
// objective against rtline budget of the chosen values through the same amplifier.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "support.hpp"

using nlohmann::json;
using rtline::test::run_rtline;

namespace {

constexpr double kB = 3950.0;  // K; a common B25/85 (common practice, no source)

json run_json(const std::vector<std::string>& args) { return rtline::test::run_json_ok(args); }

double beta_r(double t_k) { return 10e3 * std::exp(kB * (1.0 / t_k - 1.0 / 298.15)); }

}  // namespace

TEST_CASE("size ranks by the resolution through an amplifier fitted to each candidate: LSB over gain·|dv/dT|") {
    // By hand, divider-low read ratiometrically: v = R/(R + rs), |dv/dT| = rs·R·B/(T²·(R + rs)²) (beta
    // equation); --auto-range with the default 5 % headroom maps v(0 degC)..v(50 degC) onto 0.05..0.95,
    // so gain = 0.9/(v(0) − v(50)); one LSB of 12 bits is 1/4096. The resolution is the largest
    // LSB/(gain·|dv/dT|) over the grid (0 to 50 degC in 5 K steps). Checked to 1e-9 relative.
    const json j =
        run_json({"size", "--r25", "10k", "--beta", "3950", "--span", "0:50", "--step", "5", "--circuit", "divider-low",
                  "--objective", "resolution", "--adc-bits", "12", "--auto-range", "--format", "json"});
    REQUIRE(j["candidates"].size() == 5);
    double previous = 0.0;
    for (const json& c : j["candidates"]) {
        const double rs = c["resistors_ohm"]["rs"].get<double>();
        auto v = [&](double t_k) { return beta_r(t_k) / (beta_r(t_k) + rs); };
        const double gain = 0.9 / (v(273.15) - v(323.15));
        double worst = 0.0;
        for (int k = 0; k <= 10; ++k) {
            const double t = 273.15 + 5.0 * k;
            const double r = beta_r(t);
            const double slope = rs * r * kB / (t * t * (r + rs) * (r + rs));
            worst = std::max(worst, (1.0 / 4096.0) / (gain * slope));
        }
        CAPTURE(rs);
        CHECK(c["amplifier"]["gain_v_per_v"].get<double>() == doctest::Approx(gain).epsilon(1e-9));
        CHECK(c["resolution_k_per_code"].get<double>() == doctest::Approx(worst).epsilon(1e-9));
        CHECK(c["resolution_k_per_code"].get<double>() >= previous);  // ranked best first
        previous = c["resolution_k_per_code"].get<double>();
    }
    CHECK(j["objective"]["auto_range"].get<bool>());
    CHECK(j["objective"]["headroom_pct"].get<double>() == 5.0);
}

TEST_CASE("size's total error through an amplifier is rtline budget's for the same values and amplifier") {
    // The bridge's best r1 by the worst case with the amplifier's input offset and bias current: the
    // figure size ranks by is the budget's largest worst case over the span for that r1 through
    // --auto-range, the same amplifier fitted to the same span (to the last digit printed).
    const std::vector<std::string> common = {
        "--r25",        "10k",          "--beta", "3950",       "--span",     "0:50",       "--step",
        "10",           "--excitation", "3.3",    "--adc-ref",  "excitation", "--adc-bits", "12",
        "--auto-range", "--amp-offset", "1m",     "--amp-bias", "20n",        "--trials",   "0",
        "--format",     "json"};
    std::vector<std::string> size = {"size", "--circuit", "bridge", "--objective", "total-error", "--shortlist", "6"};
    size.insert(size.end(), common.begin(), common.end());
    const json s = run_json(size);
    const json& best = s["candidates"][0];
    const double r1 = best["resistors_ohm"]["r1"].get<double>();
    std::vector<std::string> budget = {"budget", "--circuit", "bridge", "--r1", std::to_string(r1)};
    budget.insert(budget.end(), common.begin(), common.end());
    const json b = run_json(budget);
    CHECK(best["total_error_k"].get<double>() ==
          doctest::Approx(b["summary"]["worst_case_k"].get<double>()).epsilon(1e-12));
    CHECK(best["amplifier"]["gain_v_per_v"].get<double>() ==
          doctest::Approx(b["assumptions"]["amplifier"]["gain_v_per_v"].get<double>()).epsilon(1e-12));
    CHECK(b["points"][0]["components"]["amp_offset_k"].get<double>() > 0.0);
}

TEST_CASE("through an amplifier --min-span and --min-sensitivity count codes at the converter as Ohm's law does") {
    // By hand, divider-low read ratiometrically, gain 2 into 12 bits (LSB = 1/4096): the span in codes
    // is 2·|v(0 degC) − v(50 degC)|·4096 with v = R/(R + rs) (beta equation), and the smallest
    // sensitivity 2·min |dv/dT|·4096 over the grid, |dv/dT| = rs·R·B/(T²·(R + rs)²). With the limits
    // given, exactly the values whose hand figures meet both are listed. Values that gain 2 drives past
    // full scale (2·v(0 degC) > 1) are never listed.
    const std::vector<std::string> base = {"size",       "--r25",       "10k",          "--beta",      "3950",
                                           "--span",     "0:50",        "--step",       "5",           "--circuit",
                                           "divider-low", "--gain",     "2",            "--adc-bits",  "12",
                                           "--objective", "resolution", "--top",        "100",         "--format",
                                           "json"};
    auto codes = [](double rs) {
        auto v = [&](double t_k) { return beta_r(t_k) / (beta_r(t_k) + rs); };
        double smallest = INFINITY;
        for (int k = 0; k <= 10; ++k) {
            const double t = 273.15 + 5.0 * k;
            const double r = beta_r(t);
            smallest = std::min(smallest, rs * r * kB / (t * t * (r + rs) * (r + rs)));
        }
        return std::make_pair(2.0 * std::abs(v(273.15) - v(323.15)) * 4096.0, 2.0 * smallest * 4096.0);
    };
    const json all = run_json(base);
    std::vector<double> want;
    for (const json& c : all["candidates"]) {
        const double rs = c["resistors_ohm"]["rs"].get<double>();
        CHECK(2.0 * beta_r(273.15) / (beta_r(273.15) + rs) <= 1.0);
        const auto [span, sens] = codes(rs);
        if (span >= 2500.0 && sens >= 20.0) want.push_back(rs);
    }
    // The limits cut the list, and leave some: the check can fail both ways.
    REQUIRE(!want.empty());
    REQUIRE(want.size() < all["candidates"].size());
    std::vector<std::string> limited = base;
    for (const char* a : {"--min-span", "2500", "--min-sensitivity", "20"}) limited.emplace_back(a);
    const json j = run_json(limited);
    std::vector<double> got;
    for (const json& c : j["candidates"]) got.push_back(c["resistors_ohm"]["rs"].get<double>());
    std::sort(want.begin(), want.end());
    std::sort(got.begin(), got.end());
    CHECK(got == want);
    CHECK(j["constraints"]["min_span_codes"].get<double>() == 2500.0);
    CHECK(j["constraints"]["min_sensitivity_codes_per_k"].get<double>() == 20.0);

    // A span no value gives: exit 1, nothing on stdout, the largest span in range said (rs = 36k:
    // 2·|v(0) − v(50)|·4096 = 3213.5 codes by the same hand calculation, whole codes said).
    std::vector<std::string> impossible = base;
    for (const char* a : {"--min-span", "6000"}) impossible.emplace_back(a);
    const auto r = run_rtline(impossible);
    CHECK(r.code == 1);
    CHECK(r.out.empty());
    CHECK(r.err.find("drive the converter past a rail through the amplifier; the largest span is 3213 codes (6000 asked)") != std::string::npos);
}
