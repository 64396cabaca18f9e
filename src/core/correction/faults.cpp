// Fault bands: which codes mean an open or a shorted thermistor (see rtline/correction.hpp).
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

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

namespace {

double clip(double v) { return std::clamp(v, 0.0, 1.0); }

}  // namespace

double open_ratio(const Channel& ch) { return clip(channel_ratio(ch, INFINITY)); }

double short_ratio(const Channel& ch) { return clip(channel_ratio(ch, 0.0)); }

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

FaultBands fault_bands(const CodeMap& map, const Channel& channel, std::int64_t margin_lo, std::int64_t margin_hi) {
    FaultBands f;
    f.margin_lo = std::max<std::int64_t>(margin_lo, 0);
    f.margin_hi = std::max<std::int64_t>(margin_hi, 0);
    const std::int64_t top = (std::int64_t{1} << map.adc_bits) - 1;
    f.open_code = ratio_code(open_ratio(channel), map.adc_bits, map.transfer);
    f.short_code = ratio_code(short_ratio(channel), map.adc_bits, map.transfer);
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
                                                       const Channel& channel, const Span& span,
                                                       const Tolerances& tol) {
    const double steps = adc_steps(map.adc_bits, map.transfer);
    const std::vector<std::string> names = resistor_names(channel.circuit.topology);
    const bool current = channel.circuit.excitation.drive == Drive::current;
    // The fixed resistors' corners, then the current's and the reference's with a current drive.
    const std::size_t factors = names.size() + (current ? 2 : 0);
    double shift_at_lo_code = 0.0;
    double shift_at_hi_code = 0.0;
    for (const double t_k : {span.lo_k, span.hi_k}) {
        const double nominal = channel_ratio(channel, model.resistance(t_k));
        double worst = 0.0;
        for (const double dr : {-tol.r25, tol.r25}) {
            for (const double db : {-tol.beta, tol.beta}) {
                const double r_t = perturbed_resistance(model, t_k, dr, db);
                for (std::size_t corner = 0; corner < (std::size_t{1} << factors); ++corner) {
                    Channel ch = channel;
                    auto sign = [corner](std::size_t i) { return (corner >> i & 1U) != 0 ? 1.0 : -1.0; };
                    for (std::size_t i = 0; i < names.size(); ++i) {
                        const std::string& n = names[i];
                        set_resistor(ch.circuit, n,
                                     resistor_value(channel.circuit, n) * (1.0 + sign(i) * tol.resistors));
                    }
                    if (current) {
                        ch.circuit.excitation.value *= 1.0 + sign(names.size()) * tol.excitation;
                        ch.reference *= 1.0 + sign(names.size() + 1) * tol.reference;
                    }
                    const double v = channel_ratio(ch, r_t);  // the converter divides by its actual reference
                    worst = std::max(worst, std::abs(v - nominal) * steps);
                }
            }
        }
        // The end with the lower ratio lies at code_lo.
        const double other = channel_ratio(channel, model.resistance(t_k == span.lo_k ? span.hi_k : span.lo_k));
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
