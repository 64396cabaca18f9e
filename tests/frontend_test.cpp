// The front end against hand calculations and closed forms computed here: the amplifier's output, the
// gain and offset that fill the converter's range, each error term's shift, the source impedance of a
// simple divider, the settling error exp(-t/(R·C)) and the filter capacitor's charge-sharing rule.
#include <doctest/doctest.h>

#include <cmath>
#include <optional>

#include "rtline/error.hpp"
#include "rtline/frontend.hpp"
#include "rtline/grid.hpp"
#include "rtline/thermistor.hpp"

namespace {

using rtline::Circuit;
using rtline::Drive;
using rtline::Topology;

// Our own part: beta model R25 = 10 kΩ, B = 3950 K.
const rtline::Thermistor kPart(rtline::BetaModel{10e3, rtline::k25CelsiusK, 3950.0});

Circuit divider_low(double rs) {
    Circuit c;
    c.topology = Topology::divider_low;
    c.rs = rs;
    return c;
}

// Every resistor of topology t set (the ones it does not use are ignored), loaded, with lead wires.
Circuit loaded_network(Topology t) {
    Circuit c;
    c.topology = t;
    c.rs = 6.8e3;
    c.rp = 33e3;
    c.r1 = 12e3;
    c.r2 = 10e3;
    c.r3 = 4.7e3;
    c.load_ohm = 150e3;
    c.lead_ohm = 12.0;
    return c;
}

}  // namespace

TEST_CASE("the converter sees gain times the network's output plus the offset") {
    const Circuit c = divider_low(10e3);
    // Hand calculation: R_T = 10 kΩ with rs = 10 kΩ gives 0.5 V/V; 2 × 0.5 − 0.25 = 0.75.
    CHECK(rtline::converter_input(c, rtline::Amplifier{2.0, -0.25, 0.0}, 10e3) == doctest::Approx(0.75));
    CHECK(rtline::converter_input(c, std::nullopt, 10e3) == doctest::Approx(0.5));
}

TEST_CASE("auto-range maps the span's lowest and highest outputs onto the range less the headroom") {
    // A 5 V bridge over 0..40 °C, a 2.5 V converter, 10 % at each end: the ends land on 0.25 V and 2.25 V.
    Circuit c;
    c.topology = Topology::bridge;
    c.excitation = {Drive::voltage, 5.0};
    c.r1 = 10e3;
    rtline::complete_bridge(c, kPart, rtline::celsius_to_kelvin(0.0));
    const rtline::Grid g =
        rtline::make_grid(kPart, {rtline::celsius_to_kelvin(0.0), rtline::celsius_to_kelvin(40.0)}, 5.0);
    const rtline::RangeFit fit = rtline::fit_range(c, g, 2.5, 0.10);
    // The bridge's output falls with temperature (A is over the thermistor): low end at the top.
    CHECK(fit.at_lo == doctest::Approx(2.25).epsilon(1e-12));
    CHECK(fit.at_hi == doctest::Approx(0.25).epsilon(1e-12));
    // Hand calculation: gain = 0.8 × 2.5 V / |v(0 °C) − v(40 °C)|, with v(0 °C) = 0 at the null.
    const double span = std::abs(rtline::output(c, g.r_ohm.back()) - rtline::output(c, g.r_ohm.front()));
    CHECK(fit.amplifier.gain == doctest::Approx(2.0 / span).epsilon(1e-12));
    CHECK_THROWS_AS((void)rtline::fit_range(c, g, 2.5, 0.5), rtline::InputError);
}

TEST_CASE("each amplifier error term shifts the output by its hand-calculated amount") {
    const rtline::Amplifier amp{100.0, 1.0, 0.0};
    rtline::AmplifierErrors e;
    e.gain_error = 0.002;           // 0.2 %
    e.offset_v = 50e-6;             // 50 µV
    e.offset_drift_v_per_k = 1e-6;  // 1 µV/K
    e.bias_current_a = 10e-9;       // 10 nA
    e.offset_current_a = 2e-9;      // 2 nA
    const rtline::SourceImpedance z{20e3, 15e3, 5e3};
    const rtline::AmplifierShift s = rtline::amplifier_shift(amp, e, 0.01, z, rtline::celsius_to_kelvin(65.0));
    // Hand calculation: 0.002 × 100 × 10 mV = 2 mV; 100 × 50 µV = 5 mV; 100 × 1 µV/K × 40 K = 4 mV;
    // −100 × (10 nA × (15k − 5k) + 1 nA × 20k) = −100 × 120 µV = −12 mV.
    CHECK(s.gain_v == doctest::Approx(2e-3));
    CHECK(s.offset_v == doctest::Approx(5e-3));
    CHECK(s.drift_v == doctest::Approx(4e-3));
    CHECK(s.bias_v == doctest::Approx(-12e-3));
    CHECK(s.total() == doctest::Approx(-1e-3));
}

TEST_CASE("a voltage-driven divider's source impedance is its two resistors in parallel") {
    // Hand calculation: 10 kΩ ∥ 15 kΩ = 6 kΩ; with a current drive only the lower part (15 kΩ) remains.
    Circuit c = divider_low(10e3);
    CHECK(rtline::source_impedance(c, 15e3).out_ohm == doctest::Approx(6e3));
    c.excitation = {Drive::current, 100e-6};
    CHECK(rtline::source_impedance(c, 15e3).out_ohm == doctest::Approx(15e3));
}

TEST_CASE("the settling error is the full-scale step times exp(-t/(R C)) in LSB") {
    rtline::Sampling s;
    s.bits = 12;
    s.capacitance_f = 15e-12;
    s.acquisition_s = 2e-6;
    for (const double r : {1e3, 10e3, 47e3, 100e3, 330e3}) {
        // Closed form of the first-order RC charge (common practice), computed here.
        const double want = 4096.0 * std::exp(-s.acquisition_s / (r * s.capacitance_f));
        CHECK(rtline::settling_error_lsb(s, r) == doctest::Approx(want).epsilon(1e-12));
    }
    // Settled to exactly ½ LSB after R·C·ln(2·4096).
    const double t = rtline::settling_time_s(s, 47e3);
    s.acquisition_s = t;
    CHECK(rtline::settling_error_lsb(s, 47e3) == doctest::Approx(0.5).epsilon(1e-12));
    CHECK(rtline::settling_error_lsb(s, 0.0) == 0.0);  // an ideal source
}

TEST_CASE("the suggested filter capacitor holds the charge-sharing step to half an LSB") {
    rtline::Sampling s;
    s.bits = 12;
    s.capacitance_f = 10e-12;
    s.acquisition_s = 1e-6;
    // Hand calculation: C_f = 10 pF × (2 × 4096 − 1) = 81.91 nF; C_s/(C_s + C_f) × 4096 = 0.5 LSB.
    const double cf = rtline::filter_capacitance_f(s);
    CHECK(cf == doctest::Approx(81.91e-9).epsilon(1e-12));
    CHECK(s.capacitance_f / (s.capacitance_f + cf) * 4096.0 == doctest::Approx(0.5).epsilon(1e-12));
}

TEST_CASE("the converter reads a bridge only through an amplifier, a bare thermistor only with a current") {
    Circuit b;
    b.topology = Topology::bridge;
    b.r1 = b.r2 = b.r3 = 10e3;
    CHECK_THROWS_WITH_AS(rtline::validate_front_end(b, std::nullopt), doctest::Contains("through an amplifier"),
                         rtline::InputError);
    CHECK_NOTHROW(rtline::validate_front_end(b, rtline::Amplifier{10.0, 0.5, 0.0}));
    CHECK_THROWS_AS(rtline::validate_front_end(b, rtline::Amplifier{0.0, 0.5, 0.0}), rtline::InputError);
    Circuit bare;
    bare.topology = Topology::bare;
    CHECK_THROWS_WITH_AS(rtline::validate_front_end(bare, std::nullopt), doctest::Contains("current drive"),
                         rtline::InputError);
    bare.excitation = {Drive::current, 100e-6};
    CHECK_NOTHROW(rtline::validate_front_end(bare, std::nullopt));
}

TEST_CASE("the channel's ratio and its inverse agree with hand calculations through each network") {
    // Hand calculations (Ohm's law, each bridge side a Thevenin source): r1 = r2 = r3 = 10 kΩ and
    // R_T = 5 kΩ give V_A0 = 5/15, V_B0 = 1/2, so V_A − V_B = −1/6 unloaded; a 20 kΩ load between A
    // and B leaves −1/6 · 20/(20 + 10·5/15 + 5) = −2/17. Gain 2 and offset 0.5 (V/V) give 1/6 and
    // 9/34 of the reference. A shunt on 100 µA: 10 kΩ ∥ 22 kΩ = 6875 Ω, 0.6875 V of 2.5 V = 0.275.
    rtline::Channel bridge;
    bridge.circuit.topology = Topology::bridge;
    bridge.circuit.r1 = bridge.circuit.r2 = bridge.circuit.r3 = 10e3;
    bridge.amplifier = rtline::Amplifier{2.0, 0.5, 0.0};
    CHECK(rtline::channel_ratio(bridge, 5e3) == doctest::Approx(1.0 / 6.0).epsilon(1e-14));
    CHECK(rtline::channel_resistance(bridge, 1.0 / 6.0) == doctest::Approx(5e3).epsilon(1e-12));
    rtline::Channel loaded = bridge;
    loaded.circuit.load_ohm = 20e3;
    CHECK(rtline::channel_ratio(loaded, 5e3) == doctest::Approx(9.0 / 34.0).epsilon(1e-14));
    CHECK(rtline::channel_resistance(loaded, 9.0 / 34.0) == doctest::Approx(5e3).epsilon(1e-12));

    rtline::Channel shunt;
    shunt.circuit.topology = Topology::shunt;
    shunt.circuit.rp = 22e3;
    shunt.circuit.excitation = {Drive::current, 100e-6};
    shunt.reference = 2.5;
    CHECK(rtline::channel_ratio(shunt, 10e3) == doctest::Approx(0.275).epsilon(1e-14));
    CHECK(rtline::channel_resistance(shunt, 0.275) == doctest::Approx(10e3).epsilon(1e-12));

    // Every network, loaded, with lead wires and an amplifier: the inverse returns the R_T it was given.
    for (const Topology t : rtline::all_topologies()) {
        rtline::Channel ch;
        ch.circuit = loaded_network(t);
        ch.amplifier = rtline::Amplifier{-3.0, 0.7, 0.0};
        if (rtline::gives_resistance(t)) {
            ch.circuit.excitation = {Drive::current, 20e-6};
            ch.reference = 1.25;
        }
        REQUIRE_NOTHROW(rtline::validate(ch));
        for (const double r_t : {800.0, 4.7e3, 22e3}) {
            CAPTURE(rtline::topology_name(t));
            CAPTURE(r_t);
            CHECK(rtline::channel_resistance(ch, rtline::channel_ratio(ch, r_t)) == doctest::Approx(r_t).epsilon(1e-9));
        }
    }
}

TEST_CASE("a divider on a supply in volts is read against a fixed reference in volts") {
    // Hand calculation (Ohm's law): divider-low, rs = 10 kΩ, R_T = 5 kΩ on 3.3 V gives 3.3·5/15 = 1.1 V
    // at the output; a 2.5 V converter reference reads 1.1/2.5 = 0.44 of full scale. With the supply's
    // own value as the reference the ratio is the ratiometric one, 5/15.
    rtline::Channel ch;
    ch.circuit = divider_low(10e3);
    ch.circuit.excitation = {Drive::voltage, 3.3};
    ch.reference = 2.5;
    REQUIRE_NOTHROW(rtline::validate(ch));
    CHECK(rtline::channel_ratio(ch, 5e3) == doctest::Approx(0.44).epsilon(1e-14));
    CHECK(rtline::channel_resistance(ch, 0.44) == doctest::Approx(5e3).epsilon(1e-12));
    ch.reference = 3.3;
    CHECK(rtline::channel_ratio(ch, 5e3) == doctest::Approx(1.0 / 3.0).epsilon(1e-14));

    // Every divider and bridge under 5 V against 4.096 V, loaded, with leads and an amplifier (volts):
    // the inverse returns the R_T it was given.
    for (const Topology t : rtline::all_topologies()) {
        if (rtline::gives_resistance(t)) continue;
        rtline::Channel v;
        v.circuit = loaded_network(t);
        v.circuit.excitation = {Drive::voltage, 5.0};
        v.reference = 4.096;
        v.amplifier = rtline::Amplifier{-3.0, 2.0, 0.0};
        REQUIRE_NOTHROW(rtline::validate(v));
        for (const double r_t : {800.0, 4.7e3, 22e3}) {
            CAPTURE(rtline::topology_name(t));
            CAPTURE(r_t);
            CHECK(rtline::channel_resistance(v, rtline::channel_ratio(v, r_t)) == doctest::Approx(r_t).epsilon(1e-9));
        }
    }
    // A supply in volts against no reference in volts has no ratio.
    ch.reference = std::nan("");
    CHECK_THROWS_WITH_AS(rtline::validate(ch), doctest::Contains("reference in volts"), rtline::InputError);
}

TEST_CASE("a channel the converter cannot read is refused in the core's own words") {
    rtline::Channel ch;
    ch.circuit.topology = Topology::bridge;
    ch.circuit.r1 = ch.circuit.r2 = ch.circuit.r3 = 10e3;
    CHECK_THROWS_WITH_AS(rtline::validate(ch), doctest::Contains("through an amplifier"), rtline::InputError);
    ch.circuit.topology = Topology::bare;
    ch.circuit.excitation = {Drive::current, 1e-4};
    ch.reference = std::nan("");
    CHECK_THROWS_WITH_AS(rtline::validate(ch), doctest::Contains("reference must be given in volts"),
                         rtline::InputError);
}
