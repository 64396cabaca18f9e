// rtline budget with the causes that dominate in the field: every cause together against an
// independent numpy Monte Carlo and an exhaustive corner enumeration (tests/ref/budget_field.py), and
// each new cause alone against its analytic first-order error.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "rtline/budget.hpp"
#include "rtline/circuit.hpp"
#include "support.hpp"

using nlohmann::json;
using rtline::test::python_ref;
using rtline::test::run_rtline;

namespace {

constexpr double kB = 3950.0;  // K; a common B25/85 (common practice, no source)

// A remote probe on a cold-chain logger: the sensor at -40..30 °C on 5 ohm of cable, the board at
// 0..50 °C, every field cause on (our own scenario).
const json kDesign = {{"r25_ohm", 10e3},
                      {"b_k", kB},
                      {"rs_ohm", 10e3},
                      {"lead_ohm", 5.0},
                      {"lead_tol", 0.05},
                      {"cable_c", {-40, 30}},
                      {"v_exc", 3.3},
                      {"ref_tol", 0.002},
                      {"ref_tc", 5e-5},
                      {"res_tol", 0.001},
                      {"res_tc", 2.5e-5},
                      {"board_c", {0, 50}},
                      {"r25_tol", 0.01},
                      {"beta_tol", 0.01},
                      {"drift", 0.002},
                      {"gain", 0.001},
                      {"offset_lsb", 1.0},
                      {"inl_lsb", 1.0},
                      {"delta_w_per_k", 0.0015},
                      {"t_c", {-40, -22.5, -5, 12.5, 30}}};

std::vector<std::string> field_args(int bits, const std::string& trials) {
    return {"budget",
            "--r25",
            "10k",
            "--beta",
            "3950",
            "--span",
            "-40:30",
            "--step",
            "17.5",
            "--circuit",
            "divider-low",
            "--rs",
            "10k",
            "--excitation",
            "3.3",
            "--adc-ref",
            "excitation",
            "--lead",
            "5",
            "--lead-tol",
            "5",
            "--cable-temp",
            "-40:30",
            "--ref-tol",
            "0.2",
            "--ref-tc",
            "50",
            "--resistor-tol",
            "0.1",
            "--resistor-tc",
            "25",
            "--board-temp",
            "0:50",
            "--drift",
            "0.2",
            "--adc-bits",
            std::to_string(bits),
            "--adc-gain",
            "0.1",
            "--adc-offset",
            "1",
            "--adc-inl",
            "1",
            "--dissipation",
            "1.5",
            "--trials",
            trials,
            "--format",
            "json"};
}

json run_json(const std::vector<std::string>& args) { return rtline::test::run_json_ok(args); }

std::vector<std::string> bare(const std::vector<std::string>& more) {
    std::vector<std::string> a = {"budget", "--r25",    "10k",       "--beta",   "3950",      "--span", "-40:60",
                                  "--step", "20",       "--circuit", "bare",     "--r25-tol", "0",      "--beta-tol",
                                  "0",      "--trials", "0",         "--format", "json"};
    a.insert(a.end(), more.begin(), more.end());
    return a;
}

double beta_r(double t_k) { return 10e3 * std::exp(kB * (1.0 / t_k - 1.0 / 298.15)); }

}  // namespace

TEST_CASE("every field cause together: the worst case is the corner enumeration of an independent numpy model") {
    // tests/ref/budget_field.py enumerates all 4096 corners of the raw parameters (the board and cable
    // temperatures at their ends, each coefficient at its sign) with the body temperature by scipy's
    // brentq; the budget searches a box of combined factors. The error is monotonic in each
    // parameter here, so both give the same extremes, to the root finders' precision.
    json in = kDesign;
    in["mode"] = "corners";
    in["bits"] = 12;
    const json ref = python_ref("budget_field.py", in);
    const json out = run_json(field_args(12, "0"));
    REQUIRE(out["points"].size() == 5);
    rtline::test::check_worst_case(out, ref);
}

TEST_CASE("every field cause together: the Monte Carlo agrees with an independent numpy one within sampling error") {
    // Two independent runs of 200 000 trials (our own splitmix64 stream, numpy's PCG64). Each statistic
    // has a standard error derived by the script from its own sample (the mean σ/√n, the standard
    // deviation from the fourth moment, a percentile √(p(1 − p)/n)/f with f the sample's density);
    // the difference of two independent estimates has √2 times it, checked at 4 of those (a 6e-5
    // chance per check for a normal difference). The converter's codes make the errors discrete in
    // steps of one LSB's worth of temperature: a percentile may land on either neighbour, so it gets
    // one step more.
    json in = kDesign;
    in["mode"] = "mc";
    in["bits"] = 16;
    in["trials"] = 200000;
    in["seed"] = 7;
    const json ref = python_ref("budget_field.py", in);
    const json out = run_json(field_args(16, "200000"));
    rtline::test::check_monte_carlo(out, ref, 5);
}

TEST_CASE("lead wires alone on a bare thermistor: the error is dR over dR/dT") {
    // First order: dT = dR/(alpha·R) with alpha = −B/T² (beta equation). A 10 ohm loop with ±10 %
    // (1 ohm) read by firmware that subtracts the nominal 10 ohm; and the same loop at a cable at 70 °C,
    // 50 K above copper's 20 °C, with 0.393 %/K (IEC 60028): 1.965 ohm. Second order is dR/R relative
    // (below 1e-3 here), checked at 2e-3.
    const json tol = run_json(bare({"--lead", "10", "--lead-tol", "10"}));
    const json warm = run_json(bare({"--lead", "10", "--cable-temp", "70"}));
    for (std::size_t i = 0; i < tol["points"].size(); ++i) {
        const double t = tol["points"][i]["t_c"].get<double>() + 273.15;
        const double slope = kB / (t * t) * beta_r(t);  // |dR/dT|
        CAPTURE(t);
        CHECK(tol["points"][i]["components"]["lead_k"].get<double>() == doctest::Approx(1.0 / slope).epsilon(2e-3));
        CHECK(warm["points"][i]["components"]["lead_k"].get<double>() ==
              doctest::Approx(10.0 * 0.00393 * 50.0 / slope).epsilon(2e-3));
        // Warmer copper reads colder: the signed worst case is negative.
        CHECK(warm["points"][i]["worst_low_k"].get<double>() < 0.0);
    }
}

TEST_CASE("a resistor's coefficient with the board at the sensed temperature: c·|T − 25 °C|·T²/B") {
    // Divider-low read ratiometrically: the firmware infers R·rs_nominal/rs, so a drift of rs by
    // c·(T − 25 °C) reads ln(1 + cΔ)/|alpha| ≈ cΔ·T²/B (first order; second order cΔ, below 1e-2 here).
    const json j = run_json({"budget", "--r25",         "10k", "--beta",     "3950",        "--span",
                             "-40:60", "--step",        "20",  "--circuit",  "divider-low", "--rs",
                             "10k",    "--r25-tol",     "0",   "--beta-tol", "0",           "--resistor-tol",
                             "0",      "--resistor-tc", "100", "--trials",   "0",           "--format",
                             "json"});
    for (const json& p : j["points"]) {
        const double t = p["t_c"].get<double>() + 273.15;
        const double expected = 1e-4 * std::abs(t - 298.15) * t * t / kB;
        CAPTURE(t);
        if (expected == 0.0) {
            CHECK(p["components"]["resistor_drift_k"].get<double>() < 1e-12);
        } else {
            CHECK(p["components"]["resistor_drift_k"].get<double>() == doctest::Approx(expected).epsilon(1e-2));
        }
    }
}

TEST_CASE("the reference: it cancels when ratiometric, and against a fixed reference is r·(R + rs)/(rs·|alpha|)") {
    // Divider-low v = R/(R + rs), dv/dT = rs·R·alpha/(R + rs)²; a reference off by r reads v/(1 + r),
    // so dT = r·v/|dv/dT| = r·(R + rs)/(rs·|alpha|) to first order (relative error about r).
    const std::vector<std::string> base = {"budget", "--r25",          "10k", "--beta",    "3950",        "--span",
                                           "0:40",   "--step",         "10",   "--circuit", "divider-low", "--rs",
                                           "10k",    "--excitation",   "3.3", "--r25-tol", "0",           "--beta-tol",
                                           "0",      "--resistor-tol", "0",   "--ref-tol", "0.5",         "--trials",
                                           "0",      "--format",       "json"};
    std::vector<std::string> ratio = base;
    ratio.insert(ratio.end(), {"--adc-ref", "excitation"});
    std::vector<std::string> fixed = base;
    fixed.insert(fixed.end(), {"--adc-ref", "3.3", "--excitation-tol", "0"});
    const json a = run_json(ratio);
    const json b = run_json(fixed);
    for (std::size_t i = 0; i < a["points"].size(); ++i) {
        const double t = a["points"][i]["t_c"].get<double>() + 273.15;
        const double r = beta_r(t);
        CAPTURE(t);
        CHECK(a["points"][i]["components"]["reference_k"].get<double>() == 0.0);
        CHECK(b["points"][i]["components"]["reference_k"].get<double>() ==
              doctest::Approx(0.005 * (r + 10e3) / (10e3 * kB / (t * t))).epsilon(0.01));
    }
}

TEST_CASE("interchangeability ±dT reads the shift itself, and drift is ln(1 + d)/|alpha|") {
    // The part's curve is the nominal one shifted by dT, so the model reading is off by exactly dT.
    // Drift scales R by (1 + d): ln(1 + d)·T²/B for the beta equation (first order, error d/2 relative).
    // --dt-tol stands instead of --r25-tol and --beta-tol, which then default to 0.
    const json j = run_json({"budget", "--r25",   "10k",       "--beta",   "3950",     "--span",   "-40:60",
                             "--step", "20",      "--circuit", "bare",     "--dt-tol", "0.2",      "--dt-range",
                             "-40:60", "--drift", "0.5",       "--trials", "0",        "--format", "json"});
    for (const json& p : j["points"]) {
        const double t = p["t_c"].get<double>() + 273.15;
        CAPTURE(t);
        CHECK(p["components"]["thermistor_dt_k"].get<double>() == doctest::Approx(0.2).epsilon(1e-9));
        CHECK(p["components"]["drift_k"].get<double>() == doctest::Approx(0.005 * t * t / kB).epsilon(5e-3));
    }
}

TEST_CASE("converter gain and offset alone: their change of reading over the output's slope") {
    // Divider-low, ratiometric, 12 bits: an offset of ±2 LSB reads 2/4096 over |dv/dT|, a gain error g
    // reads g·v/|dv/dT| (first order), dv/dT = rs·R·alpha/(R + rs)² (beta equation).
    const json j =
        run_json({"budget", "--r25",          "10k",         "--beta",     "3950", "--span",       "0:40", "--step",
                  "10",      "--circuit",      "divider-low", "--rs",       "10k",  "--r25-tol",    "0",    "--beta-tol",
                  "0",      "--resistor-tol", "0",           "--adc-bits", "12",   "--adc-offset", "2",    "--adc-gain",
                  "0.1",    "--trials",       "0",           "--format",   "json"});
    for (const json& p : j["points"]) {
        const double t = p["t_c"].get<double>() + 273.15;
        const double r = beta_r(t);
        const double v = r / (r + 10e3);
        const double slope = 10e3 * r * (kB / (t * t)) / ((r + 10e3) * (r + 10e3));
        CAPTURE(t);
        CHECK(p["components"]["adc_offset_k"].get<double>() == doctest::Approx(2.0 / 4096.0 / slope).epsilon(5e-3));
        CHECK(p["components"]["adc_gain_k"].get<double>() == doctest::Approx(0.001 * v / slope).epsilon(5e-3));
    }
}

TEST_CASE("the lead resistance is part of the circuit: check shows its shift, the table's inverse subtracts it") {
    // A bare thermistor on 5 ohm of loop read by firmware that ignores the wires reads the model's
    // temperature at R + 5: to first order 5/(alpha·R) (beta equation), negative (reads cold).
    const auto r = run_rtline({"check", "--r25", "10k", "--beta", "3950", "--span", "20:60", "--step", "10",
                               "--circuit", "divider-low", "--rs", "10k", "--lead", "5", "--format", "json"});
    INFO(r.err);
    REQUIRE(r.code == 0);
    const json j = json::parse(r.out);
    const double t_hi = 333.15;
    const double first_order = -5.0 / (kB / (t_hi * t_hi) * beta_r(t_hi));
    CHECK(j["summary"]["lead_shift_k"]["min"].get<double>() == doctest::Approx(first_order).epsilon(3e-3));
    CHECK(j["circuit"]["lead_ohm"] == 5.0);
    // The firmware's inverse of the divider gives back R_T with the lead subtracted (v = (R + L)/(rs + R + L)).
    rtline::Circuit c;
    c.topology = rtline::Topology::divider_low;
    c.rs = 10e3;
    c.lead_ohm = 5.0;
    const double v = (4000.0 + 5.0) / (10e3 + 4000.0 + 5.0);
    CHECK(rtline::output(c, 4000.0) == doctest::Approx(v).epsilon(1e-14));
    // The thermistor's power excludes the wires: P = V²·R/(rs + R + L)² at 1 V.
    CHECK(rtline::operate(c, 4000.0).power_w == doctest::Approx(4000.0 / ((14005.0) * (14005.0))).epsilon(1e-12));
}

TEST_CASE("size refuses --lead with its reason") {
    const auto r = run_rtline(
        {"size", "--r25", "10k", "--beta", "3950", "--span", "0:50", "--circuit", "divider-low", "--lead", "5"});
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("--lead '5': size chooses resistors for a thermistor on the board") != std::string::npos);
}

TEST_CASE("the model error: a part on its Steinhart-Hart curve read through a beta model") {
    // The part follows 1/T = A + B·ln R + C·ln³R (Steinhart & Hart 1968); the firmware inverts the beta
    // model, T = 1/(1/T0 + ln(R/R0)/B). The part's R at T is the real root of the cubic (Cardano),
    // computed here by bisection on the explicit 1/T(ln R); its reading minus T is the model error.
    const double a = 1.009249522e-3;  // a Steinhart–Hart set near 10k/3950 K (from memory)
    const double b = 2.378405444e-4;
    const double c = 2.019202697e-7;
    const json j =
        run_json({"budget",      "--r25",    "10k",        "--beta",    "3950",
                  "--span",      "0:50",     "--step",     "12.5",      "--circuit",
                  "divider-low", "--rs",     "10k",        "--part-sh", "1.009249522e-3,2.378405444e-4,2.019202697e-7",
                  "--r25-tol",   "0",        "--beta-tol", "0",         "--resistor-tol",
                  "0",           "--trials", "0",          "--format",  "json"});
    for (const json& p : j["points"]) {
        const double t = p["t_c"].get<double>() + 273.15;
        double lo = std::log(10.0);
        double hi = std::log(1e7);
        for (int k = 0; k < 200; ++k) {
            const double m = 0.5 * (lo + hi);
            (1.0 / (a + b * m + c * m * m * m) > t ? lo : hi) = m;  // T falls as ln R rises
        }
        const double r = std::exp(0.5 * (lo + hi));
        const double read = 1.0 / (1.0 / 298.15 + std::log(r / 10e3) / kB);
        CAPTURE(t);
        CHECK(p["nominal_error_k"].get<double>() == doctest::Approx(read - t).epsilon(1e-6));
        CHECK(p["components"]["model_error_k"].get<double>() == doctest::Approx(std::abs(read - t)).epsilon(1e-6));
    }
}

TEST_CASE("a truncated normal never exceeds the worst case; the untruncated one may") {
    // Truncated at the tolerance every draw lies inside the worst case's box, so no sample can exceed
    // it (by construction of the worst case as the box's extremes). Untruncated, 0.27 % of each part
    // lies beyond 3σ: with 200 000 trials some board reads beyond the worst case (here R25 alone,
    // whose error is monotonic in the part).
    const std::vector<std::string> base = {"budget", "--r25",      "10k", "--beta",         "3950",        "--span",
                                           "0:50",   "--step",     "12.5",  "--circuit",      "divider-low", "--rs",
                                           "10k",    "--beta-tol", "0",   "--resistor-tol", "0",           "--trials",
                                           "200000", "--format",   "json"};
    std::vector<std::string> cut = base;
    cut.insert(cut.end(), {"--distribution", "normal-truncated"});
    const json t = run_json(cut);
    const json u = run_json(base);
    CHECK(t["assumptions"]["truncated_at_tolerance"] == true);
    bool beyond = false;
    for (std::size_t i = 0; i < t["points"].size(); ++i) {
        CHECK(t["points"][i]["mc"]["max_abs_k"].get<double>() <= t["points"][i]["worst_case_k"].get<double>() + 1e-12);
        beyond =
            beyond || u["points"][i]["mc"]["max_abs_k"].get<double>() > u["points"][i]["worst_case_k"].get<double>();
    }
    CHECK(beyond);
}

TEST_CASE("the budget's converter transfer: full-scale makes one LSB 1/(2^N - 1) and is stated") {
    // 8 bits: 1 LSB = 1/256 (rounding) or 1/255 (full-scale) of the reference (the converter's three
    // conventions, common practice); the resolution scales by 256/255.
    auto run = [](const char* transfer) {
        return run_json({"budget", "--r25",      "10k", "--beta",         "3950",        "--span",
                         "0:50",   "--step",     "12.5",  "--circuit",      "divider-low", "--rs",
                         "10k",    "--adc-bits", "8",   "--adc-transfer", transfer,      "--trials",
                         "0",      "--format",   "json"});
    };
    const json r = run("rounding");
    const json f = run("full-scale");
    CHECK(r["assumptions"]["adc"]["lsb_size"].get<double>() == doctest::Approx(1.0 / 256.0).epsilon(1e-15));
    CHECK(f["assumptions"]["adc"]["lsb_size"].get<double>() == doctest::Approx(1.0 / 255.0).epsilon(1e-15));
    CHECK(f["assumptions"]["adc"]["transfer"] == "full-scale");
    CHECK(f["points"][1]["resolution_k_per_lsb"].get<double>() ==
          doctest::Approx(r["points"][1]["resolution_k_per_lsb"].get<double>() * 256.0 / 255.0).epsilon(1e-12));
}
