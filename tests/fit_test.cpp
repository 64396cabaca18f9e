// Fitting thermistor models to R–T points: Steinhart–Hart through three points and by least squares,
// and the beta model by least squares. Points are generated in the test from coefficients of our own;
// the weighted least-squares problems are solved independently by numpy.linalg.lstsq
// (tests/ref/sh_lstsq.py) from the equations stated in include/rtline/fit.hpp.
#include <doctest/doctest.h>

#include <cmath>
#include <vector>

#include "rtline/error.hpp"
#include "rtline/fit.hpp"
#include "support.hpp"

using namespace rtline;

namespace {

// Our own plausible coefficient sets (10 kΩ-class NTC magnitudes; no datasheet values).
const SteinhartHart kBattery{1.10e-3, 2.40e-4, 1.00e-7};
const SteinhartHart kFreezer{1.40e-3, 2.37e-4, 0.99e-7};

std::vector<RtPoint> points_from(const SteinhartHart& m, const std::vector<double>& t_c) {
    std::vector<RtPoint> pts;
    for (const double t : t_c) pts.push_back({celsius_to_kelvin(t), sh_resistance(m, celsius_to_kelvin(t))});
    return pts;
}

std::vector<double> every(double lo_c, double hi_c, double step_c) {
    std::vector<double> t;
    for (double x = lo_c; x <= hi_c + 1e-9; x += step_c) t.push_back(x);
    return t;
}

// Each resistance moved by a fixed, deterministic pattern of ±0.3 % (a measured table's scatter, our own
// numbers; keeps R strictly falling for points 5 K apart).
std::vector<RtPoint> perturbed(std::vector<RtPoint> pts) {
    const double pattern[] = {+0.003, -0.002, +0.001, -0.003, +0.002, 0.0, -0.001};
    for (std::size_t i = 0; i < pts.size(); ++i) pts[i].r_ohm *= 1.0 + pattern[i % 7];
    return pts;
}

nlohmann::json points_json(const std::vector<RtPoint>& pts) {
    nlohmann::json arr = nlohmann::json::array();
    for (const RtPoint& p : pts) arr.push_back({{"t_k", p.t_k}, {"r_ohm", p.r_ohm}});
    return arr;
}

double rel(double got, double want) { return std::abs(got - want) / std::abs(want); }

// The message of the InputError that `fit` throws, or "accepted" when it throws none.
template <class Fit>
std::string refusal(Fit&& fit) {
    try {
        (void)fit();
    } catch (const InputError& e) {
        return e.what();
    }
    return "accepted";
}

}  // namespace

TEST_CASE("three-point Steinhart-Hart coefficients reproduce their three points within 1 uK") {
    // The closed form of docs/sources.md (Lᵢ = ln Rᵢ, Yᵢ = 1/Tᵢ, γ₂, γ₃, C, B, A); points of our own.
    struct Case {
        RtPoint p1, p2, p3;
    };
    const Case cases[] = {
        {{248.15, 87.0e3}, {298.15, 10.0e3}, {348.15, 1.7e3}},  // -25, 25, 75 °C
        {{233.15, 336e3}, {273.15, 32.6e3}, {323.15, 3.6e3}},   // -40, 0, 50 °C
        {{263.15, 48e3}, {268.15, 37e3}, {273.15, 29e3}},       // a narrow freezer span
    };
    for (const Case& c : cases) {
        const SteinhartHart m = steinhart_hart_three_point(c.p1, c.p2, c.p3);
        for (const RtPoint& p : {c.p1, c.p2, c.p3}) {
            INFO("point " << kelvin_to_celsius(p.t_k) << " degC, " << p.r_ohm << " ohm");
            CHECK(std::abs(sh_temperature(m, p.r_ohm) - p.t_k) < 1e-6);
            CHECK(sh_resistance(m, p.t_k) == doctest::Approx(p.r_ohm).epsilon(1e-9));
        }
    }
}

TEST_CASE("three points taken from known coefficients give those coefficients back") {
    // Points on 1/T = A + B·L + C·L³ determine A, B, C uniquely (three equations, three unknowns).
    const std::vector<RtPoint> pts = points_from(kBattery, {-20.0, 25.0, 80.0});
    const SteinhartHart m = steinhart_hart_three_point(pts[0], pts[1], pts[2]);
    CHECK(rel(m.a, kBattery.a) < 1e-9);
    CHECK(rel(m.b, kBattery.b) < 1e-9);
    CHECK(rel(m.c, kBattery.c) < 1e-9);  // C·L³ is only ~2 % of 1/T at 25 °C, yet fully determined
    const ShFit fit = fit_steinhart_hart(pts);
    CHECK(fit.max_residual_k < 1e-6);
}

TEST_CASE("least squares on points from known coefficients recovers them with ~0 residuals") {
    for (const SteinhartHart& known : {kBattery, kFreezer}) {
        const ShFit fit = fit_steinhart_hart(points_from(known, every(-40.0, 125.0, 5.0)));
        INFO("A,B,C = " << known.a << "," << known.b << "," << known.c);
        CHECK(rel(fit.model.a, known.a) < 1e-9);
        CHECK(rel(fit.model.b, known.b) < 1e-9);
        CHECK(rel(fit.model.c, known.c) < 1e-9);
        CHECK(fit.max_residual_k < 1e-6);
        CHECK(fit.residuals.size() == 34);  // -40, -35, …, 125
    }
}

TEST_CASE("the Steinhart-Hart fit reports each residual as T_model(R) - T and the largest of them") {
    const std::vector<RtPoint> pts = perturbed(points_from(kBattery, every(-30.0, 90.0, 5.0)));
    const ShFit fit = fit_steinhart_hart(pts);
    REQUIRE(fit.residuals.size() == pts.size());
    double largest = 0.0;
    for (std::size_t i = 0; i < pts.size(); ++i) {
        const Residual& r = fit.residuals[i];
        CHECK(r.t_k == pts[i].t_k);
        CHECK(r.r_ohm == pts[i].r_ohm);
        // The forward equation of the fitted coefficients (Steinhart & Hart 1968).
        CHECK(r.residual_k == doctest::Approx(sh_temperature(fit.model, r.r_ohm) - r.t_k).epsilon(1e-12));
        largest = std::max(largest, std::abs(r.residual_k));
    }
    CHECK(fit.max_residual_k == largest);
    CHECK(fit.max_residual_k > 1e-3);  // 0.3 % in R is ~0.07 K at B ≈ 4000 K: visibly non-zero
}

TEST_CASE("least squares on scattered points matches numpy.linalg.lstsq on the same weighted problem") {
    for (const SteinhartHart& known : {kBattery, kFreezer}) {
        const std::vector<RtPoint> pts = perturbed(points_from(known, every(-40.0, 125.0, 5.0)));
        const ShFit fit = fit_steinhart_hart(pts);
        // numpy: rows weighted by T², columns [1, ln R, ln³R], target 1/T (fit.hpp).
        const nlohmann::json ref =
            rtline::test::python_ref("sh_lstsq.py", {{"model", "sh"}, {"points", points_json(pts)}});
        INFO("A,B,C = " << known.a << "," << known.b << "," << known.c);
        CHECK(ref["rank"] == 3);
        CHECK(rel(fit.model.a, ref["a"].get<double>()) < 1e-9);
        CHECK(rel(fit.model.b, ref["b"].get<double>()) < 1e-9);
        CHECK(rel(fit.model.c, ref["c"].get<double>()) < 1e-9);
    }
}

TEST_CASE("the beta fit on points from a beta model recovers R0 and B with ~0 residuals") {
    // Points from R = R0·exp(B(1/T − 1/T0)) with our own R0 = 22 kΩ, B = 3700 K (as Steinhart–Hart,
    // A = 1/T0 − ln R0/B, B_sh = 1/B, C = 0: docs/sources.md).
    const BetaModel known{22e3, 298.15, 3700.0};
    const std::vector<RtPoint> pts = points_from(to_steinhart_hart(known), every(-20.0, 100.0, 10.0));
    const BetaFit fit = fit_beta(pts, 298.15);
    CHECK(rel(fit.model.r0_ohm, known.r0_ohm) < 1e-9);
    CHECK(rel(fit.model.b_k, known.b_k) < 1e-9);
    CHECK(fit.model.t0_k == 298.15);
    CHECK(fit.max_residual_k < 1e-6);
}

TEST_CASE("the beta fit states R0 at the requested T0") {
    // The same beta curve stated at 0 °C: R(273.15 K) = 22e3·exp(3700·(1/273.15 − 1/298.15)), the
    // beta equation; 3700 × 3.0697569e-4 = 1.1358101, e^1.1358101 = 3.1136948 ⇒ 68 501.29 Ω.
    const BetaModel known{22e3, 298.15, 3700.0};
    const BetaFit fit = fit_beta(points_from(to_steinhart_hart(known), every(-20.0, 100.0, 10.0)), 273.15);
    CHECK(fit.model.r0_ohm == doctest::Approx(68501.29).epsilon(1e-7));
    CHECK(fit.model.b_k == doctest::Approx(3700.0).epsilon(1e-9));
}

TEST_CASE("the beta fit on Steinhart-Hart points matches numpy.linalg.lstsq on the same weighted problem") {
    // Problem: 1/T = a + (1/B)·ln R, rows weighted by T² (fit.hpp); R0 = exp(B·(1/T0 − a)).
    const std::vector<RtPoint> pts = perturbed(points_from(kBattery, every(-30.0, 110.0, 5.0)));
    const BetaFit fit = fit_beta(pts, 298.15);
    const nlohmann::json ref =
        rtline::test::python_ref("sh_lstsq.py", {{"model", "beta"}, {"points", points_json(pts)}, {"t0_k", 298.15}});
    CHECK(ref["rank"] == 2);
    CHECK(rel(fit.model.b_k, ref["b_k"].get<double>()) < 1e-9);
    CHECK(rel(fit.model.r0_ohm, ref["r0_ohm"].get<double>()) < 1e-9);
    // The beta model cannot follow the C·ln³R curvature: its residuals are far from zero.
    CHECK(fit.max_residual_k > 0.1);
}

TEST_CASE("the beta fit's residuals are T_model(R) - T by the beta equation's inverse") {
    const std::vector<RtPoint> pts = points_from(kFreezer, every(-40.0, 10.0, 5.0));
    const BetaFit fit = fit_beta(pts, 298.15);
    const BetaModel& m = fit.model;
    for (const Residual& r : fit.residuals) {
        // 1/T = 1/T0 + ln(R/R0)/B (the beta equation solved for T).
        const double t_model = 1.0 / (1.0 / m.t0_k + std::log(r.r_ohm / m.r0_ohm) / m.b_k);
        CHECK(r.residual_k == doctest::Approx(t_model - r.t_k).epsilon(1e-9));
    }
}

TEST_CASE("a Steinhart-Hart fit to fewer than three points is an InputError") {
    const std::vector<RtPoint> two = points_from(kBattery, {0.0, 25.0});
    CHECK_THROWS_AS((void)fit_steinhart_hart(two), InputError);
    CHECK_THROWS_AS((void)fit_steinhart_hart({}), InputError);
    CHECK(refusal([&] { return fit_steinhart_hart(two); }) ==
          "the R-T points '2 points': a Steinhart-Hart fit needs at least 3 R-T points");
}

TEST_CASE("a beta fit to fewer than two points is an InputError") {
    CHECK_THROWS_AS((void)fit_beta(points_from(kBattery, {25.0}), 298.15), InputError);
}

TEST_CASE("points that do not determine the coefficients are an InputError, not NaN") {
    // Four points with only two distinct resistances: columns [1, L, L³] have rank 2.
    const std::vector<RtPoint> two_values = {{273.15, 30e3}, {283.15, 30e3}, {293.15, 12e3}, {303.15, 12e3}};
    CHECK_THROWS_AS((void)fit_steinhart_hart(two_values), InputError);
    // One resistance at two temperatures: the beta columns [1, L] have rank 1.
    CHECK_THROWS_AS((void)fit_beta({{273.15, 30e3}, {298.15, 30e3}}, 298.15), InputError);
    // ln R = −1, 0, 1 (R = 1/e, 1, e Ω): L₁ + L₂ + L₃ = 0, so [1, L, L³] has two equal columns
    // (L = L³ at −1, 0, 1) and the three-point formula's denominator vanishes.
    const std::vector<RtPoint> centred = {{273.15, std::exp(1.0)}, {298.15, 1.0}, {323.15, std::exp(-1.0)}};
    CHECK_THROWS_AS((void)fit_steinhart_hart(centred), InputError);
}

TEST_CASE("a beta fit to a rising resistance is an InputError naming the points") {
    // A PTC-like table gives 1/B < 0: no NTC B-value describes it.
    CHECK(refusal([&] {
              return fit_beta({{273.15, 10e3}, {298.15, 20e3}, {323.15, 40e3}}, 298.15);
          }) == "the R-T points '3 points': the beta fit gives no positive B-value");
}

TEST_CASE("a fit that cannot give back one of its points is an InputError, not an infinite residual") {
    // A temperature typed as 5.6e57 °C among ordinary points (a case the R-T fuzzer found): through the
    // three points exactly, 1/T at 1 ohm (L = 0) is the coefficient a, which should be 1/T3 = 1.8e-58 but
    // is far below the rounding of the other points' 1/T of 3e-3 (by hand): a comes out 0 (T infinite)
    // or a few 1e-19 (an exact fit that misses its point by orders of magnitude). Both are refused.
    const std::vector<RtPoint> typo = {{319.15, 10e3}, {333.15, 8.7e3}, {celsius_to_kelvin(5.555556e57), 1.0}};
    CHECK(refusal([&] { return fit_steinhart_hart(typo); }) ==
          "the R-T points '3 points': the Steinhart-Hart fit cannot give back the temperature of the point at "
          "5.55556e+57 \xC2\xB0"
          "C (1 ohm); check the points' temperatures");
}

TEST_CASE("a Steinhart-Hart fit that turns back between its points is an InputError naming the span") {
    // Through 1e300, 1e-300 and 1e-301 ohm at 0, 25 and 50 °C the exact coefficients have b < 0 and a
    // large c (by the closed form): 1/T against ln R is not monotonic between the points.
    CHECK(refusal([&] {
              return fit_steinhart_hart({{273.15, 1e300}, {298.15, 1e-300}, {323.15, 1e-301}});
          }) ==
          "the R-T points '3 points': the Steinhart-Hart fit does not give a resistance that falls monotonically "
          "from 0 to 50 \xC2\xB0"
          "C; check the points, or use the beta model");
}

TEST_CASE("a beta fit whose R0 at T0 overflows a double says so and how to avoid it") {
    // Points 1e-5 and 2e-5 K apart near 300 K whose R spans 200 decades: B = ln(1e200)/(1/300 − 1/300.00003)
    // ≈ 1.4e12 K (by hand), and R0 at 25 °C = R·exp(B·(1/298.15 − 1/300)) = exp(2.9e7): not a double.
    CHECK(refusal([&] {
              return fit_beta({{300.0, 1e200}, {300.00001, 1e100}, {300.00003, 1.0}}, 298.15);
          }) ==
          "the R-T points '3 points': the beta fit's R0 at 25 \xC2\xB0"
          "C is beyond the range of a double; state R0 "
          "at a temperature among the points (T0)");
}
