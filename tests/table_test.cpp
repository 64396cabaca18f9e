// rtline table, the core half: the exact inverse (ratio → R_T → T), lookup tables, fixed point and
// polynomials, checked against independent references (tests/ref/adc_inverse.py, polyfit.py,
// minimax_lp.py) and hand calculations.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "rtline/budget.hpp"
#include "rtline/correction.hpp"
#include "rtline/error.hpp"
#include "support.hpp"

using namespace rtline;
using rtline::test::python_ref;

namespace {

// A beta-model thermistor in a ratiometric circuit, read by an N-bit ADC over a span.
struct Design {
    double r25_ohm = 10e3;
    double b_k = 3950.0;
    Topology topology = Topology::divider_low;
    double rs_ohm = 10e3;
    double rp_ohm = 0.0;
    double load_ohm = kNoLoad;
    int adc_bits = 12;
    double lo_c = 0.0;
    double hi_c = 45.0;
};

Thermistor thermistor(const Design& d) { return Thermistor(BetaModel{d.r25_ohm, k25CelsiusK, d.b_k}); }

Circuit circuit(const Design& d) {
    Circuit c;
    c.topology = d.topology;
    c.rs = d.rs_ohm;
    c.rp = d.rp_ohm;
    c.load_ohm = d.load_ohm;
    return c;
}

Span span(const Design& d) { return {celsius_to_kelvin(d.lo_c), celsius_to_kelvin(d.hi_c)}; }

// The converter reads the divider directly, ratiometrically.
Channel channel(const Design& d) { return Channel{circuit(d), std::nullopt, 1.0}; }

CodeMap code_map(const Design& d) { return map_codes(thermistor(d), channel(d), span(d), d.adc_bits); }

nlohmann::json ref_input(const Design& d) {
    nlohmann::json j = {{"r25_ohm", d.r25_ohm}, {"b_k", d.b_k},
                        {"t0_c", 25.0},         {"topology", std::string(topology_name(d.topology))},
                        {"rs_ohm", d.rs_ohm},   {"adc_bits", d.adc_bits},
                        {"lo_c", d.lo_c},       {"hi_c", d.hi_c}};
    if (d.rp_ohm > 0.0) j["rp_ohm"] = d.rp_ohm;
    if (std::isfinite(d.load_ohm)) j["load_ohm"] = d.load_ohm;
    return j;
}

// The normalized codes x and the exact temperatures (°C) of the independent inverse.
struct Points {
    std::vector<double> x;
    std::vector<double> t_c;
};

Points reference_points(const Design& d) {
    const auto ref = python_ref("adc_inverse.py", ref_input(d));
    Points p;
    const double lo = ref["code_lo"].get<double>();
    const double hi = ref["code_hi"].get<double>();
    for (std::size_t i = 0; i < ref["t_c"].size(); ++i) {
        p.x.push_back((2.0 * (lo + static_cast<double>(i)) - (lo + hi)) / (hi - lo));
        p.t_c.push_back(ref["t_c"][i].get<double>());
    }
    return p;
}

// A strongly curved design: a 10k divider over −40 to 125 °C, where the local slope of T against the
// code changes several-fold between the middle and the ends.
Design curved() {
    Design d;
    d.lo_c = -40.0;
    d.hi_c = 125.0;
    return d;
}

}  // namespace

TEST_CASE("the exact inverse undoes each ratiometric circuit's output, load included") {
    // Hand algebra from the divider equations (Ohm's law) in circuit.hpp: divider-high v = B/(R_T + B)
    // gives R_T = B(1 − v)/v; divider-low v = P/(rs + P) gives P = rs·v/(1 − v) and R_T = 1/(1/P −
    // 1/load); shunt-divider the same with Q = R_T ∥ rp. Each must give back v through output().
    struct Case {
        Topology topology;
        double rp;
        double load;
    };
    const Case cases[] = {{Topology::divider_high, 0.0, kNoLoad},   {Topology::divider_high, 0.0, 47e3},
                          {Topology::divider_low, 0.0, kNoLoad},    {Topology::divider_low, 0.0, 1e6},
                          {Topology::shunt_divider, 22e3, kNoLoad}, {Topology::shunt_divider, 22e3, 100e3}};
    for (const Case& k : cases) {
        Circuit c;
        c.topology = k.topology;
        c.rs = 6.8e3;
        c.rp = k.rp;
        c.load_ohm = k.load;
        for (const double r_t : {1e3, 4.7e3, 10e3, 15e3}) {
            const double v = output(c, r_t);
            CAPTURE(topology_name(k.topology));
            CAPTURE(r_t);
            CHECK(channel_resistance(Channel{c, std::nullopt, 1.0}, v) == doctest::Approx(r_t).epsilon(1e-10));
        }
    }
}

TEST_CASE("mid-scale of a divider whose resistor equals R25 reads exactly 25 degC") {
    // Hand calculation: code 2048 of 12 bits is the ratio 2048/4096 = 1/2, which a divider gives when
    // R_T = rs = R25, and the beta model gives T0 = 25 °C at R25 (R(T0) = R0).
    for (const Topology t : {Topology::divider_low, Topology::divider_high}) {
        Design d;
        d.topology = t;
        const CodeMap map = code_map(d);
        CHECK(map.temperature(2048) == doctest::Approx(k25CelsiusK).epsilon(1e-12));
    }
}

TEST_CASE("every code's temperature agrees with an independent inverse of the circuit and model") {
    // Reference: tests/ref/adc_inverse.py, the beta equation and Ohm's law, the ratio inverted by
    // scipy's brentq instead of rtline's closed form.
    Design loaded;
    loaded.load_ohm = 200e3;
    Design high;
    high.topology = Topology::divider_high;
    high.adc_bits = 10;
    high.lo_c = -20.0;
    high.hi_c = 60.0;
    Design shunt;
    shunt.topology = Topology::shunt_divider;
    shunt.rp_ohm = 33e3;
    shunt.rs_ohm = 4.7e3;
    shunt.adc_bits = 11;
    for (const Design& d : {loaded, high, shunt}) {
        const CodeMap map = code_map(d);
        const auto ref = python_ref("adc_inverse.py", ref_input(d));
        REQUIRE(map.code_lo == ref["code_lo"].get<std::int64_t>());
        REQUIRE(map.code_hi == ref["code_hi"].get<std::int64_t>());
        double worst = 0.0;
        for (std::size_t i = 0; i < map.size(); ++i) {
            worst = std::max(worst, std::abs(kelvin_to_celsius(map.t_k[i]) - ref["t_c"][i].get<double>()));
        }
        CHECK(worst < 1e-9);
    }
}

TEST_CASE("codes outside the span read as the nearer end in the map, the table and the polynomial") {
    // The reading convention (correction.hpp): a code beyond the span clamps to its end code.
    const Design d;
    const CodeMap map = code_map(d);
    const LookupTable table = make_table(map, 9, Spacing::code);
    const Polynomial poly = fit_polynomial(map, 3, FitKind::least_squares);
    const std::int64_t top = (1 << d.adc_bits) - 1;
    CHECK(map.temperature(0) == map.t_k.front());
    CHECK(map.temperature(top) == map.t_k.back());
    CHECK(table.interpolate(0) == table.t_k.front());
    CHECK(table.interpolate(top) == table.t_k.back());
    CHECK(poly.evaluate(0) == poly.evaluate(map.code_lo));
    CHECK(poly.evaluate(top) == poly.evaluate(map.code_hi));
}

TEST_CASE("a table's breakpoints start and end at the span's codes and its error is exact at them") {
    const CodeMap map = code_map(Design{});
    for (const Spacing s : {Spacing::code, Spacing::error}) {
        const LookupTable t = make_table(map, 12, s);
        REQUIRE(t.codes.size() == 12);
        CHECK(t.codes.front() == map.code_lo);
        CHECK(t.codes.back() == map.code_hi);
        for (std::size_t i = 0; i + 1 < t.codes.size(); ++i) CHECK(t.codes[i] < t.codes[i + 1]);
        // Interpolation is exact at a breakpoint by construction.
        for (const std::int64_t c : t.codes) CHECK(t.error_k[static_cast<std::size_t>(c - map.code_lo)] == 0.0);
    }
}

TEST_CASE("equal-error spacing beats even spacing for the same entries on a strongly curved design") {
    // Linear interpolation errs by about h²·|T''|/8 on a segment of width h (the standard bound, e.g.
    // Burden & Faires, Numerical Analysis, §3.1, from memory); where |T''| varies, shorter segments
    // where it is large lower the largest error. Measured: 2.13 °C even against 0.086 °C (33 entries).
    const CodeMap map = code_map(curved());
    for (const std::size_t entries : {9u, 17u, 33u}) {
        const LookupTable even = make_table(map, entries, Spacing::code);
        const LookupTable equal = make_table(map, entries, Spacing::error);
        CAPTURE(entries);
        CHECK(equal.max_error_k < 0.5 * even.max_error_k);
    }
}

TEST_CASE("equal-error spacing makes the segments' largest errors nearly equal") {
    // The min–max placement's defining property (the segments share one error); integer codes leave
    // a small spread, so the check allows 10 %: common practice, no formal source.
    const CodeMap map = code_map(curved());
    const LookupTable t = make_table(map, 17, Spacing::error);
    std::vector<double> seg;
    for (std::size_t i = 0; i + 1 < t.codes.size(); ++i) {
        double worst = 0.0;
        for (std::int64_t c = t.codes[i]; c <= t.codes[i + 1]; ++c) {
            worst = std::max(worst, std::abs(t.error_k[static_cast<std::size_t>(c - map.code_lo)]));
        }
        seg.push_back(worst);
    }
    for (const double e : seg) CHECK(e > 0.9 * t.max_error_k);
}

TEST_CASE("the fixed-point table stays within the interpolation error plus one unit") {
    // Bound by hand: each entry is off by at most unit/2 and so is any interpolation of them; the
    // final rounding adds at most unit/2 more.
    const CodeMap map = code_map(curved());
    for (const int scale : {10, 100}) {
        const LookupTable t = make_table(map, 17, Spacing::error);
        const FixedTable f = to_fixed(t, map, scale);
        CHECK(f.bits == 16);  // −40 to 125 °C is −4000 to 12500 counts of 0.01 °C
        CHECK(f.max_error_k <= t.max_error_k + 1.0 / scale + 1e-12);
        for (std::size_t i = 0; i < t.codes.size(); ++i) {
            CHECK(f.t[i] == std::llround(kelvin_to_celsius(t.t_k[i]) * scale));
        }
    }
}

TEST_CASE("a span above 327.67 degC needs 32-bit counts of 0.01 degC") {
    // int16 holds −32768 to 32767 (C99 §7.18.1.1); 350 °C is 35000 counts of 0.01 °C.
    Design d;
    d.r25_ohm = 1e6;
    d.b_k = 4500.0;
    d.rs_ohm = 200.0;
    d.lo_c = 250.0;
    d.hi_c = 350.0;
    const CodeMap map = code_map(d);
    const LookupTable t = make_table(map, 9, Spacing::code);
    CHECK(to_fixed(t, map, 100).bits == 32);
    CHECK(to_fixed(t, map, 10).bits == 16);
}

TEST_CASE("the least-squares polynomial matches numpy.polyfit on the same points") {
    // Reference: numpy.polyfit (tests/ref/polyfit.py) on the normalized codes and the independent
    // exact temperatures of tests/ref/adc_inverse.py.
    Design d = curved();
    d.adc_bits = 10;
    const CodeMap map = code_map(d);
    const Points pts = reference_points(d);
    const std::vector<int> degrees = {1, 3, 6, 9};
    const auto fits = python_ref("polyfit.py", {{"x", pts.x}, {"t_c", pts.t_c}, {"degrees", degrees}})["fits"];
    for (std::size_t k = 0; k < degrees.size(); ++k) {
        const int degree = degrees[k];
        const Polynomial p = fit_polynomial(map, degree, FitKind::least_squares);
        const auto& ref = fits[k];
        CAPTURE(degree);
        for (int i = 0; i <= degree; ++i) {
            double ours = p.coefficients_k[static_cast<std::size_t>(i)];
            if (i == 0) ours = kelvin_to_celsius(ours);
            CHECK(ours == doctest::Approx(ref["coefficients"][i].get<double>()).epsilon(1e-7).scale(100.0));
        }
        CHECK(p.max_error_k == doctest::Approx(ref["max_error_k"].get<double>()).epsilon(1e-7));
    }
}

TEST_CASE("the minimax polynomial has the smallest largest error, as a linear program finds it") {
    // Reference: scipy.optimize.linprog (HiGHS) on the discrete minimax problem (tests/ref/minimax_lp.py).
    Design d = curved();
    d.adc_bits = 10;
    const CodeMap map = code_map(d);
    const Points pts = reference_points(d);
    const std::vector<int> degrees = {2, 4, 7};
    const auto ref = python_ref("minimax_lp.py", {{"x", pts.x}, {"t_c", pts.t_c}, {"degrees", degrees}});
    for (std::size_t k = 0; k < degrees.size(); ++k) {
        const int degree = degrees[k];
        const Polynomial mm = fit_polynomial(map, degree, FitKind::minimax);
        const Polynomial ls = fit_polynomial(map, degree, FitKind::least_squares);
        CAPTURE(degree);
        CHECK(mm.max_error_k == doctest::Approx(ref["max_error_k"][k].get<double>()).epsilon(1e-6));
        CHECK(mm.max_error_k < ls.max_error_k);
    }
}

TEST_CASE("the minimax error equioscillates on degree + 2 codes") {
    // Chebyshev's alternation theorem (e.g. Powell, Approximation Theory and Methods, 1981, ch. 7, from
    // memory): the best polynomial of degree D reaches its largest error with alternating signs at
    // D + 2 points.
    const CodeMap map = code_map(Design{});
    for (const int degree : {1, 3, 5}) {
        const Polynomial p = fit_polynomial(map, degree, FitKind::minimax);
        int alternations = 0;
        int last_sign = 0;
        for (const double e : p.error_k) {
            if (std::abs(e) < (1.0 - 1e-6) * p.max_error_k) continue;
            const int sign = e > 0.0 ? 1 : -1;
            if (sign != last_sign) ++alternations;
            last_sign = sign;
        }
        CAPTURE(degree);
        CHECK(alternations >= degree + 2);
    }
}

TEST_CASE("the smallest table ships within the target and one entry fewer does not") {
    // The shipped error is the fixed-point table's over every code (to_fixed), so the count returned
    // meets the target once rounded to the unit, and the count before it does not.
    const CodeMap map = code_map(curved());
    const double target_k = 0.05;
    for (const Spacing s : {Spacing::code, Spacing::error}) {
        for (const int scale : {10, 100}) {
            if (scale == 10) continue;  // 0.1 °C alone rounds by up to 0.05 °C
            const ShippedTable t = smallest_table(map, target_k, s, scale);
            CAPTURE(spacing_name(s));
            CHECK(t.fixed.max_error_k <= target_k);
            const LookupTable fewer = make_table(map, t.table.codes.size() - 1, s);
            CHECK(to_fixed(fewer, map, scale).max_error_k > target_k);
        }
    }
    const ShippedTable p2 = smallest_table(map, 0.2, Spacing::power_of_two, 100);
    CHECK(p2.fixed.max_error_k <= 0.2);
    CHECK(to_fixed(power_of_two_table(map, p2.table.shift + 1), map, 100).max_error_k > 0.2);
    for (const FitKind k : {FitKind::least_squares, FitKind::minimax}) {
        const Polynomial p = lowest_degree(map, 1.0, k);
        CAPTURE(fit_name(k));
        CHECK(p.max_error_k <= 1.0);
        CHECK(fit_polynomial(map, p.degree - 1, k).max_error_k > 1.0);
    }
}

TEST_CASE("an error no table or polynomial can meet is reported as infeasible") {
    const CodeMap map = code_map(curved());
    CHECK_THROWS_AS((void)smallest_table(map, 1e-9, Spacing::code, 100), InfeasibleError);
    CHECK_THROWS_AS((void)lowest_degree(map, 1e-6, FitKind::minimax), InfeasibleError);
}

TEST_CASE("the rounding floor is the largest distance of an exact temperature to a whole count") {
    // Hand reasoning: a reading in whole counts errs at least by that distance at each code, so no
    // table beats it; for thousands of codes it comes close to half a unit.
    const CodeMap map = code_map(curved());
    const double floor_k = rounding_floor_k(map, 10);
    CHECK(floor_k <= 0.05);
    CHECK(floor_k > 0.049);
    CHECK_THROWS_AS((void)smallest_table(map, 0.045, Spacing::error, 10), InfeasibleError);
}

TEST_CASE("the 32-bit arithmetic is proven where it fits and 64 bits are used where it does not") {
    // int32 holds up to 2^31 - 1 (C99 §7.18.2.1): a 12-bit segment of 4094 codes and 16500 counts
    // makes 6.8e7; a 24-bit span's single segment of millions of codes and thousands of counts does not fit.
    const CodeMap map = code_map(curved());
    CHECK(to_fixed(make_table(map, 2, Spacing::code), map, 100).arithmetic_bits == 32);
    Design wide = curved();
    wide.adc_bits = 22;
    const CodeMap big = code_map(wide);
    const FixedTable f = to_fixed(make_table(big, 2, Spacing::code), big, 100);
    CHECK(f.arithmetic_bits == 64);
    // Every code evaluated by the 64-bit reference agrees with the same formula in int32 where proven.
    const FixedTable g = to_fixed(make_table(map, 9, Spacing::error), map, 100);
    for (std::int64_t code = map.code_lo; code <= map.code_hi; ++code) {
        const auto it = std::upper_bound(g.codes.begin(), g.codes.end(), code);
        const std::size_t i = std::min(static_cast<std::size_t>(it - g.codes.begin()), g.codes.size() - 1) - 1;
        const auto num =
            static_cast<std::int32_t>((g.t[i + 1] - g.t[i]) * static_cast<std::int32_t>(code - g.codes[i]));
        const auto den = static_cast<std::int32_t>(g.codes[i + 1] - g.codes[i]);
        CHECK(g.t[i] + (num >= 0 ? num + den / 2 : num - den / 2) / den == g.interpolate(code));
    }
}

TEST_CASE("fault bands: open and short by the circuit equations, the margin from the tolerances") {
    // Ohm's law on each divider (circuit.hpp): divider-high v = B/(R_T + B) goes to 0 open and 1
    // shorted; divider-low without a load to 1 open and 0 shorted. The margin is positive (the ±1 %
    // corners move the end codes).
    Design high;
    high.topology = Topology::divider_high;
    const CodeMap hm = code_map(high);
    CHECK(open_ratio(channel(high)) == 0.0);
    CHECK(short_ratio(channel(high)) == 1.0);
    const auto margin = tolerance_margin(hm, thermistor(high), channel(high), span(high), Tolerances{});
    CHECK(margin.first > 1);
    CHECK(margin.second > 1);
    const FaultBands f = fault_bands(hm, channel(high), margin.first, margin.second);
    CHECK(f.classify(0) == CodeMeaning::open);
    CHECK(f.classify(4095) == CodeMeaning::short_circuit);
    CHECK(f.classify(hm.code_lo) == CodeMeaning::reading);
    CHECK(f.reading_lo() == hm.code_lo - margin.first);
    const Design low;
    CHECK(open_ratio(channel(low)) == 1.0);
    CHECK(short_ratio(channel(low)) == 0.0);
}

TEST_CASE("with lead wires a shorted thermistor leaves the wires' loop, an open one is still infinite") {
    // Hand calculation through the circuit equations (Ohm's law, circuit.hpp) with the arm
    // R_T + R_lead: shorted, R_T = 0 leaves R_lead; open, R_T → ∞ whatever the wires. Codes by the
    // rounding transfer, round(v·4096).
    struct Case {
        Topology topology;
        double rs;
        double rp;
        double lead;
        double open_v;
        double short_v;
        std::int64_t open_code;
        std::int64_t short_code;
    };
    const Case cases[] = {
        // divider-high: v = rs/(R_arm + rs): open 0; short 10000/10050 = 0.995025, 4075.62 LSB.
        {Topology::divider_high, 10e3, 0.0, 50.0, 0.0, 10e3 / 10050.0, 0, 4076},
        // divider-low: v = R_arm/(rs + R_arm): open 1 (the top code); short 50/10050, 20.38 LSB.
        {Topology::divider_low, 10e3, 0.0, 50.0, 1.0, 50.0 / 10050.0, 4095, 20},
        // shunt-divider: v = rs/(Q + rs), Q = R_arm ∥ rp: open Q = rp, 4700/37700 = 0.124668,
        // 510.64 LSB; short Q = 100 ∥ 33000 = 99.6979, 4700/4799.70 = 0.979228, 4010.92 LSB.
        {Topology::shunt_divider, 4.7e3, 33e3, 100.0, 4.7e3 / 37.7e3, 4.7e3 / (4.7e3 + 100.0 * 33e3 / 33.1e3), 511,
         4011},
    };
    for (const Case& k : cases) {
        CAPTURE(topology_name(k.topology));
        Design d;
        d.topology = k.topology;
        d.rs_ohm = k.rs;
        d.rp_ohm = k.rp;
        d.lo_c = 0.0;
        d.hi_c = 50.0;
        Channel c = channel(d);
        c.circuit.lead_ohm = k.lead;
        CHECK(open_ratio(c) == doctest::Approx(k.open_v).epsilon(1e-14));
        CHECK(short_ratio(c) == doctest::Approx(k.short_v).epsilon(1e-14));
        const CodeMap map = map_codes(thermistor(d), c, span(d), d.adc_bits);
        const FaultBands f = fault_bands(map, c, 3, 3);
        CHECK(f.open_code == k.open_code);
        CHECK(f.short_code == k.short_code);
        CHECK(f.classify(k.open_code) == CodeMeaning::open);
        CHECK(f.classify(k.short_code) == CodeMeaning::short_circuit);
        // The wires move the short off the rail, never into the readings: R_T > 0 at every reading.
        CHECK(f.hidden.empty());
    }
}
