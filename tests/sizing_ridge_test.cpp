// Two sizing facts that follow from the algebra of the networks, checked numerically: a two-resistor
// continuous optimum is a ridge (the second resistor buys span, not linearity), and a load across a
// divider's output moves the closed-form values to R*·L/(L − R*).
#include <doctest/doctest.h>

#include <cmath>

#include "rtline/sizing.hpp"

using namespace rtline;

namespace {

Thermistor ntc() { return Thermistor(BetaModel{10e3, 298.15, 3890.0}); }  // our own plausible figures
Span span_c(double lo, double hi) { return {lo + 273.15, hi + 273.15}; }

}  // namespace

// Hand derivation: the shunt-divider's v = rs/(rs + R_T∥rp) gives 1 − v = [rp/(rs+rp)]·R_T/(R_T + rs∥rp),
// an affine image of a divider-high's 1 − v' = R_T/(R_T + r) with r = rs∥rp. %FSD is unchanged by an
// affine map, so the best shunt-divider is exactly as linear as the best divider, at every rp.
TEST_CASE("the shunt-divider's continuous optimum is as linear as the best divider, on a ridge") {
    const Thermistor t = ntc();
    const Span span = span_c(0, 45);
    const Grid g = make_grid(t, span, 1.0);
    SizingSpec divider;
    divider.base.topology = Topology::divider_high;
    SizingSpec shunt_divider;
    shunt_divider.base.topology = Topology::shunt_divider;
    const Candidate one = optimize_continuous(divider, g, t);
    const Candidate two = optimize_continuous(shunt_divider, g, t);
    CHECK(two.max_nonlinearity_pct_fsd == doctest::Approx(one.max_nonlinearity_pct_fsd).epsilon(1e-6));
    CHECK(two.ridge);
    CHECK_FALSE(one.ridge);
    // The equivalent resistance rs∥rp of the reported pair is the divider's optimum (to 1e-4: the ridge
    // is flat, so its position along the equivalent resistance is set by the refinement's tolerance).
    const double eq = parallel(two.circuit.rs, two.circuit.rp);
    CHECK(eq == doctest::Approx(one.circuit.rs).epsilon(1e-4));
    // Of the ridge, the pair with the largest span: the span factor rp/(rs+rp) grows with rp, so rp sits
    // at the top of the range and the span is within 0.1 % of the divider's.
    CHECK(two.circuit.rp == doctest::Approx(10e6).epsilon(1e-6));
    CHECK(two.output_span == doctest::Approx(one.output_span).epsilon(1e-3));
}

// divider-low with a load L across the thermistor: v = (R_T∥L)/(rs + R_T∥L) = [L/(rs+L)]·R_T/(R_T + rs∥L)
// (hand derivation), an affine image of the unloaded divider with rs∥L in rs's place.
TEST_CASE("a load across a divider's output converts the closed forms to R*·L/(L − R*)") {
    const Thermistor t = ntc();
    const Span span = span_c(5, 40);
    Circuit loaded;
    loaded.topology = Topology::divider_low;
    loaded.load_ohm = 20e3;
    const ClosedForms bare = closed_forms(t, span);
    const ClosedForms with_load = closed_forms(t, span, loaded);
    REQUIRE(bare.inflection_ohm);
    REQUIRE(with_load.inflection_ohm);
    CHECK(with_load.load_included);
    const double r_star = *bare.inflection_ohm;
    CHECK(*with_load.inflection_ohm == doctest::Approx(r_star * 20e3 / (20e3 - r_star)).epsilon(1e-12));
    CHECK(parallel(*with_load.inflection_ohm, 20e3) == doctest::Approx(r_star).epsilon(1e-12));
    // The definition of the inflection value: the loaded output's second derivative in T vanishes at the
    // centre (second central difference, small next to first difference times the step).
    loaded.rs = *with_load.inflection_ohm;
    const double tc = span.centre_k();
    const double h = 0.01;
    auto v = [&](double tk) { return output(loaded, t.resistance(tk)); };
    const double second = v(tc + h) - 2.0 * v(tc) + v(tc - h);
    const double first = (v(tc + h) - v(tc - h)) / 2.0;
    CHECK(std::abs(second) < 1e-6 * std::abs(first));
    // And the unloaded inflection value fitted under this load is not an inflection there.
    loaded.rs = r_star;
    const double off = v(tc + h) - 2.0 * v(tc) + v(tc - h);
    CHECK(std::abs(off) > 100.0 * std::abs(second));
}

TEST_CASE("a load the unloaded value cannot be reached through gives no closed form, and a loaded bridge says so") {
    const Thermistor t = ntc();
    const Span span = span_c(5, 40);
    Circuit small_load;
    small_load.topology = Topology::divider_high;
    small_load.load_ohm = 1e3;  // below the ~8 kΩ unloaded value: R·L/(R + L) < L can never reach it
    const ClosedForms cf = closed_forms(t, span, small_load);
    CHECK_FALSE(cf.inflection_ohm.has_value());
    CHECK_FALSE(cf.three_point_ohm.has_value());
    Circuit bridge;
    bridge.topology = Topology::bridge;
    bridge.load_ohm = 100e3;
    const ClosedForms b = closed_forms(t, span, bridge);
    CHECK(b.load_ignored);
    CHECK(*b.inflection_ohm == doctest::Approx(*closed_forms(t, span).inflection_ohm));
}
