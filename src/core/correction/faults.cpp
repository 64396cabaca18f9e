// Fault bands: which codes mean an open or a shorted thermistor (see rtline/correction.hpp).
#include <algorithm>
#include <cmath>
#include <string>

#include "rtline/budget.hpp"
#include "rtline/correction.hpp"

namespace rtline {

std::string_view meaning_name(CodeMeaning m) {
    switch (m) {
        case CodeMeaning::reading: return "reading";
        case CodeMeaning::open: return "open";
        case CodeMeaning::short_circuit: return "short";
        case CodeMeaning::out_of_range: return "out-of-range";
    }
    return "reading";
}

double open_ratio(const Circuit& c) {
    require_ratiometric(c);
    switch (c.topology) {
        case Topology::divider_high: return 0.0;  // v = B/(R_T + B) → 0
        case Topology::divider_low:               // v = P/(rs + P), P = R_T ∥ load → load
            return std::isinf(c.load_ohm) ? 1.0 : c.load_ohm / (c.rs + c.load_ohm);
        case Topology::shunt_divider: {  // v = B/(Q + B), Q = R_T ∥ rp → rp
            const double bottom = parallel(c.rs, c.load_ohm);
            return bottom / (c.rp + bottom);
        }
        default: break;
    }
    return 0.0;
}

double short_ratio(const Circuit& c) {
    require_ratiometric(c);
    return output(c, 0.0);
}

CodeMeaning FaultBands::classify(std::int64_t code) const {
    for (const CodeBand& b : bands) {
        if (code >= b.first && code <= b.last) return b.meaning;
    }
    return CodeMeaning::out_of_range;
}

std::int64_t FaultBands::reading_lo() const {
    for (const CodeBand& b : bands) {
        if (b.meaning == CodeMeaning::reading) return b.first;
    }
    return 0;
}

std::int64_t FaultBands::reading_hi() const {
    for (const CodeBand& b : bands) {
        if (b.meaning == CodeMeaning::reading) return b.last;
    }
    return 0;
}

FaultBands fault_bands(const CodeMap& map, const Circuit& circuit, std::int64_t margin_lo, std::int64_t margin_hi) {
    FaultBands f;
    f.margin_lo = std::max<std::int64_t>(margin_lo, 0);
    f.margin_hi = std::max<std::int64_t>(margin_hi, 0);
    const std::int64_t top = (std::int64_t{1} << map.adc_bits) - 1;
    f.open_code = ratio_code(open_ratio(circuit), map.adc_bits, map.transfer);
    f.short_code = ratio_code(short_ratio(circuit), map.adc_bits, map.transfer);
    const std::int64_t lo = std::max<std::int64_t>(0, map.code_lo - f.margin_lo);
    const std::int64_t hi = std::min(top, map.code_hi + f.margin_hi);
    auto meaning = [&](std::int64_t first, std::int64_t last) {
        if (f.open_code >= first && f.open_code <= last) return CodeMeaning::open;
        if (f.short_code >= first && f.short_code <= last) return CodeMeaning::short_circuit;
        return CodeMeaning::out_of_range;
    };
    if (lo > 0) f.bands.push_back({0, lo - 1, meaning(0, lo - 1)});
    f.bands.push_back({lo, hi, CodeMeaning::reading});
    if (hi < top) f.bands.push_back({hi + 1, top, meaning(hi + 1, top)});
    if (f.open_code >= lo && f.open_code <= hi) f.hidden.push_back(CodeMeaning::open);
    if (f.short_code >= lo && f.short_code <= hi) f.hidden.push_back(CodeMeaning::short_circuit);
    return f;
}

std::pair<std::int64_t, std::int64_t> tolerance_margin(const CodeMap& map, const Thermistor& model,
                                                       const Circuit& circuit, const Span& span,
                                                       const Tolerances& tol) {
    const double steps = adc_steps(map.adc_bits, map.transfer);
    double shift_at_lo_code = 0.0;
    double shift_at_hi_code = 0.0;
    for (const double t_k : {span.lo_k, span.hi_k}) {
        const double nominal = output(circuit, model.resistance(t_k));
        double worst = 0.0;
        for (const double dr : {-tol.r25, tol.r25}) {
            for (const double db : {-tol.beta, tol.beta}) {
                const double r_t = perturbed_resistance(model, t_k, dr, db);
                for (const double ds : {-tol.resistors, tol.resistors}) {
                    for (const double dp : {-tol.resistors, tol.resistors}) {
                        Circuit c = circuit;
                        c.rs *= 1.0 + ds;
                        c.rp *= 1.0 + dp;
                        worst = std::max(worst, std::abs(output(c, r_t) - nominal) * steps);
                    }
                }
            }
        }
        // The end with the lower output lies at code_lo.
        const double other = output(circuit, model.resistance(t_k == span.lo_k ? span.hi_k : span.lo_k));
        (nominal <= other ? shift_at_lo_code : shift_at_hi_code) = worst;
    }
    return {static_cast<std::int64_t>(std::ceil(shift_at_lo_code)) + 1,
            static_cast<std::int64_t>(std::ceil(shift_at_hi_code)) + 1};
}

std::pair<std::int64_t, std::int64_t> temperature_margin(const CodeMap& map, double margin_k) {
    const std::size_t n = map.size();
    const double step_lo = std::abs(map.t_k[1] - map.t_k[0]);
    const double step_hi = std::abs(map.t_k[n - 1] - map.t_k[n - 2]);
    auto codes = [margin_k](double step) {
        return step > 0.0 ? static_cast<std::int64_t>(std::ceil(margin_k / step - 1e-9)) : std::int64_t{0};
    };
    return {codes(step_lo), codes(step_hi)};
}

}  // namespace rtline
