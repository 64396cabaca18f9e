// A program of another project using the installed rtline library: a freezer-room probe's beta model
// (R25 = 10 kΩ, B = 3950 K, values of our own) evaluated, inverted and fitted through the public API,
// each figure checked against the beta equation R = R0·exp(B(1/T − 1/T0)) (T in kelvin; the equation
// and its source are in rtline's docs/sources.md). Exits 0 when every check holds, 1 otherwise.
#include <cmath>
#include <cstdio>
#include <vector>

#include "rtline/fit.hpp"
#include "rtline/thermistor.hpp"
#include "rtline/units.hpp"

namespace {

int failures = 0;

void expect_near(const char* what, double got, double want, double rel) {
    const bool ok = std::abs(got - want) <= rel * std::abs(want);
    std::printf("%s %s: %.9g (expected %.9g)\n", ok ? "ok  " : "FAIL", what, got, want);
    if (!ok) ++failures;
}

}  // namespace

int main() {
    const rtline::BetaModel beta{10e3, rtline::k25CelsiusK, 3950.0};
    const rtline::Thermistor probe(beta);

    // At T0 the beta equation gives R0 itself: exp(0) = 1.
    expect_near("R at 25 degC, ohm", probe.resistance(rtline::celsius_to_kelvin(25.0)), 10e3, 1e-12);
    // By hand: 1/273.15 − 1/298.15 = 3.0697569e-4 /K; × 3950 K = 1.2125540; 10 kΩ·e^1.2125540 = 33 620.60 Ω.
    expect_near("R at 0 degC, ohm", probe.resistance(rtline::celsius_to_kelvin(0.0)), 33620.60, 1e-6);
    // The inverse, 1/T = 1/T0 + ln(R/R0)/B, brings 33 620.60 Ω back to 273.15 K.
    expect_near("T at 33620.60 ohm, K", probe.temperature(33620.60), 273.15, 1e-7);

    // Points written from the equation itself, -30 to 10 °C; a beta fit must give B back.
    std::vector<rtline::RtPoint> points;
    for (double t_c = -30.0; t_c <= 10.0; t_c += 10.0) {
        const double t_k = rtline::celsius_to_kelvin(t_c);
        points.push_back({t_k, 10e3 * std::exp(3950.0 * (1.0 / t_k - 1.0 / 298.15))});
    }
    const rtline::BetaFit fit = rtline::fit_beta(points, rtline::k25CelsiusK);
    expect_near("fitted B, K", fit.model.b_k, 3950.0, 1e-9);
    expect_near("fitted R25, ohm", fit.model.r0_ohm, 10e3, 1e-9);

    std::printf("consumer: %d failed\n", failures);
    return failures == 0 ? 0 : 1;
}
