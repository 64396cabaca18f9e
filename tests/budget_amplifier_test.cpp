// rtline budget of a bridge read through an amplifier, with the amplifier's own errors as causes:
// the worst case, each cause alone and the Monte Carlo against an independent numpy model of the
// channel (tests/ref/budget_amplifier.py), and the input offset alone against its first-order error.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "support.hpp"

using nlohmann::json;
using rtline::test::python_ref;
using rtline::test::run_rtline;

namespace {

constexpr double kB = 3950.0;  // K; a common B25/85 (common practice, no source)

// A bridge balanced at 25 degC (r1 = r2 = r3 = R25) on 3.3 V, its A - B read by an amplifier of gain
// 1.5 V/V with the output offset at half the excitation, so the converter input stays within 0.05 to
// 0.91 of the reference over 0 to 60 degC; the board anywhere in 10 to 60 degC (our own scenario).
// The amplifier's figures are of the order a general-purpose op-amp states (from memory, no part).
const json kDesign = {{"r25_ohm", 10e3},     {"b_k", kB},
                      {"r1_ohm", 10e3},      {"r2_ohm", 10e3},
                      {"r3_ohm", 10e3},      {"v_exc", 3.3},
                      {"gain", 1.5},         {"offset", 0.5},
                      {"r25_tol", 0.01},     {"beta_tol", 0.01},
                      {"res_tol", 0.001},    {"gain_tol", 0.005},
                      {"vos_v", 2e-3},       {"drift_v_per_k", 1e-5},
                      {"board_c", {10, 60}}, {"ib_a", 50e-9},
                      {"ios_a", 20e-9},      {"t_c", {0, 15, 30, 45, 60}}};

std::vector<std::string> bridge_args(const std::vector<std::string>& more) {
    std::vector<std::string> a = {
        "budget", "--r25",          "10k",    "--beta",       "3950",       "--span",   "0:60", "--step",
        "15",     "--circuit",      "bridge", "--r1",         "10k",        "--r2",     "10k",  "--r3",
        "10k",    "--excitation",   "3.3",    "--adc-ref",    "excitation", "--gain",   "1.5",  "--offset",
        "0.5",    "--resistor-tol", "0.1",    "--board-temp", "10:60",      "--format", "json"};
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

const std::vector<std::string> kAmpErrors = {"--amp-gain-tol",       "0.5", "--amp-offset", "2m",
                                             "--amp-offset-drift",   "10u", "--amp-bias",   "50n",
                                             "--amp-offset-current", "20n"};

std::vector<std::string> joined(std::vector<std::string> a, const std::vector<std::string>& b) {
    a.insert(a.end(), b.begin(), b.end());
    return a;
}

json run_json(const std::vector<std::string>& args) { return rtline::test::run_json_ok(args); }

double beta_r(double t_k) { return 10e3 * std::exp(kB * (1.0 / t_k - 1.0 / 298.15)); }

}  // namespace

TEST_CASE("a bridge through an amplifier with its errors: the worst case is an independent numpy corner enumeration") {
    // tests/ref/budget_amplifier.py enumerates all 4096 corners of the raw parameters (the board at
    // the ends of its range, each term at its sign, the quantization as ±0.5 LSB) and finds the
    // reading by brentq on the nominal channel; the budget searches a box that joins the input offset
    // and its drift in one dimension. The error is monotonic in each here, so both reach the same
    // extremes, to the root finders' precision: checked to 1e-9 relative.
    json in = kDesign;
    in["mode"] = "corners";
    in["bits"] = 12;
    const json ref = python_ref("budget_amplifier.py", in);
    const json out = run_json(joined(bridge_args({"--adc-bits", "12", "--trials", "0"}), kAmpErrors));
    REQUIRE(out["points"].size() == 5);
    rtline::test::check_worst_case(out, ref);
}

TEST_CASE("each of the amplifier's errors alone is the numpy model's error at its bound") {
    // The numpy model moves one term to ± its bound (the drift with the board at 60 degC, the end of
    // 10:60 farther from 25 degC) and reads by brentq; the budget's split searches the same single
    // dimension. Checked to 1e-9 relative plus 1e-12 K (brentq's tolerance).
    json in = kDesign;
    in["mode"] = "alone";
    const json ref = python_ref("budget_amplifier.py", in);
    const json out = run_json(joined(bridge_args({"--trials", "0"}), kAmpErrors));
    for (std::size_t i = 0; i < 5; ++i) {
        const json& c = out["points"][i]["components"];
        const json& r = ref["points"][i];
        CAPTURE(r["t_c"].get<double>());
        for (const char* cause : {"amp_gain", "amp_offset", "amp_offset_drift", "amp_bias", "amp_offset_current"}) {
            CAPTURE(cause);
            const double want = r[cause].get<double>();
            CHECK(want > 1e-4);  // each term matters here, so the check can fail
            CHECK(std::abs(c[std::string(cause) + "_k"].get<double>() - want) <= 1e-9 * want + 1e-12);
        }
    }
}

TEST_CASE("a bridge through an amplifier: the Monte Carlo agrees with an independent numpy one within sampling error") {
    // 200 000 trials each (our own splitmix64 stream, numpy's PCG64); every term normal with its bound
    // as 3σ, the board uniform. Each statistic's standard error comes from the script's own sample (the
    // mean σ/√n, the standard deviation from the fourth moment, a percentile √(p(1 − p)/n)/f); the
    // difference of two independent estimates has √2 times it, checked at 4 of those (a 6e-5 chance
    // per check for a normal difference), and a percentile one LSB's worth of temperature more (the
    // codes make the errors discrete).
    json in = kDesign;
    in["mode"] = "mc";
    in["bits"] = 16;
    in["trials"] = 200000;
    in["seed"] = 11;
    const json ref = python_ref("budget_amplifier.py", in);
    const json out = run_json(joined(bridge_args({"--adc-bits", "16", "--trials", "200000"}), kAmpErrors));
    rtline::test::check_monte_carlo(out, ref, 5);
}

TEST_CASE("the input offset alone: gain·V_os at the converter over the converter input's slope") {
    // By hand: V_os moves the converter input by gain·V_os/E (V/V); the input's slope is
    // gain·dV_A/dT/E with V_A = E·R/(r1 + R) and dR/dT = −R·B/T² (beta equation), so the error is
    // V_os·(r1 + R)²·T²/(E·r1·R·B) to first order, whatever the gain. Second order is about half the
    // error times the slope's relative change per kelvin (a few %/K here): below 1e-3 relative at
    // 200 µV, checked at 1e-3.
    for (const char* gain : {"1.5", "0.8"}) {
        std::vector<std::string> a = bridge_args(
            {"--trials", "0", "--amp-offset", "200u", "--r25-tol", "0", "--beta-tol", "0", "--resistor-tol", "0"});
        REQUIRE(a[21] == "--gain");
        a[22] = gain;
        const json out = run_json(a);
        for (const json& p : out["points"]) {
            const double t = p["t_c"].get<double>() + 273.15;
            const double r = beta_r(t);
            const double expected = 200e-6 * (10e3 + r) * (10e3 + r) * t * t / (3.3 * 10e3 * r * kB);
            CAPTURE(gain);
            CAPTURE(t);
            CHECK(p["components"]["amp_offset_k"].get<double>() == doctest::Approx(expected).epsilon(1e-3));
            // The input offset is the only cause: the worst case is it.
            CHECK(p["worst_case_k"].get<double>() == doctest::Approx(expected).epsilon(1e-3));
        }
    }
}

TEST_CASE("the firmware inverts the nominal amplifier: without its errors the parts' split is the network's own") {
    // Without a converter the reading through an amplifier the firmware inverts exactly is the
    // network's output again, so every part's share of the error is what it is read directly (by the
    // algebra of an exact inverse; checked to 1e-9 relative plus 1e-12 K).
    std::vector<std::string> direct = {"budget", "--r25", "10k",       "--beta",   "3950", "--span",   "0:60",
                                       "--step", "15",    "--circuit", "bridge",   "--r1", "10k",      "--r2",
                                       "10k",    "--r3",  "10k",       "--trials", "0",    "--format", "json"};
    const json a = run_json(direct);
    const json b = run_json(joined(direct, {"--gain", "1.5", "--offset", "0.5"}));
    for (std::size_t i = 0; i < a["points"].size(); ++i) {
        for (const char* cause : {"r25_k", "beta_k", "resistors_k"}) {
            const double want = a["points"][i]["components"][cause].get<double>();
            CHECK(std::abs(b["points"][i]["components"][cause].get<double>() - want) <= 1e-9 * want + 1e-12);
        }
        CHECK(b["points"][i]["components"]["amp_offset_k"].is_null());
    }
    const json& amp = b["assumptions"]["amplifier"];
    CHECK(amp["gain_v_per_v"].get<double>() == 1.5);
    CHECK(amp["offset_v_per_v"].get<double>() == 0.5);
    CHECK(a["assumptions"]["amplifier"].is_null());
}

TEST_CASE("a bias current on a current-driven thermistor read in volts: I_b·T²/(I·B), whatever the gain") {
    // By hand: a current I through R_T reads V = I·R; the bias current I_b drawn from that node
    // (source impedance R_T, the current source open) lowers it by I_b·R, i.e. R by the fraction
    // I_b/I, and the beta model reads ΔT = T²/B·Δln R ≈ T²·I_b/(B·I) to first order (second order
    // below 2e-4 relative here), checked at 1e-3. 10 nA on 50 µA.
    for (const char* gain : {"2", "0.5"}) {
        const json out = run_json(
            {"budget", "--r25",      "10k", "--beta",    "3950", "--span",   "0:60", "--step",     "15",  "--circuit",
             "bare",   "--current",  "50u", "--adc-ref", "2.5",  "--gain",   gain,   "--amp-bias", "10n", "--r25-tol",
             "0",      "--beta-tol", "0",   "--trials",  "0",    "--format", "json"});
        for (const json& p : out["points"]) {
            const double t = p["t_c"].get<double>() + 273.15;
            CAPTURE(gain);
            CAPTURE(t);
            CHECK(p["components"]["amp_bias_k"].get<double>() ==
                  doctest::Approx(10e-9 * t * t / (50e-6 * kB)).epsilon(1e-3));
        }
        CHECK(out["assumptions"]["amplifier"]["offset_v"].get<double>() == 0.0);  // volts: the key says so
    }
}

TEST_CASE("the offset drift with the board at the sensed temperature: zero at 25 degC, and its Monte Carlo spread") {
    // By hand, as for the input offset: a drift D over T − 25 °C moves the input by D·(T − 25 °C), read
    // as D·|T − 25 °C|·(r1 + R)²·T²/(E·r1·R·B) to first order (below 1e-3 relative here). Drawn normal
    // with D as 3σ, the Monte Carlo's standard deviation is a third of it: a sample standard deviation
    // of n normal draws has a relative standard error of 1/√(2(n − 1)) (a textbook result), 0.16 % at
    // n = 200 000, checked at 4 of those plus the first-order 1e-3. No converter, the parts exact.
    std::vector<std::string> a = {
        "budget", "--r25",        "10k",    "--beta",     "3950",       "--span",         "5:45", "--step",
        "10",     "--circuit",    "bridge", "--r1",       "10k",        "--r2",           "10k",  "--r3",
        "10k",    "--excitation", "3.3",    "--adc-ref",  "excitation", "--gain",         "1.5",  "--offset",
        "0.5",    "--r25-tol",    "0",      "--beta-tol", "0",          "--resistor-tol", "0",    "--amp-offset-drift",
        "100u",   "--trials",     "200000", "--format",   "json"};
    const json out = run_json(a);
    const double n = 200000.0;
    for (const json& p : out["points"]) {
        const double t = p["t_c"].get<double>() + 273.15;
        const double r = beta_r(t);
        const double per_volt = (10e3 + r) * (10e3 + r) * t * t / (3.3 * 10e3 * r * kB);  // K per V at the input
        const double expected = 100e-6 * std::abs(t - 298.15) * per_volt;
        CAPTURE(t);
        if (std::abs(t - 298.15) < 1e-9) {
            CHECK(p["components"]["amp_offset_drift_k"].get<double>() < 1e-12);
            CHECK(p["mc"]["std_k"].get<double>() < 1e-12);
        } else {
            CHECK(p["components"]["amp_offset_drift_k"].get<double>() == doctest::Approx(expected).epsilon(1e-3));
            const double tolerance = 4.0 / std::sqrt(2.0 * (n - 1.0)) + 1e-3;
            CHECK(p["mc"]["std_k"].get<double>() == doctest::Approx(expected / 3.0).epsilon(tolerance));
        }
    }
}
