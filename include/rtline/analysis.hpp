// A design analysed point by point over its span: output, the reference line, deviation, nonlinearity
// in %FSD, the equivalent temperature error, sensitivity and the thermistor's power and self-heating.
// This is what `check` prints and what sizing, budgets and tables build on.
#pragma once

#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/grid.hpp"
#include "rtline/linearity.hpp"

namespace rtline {

struct PointResult {
    double t_k = 0.0;
    double r_t_ohm = 0.0;
    double output = 0.0;                // in the circuit's output unit
    double ideal = 0.0;                 // the reference line at t_k
    double deviation = 0.0;             // output − ideal
    double nonlinearity_pct_fsd = 0.0;  // deviation / full scale × 100
    double error_k = 0.0;               // deviation / line slope: the temperature read minus the true one
    double sensitivity_per_k = 0.0;     // |d output / dT|
    double power_w = 0.0;               // thermistor dissipation; NaN when the circuit has no drive
    double self_heating_k = 0.0;        // power / dissipation constant; NaN when either is unknown
};

struct AnalysisSummary {
    double max_nonlinearity_pct_fsd = 0.0;  // largest |nonlinearity|
    double at_t_k = 0.0;                    // where it occurs
    double max_error_k = 0.0;               // largest |error|
    double output_span = 0.0;               // |output(T_hi) − output(T_lo)|, output unit
    double sensitivity_min_per_k = 0.0;     // smallest |d output / dT| over the span
    double sensitivity_max_per_k = 0.0;     // largest
    double max_power_w = 0.0;               // NaN when the circuit has no drive
    double max_self_heating_k = 0.0;        // NaN when unknown
};

struct Analysis {
    LineKind line_kind = LineKind::endpoint;
    Line line;  // in output units against temperature in kelvin
    std::vector<PointResult> points;
    AnalysisSummary summary;
};

// Analyses `circuit` over `grid` against the reference line `kind`. dissipation_w_per_k > 0 gives the
// self-heating; 0 leaves it unknown. Throws InputError (Input::topology) when the output does not change
// over the span (a zero full-scale output, or one below 1e-12 of the output itself: rounding noise).
[[nodiscard]] Analysis analyze(const Grid& grid, const Thermistor& model, const Circuit& circuit, LineKind kind,
                               double dissipation_w_per_k);

// |d output / dT| at temperature t_k: d output/dR_T (central difference) times dR_T/dT = alpha·R_T.
[[nodiscard]] double sensitivity(const Circuit& circuit, const Thermistor& model, double t_k, double r_t);
// The same with alpha = model.alpha(t_k) given (1/K), for loops that compute it once per point.
[[nodiscard]] double sensitivity(const Circuit& circuit, double alpha_per_k, double r_t);

}  // namespace rtline
