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

json run_json(const std::vector<std::string>& args) {
    const auto r = run_rtline(args);
    INFO(r.err);
    REQUIRE(r.code == 0);
    return json::parse(r.out);
}

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
