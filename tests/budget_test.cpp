// rtline budget: the worst case against closed-form errors, the Monte Carlo against the worst case and
// against normal-distribution theory, self-heating against an exact scipy root, the line reading
// against `rtline check`, determinism across thread counts, and bad input.
#include <doctest/doctest.h>

#include <array>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "budget/budget_channel.hpp"
#include "rtline/budget.hpp"
#include "rtline/error.hpp"
#include "support.hpp"

using nlohmann::json;
using rtline::test::python_ref;
using rtline::test::run_rtline;

namespace {

constexpr double kT0 = 298.15;  // K, 25 °C
constexpr double kR25 = 10e3;   // ohm; a common NTC value (common practice, no source)
constexpr double kB = 3950.0;   // K; a common B25/85 (common practice, no source)

rtline::Thermistor beta_thermistor() { return rtline::Thermistor(rtline::BetaModel{kR25, kT0, kB}); }

rtline::Circuit divider_low(double rs) {
    rtline::Circuit c;
    c.topology = rtline::Topology::divider_low;
    c.rs = rs;
    return c;
}

// A spec with every tolerance off and no Monte Carlo; tests switch on what they need.
rtline::BudgetSpec nothing() {
    rtline::BudgetSpec s;
    s.tolerance = rtline::Tolerances{0.0, 0.0, 0.0, 0.0};
    s.trials = 0;
    return s;
}

rtline::Budget budget_of(const rtline::BudgetSpec& spec, double lo_c = -20.0, double hi_c = 80.0, double step = 10.0,
                         const rtline::Circuit& circuit = divider_low(10e3)) {
    const rtline::Thermistor th = beta_thermistor();
    const rtline::Span span{rtline::celsius_to_kelvin(lo_c), rtline::celsius_to_kelvin(hi_c)};
    return rtline::compute_budget(rtline::make_grid(th, span, step), th, circuit, spec);
}

// A divider-low design over −20..60 °C for the command line.
std::vector<std::string> design(const std::string& step = "10", const std::string& rs = "10k") {
    return {"budget", "--r25", "10k",       "--beta",      "3950", "--span", "-20:60",
            "--step", step,    "--circuit", "divider-low", "--rs", rs};
}

std::vector<std::string> with(std::vector<std::string> args, const std::vector<std::string>& more) {
    args.insert(args.end(), more.begin(), more.end());
    return args;
}

json run_json(const std::vector<std::string>& args) {
    const auto r = run_rtline(with(args, {"--format", "json"}));
    INFO(r.err);
    REQUIRE(r.code == 0);
    return json::parse(r.out);
}

}  // namespace

TEST_CASE("a B-value tolerance alone, model reading: the worst case is the exact error of the beta equation") {
    // Derived from the beta equation R = R0·exp(B(1/T − 1/T0)). A part with B' = B(1 + d)
    // gives R' = R0·exp(B(1 + d)(1/T − 1/T0)); the firmware inverts the nominal model,
    // 1/T_read = 1/T0 + ln(R'/R0)/B = 1/T0 + (1 + d)(1/T − 1/T0), so
    //   T' = 1/(1/T0 + (1 ± ΔB/B)(1/T − 1/T0)), and the error T' − T.
    // To first order, with u = d(T0 − T)/T0: T' = T/(1 + u) ≈ T(1 − u), so |ΔT| ≈ (ΔB/B)·T·|T0 − T|/T0,
    // and the exact worst case T·|u|/(1 − |u|) exceeds it by a fraction |u| (second order).
    // The circuit does not matter with nominal resistors: a divider without a load (whose inverse is a
    // plain factor) and a loaded shunt-divider (a general bilinear map) must both give it.
    const double d = 0.02;
    rtline::BudgetSpec spec = nothing();
    spec.tolerance.beta = d;
    rtline::Circuit loaded;
    loaded.topology = rtline::Topology::shunt_divider;
    loaded.rs = 6.8e3;
    loaded.rp = 33e3;
    loaded.load_ohm = 100e3;
    for (const rtline::Circuit& circuit : {divider_low(10e3), loaded}) {
        const rtline::Budget b = budget_of(spec, -20.0, 80.0, 10.0, circuit);
        REQUIRE(b.points.size() == 11);
        for (const rtline::BudgetPoint& p : b.points) {
            const double t = p.t_k;
            const double up = 1.0 / (1.0 / kT0 + (1.0 + d) * (1.0 / t - 1.0 / kT0)) - t;
            const double down = 1.0 / (1.0 / kT0 + (1.0 - d) * (1.0 / t - 1.0 / kT0)) - t;
            const double exact = std::max(std::abs(up), std::abs(down));
            CAPTURE(rtline::kelvin_to_celsius(t));
            CHECK(p.worst_case_k == doctest::Approx(exact).epsilon(1e-9));
            CHECK(p.components[rtline::Cause::beta] == doctest::Approx(exact).epsilon(1e-9));
            const double u = d * std::abs(kT0 - t) / kT0;
            const double first_order = d * t * std::abs(kT0 - t) / kT0;
            CHECK(std::abs(p.worst_case_k - first_order) <= 1.01 * u * first_order / (1.0 - u) + 1e-12);
            CHECK(p.components[rtline::Cause::r25] == 0.0);
            CHECK(p.components[rtline::Cause::resistors] == 0.0);
            CHECK(std::isnan(p.components[rtline::Cause::nonlinearity]));
        }
    }
}

TEST_CASE("an R25 tolerance alone, model reading: the error is (dR/R)/|alpha| to first order") {
    // alpha = −B/T² for the beta model. Exactly, R' = R(1 ± d) gives
    // 1/T' = 1/T + ln(1 ± d)/B; to first order |ΔT| = d/|alpha| = d·T²/B. The exact worst case (from
    // 1 − d) exceeds the first-order figure by about d/2 + T·d/B, under 0.6 % for d = 1 %.
    const double d = 0.01;
    rtline::BudgetSpec spec = nothing();
    spec.tolerance.r25 = d;
    const rtline::Budget b = budget_of(spec);
    for (const rtline::BudgetPoint& p : b.points) {
        const double t = p.t_k;
        const double exact = std::max(std::abs(1.0 / (1.0 / t + std::log1p(d) / kB) - t),
                                      std::abs(1.0 / (1.0 / t + std::log1p(-d) / kB) - t));
        CAPTURE(rtline::kelvin_to_celsius(t));
        CHECK(p.worst_case_k == doctest::Approx(exact).epsilon(1e-9));
        CHECK(p.components[rtline::Cause::r25] == doctest::Approx(d * t * t / kB).epsilon(0.006));
    }
}

TEST_CASE("resistor tolerances alone shift the reading like the thermistor's own R in a divider") {
    // In divider-low the output depends on R_T/rs only (v = R_T/(R_T + rs)), so rs off by a fraction d
    // reads as R_T off by 1/(1 ± d) − 1: by hand, the worst case is the R25 worst case for d/(1 − d).
    const double d = 0.01;
    rtline::BudgetSpec spec = nothing();
    spec.tolerance.resistors = d;
    const rtline::Budget b = budget_of(spec);
    for (const rtline::BudgetPoint& p : b.points) {
        const double t = p.t_k;
        const double exact = std::abs(1.0 / (1.0 / t + std::log(1.0 / (1.0 - d)) / kB) - t);
        CHECK(p.worst_case_k == doctest::Approx(exact).epsilon(1e-9));
    }
}

TEST_CASE("with a uniform spread no Monte Carlo sample lies beyond the worst case, and the largest comes close") {
    // Two uniform parts: a fraction ε²/2 of the box lies within ε of each worst corner (area of the
    // corner triangle, by hand), so 20 000 trials put about 25 samples within 5 % of it.
    rtline::BudgetSpec spec = nothing();
    spec.tolerance.r25 = 0.01;
    spec.tolerance.beta = 0.02;
    spec.distribution = rtline::Distribution::uniform;
    spec.trials = 20000;
    const rtline::Budget b = budget_of(spec);
    for (const rtline::BudgetPoint& p : b.points) {
        CAPTURE(rtline::kelvin_to_celsius(p.t_k));
        CHECK(p.mc.max_abs_k <= p.worst_case_k + 1e-12);
        CHECK(p.mc.max_abs_k >= 0.95 * p.worst_case_k);
        CHECK(p.mc.p95_k <= p.mc.p99_7_k);
        CHECK(p.mc.p99_7_k <= p.mc.max_abs_k);
    }
}

TEST_CASE("every cause together, uniform: the converter's rounding and self-heating stay inside the worst case") {
    rtline::BudgetSpec spec;
    spec.distribution = rtline::Distribution::uniform;
    spec.trials = 6000;
    spec.adc.bits = 10;
    spec.adc.error_lsb = 1.0;
    spec.dissipation_w_per_k = 1.5e-3;
    rtline::Circuit c = divider_low(10e3);
    c.excitation = {rtline::Drive::voltage, 3.3};
    for (const rtline::Reading reading : {rtline::Reading::model, rtline::Reading::line}) {
        spec.reading = reading;
        const rtline::Budget b = budget_of(spec, -20.0, 60.0, 10.0, c);
        for (const rtline::BudgetPoint& p : b.points) {
            CAPTURE(rtline::kelvin_to_celsius(p.t_k));
            CHECK(p.mc.max_abs_k <= p.worst_case_k + 1e-12);
            CHECK(p.mc.max_abs_k > 0.5 * p.worst_case_k);
        }
    }
}

TEST_CASE("self-heating agrees with an exact root of T_b = T + P(R(T_b))/delta (scipy)") {
    const json ref = python_ref("budget_self_heating.py", {{"r25_ohm", kR25},
                                                           {"b_k", kB},
                                                           {"rs_ohm", 10e3},
                                                           {"supply_v", 3.3},
                                                           {"dissipation_w_per_k", 1.5e-3},
                                                           {"t_c", {-20, 0, 20, 40, 60}}});
    for (const char* reading : {"model", "line"}) {
        const json out = run_json(
            with(design("20"), {"--excitation", "3.3", "--adc-ref", "excitation", "--dissipation", "1.5", "--r25-tol",
                                "0", "--beta-tol", "0", "--resistor-tol", "0", "--trials", "0", "--reading", reading}));
        REQUIRE(out["points"].size() == 5);
        for (std::size_t i = 0; i < 5; ++i) {
            const json& p = out["points"][i];
            const json& r = ref["points"][i];
            CAPTURE(reading);
            CAPTURE(p["t_c"].get<double>());
            // The body temperature is solved by Newton to rounding, brentq to 1e-14 K: they agree to
            // 1e-9 K, the precision docs/budget.md states.
            const double expected = r[std::string(reading) + "_error_k"].get<double>();
            CHECK(std::abs(p["nominal_error_k"].get<double>() - expected) < 1e-9);
        }
    }
}

TEST_CASE("self-heating near the largest rise, R25 at its tolerance: the worst case agrees with scipy's root") {
    // 10.5 V on a 10k/10k divider at 1.5 mW/K heats the thermistor by up to 10.5²/(4·10k)/1.5e-3 = 1.84 K
    // (hand calculation), near kMaxSelfHeatingK. With R25 off by ±5 % the body temperature differs from the
    // nominal parts' (where the budget's Newton starts) by the most a tolerance makes it; the model
    // reading's error is monotonic in R25, so the worst low and high are the two ends, which
    // tests/ref/budget_self_heating.py solves with scipy's brentq to 1e-14 K.
    const std::vector<double> t_c = {-20, 0, 20, 40, 60};
    std::array<json, 2> ends;
    for (std::size_t k = 0; k < 2; ++k) {
        ends[k] = python_ref("budget_self_heating.py", {{"r25_ohm", kR25},
                                                        {"b_k", kB},
                                                        {"rs_ohm", 10e3},
                                                        {"supply_v", 10.5},
                                                        {"dissipation_w_per_k", 1.5e-3},
                                                        {"r25_factor", k == 0 ? 0.95 : 1.05},
                                                        {"t_c", t_c}});
    }
    const json out =
        run_json(with(design("20"), {"--excitation", "10.5", "--adc-ref", "excitation", "--dissipation", "1.5",
                                     "--r25-tol", "5", "--beta-tol", "0", "--resistor-tol", "0", "--trials", "0"}));
    REQUIRE(out["points"].size() == t_c.size());
    for (std::size_t i = 0; i < t_c.size(); ++i) {
        const json& p = out["points"][i];
        CAPTURE(p["t_c"].get<double>());
        const double a = ends[0]["points"][i]["off_model_error_k"].get<double>();
        const double b = ends[1]["points"][i]["off_model_error_k"].get<double>();
        CHECK(ends[0]["points"][i]["rise_k"].get<double>() > 0.5);
        // 1e-9 K: the precision docs/budget.md states for the body temperature.
        CHECK(std::abs(p["worst_low_k"].get<double>() - std::min(a, b)) < 1e-9);
        CHECK(std::abs(p["worst_high_k"].get<double>() - std::max(a, b)) < 1e-9);
    }
}

TEST_CASE("the line reading with zero tolerances equals rtline check's endpoint-line error at every point") {
    const std::vector<std::vector<std::string>> circuits = {
        {"--circuit", "divider-low", "--rs", "10k"},
        {"--circuit", "shunt-divider", "--rs", "12k", "--rp", "33k", "--load", "220k"},
        {"--circuit", "bridge", "--r1", "10k", "--load", "100k", "--excitation", "5"},
        {"--circuit", "shunt", "--rp", "15k", "--current", "50u"},
    };
    for (const auto& circuit : circuits) {
        std::vector<std::string> common = {"--r25", "10k", "--beta", "3950", "--span", "-10:50", "--step", "5"};
        common.insert(common.end(), circuit.begin(), circuit.end());
        CAPTURE(circuit[1]);
        const json check = run_json(with({"check"}, common));
        std::vector<std::string> b = {"budget", "--reading",      "line", "--r25-tol", "0", "--beta-tol",
                                      "0",      "--resistor-tol", "0",    "--trials",  "50"};
        b.insert(b.end(), common.begin(), common.end());
        if (circuit[1] == "bridge") b = with(b, {"--adc-ref", "excitation"});
        if (circuit[1] == "shunt") b = with(b, {"--excitation-tol", "0"});
        const json budget = run_json(b);
        REQUIRE(budget["points"].size() == check["points"].size());
        for (std::size_t i = 0; i < check["points"].size(); ++i) {
            const double e = check["points"][i]["error_k"].get<double>();
            const json& p = budget["points"][i];
            CAPTURE(p["t_c"].get<double>());
            CHECK(std::abs(p["worst_case_k"].get<double>() - std::abs(e)) < 1e-9);
            CHECK(std::abs(p["components"]["nonlinearity_k"].get<double>() - std::abs(e)) < 1e-9);
            CHECK(std::abs(p["mc"]["mean_k"].get<double>() - e) < 1e-9);
            CHECK(p["mc"]["std_k"].get<double>() == 0.0);
        }
    }
}

TEST_CASE("the model reading with nominal parts reads every temperature exactly, for every topology") {
    // The firmware inverts the same circuit and model that produced the reading: the error is zero up
    // to rounding, whatever the network (this checks the bilinear inverse of each topology).
    struct Case {
        rtline::Topology topology;
        rtline::Drive drive;
        double load;
    };
    const Case cases[] = {{rtline::Topology::bare, rtline::Drive::ratiometric, rtline::kNoLoad},
                          {rtline::Topology::bare, rtline::Drive::current, 1e6},
                          {rtline::Topology::divider_high, rtline::Drive::ratiometric, 47e3},
                          {rtline::Topology::divider_low, rtline::Drive::voltage, rtline::kNoLoad},
                          {rtline::Topology::shunt, rtline::Drive::current, rtline::kNoLoad},
                          {rtline::Topology::shunt_divider, rtline::Drive::ratiometric, 100e3},
                          {rtline::Topology::bridge, rtline::Drive::voltage, 50e3},
                          {rtline::Topology::shunt_bridge, rtline::Drive::ratiometric, rtline::kNoLoad}};
    const rtline::Thermistor th = beta_thermistor();
    for (const Case& k : cases) {
        rtline::Circuit c;
        c.topology = k.topology;
        c.rs = 8.2e3;
        c.rp = 22e3;
        c.r1 = 10e3;
        if (c.topology != rtline::Topology::divider_high && c.topology != rtline::Topology::divider_low &&
            c.topology != rtline::Topology::shunt_divider) {
            c.rs = 0.0;
        }
        if (c.topology != rtline::Topology::shunt && c.topology != rtline::Topology::shunt_divider &&
            c.topology != rtline::Topology::shunt_bridge) {
            c.rp = 0.0;
        }
        if (!rtline::is_bridge(c.topology)) c.r1 = 0.0;
        rtline::complete_bridge(c, th, rtline::celsius_to_kelvin(0.0));
        c.load_ohm = k.load;
        c.excitation = {k.drive, k.drive == rtline::Drive::current ? 100e-6 : 2.5};
        rtline::BudgetSpec spec = nothing();
        spec.ratiometric = k.drive != rtline::Drive::current;
        const rtline::Budget b = budget_of(spec, -20.0, 60.0, 5.0, c);
        for (const rtline::BudgetPoint& p : b.points) {
            CAPTURE(std::string(rtline::topology_name(c.topology)));
            CHECK(p.worst_case_k < 1e-9);
        }
    }
}

TEST_CASE("a normal spread with the tolerance as 3 sigma gives the normal distribution's statistics") {
    // R25 alone, to first order e = dR/|alpha| with dR normal, σ = tol/3: so std = (tol/3)/|alpha|,
    // and |e| has its 95 % point at 1.960σ and its 99.7 % point at 2.968σ (standard normal quantiles,
    // scipy.stats.norm.ppf(0.975) and ppf(0.9985); common statistics tables). With n = 200 000 trials
    // the standard errors are: the std's σ/√(2n) = 0.16 %; a quantile q of |e| √(p(1 − p)/n)/(2φ(q)),
    // φ the standard normal density: 0.0042σ at 1.960 (0.21 %) and 0.0125σ at 2.968 (0.42 %); the
    // mean's σ/√n = 0.0022σ. Each is checked at three standard errors. The
    // first-order model itself is off by about T·σ_r/B = 3e-4 relative, and the mean by the second
    // order ln(1 + dr) ≈ dr − dr²/2, i.e. σ_r/2 = 0.17 % of σ (inside the mean's allowance).
    rtline::BudgetSpec spec = nothing();
    spec.tolerance.r25 = 0.01;
    spec.trials = 200000;
    const rtline::Budget b = budget_of(spec, 0.0, 50.0, 25.0);
    for (const rtline::BudgetPoint& p : b.points) {
        const double sigma = 0.01 / 3.0 * p.t_k * p.t_k / kB;
        CAPTURE(rtline::kelvin_to_celsius(p.t_k));
        CHECK(p.mc.std_k == doctest::Approx(sigma).epsilon(0.005));
        CHECK(p.mc.p95_k == doctest::Approx(1.960 * sigma).epsilon(0.0065));
        CHECK(p.mc.p99_7_k == doctest::Approx(2.968 * sigma).epsilon(0.013));
        CHECK(std::abs(p.mc.mean_k) < 0.0067 * sigma + 0.0017 * sigma);
    }
}

TEST_CASE("a converter's resolution is one LSB over the output's slope, and its error half an LSB plus its bound") {
    // Divider-low, ratiometric: v = R/(R + rs), dv/dT = rs·R·alpha/(R + rs)² with alpha = −B/T²
    // (by hand from the beta equation). 12 bits: 1 LSB = 1/4096. The converter part of the error is, to
    // first order, (0.5 + error_lsb) LSB over the slope.
    rtline::BudgetSpec spec = nothing();
    spec.adc.bits = 12;
    spec.adc.error_lsb = 1.5;
    const rtline::Budget b = budget_of(spec);
    CHECK(b.lsb == 1.0 / 4096.0);
    for (const rtline::BudgetPoint& p : b.points) {
        const double t = p.t_k;
        const double r = kR25 * std::exp(kB * (1.0 / t - 1.0 / kT0));
        const double slope = 10e3 * r * (kB / (t * t)) / ((r + 10e3) * (r + 10e3));
        CAPTURE(rtline::kelvin_to_celsius(t));
        CHECK(p.resolution_k_per_lsb == doctest::Approx(1.0 / 4096.0 / slope).epsilon(1e-6));
        CHECK(p.components[rtline::Cause::quantization] == doctest::Approx(2.0 * p.resolution_k_per_lsb).epsilon(0.01));
        CHECK(p.worst_case_k == doctest::Approx(p.components[rtline::Cause::quantization]).epsilon(1e-9));
    }
}

TEST_CASE("identical parts in every trial give identical samples, and the bounds are that one value") {
    // Zero tolerances with more trials than the pilot: every sample equals the nominal error, which
    // exercises the bounds' path for samples at the tail threshold.
    rtline::BudgetSpec spec = nothing();
    spec.reading = rtline::Reading::line;
    spec.trials = 9000;
    const rtline::Budget b = budget_of(spec, 0.0, 40.0, 10.0);
    for (const rtline::BudgetPoint& p : b.points) {
        CHECK(p.mc.mean_k == p.nominal_error_k);
        CHECK(p.mc.std_k == 0.0);
        CHECK(p.mc.p95_k == std::abs(p.nominal_error_k));
        CHECK(p.mc.p99_7_k == std::abs(p.nominal_error_k));
        CHECK(p.mc.max_abs_k == std::abs(p.nominal_error_k));
    }
}

TEST_CASE("the same seed gives byte-identical output with one thread and with four") {
    for (const char* format : {"text", "json", "csv"}) {
        // 20 000 trials: five blocks, and more than the pilot, so the tail threshold is in play.
        const auto args = with(design(), {"--trials", "20000", "--adc-bits", "10", "--format", format});
        const auto one = run_rtline(with(args, {"--threads", "1"}));
        const auto four = run_rtline(with(args, {"--threads", "4"}));
        REQUIRE(one.code == 0);
        REQUIRE(four.code == 0);
        CHECK(one.out == four.out);
        const auto other_seed = run_rtline(with(args, {"--threads", "4", "--seed", "7"}));
        CHECK(other_seed.out != one.out);
    }
}

TEST_CASE("the JSON carries the issue's keys, the assumptions, and null where a part does not apply") {
    const json j = run_json(with(design(), {"--trials", "500", "--seed", "42"}));
    CHECK(j["command"] == "budget");
    CHECK(j["assumptions"]["distribution"] == "normal");
    CHECK(j["assumptions"]["sigmas_per_tolerance"] == 3);
    CHECK(j["assumptions"]["trials"] == 500);
    CHECK(j["assumptions"]["seed"] == 42);
    CHECK(j["assumptions"]["reading"] == "model");
    CHECK(j["assumptions"]["tolerances_pct"]["r25"] == 1.0);
    CHECK(j["assumptions"]["tolerances_pct"]["excitation"].is_null());
    for (const char* key : {"worst_case_k", "p99_7_k", "at_t_c"}) CHECK(j["summary"][key].is_number());
    const json& p = j["points"][0];
    for (const char* key : {"t_c", "worst_case_k", "worst_low_k", "worst_high_k", "resolution_k_per_lsb"}) {
        CHECK(p.contains(key));
    }
    for (const char* key :
         {"mean_k", "std_k", "p95_k", "p99_7_k", "max_abs_k", "p0_135_k", "p2_5_k", "p97_5_k", "p99_865_k"}) {
        CHECK(p["mc"][key].is_number());
    }
    for (const char* key : {"r25_k", "beta_k", "resistors_k"}) CHECK(p["components"][key].is_number());
    for (const char* key :
         {"nonlinearity_k", "model_error_k", "thermistor_dt_k", "drift_k", "resistor_drift_k", "lead_k", "excitation_k",
          "reference_k", "adc_offset_k", "adc_gain_k", "adc_inl_k", "quantization_k", "self_heating_k"}) {
        CHECK(p["components"][key].is_null());
    }
    CHECK(j["assumptions"]["truncated_at_tolerance"] == false);
    CHECK(j["assumptions"]["board_temperature"] == "sensed");
    CHECK(j["assumptions"]["lead"].is_null());
    CHECK(p["resolution_k_per_lsb"].is_null());

    const json none = run_json(with(design(), {"--trials", "0"}));
    CHECK(none["points"][0]["mc"].is_null());
    CHECK(none["summary"]["p99_7_k"].is_null());
}

TEST_CASE("the text output has a table per temperature with units, then the summary") {
    const auto r = run_rtline(with(design(), {"--trials", "2000", "--adc-bits", "12"}));
    REQUIRE(r.code == 0);
    for (const char* header : {"T (\xC2\xB0"
                               "C)",
                               "worst low (\xC2\xB0"
                               "C)",
                               "worst high (\xC2\xB0"
                               "C)",
                               "0.135 % (\xC2\xB0"
                               "C)",
                               "99.865 % (\xC2\xB0"
                               "C)",
                               "|e| 99.7 % (\xC2\xB0"
                               "C)",
                               "B-value (\xC2\xB0"
                               "C)",
                               "resolution (\xC2\xB0"
                               "C/LSB)",
                               "normal, tolerance = 3 sigma, not truncated", "can exceed the worst case",
                               "2000 trials, seed 20250101", "worst case over the span", "largest cause there"}) {
        CHECK(r.out.find(header) != std::string::npos);
    }
}

TEST_CASE("bad budget flags exit 2, name the flag and the value, and print nothing on stdout") {
    struct Case {
        std::vector<std::string> flags;
        std::string message;
    };
    const std::vector<Case> cases = {
        {{"--trials", "-5"}, "--trials '-5': the number of trials must be a whole number from 0 to 100000000"},
        {{"--trials", "2.5"}, "--trials '2.5': the number of trials must be a whole number from 0 to 100000000"},
        {{"--adc-bits", "0"}, "--adc-bits '0': a converter has 1 to 24 bits"},
        {{"--adc-bits", "25"}, "--adc-bits '25': a converter has 1 to 24 bits"},
        {{"--adc-error", "1"}, "--adc-error '1': needs --adc-bits (an LSB needs a resolution)"},
        {{"--r25-tol", "-1"}, "--r25-tol '-1': a tolerance must be at least 0 and below 100 (percent)"},
        {{"--beta-tol", "100"}, "--beta-tol '100': a tolerance must be at least 0 and below 100 (percent)"},
        {{"--resistor-tol", "120%"}, "--resistor-tol '120%': a tolerance must be at least 0 and below 100 (percent)"},
        {{"--excitation-tol", "1"},
         "--excitation-tol '1': applies only to a reading in volts (a drive read against a fixed --adc-ref); a "
         "ratiometric reading cancels the excitation"},
        {{"--distribution", "gauss"},
         "--distribution 'gauss': unknown distribution; choose normal, normal-truncated or uniform"},
        {{"--reading", "table"}, "--reading 'table': unknown reading; choose model or line"},
        {{"--dissipation", "2"},
         "--dissipation '2': self-heating needs the real drive; give --excitation V (with --adc-ref excitation for "
         "a ratiometric reading) or --current A"},
        {{"--seed", "-1"}, "--seed '-1': the seed must be a whole number from 0 to 18446744073709551615"},
        {{"--threads", "0"}, "--threads '0': give 1 to 256 threads"},
        {{"--adc-ref", "2.5"}, "--adc-ref '2.5': a fixed reference needs a drive; give --excitation V or --current A"},

        {{"--trials", "30000000"},
         "--trials '30000000': with 9 temperatures that is more than 200000000 samples; use fewer trials or a "
         "larger --step"},
    };
    for (const Case& c : cases) {
        const auto r = run_rtline(with(design(), c.flags));
        CAPTURE(c.flags[0]);
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(r.err == "rtline: " + c.message + "\n");
    }
    const auto fine = run_rtline(design("0.001"));
    CHECK(fine.code == 2);
    CHECK(fine.out.empty());
    CHECK(fine.err == "rtline: --step '0.001': gives 80001 temperatures; a budget takes at most 10001\n");
}

TEST_CASE("a converter whose reference is below the output, or a drive that self-heats too much, is refused") {
    const auto low_ref = run_rtline({"budget", "--r25", "10k", "--beta", "3950", "--span", "0:50", "--circuit", "bare",
                                     "--current", "100u", "--adc-bits", "16", "--adc-ref", "2.5"});
    CHECK(low_ref.code == 2);
    CHECK(low_ref.err.find("the output reaches 3.36") != std::string::npos);
    const auto hot = run_rtline(with(design("10", "1k"), {"--excitation", "12", "--dissipation", "1"}));
    CHECK(hot.code == 2);
    CHECK(hot.err.find("a budget takes a rise up to 2 K") != std::string::npos);
}

TEST_CASE("the budget's own exp and log agree with the C library to a few units in the last place") {
    // The C library's exp and log are correctly rounded or nearly so (glibc documents < 1 ulp).
    double worst_exp = 0.0;
    double worst_log = 0.0;
    for (int k = -4000; k <= 4000; ++k) {
        const double z = k * 0.0173;  // −69.2 .. 69.2
        worst_exp = std::max(worst_exp, std::abs(rtline::budget_detail::exp_fast(z) / std::exp(z) - 1.0));
        const double x = std::exp(k * 0.01);  // 4e−18 .. 2e17
        worst_log = std::max(worst_log, std::abs(rtline::budget_detail::log_fast(x) - std::log(x)) /
                                            std::max(1.0, std::abs(std::log(x))));
    }
    CHECK(worst_exp < 4.0 * std::numeric_limits<double>::epsilon());
    CHECK(worst_log < 4.0 * std::numeric_limits<double>::epsilon());
    CHECK(std::isnan(rtline::budget_detail::log_fast(0.0)));
    CHECK(std::isnan(rtline::budget_detail::log_fast(-1.0)));
    CHECK(std::isnan(rtline::budget_detail::log_fast(INFINITY)));
}

TEST_CASE("the staged Monte Carlo evaluation gives the same bits as the point-by-point one, codes off the table too") {
    // The Monte Carlo runs errors(), each stage over a trial's temperatures and the firmware's
    // temperature looked up by code; the worst case runs point_error() one temperature at a time
    // with the inverse computed. They must agree to the bit (the same function, so that the worst
    // case bounds the samples), including codes outside the table, which errors() computes. A remote
    // probe with self-heating, leads and a 12-bit converter (benchmark 5's design), and a divider
    // without leads (the scaled inverse), each with deviations up to 5 % and converter errors up to
    // ±3000 LSB (far past the table's margin of a quarter of the range plus 64 codes).
    using namespace rtline::budget_detail;
    const rtline::Thermistor th = beta_thermistor();
    const rtline::Span span{rtline::celsius_to_kelvin(-40.0), rtline::celsius_to_kelvin(60.0)};
    const rtline::Grid grid = rtline::make_grid(th, span, 1.0);
    for (const bool remote : {true, false}) {
        rtline::Circuit c = divider_low(10e3);
        c.excitation = {rtline::Drive::voltage, 3.3};
        rtline::BudgetSpec spec = nothing();
        spec.trials = 1000;  // a Monte Carlo's channel: it holds the code table
        spec.adc.bits = 12;
        if (remote) {
            c.lead_ohm = 5.0;
            spec.dissipation_w_per_k = 1.5e-3;
        }
        const Channel ch(grid, th, c, spec);
        CHECK(ch.inverse() == (remote ? Inverse::closed : Inverse::scaled));
        // The table against the formula, past both ends.
        for (double k = -2000.0; k <= 6200.0; k += 1.0) {
            const double a = ch.code_temperature(k);
            const double b = ch.code_temperature_exact(k);
            if (!(std::isnan(a) && std::isnan(b))) REQUIRE(a == b);
        }
        SplitMix64 rng(7);
        std::vector<double> staged(ch.size());
        std::vector<double> work(ch.size());
        std::size_t outside = 0;
        for (int trial = 0; trial < 400; ++trial) {
            Slots s{};
            for (const Slot k : {Slot::kR25, kBeta, kResistor0, kDrift, kLead, kReference}) {
                s[k] = 0.05 * (2.0 * rng.uniform01() - 1.0);
            }
            s[kGain] = 0.01 * (2.0 * rng.uniform01() - 1.0);
            s[kAdc] = (trial % 4 == 0 ? 3000.0 : 2.0) * (2.0 * rng.uniform01() - 1.0);
            const Trial tr = ch.trial(s);
            rtline::budget_detail::with_kernel(ch.solves(), Adc::rounded, ch.inverse(), [&](auto kernel) {
                ch.errors(kernel, tr, s[kAdc], staged.data(), work.data());
                for (std::size_t i = 0; i < ch.size(); ++i) {
                    const double one = ch.point_error(kernel, tr, i, s[kAdc]);
                    CAPTURE(trial);
                    CAPTURE(i);
                    if (!(std::isnan(one) && std::isnan(staged[i]))) REQUIRE(std::bit_cast<std::uint64_t>(one) ==
                                                                             std::bit_cast<std::uint64_t>(staged[i]));
                }
                // errors() leaves the trial's codes in `work`: count the trials with one off the table.
                std::vector<double> looked(ch.size());
                if (!ch.code_lookup(work.data(), looked.data())) ++outside;
                return 0;
            });
        }
        CHECK(outside > 20);   // the fallback path ran (a quarter of the trials have up to ±3000 LSB)
        CHECK(outside < 200);  // and the table served the others
    }
}
