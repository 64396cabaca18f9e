// The thermistor models: the beta equation, Steinhart–Hart with its closed-form inverse, and the
// table model. Check values come from hand calculations written out beside them, the published
// equations in docs/sources.md, and scipy.interpolate.PchipInterpolator (tests/ref/pchip.py).
// Coefficient sets are our own, of the magnitudes a 10 kΩ-class NTC has (A ≈ 1e-3, B ≈ 2.4e-4,
// C ≈ 1e-7); no datasheet values.
#include <doctest/doctest.h>

#include <cmath>
#include <vector>

#include "rtline/error.hpp"
#include "rtline/thermistor.hpp"
#include "support.hpp"

using namespace rtline;

namespace {

// Our own plausible Steinhart–Hart sets: typical, C = 0, and a small negative C.
const SteinhartHart kShSets[] = {
    {1.10e-3, 2.40e-4, 1.00e-7}, {1.40e-3, 2.37e-4, 0.99e-7}, {0.90e-3, 2.60e-4, 1.50e-7},
    {1.00e-3, 2.60e-4, 0.0},     {1.20e-3, 2.50e-4, -2.0e-8},
};

// Points of an R–T table generated from a model of our own at the given °C.
std::vector<RtPoint> points_from(const SteinhartHart& m, const std::vector<double>& t_c) {
    std::vector<RtPoint> pts;
    for (const double t : t_c) pts.push_back({celsius_to_kelvin(t), sh_resistance(m, celsius_to_kelvin(t))});
    return pts;
}

// A table with uneven spacing, -40 … 125 °C, from the first coefficient set.
std::vector<RtPoint> uneven_table() {
    return points_from(kShSets[0], {-40, -30, -25, -10, 0, 5, 20, 25, 40, 60, 65, 85, 100, 125});
}

// Central finite difference of ln R at t_k (step h in kelvin): the textbook second-order formula.
double fd_alpha(const Thermistor& th, double t_k, double h = 1e-3) {
    return (std::log(th.resistance(t_k + h)) - std::log(th.resistance(t_k - h))) / (2.0 * h);
}

}  // namespace

TEST_CASE("the beta model gives the hand-calculated resistance at 0 degC") {
    // R0 = 10 kΩ at T0 = 298.15 K, B = 3500 K, T = 273.15 K:
    //   1/T − 1/T0 = (T0 − T)/(T·T0) = 25 / (273.15 × 298.15) = 25 / 81439.6725 = 3.0697569e-4 K⁻¹
    //   B·(1/T − 1/T0) = 3500 × 3.0697569e-4 = 1.0744149
    //   exp(1.0744149) = 2.9282791  ⇒  R = 29 282.79 Ω
    const Thermistor th(BetaModel{10e3, 298.15, 3500.0});
    CHECK(th.resistance(273.15) == doctest::Approx(29282.79).epsilon(1e-7));
    // At T0 itself the exponent is zero: R = R0 exactly.
    CHECK(th.resistance(298.15) == doctest::Approx(10e3).epsilon(1e-15));
}

TEST_CASE("the beta model's inverse gives the hand-calculated temperature at 5 kOhm") {
    // 1/T = 1/T0 + ln(R/R0)/B = 1/298.15 + ln(0.5)/3500 = 3.3540164e-3 − 1.9804205e-4 = 3.1559744e-3
    //   T = 316.85935 K (43.70935 °C)
    const Thermistor th(BetaModel{10e3, 298.15, 3500.0});
    CHECK(th.temperature(5e3) == doctest::Approx(316.85935).epsilon(1e-8));
    CHECK(th.temperature(th.resistance(250.0)) == doctest::Approx(250.0).epsilon(1e-14));
}

TEST_CASE("the beta model's inverse holds for a resistance 400 decades from R0") {
    // R/R0 = 1e-200/1e200 = 1e-400 underflows a double, but ln(R/R0) = −400·ln 10 = −921.0340372 does not:
    // 1/T = 1/300 − 921.0340372/1e12 (the defining equation, by hand) gives T = 300.0000829 K, not 0.
    const BetaModel m{1e200, 300.0, 1e12};
    const double want = 1.0 / (1.0 / 300.0 - 400.0 * std::log(10.0) / 1e12);
    CHECK(want == doctest::Approx(300.0000829).epsilon(1e-9));
    CHECK(beta_temperature(m, 1e-200) == doctest::Approx(want).epsilon(1e-12));
    CHECK(Thermistor(m).temperature(1e-200) == doctest::Approx(want).epsilon(1e-12));
    // An ordinary ratio keeps the one logarithm: to the last bit the beta equation's inverse as
    // docs/sources.md writes it, 1/T = 1/T0 + ln(R/R0)/B.
    CHECK(beta_temperature(BetaModel{10e3, 298.15, 3500.0}, 5e3) == 1.0 / (1.0 / 298.15 + std::log(0.5) / 3500.0));
}

TEST_CASE("the B-value between two temperatures recovers B for the beta model") {
    // B = ln(R1/R2)/(1/T1 − 1/T2) (docs/sources.md: B-value between two temperatures); for the beta model
    // ln(R1/R2) = B·(1/T1 − 1/T2), so the ratio is B itself for any pair.
    const Thermistor th(BetaModel{10e3, 298.15, 3950.0});
    CHECK(beta_between(th, 298.15, 358.15) == doctest::Approx(3950.0).epsilon(1e-12));  // B25/85
    CHECK(beta_between(th, 298.15, 323.15) == doctest::Approx(3950.0).epsilon(1e-12));  // B25/50
    CHECK(beta_between(th, 233.15, 273.15) == doctest::Approx(3950.0).epsilon(1e-12));
}

TEST_CASE("the B-value of a Steinhart-Hart model with C = 0 is 1/B_sh between any two temperatures") {
    // With C = 0, 1/T = A + B_sh·ln R, so ln(R1/R2)/(1/T1 − 1/T2) = 1/B_sh = 1/2.6e-4 = 3846.15 K.
    const Thermistor th(kShSets[3]);
    CHECK(beta_between(th, 298.15, 358.15) == doctest::Approx(1.0 / 2.6e-4).epsilon(1e-10));
    CHECK(beta_between(th, 298.15, 323.15) == doctest::Approx(1.0 / 2.6e-4).epsilon(1e-10));
}

TEST_CASE("alpha of the beta model is -B/T^2") {
    // alpha = (1/R)·dR/dT = −B/T² (docs/sources.md). At 0 °C with B = 3500 K:
    //   −3500 / 273.15² = −3500 / 74610.9225 = −0.04691002 K⁻¹
    const Thermistor th(BetaModel{10e3, 298.15, 3500.0});
    CHECK(th.alpha(273.15) == doctest::Approx(-0.04691002).epsilon(1e-7));
    for (const double t : {233.15, 298.15, 373.15}) {
        CHECK(th.alpha(t) == doctest::Approx(-3500.0 / (t * t)).epsilon(1e-14));
        CHECK(th.local_beta(t) == doctest::Approx(3500.0).epsilon(1e-12));
    }
}

TEST_CASE("alpha of a Steinhart-Hart model matches a central finite difference of ln R") {
    // d ln R/dT by (ln R(T+h) − ln R(T−h))/2h, h = 1 mK: truncation ~h²·|d³lnR/dT³|/6 < 1e-12,
    // rounding ~1e-16·ln R/h ≈ 1e-12, both far below the 1e-8 relative tolerance.
    for (const SteinhartHart& m : kShSets) {
        const Thermistor th(m);
        for (double t_c = -55.0; t_c <= 150.0; t_c += 12.5) {
            const double t = celsius_to_kelvin(t_c);
            INFO("A,B,C = " << m.a << "," << m.b << "," << m.c << " at " << t_c << " degC");
            CHECK(th.alpha(t) == doctest::Approx(fd_alpha(th, t)).epsilon(1e-8));
        }
    }
}

TEST_CASE("alpha of the table model matches a central finite difference of ln R") {
    const Thermistor th{TableModel(uneven_table())};
    // Off-node temperatures inside segments; the interpolant is C¹ so nodes would do as well.
    for (double t_c = -37.0; t_c <= 122.0; t_c += 7.0) {
        const double t = celsius_to_kelvin(t_c);
        INFO("at " << t_c << " degC");
        CHECK(th.alpha(t) == doctest::Approx(fd_alpha(th, t)).epsilon(1e-7));
    }
}

TEST_CASE("Steinhart-Hart R(T) then T(R) round-trips within 1 uK from -55 to 150 degC") {
    // The closed-form (Cardano) inverse against the forward form 1/T = A + B·ln R + C·ln³R
    // (Steinhart & Hart 1968); 1 µK is the issue's requirement.
    for (const SteinhartHart& m : kShSets) {
        double worst = 0.0;
        for (double t_c = -55.0; t_c <= 150.0; t_c += 0.5) {
            const double t = celsius_to_kelvin(t_c);
            const double r = sh_resistance(m, t);
            REQUIRE(std::isfinite(r));
            worst = std::max(worst, std::abs(sh_temperature(m, r) - t));
        }
        INFO("A,B,C = " << m.a << "," << m.b << "," << m.c);
        CHECK(worst < 1e-6);
    }
}

TEST_CASE("Steinhart-Hart R(T) satisfies the forward equation at every temperature") {
    // 1/T − (A + B·L + C·L³) = 0 with L = ln R(T): the cubic's residual, relative to 1/T.
    for (const SteinhartHart& m : kShSets) {
        for (double t_c = -55.0; t_c <= 150.0; t_c += 5.0) {
            const double t = celsius_to_kelvin(t_c);
            const double l = std::log(sh_resistance(m, t));
            INFO("A,B,C = " << m.a << "," << m.b << "," << m.c << " at " << t_c << " degC");
            CHECK(std::abs((m.a + m.b * l + m.c * l * l * l) * t - 1.0) < 1e-12);
        }
    }
}

TEST_CASE("the beta model written as Steinhart-Hart has the published coefficients") {
    // A = 1/T0 − ln(R0)/B, B_sh = 1/B, C = 0 (docs/sources.md). R0 = 10 kΩ, T0 = 298.15 K, B = 3500 K:
    //   1/298.15 = 3.35401644e-3; ln(1e4) = 9.21034037; 9.21034037/3500 = 2.63152582e-3
    //   A = 7.2249062e-4;  B_sh = 1/3500 = 2.85714286e-4
    const SteinhartHart sh = to_steinhart_hart(BetaModel{10e3, 298.15, 3500.0});
    CHECK(sh.a == doctest::Approx(7.2249062e-4).epsilon(1e-7));
    CHECK(sh.b == doctest::Approx(2.85714286e-4).epsilon(1e-8));
    CHECK(sh.c == 0.0);
}

TEST_CASE("the beta model written as Steinhart-Hart gives the same resistance and temperature") {
    const BetaModel beta{10e3, 298.15, 3500.0};
    const Thermistor as_beta(beta);
    const Thermistor as_sh(to_steinhart_hart(beta));
    for (double t_c = -55.0; t_c <= 150.0; t_c += 5.0) {
        const double t = celsius_to_kelvin(t_c);
        INFO("at " << t_c << " degC");
        CHECK(as_sh.resistance(t) == doctest::Approx(as_beta.resistance(t)).epsilon(1e-11));
        CHECK(as_sh.alpha(t) == doctest::Approx(as_beta.alpha(t)).epsilon(1e-11));
        const double r = as_beta.resistance(t);
        CHECK(as_sh.temperature(r) == doctest::Approx(t).epsilon(1e-12));
    }
}

TEST_CASE("check_span rejects a span outside the table's points and accepts one inside") {
    const Thermistor th{TableModel(points_from(kShSets[0], {0, 10, 20, 30, 40, 50}))};
    CHECK_NOTHROW(th.check_span(Span{273.15, 323.15}, rtline::Input::span));  // 0:50, the table's own ends
    CHECK_NOTHROW(th.check_span(Span{283.15, 303.15}, rtline::Input::span));
    CHECK_THROWS_AS(th.check_span(Span{263.15, 293.15}, rtline::Input::span), InputError);  // -10:20
    CHECK_THROWS_AS(th.check_span(Span{293.15, 333.15}, rtline::Input::span), InputError);  // 20:60
    try {
        th.check_span(Span{263.15, 293.15}, rtline::Input::span);
        FAIL("a span outside the table was accepted");
    } catch (const InputError& e) {
        CHECK(e.input() == rtline::Input::span);
        CHECK(std::string(e.what()) ==
              "the span '-10:20': outside the R-T table, which covers 0 to 50 \xC2\xB0"
              "C");
    }
}

TEST_CASE("check_span rejects Steinhart-Hart coefficients that are not monotonic over the span") {
    // d(1/T)/d ln R = B + 3C·L² must stay positive. With B = 2.4e-4 and C = −1e-6 it is zero at
    // L² = 2.4e-4/3e-6 = 80, L = 8.94 (R ≈ 7.7 kΩ). The monotone branch ends there, at
    // 1/T = 1e-3 + 2.4e-4·8.94 − 1e-6·8.94³ = 1e-3 + 2.146e-3 − 0.715e-3 = 2.431e-3 K⁻¹ (T = 411 K,
    // 138 °C): colder than that the coefficients give no resistance on it.
    const Thermistor bad(SteinhartHart{1.0e-3, 2.4e-4, -1.0e-6});
    CHECK_THROWS_AS(bad.check_span(Span{243.15, 278.15}, rtline::Input::span), InputError);  // -30:5
    // A negative B with C > 0 is not monotone near L = 0 (B + 3C·0 < 0; turning point at
    // L² = 1e-5/3e-6, |L| = 1.83): a span whose ln R crosses zero (0:100 °C) is rejected.
    const Thermistor negative_b(SteinhartHart{3.0e-3, -1.0e-5, 1.0e-6});
    CHECK_THROWS_AS(negative_b.check_span(Span{273.15, 373.15}, rtline::Input::span), InputError);
    // Where ln R stays beyond that turning point the same coefficients are monotone: 0:40 °C has
    // L from about 8.7 down to 6.0 (1e-6·L³ − 1e-5·L = 1/T − 3e-3 solved by hand), past 1.83.
    CHECK_NOTHROW(negative_b.check_span(Span{273.15, 313.15}, rtline::Input::span));
    const double r20 = negative_b.resistance(293.15);
    CHECK(negative_b.temperature(r20) == doctest::Approx(293.15).epsilon(1e-12));
    // Our ordinary sets pass over the whole -55 … 150 °C.
    for (const SteinhartHart& m : kShSets) CHECK_NOTHROW(Thermistor(m).check_span(Span{218.15, 423.15}, rtline::Input::span));
}

TEST_CASE("the table model agrees with scipy's PchipInterpolator on (1/T, ln R) between the nodes") {
    // Our table interpolates with x = 1/T ascending (T descending) and y = ln R; scipy needs
    // ascending x, so the nodes go to it in that order.
    const std::vector<RtPoint> pts = uneven_table();
    nlohmann::json x = nlohmann::json::array();
    nlohmann::json y = nlohmann::json::array();
    for (auto it = pts.rbegin(); it != pts.rend(); ++it) {
        x.push_back(1.0 / it->t_k);
        y.push_back(std::log(it->r_ohm));
    }
    std::vector<double> t_eval;
    for (double t_c = -39.7; t_c < 125.0; t_c += 1.3) t_eval.push_back(celsius_to_kelvin(t_c));
    nlohmann::json xi = nlohmann::json::array();
    for (const double t : t_eval) xi.push_back(1.0 / t);
    const nlohmann::json ref = rtline::test::python_ref("pchip.py", {{"x", x}, {"y", y}, {"xi", xi}});

    const Thermistor th{TableModel(pts)};
    REQUIRE(ref["yi"].size() == t_eval.size());
    for (std::size_t i = 0; i < t_eval.size(); ++i) {
        const double t = t_eval[i];
        INFO("at " << kelvin_to_celsius(t) << " degC");
        // ln R to 1e-12 absolute (the cubic evaluated in another order rounds differently).
        CHECK(std::log(th.resistance(t)) == doctest::Approx(ref["yi"][i].get<double>()).epsilon(1e-12));
        // alpha = d ln R/dT = (d ln R/dx)·(dx/dT) = −(dy/dx)/T².
        const double alpha_ref = -ref["dyi"][i].get<double>() / (t * t);
        CHECK(th.alpha(t) == doctest::Approx(alpha_ref).epsilon(1e-9));
    }
}

TEST_CASE("the table model passes exactly through its points") {
    const std::vector<RtPoint> pts = uneven_table();
    const Thermistor th{TableModel(pts)};
    for (const RtPoint& p : pts) {
        INFO("at " << kelvin_to_celsius(p.t_k) << " degC");
        CHECK(th.resistance(p.t_k) == doctest::Approx(p.r_ohm).epsilon(1e-13));
        CHECK(th.temperature(p.r_ohm) == doctest::Approx(p.t_k).epsilon(1e-13));
    }
}

TEST_CASE("the table model falls strictly with temperature even between unevenly spaced points") {
    // A table that an ordinary cubic spline would overshoot: a sharp change of slope near 25 °C
    // (own numbers). PCHIP keeps each segment monotone (Fritsch & Carlson 1980).
    const std::vector<RtPoint> pts = {{253.15, 90e3},   {273.15, 32e3},  {293.15, 12.6e3}, {298.15, 10e3},
                                      {299.15, 9.95e3}, {323.15, 3.6e3}, {373.15, 0.68e3}};
    const Thermistor th{TableModel(pts)};
    double previous = th.resistance(253.15);
    for (double t = 253.25; t <= 373.15; t += 0.1) {
        const double r = th.resistance(t);
        INFO("at " << kelvin_to_celsius(t) << " degC");
        CHECK(r < previous);
        previous = r;
    }
}

TEST_CASE("the table model's temperature(resistance(T)) returns T") {
    const Thermistor th{TableModel(uneven_table())};
    for (double t_c = -40.0; t_c <= 125.0; t_c += 0.7) {
        const double t = celsius_to_kelvin(t_c);
        INFO("at " << t_c << " degC");
        CHECK(std::abs(th.temperature(th.resistance(t)) - t) < 1e-9);
    }
}

TEST_CASE("a table of two points is the beta model through them") {
    // Two points: PCHIP is the straight line in (1/T, ln R), i.e. the beta model with
    // B = ln(R1/R2)/(1/T1 − 1/T2) = ln(3) / (1/273.15 − 1/298.15) = 1.0986123 / 3.0697569e-4 = 3578.825 K.
    const Thermistor th{TableModel({{273.15, 30e3}, {298.15, 10e3}})};
    CHECK(th.local_beta(285.0) == doctest::Approx(3578.825).epsilon(1e-6));
    CHECK(th.resistance(285.0) == doctest::Approx(10e3 * std::exp(3578.825 * (1 / 285.0 - 1 / 298.15))).epsilon(1e-6));
}

TEST_CASE("a Thermistor rejects coefficients it cannot use") {
    CHECK_THROWS_AS(Thermistor(BetaModel{0.0, 298.15, 3500.0}), InputError);
    CHECK_THROWS_AS(Thermistor(BetaModel{10e3, 298.15, -3500.0}), InputError);
    CHECK_THROWS_AS(Thermistor(BetaModel{10e3, 0.0, 3500.0}), InputError);
    CHECK_THROWS_AS(Thermistor(SteinhartHart{1e-3, 0.0, 0.0}), InputError);
    CHECK_THROWS_AS(Thermistor(SteinhartHart{1e-3, NAN, 1e-7}), InputError);
}

TEST_CASE("validate_points sorts the points and rejects too few, duplicates and rising resistance") {
    const std::vector<RtPoint> sorted = validate_points({{298.15, 10e3}, {273.15, 30e3}, {323.15, 4e3}}, 3, "t.csv");
    CHECK(sorted.front().t_k == 273.15);
    CHECK(sorted.back().t_k == 323.15);
    struct Case {
        std::vector<RtPoint> points;
        std::size_t min_count;
        const char* message;
    };
    const Case cases[] = {
        {{{273.15, 30e3}, {298.15, 10e3}}, 3, "t.csv '2 points': this model needs at least 3 R-T points"},
        {{{273.15, 30e3}, {273.15, 20e3}}, 2, "t.csv '0 C': duplicate temperature"},
        {{{273.15, 30e3}, {298.15, 30e3}},
         2,
         "t.csv '25 C': an NTC's resistance must fall strictly as temperature rises"},
        {{{273.15, -1.0}, {298.15, 10e3}}, 2, "t.csv '-1 ohm': resistances must be positive"},
        {{{0.0, 30e3}, {298.15, 10e3}}, 2, "t.csv '-273.15 C': is at or below absolute zero (-273.15 C)"},
        // Past 10 000 K, the top of an R-T point's range (kMaxPointK, our own limit).
        {{{298.15, 10e3}, {2e4, 1.0}},
         2,
         "t.csv '19726.8 C': is outside the range of an R-T point, 0.001 to 10000 K (a typing mistake?)"},
    };
    for (const Case& c : cases) {
        INFO("expecting: " << c.message);
        try {
            (void)validate_points(c.points, c.min_count, "t.csv");
            FAIL("accepted");
        } catch (const InputError& e) {
            CHECK(std::string(e.what()) == c.message);
        }
    }
}
