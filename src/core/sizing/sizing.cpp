#include "rtline/sizing.hpp"

#include <algorithm>
#include <cmath>

#include "rtline/error.hpp"

namespace rtline {

std::vector<std::string> free_resistors(Topology t) {
    switch (t) {
        case Topology::bare: return {};
        case Topology::divider_high:
        case Topology::divider_low: return {"rs"};
        case Topology::shunt: return {"rp"};
        case Topology::shunt_divider: return {"rp", "rs"};
        case Topology::bridge: return {"r1"};
        case Topology::shunt_bridge: return {"rp", "r1"};
    }
    return {};
}

Circuit sized_circuit(const SizingSpec& spec, const Thermistor& model, const std::vector<double>& values) {
    Circuit c = spec.base;
    c.rs = c.rp = c.r1 = c.r2 = c.r3 = 0.0;
    const std::vector<std::string> names = free_resistors(c.topology);
    for (std::size_t i = 0; i < names.size(); ++i) set_resistor(c, names[i], values[i]);
    complete_bridge(c, model, spec.null_at_k);
    return c;
}

namespace {

// True when the output does not change over the span: a full scale of zero, or one at rounding level
// next to the output itself (a current into a divider-high gives I·rs at every temperature, and the
// ends then differ by ~1e-16 of it).
bool unchanging(const std::vector<double>& y) {
    const double fs = full_scale(y);
    const double level = std::max(std::abs(y.front()), std::abs(y.back()));
    return !(fs > 1e-12 * level) || !std::isfinite(fs);
}

}  // namespace

double objective(const SizingSpec& spec, const Grid& grid, const Circuit& c) {
    std::vector<double> y(grid.size());
    for (std::size_t i = 0; i < grid.size(); ++i) y[i] = output(c, grid.r_ohm[i]);
    if (unchanging(y)) return INFINITY;
    return max_nonlinearity_pct_fsd(grid.t_k, y, spec.line);
}

Candidate evaluate(const SizingSpec& spec, const Grid& grid, const Thermistor& model, const Circuit& c) {
    const Analysis a = analyze(grid, model, c, spec.line, spec.dissipation_w_per_k);
    const AnalysisSummary& s = a.summary;
    return {c,
            s.max_nonlinearity_pct_fsd,
            s.max_error_k,
            s.output_span,
            s.sensitivity_min_per_k,
            s.sensitivity_max_per_k,
            s.max_power_w,
            s.max_self_heating_k};
}

// ------------------------------------------------------------------------------------ closed forms

ClosedForms closed_forms(const Thermistor& model, const Span& span) {
    ClosedForms cf;
    cf.centre_k = span.centre_k();
    cf.local_b_k = model.local_beta(cf.centre_k);
    cf.local_b = model.kind() != "beta";
    const double r_c = model.resistance(cf.centre_k);
    if (cf.local_b_k > 2.0 * cf.centre_k) {
        cf.inflection_ohm = r_c * (cf.local_b_k - 2.0 * cf.centre_k) / (cf.local_b_k + 2.0 * cf.centre_k);
    }
    const double r1 = model.resistance(span.lo_k);
    const double r2 = r_c;
    const double r3 = model.resistance(span.hi_k);
    const double den = r1 + r3 - 2.0 * r2;
    if (den != 0.0) {
        const double r = (r2 * (r1 + r3) - 2.0 * r1 * r3) / den;
        if (r > 0.0 && std::isfinite(r)) cf.three_point_ohm = r;
    }
    return cf;
}

ClosedForms closed_forms(const Thermistor& model, const Span& span, const Circuit& base) {
    ClosedForms cf = closed_forms(model, span);
    if (!std::isfinite(base.load_ohm)) return cf;
    if (is_bridge(base.topology)) {
        cf.load_ignored = true;
        return cf;
    }
    // Dividers and the shunt: the load makes the network act as the unloaded one with R∥load in the
    // sized resistor's place (divider-low: v = [L/(rs+L)]·R_T/(R_T + rs∥L)), so the value to fit is
    // R = R*·L/(L − R*), and there is none when the load is not above R*.
    const double l = base.load_ohm;
    auto loaded = [l](std::optional<double> r) -> std::optional<double> {
        if (!r || !(l > *r)) return std::nullopt;
        return *r * l / (l - *r);
    };
    cf.inflection_ohm = loaded(cf.inflection_ohm);
    cf.three_point_ohm = loaded(cf.three_point_ohm);
    cf.load_included = true;
    return cf;
}

// ------------------------------------------------------------------------------ standard values

std::optional<Input> failed_constraint(const SizingSpec& spec, const Candidate& c) {
    const Constraints& k = spec.constraints;
    if (c.output_span < k.min_span) return Input::min_span;
    if (c.sensitivity_min_per_k < k.min_sensitivity) return Input::min_sensitivity;
    if (std::isfinite(k.max_power_w) && !(c.max_power_w <= k.max_power_w)) return Input::max_power;
    if (std::isfinite(k.max_self_heating_k) && !(c.max_self_heating_k <= k.max_self_heating_k)) {
        return Input::max_self_heating;
    }
    return std::nullopt;
}

}  // namespace rtline
