#include "rtline/analysis.hpp"

#include <algorithm>
#include <cmath>

#include "rtline/error.hpp"

namespace rtline {

double sensitivity(const Circuit& circuit, double alpha_per_k, double r_t) {
    const double h = 1e-6 * r_t;
    const double dout_dr = (output(circuit, r_t + h) - output(circuit, r_t - h)) / (2.0 * h);
    return std::abs(dout_dr * alpha_per_k * r_t);
}

double sensitivity(const Circuit& circuit, const Thermistor& model, double t_k, double r_t) {
    return sensitivity(circuit, model.alpha(t_k), r_t);
}

Analysis analyze(const Grid& grid, const Thermistor& model, const Circuit& circuit, LineKind kind,
                 double dissipation_w_per_k) {
    const std::size_t n = grid.size();
    std::vector<double> y(n);
    std::vector<OperatingPoint> ops(n);
    for (std::size_t i = 0; i < n; ++i) {
        ops[i] = operate(circuit, grid.r_ohm[i]);
        y[i] = ops[i].output;
    }
    const double fs = full_scale(y);
    // Zero, or at rounding level next to the output itself (a current forced through a divider-high
    // gives I·rs at every temperature, its ends differing by ~1e-16 of it): no full scale to divide by.
    const double level = std::max(std::abs(y.front()), std::abs(y.back()));
    if (!(fs > 1e-12 * level) || !std::isfinite(fs)) {
        throw InputError(Input::topology, std::string(topology_name(circuit.topology)),
                         "the output does not change over the span (zero full-scale output)");
    }
    Analysis a;
    a.line_kind = kind;
    a.line = reference_line(grid.t_k, y, kind);
    a.points.resize(n);
    AnalysisSummary& s = a.summary;
    s.output_span = fs;
    s.sensitivity_min_per_k = INFINITY;
    s.sensitivity_max_per_k = 0.0;
    s.max_power_w = std::isnan(ops[0].power_w) ? NAN : 0.0;
    s.max_self_heating_k = (dissipation_w_per_k > 0.0 && !std::isnan(s.max_power_w)) ? 0.0 : NAN;
    for (std::size_t i = 0; i < n; ++i) {
        PointResult& p = a.points[i];
        p.t_k = grid.t_k[i];
        p.r_t_ohm = grid.r_ohm[i];
        p.output = y[i];
        p.ideal = a.line.at(p.t_k);
        p.deviation = p.output - p.ideal;
        // Rounding leaves ~1e-16 of full scale where the line meets the output exactly (the endpoints).
        if (std::abs(p.deviation) < 1e-12 * fs) p.deviation = 0.0;
        p.nonlinearity_pct_fsd = p.deviation / fs * 100.0;
        p.error_k = p.deviation == 0.0 ? 0.0 : p.deviation / a.line.slope;  // +0, not −0, on the line
        p.sensitivity_per_k = sensitivity(circuit, model, p.t_k, p.r_t_ohm);
        p.power_w = ops[i].power_w;
        p.self_heating_k = dissipation_w_per_k > 0.0 ? p.power_w / dissipation_w_per_k : NAN;
        if (std::abs(p.nonlinearity_pct_fsd) > s.max_nonlinearity_pct_fsd || i == 0) {
            s.max_nonlinearity_pct_fsd = std::abs(p.nonlinearity_pct_fsd);
            s.at_t_k = p.t_k;
        }
        s.max_error_k = std::max(s.max_error_k, std::abs(p.error_k));
        s.sensitivity_min_per_k = std::min(s.sensitivity_min_per_k, p.sensitivity_per_k);
        s.sensitivity_max_per_k = std::max(s.sensitivity_max_per_k, p.sensitivity_per_k);
        if (!std::isnan(p.power_w)) s.max_power_w = std::max(s.max_power_w, p.power_w);
        if (!std::isnan(p.self_heating_k)) s.max_self_heating_k = std::max(s.max_self_heating_k, p.self_heating_k);
    }
    return a;
}

}  // namespace rtline
