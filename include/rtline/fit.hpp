// Fitting thermistor models to R–T points: Steinhart–Hart from three points exactly or from N ≥ 3 by
// least squares, and the beta model (R0, B) by least squares, each with its residuals in temperature.
#pragma once

#include <vector>

#include "rtline/thermistor.hpp"

namespace rtline {

// A point and the temperature error of the fitted model there: T_model(R) − T, in kelvin.
struct Residual {
    double t_k = 0.0;
    double r_ohm = 0.0;
    double residual_k = 0.0;
};

struct ShFit {
    SteinhartHart model;
    std::vector<Residual> residuals;
    double max_residual_k = 0.0;  // largest |residual|
};

struct BetaFit {
    BetaModel model;
    std::vector<Residual> residuals;
    double max_residual_k = 0.0;
};

// Coefficients through three points exactly (Lᵢ = ln Rᵢ, Yᵢ = 1/Tᵢ; the closed form in docs/sources.md).
// Requires three distinct temperatures with distinct resistances.
[[nodiscard]] SteinhartHart steinhart_hart_three_point(const RtPoint& p1, const RtPoint& p2, const RtPoint& p3);

// Steinhart–Hart through validated points (at least 3). Three points: exact. More: least squares on
// 1/T = a + b·L + c·L³, each row weighted by T² so that it minimizes temperature residuals to first
// order; ln R scaled and solved by column-pivoting QR. Throws InputError if the points are degenerate,
// if the coefficients turn back between the first and last point, or if the model cannot give back a
// point's temperature (not finite and positive; for three points, missed by more than 1e-6·T).
[[nodiscard]] ShFit fit_steinhart_hart(const std::vector<RtPoint>& points);

// The beta model through validated points (at least 2), R0 stated at t0_k: least squares on
// 1/T = a + (1/B)·ln R with the same T² weights. Throws InputError if the points are degenerate, if B
// is not positive or R0 not a normal double, or if the model cannot give back a point's temperature.
[[nodiscard]] BetaFit fit_beta(const std::vector<RtPoint>& points, double t0_k);

}  // namespace rtline
