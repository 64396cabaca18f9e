// `rtline check` with a front end: the amplifier's gain and offset (given or chosen to fill the
// converter's range), the source impedance, the settling error and its warning, as a user runs them.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "support.hpp"

namespace {

using nlohmann::json;
using rtline::test::run_rtline;
using Args = std::vector<std::string>;

// Our own thermistor: beta model R25 = 10 kΩ, B = 3950 K (support.hpp).
Args check(const Args& more) { return rtline::test::check_args(more); }

// Beta equation, our part: R(t_c) = 10000·exp(3950·(1/T − 1/298.15)).
double r_beta(double t_c) { return 10e3 * std::exp(3950.0 * (1.0 / (t_c + 273.15) - 1.0 / 298.15)); }

json run_json(const Args& args, std::string* err = nullptr) {
    const auto r = run_rtline(args);
    INFO("stderr: " << r.err);
    REQUIRE(r.code == 0);
    if (err) *err = r.err;
    return json::parse(r.out);
}

}  // namespace

TEST_CASE("check --auto-range puts a bridge's span onto 5 % to 95 % of the converter's range") {
    const json j = run_json(check({"--span", "-20:60", "--step", "10", "--circuit", "bridge", "--r1", "10k",
                                   "--excitation", "3.3", "--auto-range", "--format", "json"}));
    const json& fe = j["front_end"];
    // Hand calculation: headroom 5 % of 3.3 V is 0.165 V; the bridge's output falls with temperature, so
    // the low end maps onto 3.3 − 0.165 = 3.135 V and the high end onto 0.165 V.
    CHECK(fe["converter_input_at_lo"].get<double>() == doctest::Approx(3.135).epsilon(1e-12));
    CHECK(fe["converter_input_at_hi"].get<double>() == doctest::Approx(0.165).epsilon(1e-12));
    const double gain = fe["amplifier"]["gain_v_per_v"];
    const double offset = fe["amplifier"]["offset"];
    CHECK(fe["amplifier"]["headroom_pct"].get<double>() == 5.0);
    // Every point: gain × (V_A − V_B) + offset, with V_A − V_B from check's own output column.
    for (std::size_t k = 0; k < j["points"].size(); ++k) {
        const double v = j["points"][k]["output"];
        CHECK(fe["points"][k]["converter_input"].get<double>() == doctest::Approx(gain * v + offset).epsilon(1e-12));
    }
    CHECK(fe["warnings"].empty());
}

TEST_CASE("check reports a divider's source impedance and the settling error exp(-t/(R C)) in LSB") {
    std::string err;
    const json j = run_json(check({"--span", "-20:60", "--step", "20", "--circuit", "divider-low", "--rs", "10k",
                                   "--sample-cap", "10p", "--acquisition", "1u", "--format", "json"}),
                            &err);
    const json& fe = j["front_end"];
    REQUIRE(fe["points"].size() == 5);
    for (const json& p : fe["points"]) {
        // Voltage (ratiometric) drive: the source is rs ∥ R_T; the first-order RC charge of a
        // full-scale step leaves 2^12·exp(−t/(R·C)) LSB (common practice), both computed here.
        const double r_t = r_beta(p["t_c"].get<double>());
        const double r = 10e3 * r_t / (10e3 + r_t);
        CHECK(p["source_ohm"].get<double>() == doctest::Approx(r).epsilon(1e-9));
        CHECK(p["settling_error_lsb"].get<double>() == doctest::Approx(4096.0 * std::exp(-1e-6 / (r * 10e-12))));
    }
    CHECK(fe["settling"]["settled"] == true);
    CHECK(err.empty());
    // Hand calculation: 10 pF × (2 × 4096 − 1) = 81.91 nF.
    CHECK(fe["settling"]["filter_cap_f"].get<double>() == doctest::Approx(81.91e-9));
}

TEST_CASE("a sample that does not settle to half an LSB is warned about on stderr, the report still written") {
    // A 100k part at -40 °C behind 47k: about 46.6 kΩ into 15 pF for 1 µs leaves hundreds of LSB.
    const auto r =
        run_rtline({"check", "--r25", "100k", "--beta", "4250", "--span", "-40:20", "--step", "10", "--circuit",
                    "divider-low", "--rs", "47k", "--sample-cap", "15p", "--acquisition", "1u"});
    REQUIRE(r.code == 0);
    CHECK(r.err.find("rtline: warning: the sample does not settle") != std::string::npos);
    CHECK(r.err.find("at -40.00 \xC2\xB0"
                     "C") != std::string::npos);
    CHECK(r.out.find("filter capacitor        122.9 nF") != std::string::npos);  // 15 pF × 8191
}

TEST_CASE("check --format csv appends the front end's columns") {
    const auto r = run_rtline(check({"--span", "0:40", "--step", "10", "--circuit", "bridge", "--r1", "10k",
                                     "--excitation", "5", "--gain", "10", "--offset", "2.5", "--format", "csv"}));
    REQUIRE(r.code == 0);
    const std::string header = r.out.substr(0, r.out.find('\n'));
    CHECK(header.find(",line,source_ohm,source_a_ohm,source_b_ohm,converter_input_v,settling_error_lsb") !=
          std::string::npos);
    // At the null (0 °C) the bridge gives 0 V, so the converter sees the offset alone.
    CHECK(r.out.find(",2.5,\n") != std::string::npos);
}

TEST_CASE("front end misuse is one line on stderr, exit 2, nothing on stdout") {
    const Args base{"--span", "0:40", "--circuit", "bridge", "--r1", "10k", "--excitation", "5"};
    auto refused = [&](const Args& more, const std::string& message) {
        Args a = base;
        a.insert(a.end(), more.begin(), more.end());
        const auto r = run_rtline(check(a));
        CHECK(r.code == 2);
        CHECK(r.out.empty());
        CHECK(r.err == "rtline: " + message + "\n");
    };
    refused({"--sample-cap", "10p", "--acquisition", "1u"},
            "--gain: the bridge circuit's output is the difference V_A - V_B; a converter reads it through an "
            "amplifier (give --gain or --auto-range)");
    refused({"--offset", "1"}, "--offset '1': needs --gain");
    refused({"--auto-range", "--headroom", "50"}, "--headroom '50': the headroom at each end must be 0 to under 50 %");
    refused({"--gain", "10", "--auto-range"},
            "--gain '10': give either --gain (with --offset) or --auto-range, not both");
    refused({"--gain", "0"}, "--gain '0': the gain must be a finite number other than 0");
    refused({"--gain", "10", "--sample-cap", "10p"}, "--acquisition: the settling needs the acquisition time too");
}

TEST_CASE("a current-driven bare thermistor reaches the converter as I times R_T") {
    const json j =
        run_json(check({"--span", "15:35", "--step", "5", "--circuit", "bare", "--current", "100u", "--adc-ref", "2.5",
                        "--adc-bits", "12", "--sample-cap", "10p", "--acquisition", "2u", "--format", "json"}));
    const json& fe = j["front_end"];
    CHECK(fe["full_scale"].get<double>() == 2.5);
    for (const json& p : fe["points"]) {
        // Ohm's law with the beta equation: 100 µA × R_T (1 V at 25 °C); the source is R_T itself.
        const double r_t = r_beta(p["t_c"].get<double>());
        CHECK(p["converter_input"].get<double>() == doctest::Approx(100e-6 * r_t).epsilon(1e-12));
        CHECK(p["source_ohm"].get<double>() == doctest::Approx(r_t).epsilon(1e-12));
    }
    CHECK(fe["points"][2]["converter_input"].get<double>() == doctest::Approx(1.0).epsilon(1e-12));
}
