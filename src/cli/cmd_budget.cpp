// rtline budget: the temperature error of a design with real parts — worst case over the tolerances,
// Monte Carlo, and the split by cause (nonlinearity, R25, B, resistors, excitation, ADC, self-heating).
#include <charconv>
#include <cmath>
#include <memory>
#include <tuple>

#include "budget_flags.hpp"
#include "commands.hpp"
#include "common.hpp"
#include "frontend_report.hpp"
#include "markdown.hpp"
#include "pictures.hpp"
#include "rtline/budget.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

struct BudgetOptions {
    ModelOptions model;
    SpanOptions span;
    CircuitOptions circuit;
    BudgetFlags parts;      // tolerances, environment, converter, Monte Carlo, the amplifier's errors
    FrontEndOptions front;  // the amplifier: --gain, --offset, --auto-range, --headroom (as table's)
    OutputOptions out;
    std::string svg;  // --svg FILE
};

const char* const kDegC =
    "\xC2\xB0"
    "C";

// The amplifier's error terms in words; empty when it has none.
std::string amplifier_errors_text(const AmplifierErrors& e) {
    std::vector<std::string> terms;
    if (e.gain_error > 0.0) terms.push_back("gain \xC2\xB1" + format_number(100.0 * e.gain_error) + " %");
    if (e.offset_v > 0.0) terms.push_back("input offset \xC2\xB1" + format_si(e.offset_v, "V"));
    if (e.offset_drift_v_per_k > 0.0) {
        terms.push_back("offset drift \xC2\xB1" + format_si(e.offset_drift_v_per_k, "V/K") + " from " +
                        format_number(kelvin_to_celsius(e.reference_t_k)) + " \xC2\xB0" + "C to the board");
    }
    if (e.bias_current_a > 0.0) terms.push_back("bias current \xC2\xB1" + format_si(e.bias_current_a, "A"));
    if (e.offset_current_a > 0.0) {
        terms.push_back("offset current \xC2\xB1" + format_si(e.offset_current_a, "A"));
    }
    std::string t;
    for (const std::string& term : terms) t += (t.empty() ? "" : ", ") + term;
    return t;
}

std::string reading_description(const BudgetSpec& s, const Circuit& circuit, const std::string& unit) {
    std::string t = s.reading == Reading::model
                        ? "model: the firmware inverts the nominal circuit and thermistor model exactly"
                        : "line: the firmware reads through the nominal endpoint line (nonlinearity counts)";
    if (unit == "V") {
        t += "; output in volts against a fixed " + format_number(s.adc.full_scale) +
             " V reference (excitation tolerance counts)";
    } else if (circuit.excitation.drive == Drive::voltage) {
        t += "; ratiometric (the converter's reference is the " + format_number(circuit.excitation.value) +
             " V excitation)";
    } else {
        t += "; output in " + unit;
    }
    return t;
}

std::string pm_pct(double f) { return "\xC2\xB1" + format_number(100.0 * f) + " %"; }
std::string pm_ppm(double c) { return "\xC2\xB1" + format_number(1e6 * c) + " ppm/K"; }
std::string range_text(double lo_k, double hi_k) {
    return lo_k == hi_k ? celsius(lo_k, 1) + " " + kDegC : celsius(lo_k, 1) + " to " + celsius(hi_k, 1) + " " + kDegC;
}

std::string distribution_text(Distribution d) {
    switch (d) {
        case Distribution::normal:
            return "normal, tolerance = 3 sigma, not truncated: 0.27 % of the draws lie beyond a tolerance, so a "
                   "Monte Carlo maximum can exceed the worst case";
        case Distribution::normal_truncated:
            return "normal, tolerance = 3 sigma, truncated at the tolerance (screened parts)";
        case Distribution::uniform: break;
    }
    return "uniform over the tolerance";
}

std::string parts_description(const BudgetSpec& s, bool volts) {
    const Tolerances& t = s.tolerance;
    std::string out;
    if (t.thermistor_dt_k > 0.0) {
        out = "thermistor \xC2\xB1" + format_number(t.thermistor_dt_k) + " K over " + range_text(s.dt_lo_k, s.dt_hi_k);
        if (t.r25 > 0.0 || t.beta > 0.0) out += ", R25 " + pm_pct(t.r25) + ", B " + pm_pct(t.beta);
    } else {
        out = "R25 " + pm_pct(t.r25) + ", B " + pm_pct(t.beta);
    }
    if (t.thermistor_drift > 0.0) out += ", drift " + pm_pct(t.thermistor_drift);
    out += ", resistors " + pm_pct(t.resistors);
    if (t.resistor_tc_per_k > 0.0) out += " and " + pm_ppm(t.resistor_tc_per_k);
    if (volts) out += ", excitation " + pm_pct(t.excitation);
    return out + " (" + distribution_text(s.distribution) + ")";
}

Json components_json(const BudgetComponents& k) {
    Json j = Json::object();
    for (std::size_t c = 0; c < kCauses; ++c) j[std::string(cause_key(static_cast<Cause>(c))) + "_k"] = number(k.k[c]);
    return j;
}

Json budget_json(const Budget& b, const BudgetSpec& s, const Thermistor& model, const Span& span,
                 const Circuit& circuit, const std::string& unit) {
    const bool volts = unit == "V";
    const Tolerances& t = s.tolerance;
    Json doc = document("budget");
    doc["model"] = model_json(model);
    doc["part"] = s.part ? model_json(*s.part) : Json(nullptr);
    doc["span"] = {{"lo_c", kelvin_to_celsius(span.lo_k)}, {"hi_c", kelvin_to_celsius(span.hi_k)}};
    doc["circuit"] = circuit_json(circuit);
    Json a;
    a["reading"] = std::string(reading_name(s.reading));
    a["reading_unit"] = unit;
    a["ratiometric"] = unit == "V/V";
    a["distribution"] = std::string(distribution_name(s.distribution));
    a["sigmas_per_tolerance"] = s.distribution == Distribution::uniform ? Json(nullptr) : Json(3);
    a["truncated_at_tolerance"] = s.distribution != Distribution::normal;
    a["trials"] = s.trials;
    a["seed"] = s.seed;
    a["tolerances_pct"] = {{"r25", echoed(100.0 * t.r25)},
                           {"beta", echoed(100.0 * t.beta)},
                           {"resistors", echoed(100.0 * t.resistors)},
                           {"excitation", volts ? Json(echoed(100.0 * t.excitation)) : Json(nullptr)},
                           {"thermistor_drift", echoed(100.0 * t.thermistor_drift)},
                           {"lead", echoed(100.0 * t.lead)},
                           {"reference", echoed(100.0 * t.reference)}};
    a["coefficients_ppm_per_k"] = {{"resistors", echoed(1e6 * t.resistor_tc_per_k)}, {"reference", echoed(1e6 * t.reference_tc_per_k)}};
    a["coefficients_from_c"] = kelvin_to_celsius(kCoefficientReferenceK);
    a["board_temperature"] =
        s.board.sensed ? Json("sensed")
                       : Json({{"lo_c", kelvin_to_celsius(s.board.lo_k)}, {"hi_c", kelvin_to_celsius(s.board.hi_k)}});
    a["thermistor_dt"] = t.thermistor_dt_k > 0.0 ? Json({{"tolerance_k", t.thermistor_dt_k},
                                                           {"lo_c", kelvin_to_celsius(s.dt_lo_k)},
                                                           {"hi_c", kelvin_to_celsius(s.dt_hi_k)}})
                                                   : Json(nullptr);
    if (circuit.lead_ohm > 0.0) {
        a["lead"] = {{"loop_ohm", circuit.lead_ohm},
                     {"stated_at_c", kelvin_to_celsius(kCopperReferenceK)},
                     {"compensated", s.lead_compensated},
                     {"copper_alpha_per_k", kCopperAlphaPerK},
                     {"cable_lo_c", kelvin_to_celsius(s.cable_lo_k)},
                     {"cable_hi_c", kelvin_to_celsius(s.cable_hi_k)}};
    } else {
        a["lead"] = nullptr;
    }
    a["r25_at_t_c"] = kelvin_to_celsius(tolerance_reference_k(s.part ? *s.part : model));
    if (s.adc.bits > 0) {
        a["adc"] = {{"bits", s.adc.bits},
                    {"transfer", std::string(adc_transfer_name(s.adc.transfer))},
                    {"error_lsb", s.adc.error_lsb},
                    {"offset_lsb", s.adc.offset_lsb},
                    {"gain_pct", echoed(100.0 * s.adc.gain)},
                    {"inl_lsb", s.adc.inl_lsb},
                    {"full_scale", s.adc.full_scale},
                    {"lsb_size", b.lsb}};
    } else {
        a["adc"] = nullptr;
    }
    if (s.amplifier) {
        const AmplifierErrors& e = s.amplifier_errors;
        Json amp = {{"gain_v_per_v", s.amplifier->gain},
                    {"gain_tol_pct", 100.0 * e.gain_error},
                    {"input_offset_v", e.offset_v},
                    {"offset_drift_v_per_k", e.offset_drift_v_per_k},
                    {"offset_from_c", kelvin_to_celsius(e.reference_t_k)},
                    {"bias_current_a", e.bias_current_a},
                    {"offset_current_a", e.offset_current_a}};
        // The output offset is in the reading's unit: a fraction of the excitation when ratiometric.
        amp[unit == "V" ? "offset_v" : "offset_v_per_v"] = s.amplifier->offset;
        a["amplifier"] = amp;
    } else {
        a["amplifier"] = nullptr;
    }
    a["dissipation_mw_per_k"] = s.dissipation_w_per_k > 0.0 ? Json(echoed(1e3 * s.dissipation_w_per_k)) : Json(nullptr);
    doc["assumptions"] = a;
    if (s.reading == Reading::line) {
        doc["line"] = {{"slope_per_k", b.line.slope}, {"intercept", b.line.at(kZeroCelsiusK)}};
    }
    const bool mc = s.trials > 0;
    doc["summary"] = {{"worst_case_k", b.summary.worst_case_k},
                      {"at_t_c", kelvin_to_celsius(b.summary.at_t_k)},
                      {"worst_low_k", b.summary.worst_low_k},
                      {"worst_high_k", b.summary.worst_high_k},
                      {"p99_7_k", number(b.summary.p99_7_k)},
                      {"p99_7_at_t_c", mc ? Json(kelvin_to_celsius(b.summary.p99_7_at_t_k)) : Json(nullptr)}};
    Json pts = Json::array();
    for (const BudgetPoint& p : b.points) {
        Json j;
        j["t_c"] = kelvin_to_celsius(p.t_k);
        j["worst_case_k"] = p.worst_case_k;
        j["worst_low_k"] = p.worst_low_k;
        j["worst_high_k"] = p.worst_high_k;
        j["nominal_error_k"] = p.nominal_error_k;
        if (mc) {
            j["mc"] = {{"mean_k", p.mc.mean_k},   {"std_k", number(p.mc.std_k)}, {"p95_k", p.mc.p95_k},
                       {"p99_7_k", p.mc.p99_7_k}, {"max_abs_k", p.mc.max_abs_k}, {"p0_135_k", p.mc.p0_135_k},
                       {"p2_5_k", p.mc.p2_5_k},   {"p97_5_k", p.mc.p97_5_k},     {"p99_865_k", p.mc.p99_865_k}};
        } else {
            j["mc"] = nullptr;
        }
        j["components"] = components_json(p.components);
        j["resolution_k_per_lsb"] = number(p.resolution_k_per_lsb);
        pts.push_back(j);
    }
    doc["points"] = pts;
    return doc;
}

std::string budget_csv(const Budget& b) {
    std::vector<Column> cols = {
        {"", "t_c"},         {"", "worst_case_k"}, {"", "worst_low_k"}, {"", "worst_high_k"}, {"", "nominal_error_k"},
        {"", "mc_mean_k"},   {"", "mc_std_k"},     {"", "mc_p95_k"},    {"", "mc_p99_7_k"},   {"", "mc_max_abs_k"},
        {"", "mc_p0_135_k"}, {"", "mc_p2_5_k"},    {"", "mc_p97_5_k"},  {"", "mc_p99_865_k"}};
    for (std::size_t c = 0; c < kCauses; ++c)
        cols.push_back({"", std::string(cause_key(static_cast<Cause>(c))) + "_k"});
    cols.push_back({"", "resolution_k_per_lsb"});
    Table t(cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row = {kelvin_to_celsius(p.t_k),
                                 p.worst_case_k,
                                 p.worst_low_k,
                                 p.worst_high_k,
                                 p.nominal_error_k,
                                 p.mc.mean_k,
                                 p.mc.std_k,
                                 p.mc.p95_k,
                                 p.mc.p99_7_k,
                                 p.mc.max_abs_k,
                                 p.mc.p0_135_k,
                                 p.mc.p2_5_k,
                                 p.mc.p97_5_k,
                                 p.mc.p99_865_k};
        for (const double v : p.components.k) row.push_back(v);
        row.push_back(p.resolution_k_per_lsb);
        t.add_row(row);
    }
    return t.csv();
}

// The cause with the largest share at point p, for the summary line.
std::string largest_cause(const BudgetPoint& p) {
    std::size_t best = kCauses;
    for (std::size_t c = 0; c < kCauses; ++c) {
        if (std::isfinite(p.components.k[c]) && (best == kCauses || p.components.k[c] > p.components.k[best])) best = c;
    }
    if (best == kCauses) return "none";
    return std::string(cause_label(static_cast<Cause>(best))) + " (" + format_decimals(p.components.k[best], 4) + " " +
           kDegC + ")";
}

// The run's inputs, as the text and Markdown outputs open with them.
Facts budget_header(const Budget& b, const BudgetSpec& s, const Thermistor& model, const Circuit& circuit,
                    const std::string& unit) {
    const bool mc = s.trials > 0;
    const Tolerances& tl = s.tolerance;
    Facts f{{"model", describe_model(model) + (s.part ? " (the firmware inverts this)" : "")}};
    if (s.part) f.push_back({"part", describe_model(*s.part) + " (its real curve: the model error)"});
    f.push_back({"circuit", describe_circuit(circuit)});
    f.push_back({"reading", reading_description(s, circuit, unit)});
    if (s.amplifier) {
        std::string amp = std::string(is_bridge(circuit.topology) ? "differential across A and B, " : "") + "gain " +
                          format_number(s.amplifier->gain, 6) + " V/V, offset " +
                          format_number(s.amplifier->offset, 6) + " " + unit + "; the firmware inverts it as nominal";
        const std::string errors = amplifier_errors_text(s.amplifier_errors);
        f.push_back({"amplifier", amp});
        if (!errors.empty()) f.push_back({"", errors + " (" + distribution_text(s.distribution) + ")"});
    }
    f.push_back({"parts", parts_description(s, unit == "V") + "; R25 at " +
                              format_number(kelvin_to_celsius(tolerance_reference_k(s.part ? *s.part : model))) + " " +
                              kDegC});
    if (tl.resistor_tc_per_k > 0.0 || tl.reference_tc_per_k > 0.0) {
        f.push_back(
            {"board", (s.board.sensed ? std::string("at the sensed temperature (a probe inside the product)")
                                      : range_text(s.board.lo_k, s.board.hi_k) + " (uniform in the Monte Carlo)") +
                          "; coefficients from " + format_number(kelvin_to_celsius(kCoefficientReferenceK)) + " " +
                          kDegC});
    }
    if (circuit.lead_ohm > 0.0) {
        f.push_back({"leads", format_resistance(circuit.lead_ohm, 6) + " ohm loop at 20 " + kDegC + " " +
                                  pm_pct(tl.lead) + ", copper " + format_number(100.0 * kCopperAlphaPerK) +
                                  " %/K (IEC 60028) at " + range_text(s.cable_lo_k, s.cable_hi_k) + "; " +
                                  (s.lead_compensated ? "the firmware subtracts the nominal loop"
                                                      : "not compensated: all of it counts")});
    }
    if (tl.reference > 0.0 || tl.reference_tc_per_k > 0.0) {
        f.push_back(
            {"reference",
             pm_pct(tl.reference) + " and " + pm_ppm(tl.reference_tc_per_k) +
                 (unit == "V" ? "" : " (ratiometric: it is the excitation too, so it cancels in the reading)")});
    }
    if (s.adc.bits > 0) {
        f.push_back({"converter", std::to_string(s.adc.bits) + " bits, 1 LSB = " + format_significant(b.lsb, 4) + " " +
                                      unit + "; " + describe_adc_transfer(s.adc.transfer, s.adc.bits)});
        std::string q =
            "quantization \xC2\xB1"
            "0.5 LSB";
        if (s.adc.offset_lsb > 0.0) q += ", offset \xC2\xB1" + format_number(s.adc.offset_lsb) + " LSB";
        if (s.adc.gain > 0.0) q += ", gain " + pm_pct(s.adc.gain);
        if (s.adc.inl_lsb > 0.0) q += ", INL \xC2\xB1" + format_number(s.adc.inl_lsb) + " LSB";
        if (s.adc.error_lsb > 0.0) q += ", further error \xC2\xB1" + format_number(s.adc.error_lsb) + " LSB";
        f.push_back({"", q + " (uniform in the Monte Carlo)"});
    }
    if (s.dissipation_w_per_k > 0.0) {
        f.push_back({"self-heating", "dissipation constant " + format_number(1e3 * s.dissipation_w_per_k) +
                                         " mW/K, body temperature solved exactly (reads warm)"});
    }
    f.push_back({"Monte Carlo", mc ? std::to_string(s.trials) + " trials, seed " + std::to_string(s.seed)
                                   : std::string("off (--trials 0)")});
    return f;
}

// The signed error per temperature: worst case, and the Monte Carlo's figures when it ran.
Table error_table(const Budget& b, const BudgetSpec& s) {
    const bool mc = s.trials > 0;
    const std::string deg = std::string(" (") + kDegC + ")";
    std::vector<Column> cols = {{"T" + deg, "t_c", 2}, {"worst low" + deg, "", 4}, {"worst high" + deg, "", 4}};
    if (mc) {
        cols.insert(cols.end(), {{"MC mean" + deg, "", 4},
                                 {"MC std" + deg, "", 4},
                                 {"0.135 %" + deg, "", 4},
                                 {"2.5 %" + deg, "", 4},
                                 {"97.5 %" + deg, "", 4},
                                 {"99.865 %" + deg, "", 4},
                                 {"|e| 99.7 %" + deg, "", 4},
                                 {"MC max |e|" + deg, "", 4}});
    }
    Table errors(cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row = {kelvin_to_celsius(p.t_k), p.worst_low_k, p.worst_high_k};
        if (mc) {
            row.insert(row.end(), {p.mc.mean_k, p.mc.std_k, p.mc.p0_135_k, p.mc.p2_5_k, p.mc.p97_5_k, p.mc.p99_865_k,
                                   p.mc.p99_7_k, p.mc.max_abs_k});
        }
        errors.add_row(row);
    }
    return errors;
}

// The split: one column per cause that applies, and the resolution with a converter.
Table split_table(const Budget& b, const BudgetSpec& s) {
    const std::string deg = std::string(" (") + kDegC + ")";
    const BudgetComponents& k0 = b.points.front().components;
    std::vector<Column> split_cols = {{"T" + deg, "t_c", 2}};
    std::vector<std::size_t> shown;
    for (std::size_t c = 0; c < kCauses; ++c) {
        if (!std::isnan(k0.k[c])) {
            split_cols.push_back({std::string(cause_label(static_cast<Cause>(c))) + deg, "", 4});
            shown.push_back(c);
        }
    }
    if (s.adc.bits > 0) split_cols.push_back({std::string("resolution (") + kDegC + "/LSB)", "", 5});
    Table split(split_cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row = {kelvin_to_celsius(p.t_k)};
        for (const std::size_t c : shown) row.push_back(p.components.k[c]);
        if (s.adc.bits > 0) row.push_back(p.resolution_k_per_lsb);
        split.add_row(row);
    }
    return split;
}

const char* const kSplitTitle = "each cause alone (largest |change of error| over its tolerance)";

Facts budget_summary(const Budget& b, const BudgetSpec& s) {
    const BudgetSummary& sm = b.summary;
    Facts f{{"worst case over the span", format_decimals(sm.worst_case_k, 4) + " " + kDegC + " at " + celsius(sm.at_t_k) +
                                             " " + kDegC + " (signed: " + format_decimals(sm.worst_low_k, 4) + " to +" +
                                             format_decimals(sm.worst_high_k, 4) + " " + kDegC + ")"}};
    if (s.trials > 0) {
        f.push_back({"99.7 % bound over the span",
                     format_decimals(sm.p99_7_k, 4) + " " + kDegC + " at " + celsius(sm.p99_7_at_t_k) + " " + kDegC});
    }
    for (const BudgetPoint& p : b.points) {
        if (p.t_k == sm.at_t_k) f.push_back({"largest cause there", largest_cause(p)});
    }
    return f;
}

std::string budget_text(const Budget& b, const BudgetSpec& s, const Thermistor& model, const Circuit& circuit,
                        const std::string& unit) {
    return facts_text(budget_header(b, s, model, circuit, unit), 14) + "\n" + error_table(b, s).text() + "\n" +
           kSplitTitle + ":\n" + split_table(b, s).text() + "\n" + facts_text(budget_summary(b, s), 27, "");
}

std::string budget_markdown(const Budget& b, const BudgetSpec& s, const Thermistor& model, const Circuit& circuit,
                            const std::string& unit, const Span& span) {
    Markdown md("rtline budget: " + std::string(topology_name(circuit.topology)) + ", " +
                format_number(kelvin_to_celsius(span.lo_k)) + " to " + format_number(kelvin_to_celsius(span.hi_k)) +
                " " + kDegC);
    md.facts(budget_header(b, s, model, circuit, unit));
    md.section("Error per temperature");
    md.table(error_table(b, s));
    std::string split_title = kSplitTitle;
    split_title[0] = 'E';
    md.section(split_title);
    md.table(split_table(b, s));
    md.section("Summary");
    md.facts(budget_summary(b, s));
    return md.str();
}

// The amplifier the front-end flags describe (none without --gain or --auto-range), in the reading's
// unit: per volt of the excitation when ratiometric. --auto-range maps the span's ends onto the
// converter's full scale less the headroom; a current drive needs --adc-ref volts for it.
std::optional<Amplifier> budget_amplifier(const BudgetOptions& o, const Circuit& circuit, const BudgetSpec& spec,
                                          const Span& span, const Thermistor& thermistor) {
    Circuit reading = circuit;
    if (circuit.excitation.drive == Drive::voltage && spec.ratiometric) reading.excitation = Excitation{};
    const double fs =
        circuit.excitation.drive == Drive::current && o.parts.adc_ref.empty() ? std::nan("") : spec.adc.full_scale;
    // The output is monotone in R_T: the span's ends are the extremes --auto-range maps.
    const Grid ends{{span.lo_k, span.hi_k}, {thermistor.resistance(span.lo_k), thermistor.resistance(span.hi_k)}};
    return choose_amplifier(o.front, reading, ends, fs).amplifier;
}

// compute_budget, its refusals of the amplifier's figures quoting the text as typed (the core quotes
// its own numbers: 5e-05 for 50u).
Budget budget_as_typed(const BudgetOptions& o, const Grid& grid, const Thermistor& thermistor, const Circuit& circuit,
                       const BudgetSpec& spec) {
    try {
        return compute_budget(grid, thermistor, circuit, spec);
    } catch (const InputError& e) {
        const std::pair<Input, const std::string*> typed[] = {{Input::amp_gain_tol, &o.parts.amp_gain_tol},
                                                              {Input::amp_offset, &o.parts.amp_offset},
                                                              {Input::amp_offset_drift, &o.parts.amp_offset_drift},
                                                              {Input::amp_bias, &o.parts.amp_bias},
                                                              {Input::amp_offset_current, &o.parts.amp_offset_current},
                                                              {Input::gain, &o.front.gain}};
        for (const auto& [input, text] : typed) {
            if (e.input() == input && !text->empty()) throw e.with_value(*text);
        }
        throw;
    }
}

void run_budget(const BudgetOptions& o) {
    const Format format = parse_format(o.out.format, true);
    const Thermistor thermistor = build_model(o.model);
    const Span span = build_span(o.span);
    const Grid grid = build_grid(thermistor, span, o.span, true);
    if (grid.size() > kMaxBudgetPoints) {
        const auto [flag, text] = grid_size_culprit(o.span);
        throw InputError(flag, text,
                         "gives " + std::to_string(grid.size()) + " temperatures; a budget takes at most " +
                             std::to_string(kMaxBudgetPoints));
    }
    const Circuit circuit = build_circuit(o.circuit, thermistor, span);
    BudgetSpec spec = build_budget_spec(o.parts, circuit);
    spec.amplifier = budget_amplifier(o, circuit, spec, span, thermistor);
    if (!o.svg.empty()) check_svg_path(o.svg, o.out.output);
    const Budget b = budget_as_typed(o, grid, thermistor, circuit, spec);
    const std::string unit = reading_unit(circuit, spec);

    std::string bytes;
    switch (format) {
        case Format::json: bytes = dump(budget_json(b, spec, thermistor, span, circuit, unit)); break;
        case Format::csv: bytes = budget_csv(b); break;
        case Format::text: bytes = budget_text(b, spec, thermistor, circuit, unit); break;
        case Format::markdown: bytes = budget_markdown(b, spec, thermistor, circuit, unit, span); break;
    }
    std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
    if (!o.svg.empty()) {
        outputs.push_back(
            {o.svg, svg::render(budget_figure(thermistor, circuit, b, distribution_text(spec.distribution))), "--svg"});
    }
    emit_all(outputs);
}

}  // namespace

void setup_budget(CLI::App& app) {
    auto opt = std::make_shared<BudgetOptions>();
    auto* sub = app.add_subcommand(
        "budget", "Error budget with real parts: worst case, Monte Carlo and the split by cause over a span");
    add_model_options(*sub, opt->model);
    add_span_options(*sub, opt->span);
    add_circuit_options(*sub, opt->circuit);
    sub->get_option("--circuit")
        ->description(
            "divider-high, divider-low, shunt-divider, bridge or shunt-bridge (directly, or through --gain/--offset "
            "or --auto-range); bare or shunt with --current");
    add_amplifier_flags(*sub, opt->front);
    BudgetFlagSet which;
    which.amplifier = true;
    add_budget_flags(*sub, opt->parts, which);
    add_output_options(*sub, opt->out, true);
    add_svg_option(*sub, opt->svg);
    sub->footer(
        std::string("Example:\n"
                    "  rtline budget --r25 10k --beta 3950 --span 0:45 --step 5 --circuit divider-low --rs 10k\n"
                    "  rtline budget --r25 10k --beta 3950 --span -20:60 --step 10 --circuit divider-low --rs 10k "
                    "--excitation 3.3 --adc-ref excitation --adc-bits 12 --adc-error 2 --dissipation 1.5 "
                    "--reading line\n"
                    "  rtline budget --r25 10k --beta 3950 --span 0:50 --step 10 --circuit bridge --r1 10k "
                    "--excitation 3.3 --adc-ref excitation --adc-bits 12 --auto-range --amp-offset 50u --amp-bias 1n\n"
                    "Errors are the temperature the firmware reads minus the true one. The worst case spans "
                    "every tolerance at once; each cause alone shows which part to buy better.\n\n") +
        kSafetyNote);
    sub->callback([opt] { run_budget(*opt); });
}

}  // namespace rtline::cli
