// Sizing objectives (objective.hpp): the nonlinearity the exhaustive search ranks by, and the
// resolution and total error that re-rank its shortlist.
#include "rtline/objective.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <optional>

#include "rtline/analysis.hpp"
#include "rtline/error.hpp"

namespace rtline {

std::string_view objective_name(Objective o) {
    switch (o) {
        case Objective::nonlinearity: return "nonlinearity";
        case Objective::resolution: return "resolution";
        case Objective::total_error: return "total-error";
    }
    return "nonlinearity";
}

Objective parse_objective(std::string_view text, std::string_view field) {
    for (const Objective o : {Objective::nonlinearity, Objective::resolution, Objective::total_error}) {
        if (text == objective_name(o)) return o;
    }
    throw InputError(std::string(field), std::string(text),
                     "unknown objective; choose nonlinearity, resolution or total-error");
}

std::string_view objective_unit(Objective o) { return o == Objective::nonlinearity ? "%FSD" : "K"; }

std::string_view confidence_name(Confidence c) {
    switch (c) {
        case Confidence::worst_case: return "worst-case";
        case Confidence::p95: return "95";
        case Confidence::p99_7: return "99.7";
    }
    return "worst-case";
}

Confidence parse_confidence(std::string_view text, std::string_view field) {
    std::string_view t = text;
    if (!t.empty() && t.back() == '%') t.remove_suffix(1);
    for (const Confidence c : {Confidence::worst_case, Confidence::p95, Confidence::p99_7}) {
        if (t == confidence_name(c)) return c;
    }
    throw InputError(std::string(field), std::string(text),
                     "unknown confidence; choose worst-case, 95 or 99.7 (a Monte Carlo percentile of |error|)");
}

void validate(const ObjectiveSpec& spec) {
    if (spec.kind == Objective::nonlinearity) {
        if (spec.auto_range || spec.budget.amplifier) {
            throw InputError(spec.auto_range ? Input::output_range : Input::gain, "",
                             "an amplifier maps the output linearly, so the nonlinearity is the network's own; it "
                             "counts for the resolution and total-error objectives");
        }
        return;
    }
    if (spec.auto_range && !(spec.headroom >= 0.0 && spec.headroom < 0.5)) {
        throw InputError(Input::headroom, describe(100.0 * spec.headroom),
                         "the headroom at each end must be 0 to under 50 %");
    }
    if (spec.budget.adc.bits <= 0) {
        throw InputError(Input::adc_bits, "",
                         std::string("the ") + std::string(objective_name(spec.kind)) +
                             " objective judges the reading at the converter; give its resolution in bits");
    }
    if (spec.kind == Objective::total_error && spec.confidence != Confidence::worst_case && spec.budget.trials == 0) {
        throw InputError(Input::trials, "0",
                         "a Monte Carlo confidence needs trials; give some, or choose the worst case");
    }
}

double resolution_k_per_code(const Grid& grid, const Thermistor& model, const Circuit& c, const Converter& adc) {
    const double lsb = adc.lsb();
    double worst = 0.0;
    for (std::size_t i = 0; i < grid.size(); ++i) {
        const double s = sensitivity(c, model, grid.t_k[i], grid.r_ohm[i]);
        worst = std::max(worst, s > 0.0 ? lsb / s : INFINITY);
    }
    return worst;
}

TotalError total_error(const Budget& b, Confidence c) {
    TotalError e;
    for (const BudgetPoint& p : b.points) {
        const double v = c == Confidence::worst_case ? p.worst_case_k
                         : c == Confidence::p95      ? p.mc.p95_k
                                                     : p.mc.p99_7_k;
        if (v > e.error_k) e = {v, p.t_k};
    }
    return e;
}

namespace {

// The circuit whose output the converter reads in the budget's unit: per volt of the excitation when a
// voltage drive is read ratiometrically.
Circuit reading_circuit(const Circuit& c, const BudgetSpec& b) {
    Circuit r = c;
    if (c.excitation.drive == Drive::voltage && b.ratiometric) r.excitation = Excitation{};
    return r;
}

}  // namespace

std::optional<Amplifier> objective_amplifier(const ObjectiveSpec& spec, const Grid& grid, const Circuit& c) {
    if (!spec.auto_range) return spec.budget.amplifier;
    const Circuit rc = reading_circuit(c, spec.budget);
    validate_front_end(rc, Amplifier{});
    return fit_range(rc, grid, spec.budget.adc.full_scale, spec.headroom).amplifier;
}

ConverterCodes converter_codes(const ObjectiveSpec& obj, const Grid& grid, const Thermistor& model, const Circuit& c) {
    const Circuit rc = reading_circuit(c, obj.budget);
    const std::optional<Amplifier> amp = objective_amplifier(obj, grid, c);
    const double per_code = (amp ? std::abs(amp->gain) : 1.0) / obj.budget.adc.lsb();
    ConverterCodes codes;
    codes.span_codes = std::abs(output(rc, grid.r_ohm.back()) - output(rc, grid.r_ohm.front())) * per_code;
    double smallest = INFINITY;
    for (std::size_t i = 0; i < grid.size(); ++i) {
        smallest = std::min(smallest, sensitivity(rc, model, grid.t_k[i], grid.r_ohm[i]));
        const double in = converter_input(rc, amp, grid.r_ohm[i]);
        if (!(in >= 0.0 && in <= obj.budget.adc.full_scale)) codes.in_range = false;
    }
    codes.min_sensitivity_codes_per_k = smallest * per_code;
    return codes;
}

double objective_value(const ObjectiveSpec& obj, const SizingSpec& spec, const Grid& grid, const Thermistor& model,
                       const Circuit& c) {
    if (obj.kind == Objective::nonlinearity) return objective(spec, grid, c);
    BudgetSpec b = obj.budget;
    b.amplifier = objective_amplifier(obj, grid, c);
    switch (obj.kind) {
        case Objective::nonlinearity: break;
        case Objective::resolution:
            if (!b.amplifier) return resolution_k_per_code(grid, model, c, b.adc);
            return resolution_k_per_code(grid, model, reading_circuit(c, b), b.adc) / std::abs(b.amplifier->gain);
        case Objective::total_error: return total_error(compute_budget(grid, model, c, b), obj.confidence).error_k;
    }
    return INFINITY;
}

ObjectiveSearch search_objective(const ObjectiveSpec& obj, const SizingSpec& spec, const Grid& grid,
                                 const Thermistor& model) {
    validate(obj);
    ObjectiveSearch result;
    if (obj.kind == Objective::nonlinearity) {
        result.nonlinearity = search_standard(spec, grid, model);
        for (const Candidate& c : result.nonlinearity.best) result.best.push_back({c, c.max_nonlinearity_pct_fsd});
        result.ranked = result.nonlinearity.examined;
        return result;
    }
    SizingSpec wide = spec;
    const bool every = obj.kind == Objective::resolution && free_resistors(spec.base.topology).size() == 1;
    wide.top = every ? series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm).size()
                     : std::max(spec.top, obj.shortlist);
    result.nonlinearity = search_standard(wide, grid, model);
    std::vector<RankedCandidate> all;
    std::optional<InputError> refused;  // a budget that cannot be taken for a candidate leaves it out
    const bool by_codes = obj.min_span_codes > 0.0 || obj.min_sensitivity_codes_per_k > 0.0 || obj.budget.amplifier;
    ConverterCodes most;  // the largest of each figure among the candidates in range, for the refusal
    std::size_t clipped = 0;
    for (const Candidate& c : result.nonlinearity.best) {
        try {
            if (by_codes) {
                const ConverterCodes codes = converter_codes(obj, grid, model, c.circuit);
                if (!codes.in_range) {
                    ++clipped;
                    ++result.removed_codes;
                    continue;
                }
                most.span_codes = std::max(most.span_codes, codes.span_codes);
                most.min_sensitivity_codes_per_k =
                    std::max(most.min_sensitivity_codes_per_k, codes.min_sensitivity_codes_per_k);
                if (codes.span_codes < obj.min_span_codes ||
                    codes.min_sensitivity_codes_per_k < obj.min_sensitivity_codes_per_k) {
                    ++result.removed_codes;
                    continue;
                }
            }
            all.push_back({c, objective_value(obj, spec, grid, model, c.circuit)});
        } catch (const InputError& e) {
            if (!refused) refused = e;
        }
    }
    if (all.empty() && refused) throw *refused;
    if (all.empty() && result.removed_codes > 0) {
        std::string why = "none of the " + std::to_string(result.removed_codes) +
                          " combinations ranked meets the converter-input constraints:";
        if (clipped > 0) {
            why += " " + std::to_string(clipped) + " drive the converter past a rail through the amplifier" +
                   (clipped < result.removed_codes ? ";" : "");
        }
        if (obj.min_span_codes > 0.0 && clipped < result.removed_codes) {
            why += " the largest span is " + describe(std::floor(most.span_codes)) + " codes (" +
                   describe(obj.min_span_codes) + " asked)";
        }
        if (obj.min_sensitivity_codes_per_k > 0.0 && clipped < result.removed_codes) {
            why += std::string(obj.min_span_codes > 0.0 ? ";" : "") + " the best smallest sensitivity is " +
                   describe(std::round(most.min_sensitivity_codes_per_k * 100.0) / 100.0) + " codes/K (" +
                   describe(obj.min_sensitivity_codes_per_k) + " asked)";
        }
        throw InfeasibleError(why);
    }
    result.ranked = all.size() + result.removed_codes;
    // A stable sort keeps the nonlinearity order among equal figures.
    std::stable_sort(all.begin(), all.end(),
                     [](const RankedCandidate& a, const RankedCandidate& b) { return a.objective < b.objective; });
    if (all.size() > spec.top) all.resize(spec.top);
    result.best = std::move(all);
    return result;
}

}  // namespace rtline
