// The writers of `rtline design` (design_report.hpp).
#include "design_report.hpp"

#include <cmath>

#include "common.hpp"
#include "emit_c.hpp"
#include "markdown.hpp"
#include "pictures.hpp"
#include "svg.hpp"

namespace rtline::cli {

namespace {

const char* const kDeg =
    "\xC2\xB0"
    "C";
const std::string kPm = "\xC2\xB1";
// A resistor's power rating the margin is taken against: 1/16 W, the usual rating of an 0402 chip
// resistor and the lowest of the common sizes (common practice, from memory; 0603 parts are usually
// 1/10 W, so the margin is on the safe side for them).
constexpr double kResistorRatingW = 0.0625;

// A power margin as a factor: three figures below 1000, whole above (2855x, not 2.86e+03x).
std::string margin_words(double factor) {
    if (factor >= 1000.0 && factor < 1e9) return std::to_string(static_cast<long long>(std::floor(factor))) + "x";
    return format_significant(factor, 3) + "x";
}

std::string deg(double k, int decimals = 3) { return format_fixed(k, decimals) + " " + kDeg; }
std::string at_c(double t_k) { return celsius(t_k, 1) + " " + kDeg; }
std::string pct(double f) { return format_number(100.0 * f) + " %"; }

const DesignPart& chosen_part(const DesignRun& r) { return r.spec.parts[r.design.chosen().part]; }

std::string values_text(const Circuit& c) {
    std::string s;
    for (const std::string& n : free_resistors(c.topology)) {
        if (!s.empty()) s += ", ";
        s += n + " = " + format_resistance(resistor_value(c, n), 4);
    }
    return s;
}

std::string confidence_words(Confidence c) {
    return c == Confidence::worst_case ? std::string("the worst case over the tolerances")
                                       : "the Monte Carlo's " + std::string(confidence_name(c)) + " % bound of |error|";
}

std::string cause_words(Cause c) {
    std::string l(cause_label(c));
    return l;
}

Json resistors_json(const Circuit& c) {
    Json j = Json::object();
    for (const std::string& n : free_resistors(c.topology)) j[n] = resistor_value(c, n);
    return j;
}

// The flags that make size, budget and table give this design's figures (each takes those it knows).
Json readback_flags(const DesignRun& r) {
    const Design& d = r.design;
    const DesignOption& best = d.chosen();
    const DesignPart& part = chosen_part(r);
    const BudgetFlags& f = r.flags;
    const BudgetSpec& b = d.budget_spec;
    Json j = Json::object();
    j["step"] = r.spec.step_k;
    j["adc_bits"] = b.adc.bits;
    j["adc_transfer"] = std::string(adc_transfer_name(b.adc.transfer));
    if (!f.adc_ref.empty()) j["adc_ref"] = f.adc_ref;
    j["r25_tol"] = echoed(100.0 * part.tol_r25);
    j["beta_tol"] = echoed(100.0 * part.tol_beta);
    j["resistor_tol"] = echoed(100.0 * b.tolerance.resistors);
    auto copy = [&](const char* key, const std::string& text) {
        if (!text.empty()) j[key] = text;
    };
    copy("resistor_tc", f.resistor_tc);
    copy("ref_tol", f.ref_tol);
    copy("ref_tc", f.ref_tc);
    copy("adc_offset", f.adc_offset);
    copy("adc_gain", f.adc_gain);
    copy("adc_inl", f.adc_inl);
    copy("adc_error", f.adc_error);
    copy("excitation_tol", f.excitation_tol);
    copy("drift", f.drift);
    if (f.board_temp != "sensed") j["board_temp"] = f.board_temp;
    j["distribution"] = f.distribution;
    if (part.dissipation_w_per_k > 0.0) j["dissipation"] = echoed(1e3 * part.dissipation_w_per_k);
    j["trials"] = b.trials;
    j["seed"] = b.seed;
    // size: the chosen series and the judgement design made
    j["series"] = std::string(series_name(best.series));
    j["range"] = format_resistance(r.spec.range_lo_ohm, 6) + ":" + format_resistance(r.spec.range_hi_ohm, 6);
    j["objective"] = "total-error";
    j["confidence"] = std::string(confidence_name(r.spec.confidence));
    j["shortlist"] = r.spec.shortlist;
    j["top"] = r.spec.shortlist;  // size then ranks the same most linear combinations design budgeted
    // table: the share of the target the table was sized to
    if (d.table) {
        j["max_error"] = d.table_target_k;
        j["spacing"] = std::string(spacing_name(r.spec.spacing));
        j["unit"] = r.spec.scale_per_c == 100 ? 0.01 : 0.1;
    }
    return j;
}

Table parts_table(const DesignRun& r) {
    const Design& d = r.design;
    const Circuit& c = d.chosen().candidate.circuit;
    const DesignPart& part = chosen_part(r);
    const bool driven = c.excitation.drive == Drive::voltage;
    Table t({{"part", "part"},
             {"value", "value"},
             {"series", "series"},
             {"tolerance (%)", "tolerance_pct"},
             {"max power (mW)", "max_power_mw", -1, 4},
             {"rating (mW)", "rating_mw", -1, 4},
             {"margin", "margin"}});
    const double tp = d.chosen().candidate.max_power_w;
    std::string heat = "-";
    if (driven && part.dissipation_w_per_k > 0.0) heat = "self-heating " + format_significant(tp / part.dissipation_w_per_k, 3) + " K";
    t.add_row({"RT1 " + part.label, describe_model(part.model),
               std::string("-"),
               "R25 " + format_number(100.0 * part.tol_r25) + ", B " + format_number(100.0 * part.tol_beta),
               driven ? 1e3 * tp : NAN, NAN, heat});
    for (const ResistorPower& p : resistor_powers(c, d.grid)) {
        const bool sized = p.max_w == p.max_w;
        t.add_row({p.name, format_resistance(resistor_value(c, p.name), 4) + " ohm",
                   std::string(series_name(d.chosen().series)), format_number(100.0 * d.budget_spec.tolerance.resistors),
                   sized ? 1e3 * p.max_w : NAN, 1e3 * kResistorRatingW,
                   sized ? margin_words(kResistorRatingW / std::max(p.max_w, 1e-30)) : std::string("-")});
    }
    return t;
}

Table ranked_table(const DesignRun& r) {
    const Design& d = r.design;
    const bool several = r.spec.parts.size() > 1;
    std::vector<Column> cols{{"rank", "rank", 0}};
    if (several) cols.push_back({"part", "part"});
    cols.insert(cols.end(), {{"circuit", "topology"},
                             {"values", "values"},
                             {"series", "series"},
                             {std::string("error (") + kDeg + ")", "error_k", 4},
                             {std::string("at (") + kDeg + ")", "at_t_c", 1},
                             {std::string("worst case (") + kDeg + ")", "worst_case_k", 4},
                             {"nonlinearity (%FSD)", "nonlinearity_pct_fsd", 3}});
    Table t(cols);
    const std::size_t n = std::min(d.ranked.size(), r.runners_up + 1);
    for (std::size_t i = 0; i < n; ++i) {
        const DesignOption& o = d.ranked[i];
        std::vector<Cell> row{static_cast<double>(i + 1)};
        if (several) row.emplace_back(r.spec.parts[o.part].label);
        // Below the finalists a Monte Carlo confidence has no figure: those rank by their worst case.
        const bool figure = o.monte_carlo || r.spec.confidence == Confidence::worst_case;
        row.insert(row.end(), {std::string(topology_name(o.candidate.circuit.topology)), values_text(o.candidate.circuit),
                               std::string(series_name(o.series)), figure ? o.analog_k : NAN,
                               figure ? kelvin_to_celsius(o.analog_at_k) : NAN, o.worst_case_k,
                               o.candidate.max_nonlinearity_pct_fsd});
        t.add_row(row);
    }
    return t;
}

// What a "-" in the ranked table's error column means, when one is shown; else empty.
std::string ranked_note(const DesignRun& r) {
    const Design& d = r.design;
    if (r.spec.confidence == Confidence::worst_case) return "";
    const std::size_t n = std::min(d.ranked.size(), r.runners_up + 1);
    for (std::size_t i = 0; i < n; ++i) {
        if (!d.ranked[i].monte_carlo) {
            return "error -: not among the " + std::to_string(r.spec.finalists) +
                   " best by worst case that the Monte Carlo budgets; ranked by the worst case\n";
        }
    }
    return "";
}

// The signed error per temperature: the worst case's ends and, with the Monte Carlo, its percentiles.
Table signed_table(const DesignRun& r) {
    const Budget& b = r.design.budget;
    const bool mc = r.design.budget_spec.trials > 0;
    const std::string u = std::string(" (") + kDeg + ")";
    std::vector<Column> cols{{"T" + u, "t_c", 1}, {"worst low" + u, "worst_low_k", 4}, {"worst high" + u, "worst_high_k", 4}};
    if (mc) {
        cols.insert(cols.end(), {{"MC mean" + u, "mc_mean_k", 4},
                                 {"0.135 %" + u, "mc_p0_135_k", 4},
                                 {"99.865 %" + u, "mc_p99_865_k", 4},
                                 {"|e| 95 %" + u, "mc_p95_k", 4},
                                 {"|e| 99.7 %" + u, "mc_p99_7_k", 4}});
    }
    Table t(cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row{kelvin_to_celsius(p.t_k), p.worst_low_k, p.worst_high_k};
        if (mc) row.insert(row.end(), {p.mc.mean_k, p.mc.p0_135_k, p.mc.p99_865_k, p.mc.p95_k, p.mc.p99_7_k});
        t.add_row(row);
    }
    return t;
}

// Each cause alone per temperature (the causes that apply).
Table split_table(const DesignRun& r) {
    const Budget& b = r.design.budget;
    const std::string u = std::string(" (") + kDeg + ")";
    std::vector<Column> cols{{"T" + u, "t_c", 1}};
    std::vector<std::size_t> shown;
    for (std::size_t c = 0; c < kCauses; ++c) {
        if (!std::isnan(b.points.front().components.k[c])) {
            cols.push_back({cause_words(static_cast<Cause>(c)) + u, std::string(cause_key(static_cast<Cause>(c))) + "_k", 4});
            shown.push_back(c);
        }
    }
    cols.push_back({std::string("resolution (") + kDeg + "/LSB)", "resolution_k_per_lsb", 5});
    Table t(cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row{kelvin_to_celsius(p.t_k)};
        for (const std::size_t c : shown) row.push_back(p.components.k[c]);
        row.push_back(p.resolution_k_per_lsb);
        t.add_row(row);
    }
    return t;
}

// How the converter reads the divider: against its own supply, or a fixed reference in volts.
std::string reading_words(const DesignRun& r) {
    const DesignSpec& s = r.spec;
    if (s.drive.drive != Drive::voltage) return "ratiometric (no drive given)";
    const std::string drive = format_number(s.drive.value) + " V drive";
    if (s.budget.ratiometric) return drive + ", read ratiometrically (the reference is the drive)";
    return drive + " against a fixed " + format_number(s.budget.adc.full_scale) + " V reference (not ratiometric)";
}

Facts requirement_facts(const DesignRun& r) {
    const DesignSpec& s = r.spec;
    std::string series;
    for (const Series x : s.series) series += (series.empty() ? "" : ", ") + std::string(series_name(x));
    std::string topologies;
    for (const Topology t : s.topologies) topologies += (topologies.empty() ? "" : ", ") + std::string(topology_name(t));
    if (topologies.empty()) topologies = "divider-high, divider-low, shunt-divider (every divider)";
    Facts f{{"span", format_number(kelvin_to_celsius(s.span.lo_k)) + " to " + format_number(kelvin_to_celsius(s.span.hi_k)) +
                         " " + kDeg + ", budgeted every " + format_number(s.step_k) + " K"},
            {"accuracy", "|error| at most " + format_number(s.max_error_k) + " " + kDeg + ", table included, at " +
                             confidence_words(s.confidence)},
            {"converter", std::to_string(s.budget.adc.bits) + " bits, " + std::string(adc_transfer_name(s.budget.adc.transfer)) +
                              "; " + reading_words(r)},
            {"thermistors", r.candidates_file.empty() ? describe_model(s.parts.front().model)
                                                      : std::to_string(s.parts.size()) + " candidates from " + r.candidates_file},
            {"series", series + " from " + format_resistance(s.range_lo_ohm) + " to " + format_resistance(s.range_hi_ohm) + " ohm"},
            {"topologies", topologies}};
    const Constraints& k = s.constraints;
    std::string cons;
    if (std::isfinite(k.max_power_w)) cons += "thermistor power at most " + format_number(1e3 * k.max_power_w) + " mW; ";
    if (std::isfinite(k.max_self_heating_k)) cons += "self-heating at most " + format_number(k.max_self_heating_k) + " K; ";
    if (k.min_span > 0.0) cons += "output span at least " + format_number(k.min_span) + "; ";
    if (k.min_sensitivity > 0.0) cons += "sensitivity at least " + format_number(k.min_sensitivity) + " per K; ";
    if (!cons.empty()) f.push_back({"constraints", cons.substr(0, cons.size() - 2)});
    return f;
}

Facts assumption_facts(const DesignRun& r) {
    const BudgetSpec& b = r.design.budget_spec;
    return {{"firmware", "inverts the nominal model exactly through the table (the model reading)"},
            {"fixed resistors", kPm + pct(b.tolerance.resistors) + " each, independently" +
                                    (r.flags.resistor_tol == "1" ? " (the budget's default)" : "")},
            {"thermistor", "R25 and B tolerances as each part states them (default " + kPm + "1 %)"},
            {"Monte Carlo", b.trials > 0 ? std::to_string(b.trials) + " trials, seed " + std::to_string(b.seed) + ", " +
                                               std::string(distribution_name(b.distribution))
                                         : std::string("off")},
            {"search", "the " + std::to_string(r.spec.shortlist) +
                           " most linear standard combinations of each part, series and topology are budgeted; a "
                           "Monte Carlo confidence ranks the best " + std::to_string(r.spec.finalists) +
                           " by worst case with it"},
            {"ties", "figures within " + format_number(1e3 * kDesignTieK) + " m" + kDeg +
                         " go to the coarser series, then to fewer resistors"},
            {"table", "sized to the target less the analog figure (the table's shipped error adds in full)"},
            {"power rating", "margins against " + format_number(1e3 * kResistorRatingW) +
                                 " mW (1/16 W), the usual rating of an 0402 chip resistor, the smallest common size"}};
}

Facts result_facts(const DesignRun& r) {
    const Design& d = r.design;
    const DesignOption& best = d.chosen();
    const DesignPart& part = chosen_part(r);
    Facts f{{"design", (r.spec.parts.size() > 1 ? part.label + " (" + describe_model(part.model) + ")"
                                                 : describe_model(part.model)) +
                           " in " + std::string(topology_name(best.candidate.circuit.topology)) + ", " +
                           values_text(best.candidate.circuit) + " (" + std::string(series_name(best.series)) + ")"},
            {"analog error", deg(best.analog_k, 4) + " at " + at_c(best.analog_at_k) + " (" +
                                 confidence_words(r.spec.confidence) + "); worst case " + deg(best.worst_case_k, 4)}};
    if (d.table) {
        f.push_back({"table", std::to_string(d.table->table.codes.size()) + " entries, " +
                                  std::string(spacing_name(r.spec.spacing)) + " spacing, ships " +
                                  deg(d.table->fixed.max_error_k, 4) + " (sized to " + deg(d.table_target_k, 4) + ")"});
        f.push_back({"total error", deg(d.total_k, 4) + " against the " + format_number(r.spec.max_error_k) + " " + kDeg +
                                        " target: margin " + deg(r.spec.max_error_k - d.total_k, 4)});
    } else {
        f.push_back({"table", "none: " + shortfall_words(r)});
    }
    f.push_back({"examined", std::to_string(d.examined) + " standard combinations, " + std::to_string(d.ranked.size()) +
                                 " budgeted"});
    return f;
}

}  // namespace

std::string chosen_words(const DesignRun& r) {
    const DesignOption& best = r.design.chosen();
    return (r.spec.parts.size() > 1 ? chosen_part(r).label + " in " : std::string()) +
           std::string(topology_name(best.candidate.circuit.topology)) + ", " + values_text(best.candidate.circuit) + " (" +
           std::string(series_name(best.series)) + "): " + deg(best.analog_k, 3) + " at " + at_c(best.analog_at_k) +
           " before the table";
}

std::string shortfall_words(const DesignRun& r) {
    const Design& d = r.design;
    switch (d.shortfall) {
        case Shortfall::none: return "";
        case Shortfall::analog: {
            std::string cause = cause_words(d.cause);
            if (d.cause == Cause::beta) cause = "B tolerance";
            if (d.cause == Cause::r25) cause = "R25 tolerance";
            if (d.cause == Cause::resistors) cause = "fixed resistors' tolerance";
            const std::string head = "no design meets " + format_number(r.spec.max_error_k) + " " + kDeg + ": ";
            if (d.cause_k >= r.spec.max_error_k) {
                return head + "the " + cause + " alone gives " + deg(d.cause_k, 2) + " at " + at_c(d.cause_at_k);
            }
            // No one cause reaches the target: they do together.
            return head + "the analog errors together give " + deg(d.chosen().analog_k, 3) + " at " +
                   at_c(d.cause_at_k) + ", the largest the " + cause + " (" + deg(d.cause_k, 2) + " alone)";
        }
        case Shortfall::table: break;
    }
    return "no design meets " + format_number(r.spec.max_error_k) + " " + kDeg + ": the analog errors leave " +
           deg(d.table_target_k, 4) + " for the table, and a table in " + format_number(1.0 / r.spec.scale_per_c) + " " +
           kDeg + " units errs by at least " + deg(d.rounding_floor_k, 4);
}

Json design_json(const DesignRun& r) {
    const Design& d = r.design;
    const DesignOption& best = d.chosen();
    const DesignPart& part = chosen_part(r);
    const Circuit& c = best.candidate.circuit;
    Json doc = document("design");
    doc["met"] = d.met;
    doc["model"] = model_json(part.model);
    doc["span"] = {{"lo_c", kelvin_to_celsius(r.spec.span.lo_k)}, {"hi_c", kelvin_to_celsius(r.spec.span.hi_k)}};
    doc["circuit"] = circuit_json(c);
    doc["flags"] = readback_flags(r);
    doc["requirements"] = {{"max_error_k", r.spec.max_error_k},
                           {"confidence", std::string(confidence_name(r.spec.confidence))},
                           {"step_k", r.spec.step_k},
                           {"adc_bits", r.spec.budget.adc.bits},
                           {"parts", r.spec.parts.size()}};
    doc["part"] = {{"label", part.label},
                   {"r25_tol_pct", echoed(100.0 * part.tol_r25)},
                   {"b_tol_pct", echoed(100.0 * part.tol_beta)},
                   {"dissipation_mw_per_k", part.dissipation_w_per_k > 0.0 ? Json(echoed(1e3 * part.dissipation_w_per_k)) : Json(nullptr)}};
    doc["series"] = std::string(series_name(best.series));
    Json powers = Json::object();
    for (const ResistorPower& p : resistor_powers(c, d.grid)) powers[p.name] = number(p.max_w);
    doc["resistor_power_w"] = powers;
    doc["analog"] = {{"error_k", best.analog_k},
                     {"at_t_c", kelvin_to_celsius(best.analog_at_k)},
                     {"worst_case_k", best.worst_case_k},
                     {"monte_carlo", best.monte_carlo},
                     {"nonlinearity_pct_fsd", best.candidate.max_nonlinearity_pct_fsd}};
    if (d.table) {
        doc["table"] = {{"target_k", d.table_target_k},
                        {"entries", d.table->table.codes.size()},
                        {"spacing", std::string(spacing_name(r.spec.spacing))},
                        {"unit_k", 1.0 / r.spec.scale_per_c},
                        {"shipped_error_k", d.table->fixed.max_error_k},
                        {"interpolation_error_k", d.table->table.max_error_k},
                        {"code_lo", d.map->code_lo},
                        {"code_hi", d.map->code_hi}};
        Json rows = Json::array();
        for (std::size_t i = 0; i < d.table->table.codes.size(); ++i) {
            rows.push_back({{"code", d.table->table.codes[i]},
                            {"t_c", kelvin_to_celsius(d.table->table.t_k[i])},
                            {"t_fixed", d.table->fixed.t[i]}});
        }
        doc["table"]["breakpoints"] = rows;
    } else {
        doc["table"] = nullptr;
    }
    doc["total_error_k"] = d.total_k;
    doc["margin_k"] = r.spec.max_error_k - d.total_k;
    if (d.shortfall == Shortfall::none) {
        doc["shortfall"] = nullptr;
    } else {
        Json sf = {{"kind", d.shortfall == Shortfall::analog ? "analog" : "table"}, {"words", shortfall_words(r)}};
        if (d.shortfall == Shortfall::analog) {
            sf["cause"] = std::string(cause_key(d.cause));
            sf["cause_k"] = d.cause_k;
            sf["at_t_c"] = kelvin_to_celsius(d.cause_at_k);
        } else {
            sf["rounding_floor_k"] = d.rounding_floor_k;
        }
        doc["shortfall"] = sf;
    }
    Json ranked = Json::array();
    const std::size_t n = std::min(d.ranked.size(), r.runners_up + 1);
    for (std::size_t i = 0; i < n; ++i) {
        const DesignOption& o = d.ranked[i];
        ranked.push_back({{"rank", i + 1},
                          {"part", r.spec.parts[o.part].label},
                          {"topology", std::string(topology_name(o.candidate.circuit.topology))},
                          {"resistors_ohm", resistors_json(o.candidate.circuit)},
                          {"series", std::string(series_name(o.series))},
                          {"error_k", o.analog_k},
                          {"at_t_c", kelvin_to_celsius(o.analog_at_k)},
                          {"worst_case_k", o.worst_case_k},
                          {"monte_carlo", o.monte_carlo},
                          {"nonlinearity_pct_fsd", o.candidate.max_nonlinearity_pct_fsd}});
    }
    doc["ranked"] = ranked;
    doc["budgeted"] = d.ranked.size();
    doc["examined"] = d.examined;
    Json pts = Json::array();
    const bool mc = d.budget_spec.trials > 0;
    for (const BudgetPoint& p : d.budget.points) {
        Json j = {{"t_c", kelvin_to_celsius(p.t_k)},
                  {"worst_low_k", p.worst_low_k},
                  {"worst_high_k", p.worst_high_k},
                  {"worst_case_k", p.worst_case_k},
                  {"resolution_k_per_lsb", number(p.resolution_k_per_lsb)}};
        if (mc) {
            j["mc"] = {{"mean_k", p.mc.mean_k}, {"p0_135_k", p.mc.p0_135_k}, {"p99_865_k", p.mc.p99_865_k},
                       {"p95_k", p.mc.p95_k},   {"p99_7_k", p.mc.p99_7_k}};
        }
        Json comp = Json::object();
        for (std::size_t k = 0; k < kCauses; ++k) comp[std::string(cause_key(static_cast<Cause>(k))) + "_k"] = number(p.components.k[k]);
        j["components"] = comp;
        pts.push_back(j);
    }
    doc["budget"] = {{"worst_case_k", d.budget.summary.worst_case_k},
                     {"at_t_c", kelvin_to_celsius(d.budget.summary.at_t_k)},
                     {"p99_7_k", number(d.budget.summary.p99_7_k)},
                     {"points", pts}};
    return doc;
}

std::string design_text(const DesignRun& r) {
    std::string t = facts_text(requirement_facts(r), 13) + "\n" + facts_text(result_facts(r), 13) + "\n";
    t += "parts:\n" + parts_table(r).text() + "\n";
    t += "ranked by the error at the confidence (the design first):\n" + ranked_table(r).text() + ranked_note(r) + "\n";
    t += "signed error per temperature:\n" + signed_table(r).text() + "\n";
    t += "each cause alone:\n" + split_table(r).text();
    return t;
}

std::string design_markdown(const DesignRun& r, bool package) {
    const Design& d = r.design;
    Markdown md("rtline design: " + std::string(topology_name(d.chosen().candidate.circuit.topology)) + ", " +
                format_number(kelvin_to_celsius(r.spec.span.lo_k)) + " to " +
                format_number(kelvin_to_celsius(r.spec.span.hi_k)) + " " + kDeg + " within \u00b1" +
                format_number(r.spec.max_error_k) + " " + kDeg);
    md.section("Requirements");
    md.facts(requirement_facts(r));
    md.section("Assumptions and defaults");
    md.facts(assumption_facts(r));
    md.section("Design");
    md.facts(result_facts(r));
    md.section("Parts list");
    md.table(parts_table(r));
    md.section("Why this design");
    md.paragraph("Every option budgeted, ranked by its error at the confidence before the table; the first is the design.");
    md.table(ranked_table(r));
    if (!ranked_note(r).empty()) md.paragraph(ranked_note(r));
    md.section("Signed error per temperature");
    md.table(signed_table(r));
    md.section("Each cause alone");
    md.paragraph("The largest |change of error| over each cause's tolerance, the others nominal.");
    md.table(split_table(r));
    if (d.table) {
        md.section("Firmware table");
        Table t({{"code", "code", 0}, {std::string("T (") + kDeg + ")", "t_c", 4}, {"counts", "t_fixed", 0}});
        for (std::size_t i = 0; i < d.table->table.codes.size(); ++i) {
            t.add_row({static_cast<double>(d.table->table.codes[i]), kelvin_to_celsius(d.table->table.t_k[i]),
                       static_cast<double>(d.table->fixed.t[i])});
        }
        md.table(t);
    }
    if (package) {
        md.section("Pictures");
        md.list({"![error budget](budget.svg)", "![table error](table.svg)"});
        md.paragraph("The firmware header is design.h; design.json reads back as a spec for size, budget and table.");
    }
    return md.str();
}

std::vector<std::pair<std::string, std::string>> design_package(const DesignRun& r) {
    const Design& d = r.design;
    const DesignPart& part = chosen_part(r);
    const Circuit& c = d.chosen().candidate.circuit;
    std::vector<std::pair<std::string, std::string>> files;
    files.emplace_back("report.md", design_markdown(r, true));
    files.emplace_back("design.json", dump(design_json(r)));
    Tolerances tol = d.budget_spec.tolerance;
    const auto [below, above] = tolerance_margin(*d.map, part.model, d.channel, r.spec.span, tol);
    const FaultBands faults = fault_bands(*d.map, d.channel, below, above);
    CHeader h;
    h.prefix = r.prefix.empty() ? "ntc_" : r.prefix;
    h.adc_bits = d.map->adc_bits;
    h.table = &d.table->fixed;
    h.faults = &faults;
    h.comment = {"ADC code to temperature, written by rtline " RTLINE_VERSION " (rtline design).", "",
                 "circuit: " + describe_circuit(c),
                 "table:   " + std::to_string(d.table->table.codes.size()) + " entries, shipped error " +
                     format_fixed(d.table->fixed.max_error_k, 4) + " degC over codes " + std::to_string(d.map->code_lo) +
                     " to " + std::to_string(d.map->code_hi),
                 "", "rtline is not a protective device; verify the design with measured parts."};
    files.emplace_back("design.h", c_header(h));
    files.emplace_back("budget.svg", svg::render(budget_figure(part.model, c, d.budget,
                                                                 std::string(distribution_name(d.budget_spec.distribution)))));
    files.emplace_back("table.svg", svg::render(table_figure(part.model, c, *d.map, d.table->table, d.table->fixed,
                                                               std::nullopt, d.table_target_k, "design")));
    return files;
}

}  // namespace rtline::cli
