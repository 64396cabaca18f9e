// rtline::analyze(): a bare thermistor worked by hand from the beta equation; a divider's sensitivity
// against its analytic derivative; power and self-heating against the published formulas.
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "rtline/analysis.hpp"
#include "rtline/error.hpp"

namespace {

using rtline::Circuit;
using rtline::Drive;
using rtline::LineKind;
using rtline::Topology;

rtline::Span span_c(double lo_c, double hi_c) {
    return {rtline::celsius_to_kelvin(lo_c), rtline::celsius_to_kelvin(hi_c)};
}

Circuit circuit(Topology t, double rs = 0.0) {
    Circuit c;
    c.topology = t;
    c.rs = rs;
    return c;
}

bool rel_close(double got, double want, double rel) { return std::abs(got - want) <= rel * std::abs(want); }

// Our own part for the hand example: R25 = 10 kΩ, B = 3500 K, beta equation R = R25·exp(B(1/T − 1/T25)).
const rtline::Thermistor kHand(rtline::BetaModel{10e3, rtline::k25CelsiusK, 3500.0});
// Our own part for the rest: R25 = 10 kΩ, B = 3950 K.
const rtline::Thermistor kNtc(rtline::BetaModel{10e3, rtline::k25CelsiusK, 3950.0});

}  // namespace

TEST_CASE("a bare thermistor from 0 to 50 °C, worked by hand: endpoint line, %FSD and °C error at 25 °C") {
    // Hand calculation from the beta equation (calculator, 10 figures):
    //   R(0 °C)  = 10000·exp(3500·(1/273.15 − 1/298.15)) = 10000·exp(3500·25/81439.6725)
    //            = 10000·exp(1.074414930)  = 29282.79150 Ω
    //   R(25 °C) = 10000 Ω
    //   R(50 °C) = 10000·exp(−3500·25/96347.1725) = 10000·exp(−0.9081740307) = 4032.598923 Ω
    //   endpoint line (Bentley §2.1): slope (4032.598923 − 29282.79150)/50 K = −505.0038515 Ω/K,
    //   ideal at 25 °C = (29282.79150 + 4032.598923)/2 = 16657.69521 Ω,
    //   deviation = 10000 − 16657.69521 = −6657.695211 Ω, full scale 25250.19258 Ω,
    //   nonlinearity = −6657.695211/25250.19258 × 100 = −26.36690865 %FSD,
    //   error = −6657.695211/−505.0038515 = +13.18345433 °C (the reading lies 13 K high at 25 °C).
    const rtline::Grid grid = rtline::make_grid(kHand, span_c(0.0, 50.0), 25.0);
    const rtline::Analysis a = rtline::analyze(grid, kHand, circuit(Topology::bare), LineKind::endpoint, 0.0);
    REQUIRE(a.points.size() == 3);
    CHECK(rel_close(a.points[0].r_t_ohm, 29282.79150, 1e-9));
    CHECK(rel_close(a.points[2].r_t_ohm, 4032.598923, 1e-9));
    CHECK(rel_close(a.line.slope, -505.0038515, 1e-9));
    const rtline::PointResult& mid = a.points[1];
    CHECK(mid.output == doctest::Approx(10000.0).epsilon(1e-14));  // a bare thermistor's output is R_T
    CHECK(rel_close(mid.ideal, 16657.69521, 1e-9));
    CHECK(rel_close(mid.deviation, -6657.695211, 1e-9));
    CHECK(rel_close(mid.nonlinearity_pct_fsd, -26.36690865, 1e-9));
    CHECK(rel_close(mid.error_k, 13.18345433, 1e-9));
    // The end points lie on the endpoint line, their error +0 °C (not −0 from 0 over a falling slope).
    CHECK(a.points[0].deviation == 0.0);
    CHECK(a.points[2].deviation == 0.0);
    CHECK((a.points[0].error_k == 0.0 && !std::signbit(a.points[0].error_k)));
    // The summary names the worst point and the span.
    CHECK(rel_close(a.summary.max_nonlinearity_pct_fsd, 26.36690865, 1e-9));
    CHECK(a.summary.at_t_k == doctest::Approx(298.15).epsilon(1e-14));
    CHECK(rel_close(a.summary.max_error_k, 13.18345433, 1e-9));
    CHECK(rel_close(a.summary.output_span, 25250.19258, 1e-9));
    // A ratiometric bare thermistor has no drive: its power and self-heating are unknown, not zero.
    CHECK(std::isnan(mid.power_w));
    CHECK(std::isnan(a.summary.max_power_w));
    CHECK(std::isnan(a.summary.max_self_heating_k));
}

TEST_CASE("a bare thermistor's sensitivity is |dR/dT| = B·R/T² from the beta equation") {
    // Hand at 25 °C: 3500 · 10000 / 298.15² = 393.7299185 Ω/K.
    const rtline::Grid grid = rtline::make_grid(kHand, span_c(0.0, 50.0), 25.0);
    const rtline::Analysis a = rtline::analyze(grid, kHand, circuit(Topology::bare), LineKind::endpoint, 0.0);
    CHECK(rel_close(a.points[1].sensitivity_per_k, 393.7299185, 1e-8));
    // B·R/T² falls with T: largest at 0 °C, smallest at 50 °C.
    CHECK(rel_close(a.summary.sensitivity_max_per_k, 3500.0 * 29282.79150 / (273.15 * 273.15), 1e-8));
    CHECK(rel_close(a.summary.sensitivity_min_per_k, 3500.0 * 4032.598923 / (323.15 * 323.15), 1e-8));
}

TEST_CASE("a divider-low's sensitivity matches the analytic derivative at every point") {
    // v = R/(rs + R), dv/dR = rs/(rs + R)², dR/dT = −B·R/T² (beta equation): |dv/dT| = rs·B·R/(T²(rs + R)²).
    const double rs = 10e3;
    const rtline::Grid grid = rtline::make_grid(kNtc, span_c(-20.0, 80.0), 10.0);
    const rtline::Analysis a = rtline::analyze(grid, kNtc, circuit(Topology::divider_low, rs), LineKind::best_fit, 0.0);
    double lo = INFINITY;
    double hi = 0.0;
    for (const rtline::PointResult& p : a.points) {
        const double want = rs * 3950.0 * p.r_t_ohm / (p.t_k * p.t_k * (rs + p.r_t_ohm) * (rs + p.r_t_ohm));
        CAPTURE(p.t_k);
        // 1e-8: a central difference with h = 1e-6·R_T errs by ~h² in truncation and ~1e-10 in rounding.
        CHECK(rel_close(p.sensitivity_per_k, want, 1e-8));
        lo = std::min(lo, want);
        hi = std::max(hi, want);
    }
    CHECK(rel_close(a.summary.sensitivity_min_per_k, lo, 1e-8));
    CHECK(rel_close(a.summary.sensitivity_max_per_k, hi, 1e-8));
}

TEST_CASE("a driven divider's thermistor power is V²·R_T/(rs + R_T)², at most V²/(4·rs) where R_T = rs") {
    // docs/sources.md (dissipation): P = V²·R_T/(R + R_T)², largest V²/(4R) at R_T = R. With 3.3 V and
    // rs = 10 kΩ = R25 the grid holds R_T = rs at 25 °C: 3.3²/40000 = 2.7225e-4 W.
    const double rs = 10e3;
    Circuit c = circuit(Topology::divider_low, rs);
    c.excitation = {Drive::voltage, 3.3};
    const rtline::Grid grid = rtline::make_grid(kNtc, span_c(0.0, 50.0), 5.0);
    const rtline::Analysis a = rtline::analyze(grid, kNtc, c, LineKind::endpoint, 0.0);
    for (const rtline::PointResult& p : a.points) {
        const double v_t = 3.3 * p.r_t_ohm / (rs + p.r_t_ohm);  // the thermistor's share of the supply
        CAPTURE(p.t_k);
        CHECK(rel_close(p.power_w, v_t * v_t / p.r_t_ohm, 1e-12));
        CHECK(rel_close(p.power_w, 3.3 * 3.3 * p.r_t_ohm / ((rs + p.r_t_ohm) * (rs + p.r_t_ohm)), 1e-12));
        CHECK(p.power_w <= 2.7225e-4 * (1.0 + 1e-12));
    }
    CHECK(rel_close(a.summary.max_power_w, 2.7225e-4, 1e-12));
    CHECK(std::isnan(a.summary.max_self_heating_k));  // no dissipation constant given
}

TEST_CASE("self-heating is the power over the dissipation constant, P/δ") {
    // δ = 1.5 mW/K (a small epoxy chip, common practice, docs/sources.md). Largest: 2.7225e-4/1.5e-3 = 0.1815 K.
    Circuit c = circuit(Topology::divider_high, 10e3);
    c.excitation = {Drive::voltage, 3.3};
    const rtline::Grid grid = rtline::make_grid(kNtc, span_c(0.0, 50.0), 5.0);
    const rtline::Analysis a = rtline::analyze(grid, kNtc, c, LineKind::endpoint, 1.5e-3);
    for (const rtline::PointResult& p : a.points) CHECK(rel_close(p.self_heating_k, p.power_w / 1.5e-3, 1e-12));
    CHECK(rel_close(a.summary.max_self_heating_k, 0.1815, 1e-12));
}

TEST_CASE("a current-driven bare thermistor reads I·R_T and dissipates V²/R_T = I²·R_T") {
    Circuit c = circuit(Topology::bare);
    c.excitation = {Drive::current, 100e-6};
    const rtline::Grid grid = rtline::make_grid(kNtc, span_c(-10.0, 40.0), 10.0);
    const rtline::Analysis a = rtline::analyze(grid, kNtc, c, LineKind::endpoint, 2e-3);
    for (const rtline::PointResult& p : a.points) {
        CHECK(rel_close(p.output, 100e-6 * p.r_t_ohm, 1e-14));  // Ohm's law
        CHECK(rel_close(p.power_w, p.output * p.output / p.r_t_ohm, 1e-12));
        CHECK(rel_close(p.power_w, 1e-8 * p.r_t_ohm, 1e-12));
    }
    // Largest at the coldest point, R(−10 °C) = 10000·exp(3950·(1/263.15 − 1/298.15)).
    const double r_cold = 10e3 * std::exp(3950.0 * (1.0 / 263.15 - 1.0 / 298.15));
    CHECK(rel_close(a.summary.max_power_w, 1e-8 * r_cold, 1e-12));
    CHECK(rel_close(a.summary.max_self_heating_k, 1e-8 * r_cold / 2e-3, 1e-12));
}

TEST_CASE("each point's deviation is output − line, its %FSD over the span and its °C error over the slope") {
    const rtline::Grid grid = rtline::make_grid(kNtc, span_c(-20.0, 60.0), 4.0);
    for (const LineKind k : {LineKind::endpoint, LineKind::best_fit, LineKind::minimax}) {
        CAPTURE(rtline::line_name(k));
        const rtline::Analysis a = rtline::analyze(grid, kNtc, circuit(Topology::divider_high, 6.8e3), k, 0.0);
        const double fs = std::abs(a.points.back().output - a.points.front().output);
        double worst = 0.0;
        for (const rtline::PointResult& p : a.points) {
            CHECK(p.ideal == doctest::Approx(a.line.at(p.t_k)).epsilon(1e-14));
            CHECK(std::abs(p.deviation - (p.output - p.ideal)) <= 1e-12 * fs);
            CHECK(p.nonlinearity_pct_fsd == doctest::Approx(p.deviation / fs * 100.0).epsilon(1e-14));
            CHECK(p.error_k == doctest::Approx(p.deviation / a.line.slope).epsilon(1e-14));
            worst = std::max(worst, std::abs(p.nonlinearity_pct_fsd));
        }
        CHECK(a.summary.max_nonlinearity_pct_fsd == worst);
        CHECK(a.summary.output_span == doctest::Approx(fs).epsilon(1e-15));
        // The same figure as the sizing objective computes (linearity module, Bentley's %FSD).
        std::vector<double> y;
        for (const rtline::PointResult& p : a.points) y.push_back(p.output);
        CHECK(a.summary.max_nonlinearity_pct_fsd ==
              doctest::Approx(rtline::max_nonlinearity_pct_fsd(grid.t_k, y, k)).epsilon(1e-9));
    }
}

TEST_CASE("a bridge completed for a null at a temperature reads zero there") {
    const double null_k = rtline::celsius_to_kelvin(5.0);
    const double r_null = kNtc.resistance(null_k);
    Circuit c;
    c.topology = Topology::bridge;
    c.r1 = 10e3;
    rtline::complete_bridge(c, kNtc, null_k);
    CHECK(c.r2 == 10e3);    // r2 = r1
    CHECK(c.r3 == r_null);  // r3 = R_T(null)
    CHECK(std::abs(rtline::output(c, r_null)) < 1e-15);
    // A given r2: the Wheatstone balance r1/R_T = r2/r3 sets r3 = r2·R_T/r1.
    Circuit given = c;
    given.r2 = 12e3;
    given.r3 = 0.0;
    rtline::complete_bridge(given, kNtc, null_k);
    CHECK(given.r3 == doctest::Approx(1.2 * r_null).epsilon(1e-15));
    CHECK(std::abs(rtline::output(given, r_null)) < 1e-15);
    // The shunt-bridge balances against R_T ∥ rp.
    Circuit sb = c;
    sb.topology = Topology::shunt_bridge;
    sb.rp = 33e3;
    sb.r3 = 0.0;
    rtline::complete_bridge(sb, kNtc, null_k);
    CHECK(sb.r3 == doctest::Approx(r_null * 33e3 / (r_null + 33e3)).epsilon(1e-15));
    CHECK(std::abs(rtline::output(sb, r_null)) < 1e-15);
}

TEST_CASE("an output that does not change over the span is an InputError naming the topology") {
    // A hand-made grid whose two resistances are equal: the divider reads the same at both ends.
    rtline::Grid grid;
    grid.t_k = {290.0, 300.0};
    grid.r_ohm = {10e3, 10e3};
    try {
        (void)rtline::analyze(grid, kNtc, circuit(Topology::divider_low, 10e3), LineKind::endpoint, 0.0);
        FAIL("no error for a zero full-scale output");
    } catch (const rtline::InputError& e) {
        CHECK(e.input() == rtline::Input::topology);
        CHECK(e.value() == "divider-low");
        CHECK(std::string(e.what()).find("zero full-scale output") != std::string::npos);
    }
}
