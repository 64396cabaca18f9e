// `rtline size` as a user runs it: the JSON document, --compare, --tradeoff, the small-span warning,
// infeasible constraints (exit 1) and bad input (exit 2), each checked against values computed here.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <vector>

#include "support.hpp"

using nlohmann::json;
using rtline::test::run_rtline;

namespace {

constexpr double kT25 = 298.15;  // 25 °C in kelvin (SI)

// The greenhouse thermistor and span used throughout: 10 kΩ, B = 3950 K, 5 to 40 °C in 1 °C steps.
const std::vector<std::string> kGreenhouse = {"size", "--r25", "10k", "--beta", "3950", "--span", "5:40"};

std::vector<std::string> with(std::vector<std::string> base, const std::vector<std::string>& more) {
    base.insert(base.end(), more.begin(), more.end());
    return base;
}

json run_json(const std::vector<std::string>& args) {
    const auto r = run_rtline(with(args, {"--format", "json"}));
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    return json::parse(r.out);
}

// The beta equation (docs/sources.md), written here.
double beta_r(double r25, double b, double t_k) { return r25 * std::exp(b * (1.0 / t_k - 1.0 / kT25)); }

std::vector<double> temps(double lo_c, double hi_c) {
    std::vector<double> t;
    for (double c = lo_c; c <= hi_c + 1e-9; c += 1.0) t.push_back(c + 273.15);
    return t;
}

// A greenhouse divider-low driven by `volts`, by the formulas (written here): v = V·R_T/(rs + R_T);
// endpoint line and %FSD per Bentley §2.1; error = deviation / line slope (K, = °C of difference);
// |dv/dT| = V·rs·R_T·B/(T²(rs + R_T)²) (by hand from the beta equation); P = V²R_T/(rs + R_T)² (docs/sources.md).
struct Divider {
    double nl = 0, error_c = 0, span = 0, sens_min = INFINITY, sens_max = 0, power = 0;
};

Divider divider_low(double rs, double volts) {
    const std::vector<double> t = temps(5, 40);
    std::vector<double> y;
    Divider d;
    for (const double tk : t) {
        const double rt = beta_r(10e3, 3950, tk);
        y.push_back(volts * rt / (rs + rt));
        const double s = volts * rs * rt * 3950 / (tk * tk * (rs + rt) * (rs + rt));
        d.sens_min = std::min(d.sens_min, s);
        d.sens_max = std::max(d.sens_max, s);
        d.power = std::max(d.power, volts * volts * rt / ((rs + rt) * (rs + rt)));
    }
    const std::size_t n = t.size() - 1;
    const double slope = (y[n] - y[0]) / (t[n] - t[0]);
    double worst = 0;
    for (std::size_t i = 0; i <= n; ++i) worst = std::max(worst, std::abs(y[i] - (y[0] + slope * (t[i] - t[0]))));
    d.span = std::abs(y[n] - y[0]);
    d.nl = worst / d.span * 100.0;
    d.error_c = worst / std::abs(slope);
    return d;
}

// Every E24 value from 1 Ω to 10 MΩ, from the IEC 60063 list (docs/sources.md) written here.
std::vector<double> e24_values() {
    const int m[] = {10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91};
    std::vector<double> v;
    for (int d = 0; d < 7; ++d) {
        for (const int x : m) v.push_back(x * std::pow(10.0, d) / 10.0);
    }
    v.push_back(10e6);
    return v;
}

int lines(const std::string& s) { return static_cast<int>(std::count(s.begin(), s.end(), '\n')); }

}  // namespace

TEST_CASE("size --format json carries the continuous optimum, the closed forms and the ranked candidates") {
    const json doc = run_json(with(kGreenhouse, {"--circuit", "divider-low", "--excitation", "5", "--top", "3"}));
    CHECK(doc["tool"] == "rtline");
    CHECK(doc["schema"] == 2);
    CHECK(doc["command"] == "size");
    REQUIRE(doc.contains("version"));
    // "continuous": {"resistors_ohm", "max_nonlinearity_pct_fsd"} (docs/json.md, docs/size.md)
    const json& cont = doc["continuous"];
    REQUIRE(cont["resistors_ohm"].contains("rs"));
    const double rs_cont = cont["resistors_ohm"]["rs"];
    CHECK(cont["max_nonlinearity_pct_fsd"].get<double>() == doctest::Approx(divider_low(rs_cont, 5).nl).epsilon(1e-9));
    // "closed_form": {"inflection_ohm", "three_point_ohm"}: eq. 2.38 and 2.37 (Pallàs-Areny & Webster,
    // from memory) with the beta equation at 5, 22.5 and 40 °C, written here.
    const double tc = 22.5 + 273.15;
    const double r1 = beta_r(10e3, 3950, 5 + 273.15);
    const double r2 = beta_r(10e3, 3950, tc);
    const double r3 = beta_r(10e3, 3950, 40 + 273.15);
    CHECK(doc["closed_form"]["inflection_ohm"].get<double>() ==
          doctest::Approx(r2 * (3950 - 2 * tc) / (3950 + 2 * tc)).epsilon(1e-9));
    CHECK(doc["closed_form"]["three_point_ohm"].get<double>() ==
          doctest::Approx((r2 * (r1 + r3) - 2 * r1 * r3) / (r1 + r3 - 2 * r2)).epsilon(1e-9));
    // "candidates": best first, each figure recomputed here from its rs.
    const json& cands = doc["candidates"];
    REQUIRE(cands.size() == 3);
    double previous = 0;
    for (const json& c : cands) {
        for (const char* key : {"resistors_ohm", "max_nonlinearity_pct_fsd", "max_error_k", "output_span",
                                "sensitivity_per_k", "max_power_w"}) {
            CHECK(c.contains(key));
        }
        const double rs = c["resistors_ohm"]["rs"];
        CAPTURE(rs);
        const Divider d = divider_low(rs, 5);
        CHECK(c["max_nonlinearity_pct_fsd"].get<double>() == doctest::Approx(d.nl).epsilon(1e-9));
        CHECK(c["max_error_k"].get<double>() == doctest::Approx(d.error_c).epsilon(1e-9));
        CHECK(c["output_span"].get<double>() == doctest::Approx(d.span).epsilon(1e-9));
        CHECK(c["sensitivity_per_k"]["min"].get<double>() == doctest::Approx(d.sens_min).epsilon(1e-6));
        CHECK(c["sensitivity_per_k"]["max"].get<double>() == doctest::Approx(d.sens_max).epsilon(1e-6));
        CHECK(c["max_power_w"].get<double>() == doctest::Approx(d.power).epsilon(1e-9));
        CHECK(c["max_nonlinearity_pct_fsd"].get<double>() >= previous);
        previous = c["max_nonlinearity_pct_fsd"];
    }
    // The best is the best of every E24 value (brute force here).
    double best = INFINITY;
    for (const double v : e24_values()) best = std::min(best, divider_low(v, 5).nl);
    CHECK(cands[0]["max_nonlinearity_pct_fsd"].get<double>() == doctest::Approx(best).epsilon(1e-9));
}

TEST_CASE(
    "size json: power per volt when ratiometric, null (never NaN) without a drive; no closed form for two resistors") {
    // Ratiometric is notionally 1 V (circuit.hpp): P = R_T/(rs + R_T)² W at 1 V, the formula above.
    const json one = run_json(with(kGreenhouse, {"--circuit", "divider-low"}));
    const double rs = one["candidates"][0]["resistors_ohm"]["rs"];
    CHECK(one["candidates"][0]["max_power_w"].get<double>() ==
          doctest::Approx(divider_low(rs, 1.0).power).epsilon(1e-9));
    // A ratiometric shunt's output is a resistance: nothing drives it, so no power.
    const json shunt = run_json(with(kGreenhouse, {"--circuit", "shunt"}));
    CHECK(shunt["candidates"][0]["max_power_w"].is_null());
    CHECK(shunt["candidates"][0]["max_self_heating_k"].is_null());
    const json two =
        run_json(with(kGreenhouse, {"--circuit", "shunt-divider", "--series", "E12", "--range", "1k:100k"}));
    CHECK_FALSE(two.contains("closed_form"));
    CHECK(two["continuous"]["resistors_ohm"].contains("rp"));
    CHECK(two["continuous"]["resistors_ohm"].contains("rs"));
    CHECK(two["candidates"][0]["resistors_ohm"].contains("rp"));
    CHECK(two["candidates"][0]["resistors_ohm"].contains("rs"));
    CHECK(two["examined"] == 25 * 25);  // hand count: 25 E12 values from 1k to 100k, every pair
}

TEST_CASE("size json for a bridge gives r2 = r1 and r3 = R_T at the null temperature") {
    const json doc = run_json(with(kGreenhouse, {"--circuit", "bridge", "--null-at", "20"}));
    const json& r = doc["candidates"][0]["resistors_ohm"];
    CHECK(r["r2"].get<double>() == r["r1"].get<double>());
    CHECK(r["r3"].get<double>() == doctest::Approx(beta_r(10e3, 3950, 20 + 273.15)).epsilon(1e-9));  // beta equation
}

TEST_CASE("size --compare gives one row per applicable topology, sorted by nonlinearity") {
    SUBCASE("ratiometric: every topology but the bare thermistor") {
        const json doc = run_json(with(kGreenhouse, {"--compare"}));
        const json& rows = doc["comparison"];
        std::multiset<std::string> names;
        for (const json& row : rows) names.insert(row["topology"].get<std::string>());
        CHECK(names == std::multiset<std::string>{"bridge", "divider-high", "divider-low", "shunt", "shunt-bridge",
                                                  "shunt-divider"});
        for (std::size_t i = 1; i < rows.size(); ++i) {
            CHECK(rows[i]["max_nonlinearity_pct_fsd"].get<double>() >=
                  rows[i - 1]["max_nonlinearity_pct_fsd"].get<double>());
        }
        // Each row is that topology's own best (the single-topology run, --top 1).
        for (const json& row : rows) {
            const std::string t = row["topology"];
            CAPTURE(t);
            const json own = run_json(with(kGreenhouse, {"--circuit", t, "--top", "1"}));
            CHECK(row["resistors_ohm"] == own["candidates"][0]["resistors_ohm"]);
        }
    }
    SUBCASE("a voltage drive skips the shunt, whose output is a resistance") {
        const json doc = run_json(with(kGreenhouse, {"--compare", "--excitation", "3.3"}));
        CHECK(doc["comparison"].size() == 5);
        REQUIRE(doc["skipped"].size() == 1);
        CHECK(doc["skipped"][0].get<std::string>().rfind("shunt ", 0) == 0);
    }
    SUBCASE("output-unit limits skip the ratiometric shunt, whose output is in ohm, not V/V") {
        // Without this the shunt's span of about 3 kΩ would pass --min-span 0.38 (meant as V/V), which no
        // divider reaches (≈ 0.377 V/V at best, by hand in the infeasible test below).
        const json doc = run_json(with(kGreenhouse, {"--compare", "--min-span", "0.3"}));
        for (const json& row : doc["comparison"]) CHECK(row["topology"] != "shunt");
        bool skipped_shunt = false;
        for (const json& k : doc["skipped"])
            skipped_shunt = skipped_shunt || k.get<std::string>().rfind("shunt (", 0) == 0;
        CHECK(skipped_shunt);
        const auto none = run_rtline(with(kGreenhouse, {"--compare", "--min-span", "0.38"}));
        CHECK(none.code == 1);
        CHECK(none.out.empty());
        CHECK(none.err.rfind("rtline: no E24 combination for any topology meets the constraints: --min-span removed ",
                             0) == 0);
    }
    SUBCASE("a current drive skips the dividers, whose output it makes independent of the thermistor or of rs") {
        // By hand: a current source I into a divider gives I·rs (thermistor on top) or I·R_T (at the bottom).
        const json doc = run_json(with(kGreenhouse, {"--compare", "--current", "100u"}));
        std::multiset<std::string> names;
        for (const json& row : doc["comparison"]) names.insert(row["topology"].get<std::string>());
        CHECK(names == std::multiset<std::string>{"bridge", "shunt", "shunt-bridge"});
        CHECK(doc["skipped"].size() == 3);
    }
}

TEST_CASE("size --tradeoff lists exactly the Pareto front of nonlinearity against span over the E24 values") {
    const json doc = run_json(with(kGreenhouse, {"--circuit", "divider-low", "--tradeoff"}));
    const json& front = doc["tradeoff"];
    REQUIRE(front.size() >= 2);
    // Along the front the span falls and so does the nonlinearity, strictly.
    for (std::size_t i = 1; i < front.size(); ++i) {
        CHECK(front[i]["output_span"].get<double>() < front[i - 1]["output_span"].get<double>());
        CHECK(front[i]["max_nonlinearity_pct_fsd"].get<double>() <
              front[i - 1]["max_nonlinearity_pct_fsd"].get<double>());
    }
    // Against every E24 value computed here: a value is on the front exactly when no other value has at
    // least its span and less nonlinearity, or more span and no more nonlinearity (ties to 1e-9).
    const std::vector<double> values = e24_values();
    std::vector<Divider> all;
    for (const double v : values) all.push_back(divider_low(v, 1.0));
    auto le = [](double a, double b) { return a <= b * (1 + 1e-9); };
    auto lt = [](double a, double b) { return a < b * (1 - 1e-9); };
    std::set<double> expected;
    for (std::size_t i = 0; i < all.size(); ++i) {
        bool dominated = false;
        for (std::size_t j = 0; j < all.size() && !dominated; ++j) {
            if (j == i) continue;
            dominated = (le(all[i].span, all[j].span) && lt(all[j].nl, all[i].nl)) ||
                        (lt(all[i].span, all[j].span) && le(all[j].nl, all[i].nl));
        }
        if (!dominated) expected.insert(values[i]);
    }
    std::set<double> got;
    for (const json& c : front) got.insert(c["resistors_ohm"]["rs"].get<double>());
    CHECK(got == expected);
}

TEST_CASE("size warns on stderr, in every format, when the best design's span is below 10 % of the excitation") {
    // At 3.3 V with at most 1 µW in the thermistor the best E24 value is large and the span small.
    const auto small =
        run_rtline(with(kGreenhouse, {"--circuit", "divider-low", "--excitation", "3.3", "--max-power", "1u"}));
    REQUIRE(small.code == 0);
    const json doc =
        run_json(with(kGreenhouse, {"--circuit", "divider-low", "--excitation", "3.3", "--max-power", "1u"}));
    const double rs = doc["candidates"][0]["resistors_ohm"]["rs"];
    CHECK(divider_low(rs, 3.3).span < 0.33);  // the formula agrees that it is below 10 % of 3.3 V
    // The warning goes to stderr, never into the data, in every format; JSON carries it too.
    CHECK(small.out.find("warning") == std::string::npos);
    CHECK(small.err.rfind("rtline: warning: the output span is only ", 0) == 0);
    CHECK(small.err.find("below 10 % of the excitation; consider --min-span\n") != std::string::npos);
    const auto csv = run_rtline(
        with(kGreenhouse, {"--circuit", "divider-low", "--excitation", "3.3", "--max-power", "1u", "--format", "csv"}));
    CHECK(csv.err == small.err);
    CHECK(csv.out.find("warning") == std::string::npos);
    REQUIRE(doc["warnings"].size() == 1);
    CHECK("rtline: warning: " + doc["warnings"][0].get<std::string>() + "\n" == small.err);
    // The unconstrained greenhouse divider has a span of about 0.37 V/V (formula above): no warning.
    const auto normal = run_rtline(with(kGreenhouse, {"--circuit", "divider-low"}));
    REQUIRE(normal.code == 0);
    CHECK(normal.err.empty());
    CHECK(!run_json(with(kGreenhouse, {"--circuit", "divider-low"})).contains("warnings"));
}

TEST_CASE("size text output shows the continuous optimum, the closed forms and the table") {
    const auto r = run_rtline(with(kGreenhouse, {"--circuit", "divider-low"}));
    REQUIRE(r.code == 0);
    CHECK(r.err.empty());
    CHECK(r.out.find("continuous optimum") != std::string::npos);
    CHECK(r.out.find("closed forms") != std::string::npos);
    CHECK(r.out.find("nonlinearity (%FSD)") != std::string::npos);
    const auto two =
        run_rtline(with(kGreenhouse, {"--circuit", "shunt-divider", "--series", "E6", "--range", "1k:100k"}));
    REQUIRE(two.code == 0);
    CHECK(two.out.find("closed forms") == std::string::npos);
}

TEST_CASE("size with constraints nothing meets exits 1, names the constraint that removed most, prints nothing") {
    // The greenhouse divider's largest span is ≈ 0.377 V/V at rs ≈ 11.7 kΩ (by hand: R(5 °C) ≈ 25.9k,
    // R(40 °C) ≈ 5.30k, span = R1/(rs + R1) − R2/(rs + R2) at rs = √(R1·R2)), so 0.5 V/V is out of reach.
    const auto r = run_rtline(with(kGreenhouse, {"--circuit", "divider-low", "--min-span", "0.5"}));
    CHECK(r.code == 1);
    CHECK(r.out.empty());
    CHECK(lines(r.err) == 1);
    CHECK(r.err == "rtline: no E24 combination meets the constraints: --min-span removed 169 of 169 combinations\n");

    // Two constraints: at 5 V, a span of 1.85 V (0.37 V/V) leaves only values near 11.7 kΩ, which all
    // dissipate more than 0.1 mW (V²/4R ≈ 0.5 mW there). The span limit removes more (see sizing_test).
    const auto both = run_rtline(with(
        kGreenhouse, {"--circuit", "divider-low", "--excitation", "5", "--min-span", "1.85", "--max-power", "100u"}));
    CHECK(both.code == 1);
    CHECK(both.out.empty());
    CHECK(both.err.rfind("rtline: no E24 combination meets the constraints: --min-span removed ", 0) == 0);
    CHECK(both.err.find("--max-power removed") != std::string::npos);

    // --tradeoff says the same.
    const auto front = run_rtline(with(kGreenhouse, {"--circuit", "divider-low", "--tradeoff", "--min-span", "0.5"}));
    CHECK(front.code == 1);
    CHECK(front.out.empty());
    CHECK(front.err == r.err);

    // An -o file is left as it was.
    const rtline::test::TempPath file(".json");
    rtline::test::write_file(file.str(), "kept\n");
    const auto kept =
        run_rtline(with(kGreenhouse, {"--circuit", "divider-low", "--min-span", "0.5", "-o", file.str()}));
    CHECK(kept.code == 1);
    CHECK(rtline::test::read_file(file.str()) == "kept\n");
}

TEST_CASE("size rejects bad input with exit 2, one stderr line naming the flag and value, nothing on stdout") {
    const struct {
        std::vector<std::string> args;
        const char* flag;
        const char* value;  // as quoted in the message; nullptr when the message quotes none
    } cases[] = {
        {{"--circuit", "divider-low", "--series", "E25"}, "--series", "E25"},
        {{"--circuit", "divider-low", "--series", "24"}, "--series", "24"},
        {{"--circuit", "divider-low", "--range", "10k:1k"}, "--range", "10k:1k"},
        {{"--circuit", "divider-low", "--range", "1k:1k"}, "--range", "1k:1k"},
        {{"--circuit", "divider-low", "--range", "abc"}, "--range", "abc"},
        {{"--circuit", "divider-low", "--range", "1k:lots"}, "--range", "lots"},
        {{"--circuit", "divider-low", "--series", "E3", "--range", "5k:9k"}, "--range", "5k:9k"},  // no E3 value in it
        {{"--compare", "--series", "E3", "--range", "5k:9k"}, "--range", "5k:9k"},
        {{"--circuit", "divider-low", "--top", "0"}, "--top", "0"},
        {{"--circuit", "divider-low", "--top", "2.5"}, "--top", "2.5"},
        {{"--circuit", "divider-low", "--top", "many"}, "--top", "many"},
        {{"--circuit", "divider-low", "--max-power", "1m"}, "--max-power", "1m"},
        {{"--circuit", "divider-low", "--excitation", "5", "--max-self-heating", "0.1"}, "--max-self-heating", "0.1"},
        {{"--circuit", "divider-low", "--dissipation", "0"}, "--dissipation", "0"},
        {{"--circuit", "divider-low", "--min-span", "-1"}, "--min-span", "-1"},
        {{"--circuit", "divider-low", "--line", "straight"}, "--line", "straight"},
        {{"--circuit", "shunt-divider", "--tradeoff"}, "--tradeoff", "shunt-divider"},
        {{"--circuit", "shunt-bridge", "--tradeoff"}, "--tradeoff", "shunt-bridge"},
        {{"--compare", "--circuit", "shunt"}, "--compare", "shunt"},
        {{"--compare", "--tradeoff"}, "--tradeoff", nullptr},
        {{"--circuit", "bare"}, "--circuit", "bare"},
        {{"--circuit", "triangle"}, "--circuit", "triangle"},
        {{}, "--circuit", nullptr},
        {{"--circuit", "divider-high", "--current", "100u"}, "--current", "100u"},
        {{"--circuit", "divider-low", "--null-at", "20"}, "--null-at", "20"},
        {{"--circuit", "shunt", "--excitation", "5"}, "--excitation", "5"},
    };
    for (const auto& c : cases) {
        const auto r = run_rtline(with(kGreenhouse, c.args));
        std::string joined;
        for (const std::string& a : c.args) joined += a + " ";
        CAPTURE(joined);
        CAPTURE(r.err);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(lines(r.err) == 1);
        CHECK(r.err.rfind(std::string("rtline: ") + c.flag, 0) == 0);
        if (c.value != nullptr) CHECK(r.err.find(std::string("'") + c.value + "'") != std::string::npos);
    }
}
