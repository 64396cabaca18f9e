// rtline size: the resistor values that make the output most linear, continuous and standard.
#include <algorithm>
#include <cmath>
#include <memory>
#include <tuple>

#include "budget_flags.hpp"
#include "commands.hpp"
#include "common.hpp"
#include "frontend_report.hpp"
#include "markdown.hpp"
#include "pictures.hpp"
#include "rtline/error.hpp"
#include "rtline/objective.hpp"
#include "rtline/sizing.hpp"

namespace rtline::cli {

namespace {

const char* const kDeg =
    "\xC2\xB0"
    "C";

struct SizeCommand {
    ModelOptions model;
    SpanOptions span;
    CircuitOptions circuit;
    std::string series = "E24";
    std::string range = "1:10M";
    std::string top = "5";
    std::string threads;  // empty: one per core
    std::string line = "endpoint";
    std::string max_power;         // W
    std::string max_self_heating;  // K
    std::string dissipation;       // mW/K
    std::string min_span;          // output units
    std::string min_sensitivity;   // output units per K
    bool compare = false;
    bool tradeoff = false;
    std::string objective = "nonlinearity";  // nonlinearity | resolution | total-error
    std::string confidence;                  // total-error: worst-case (default), 95 or 99.7
    std::string shortlist;                   // how many of the nonlinearity search's best the others rank
    BudgetFlags parts;                       // the converter and, for total-error, the budget's tolerances
    FrontEndOptions front;                   // an amplifier for resolution and total-error (as budget's)
    OutputOptions out;
    std::string svg;  // --svg FILE
};

// The spec shared by every topology the run sizes.
struct Setup {
    Thermistor model;
    Span span;
    Grid grid;
    SizingSpec spec;
    ObjectiveSpec objective;  // its budget is set once the drive is known (objective_budget)
};

Setup build_setup(const SizeCommand& o) {
    Thermistor model = build_model(o.model);
    const Span span = build_span(o.span);
    Grid grid = build_grid(model, span, o.span, true);
    SizingSpec spec;
    spec.line = parse_line(o.line, "--line");
    spec.series = parse_series(o.series, "--series");
    {
        const std::size_t colon = o.range.find(':');
        if (colon == std::string::npos) throw InputError("--range", o.range, "expected LO:HI in ohm, e.g. 100:1M");
        spec.range_lo_ohm = parse_resistance(o.range.substr(0, colon), "--range");
        spec.range_hi_ohm = parse_resistance(o.range.substr(colon + 1), "--range");
        if (!(spec.range_lo_ohm < spec.range_hi_ohm)) {
            throw InputError("--range", o.range, "the low end must be below the high end");
        }
        if (series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm).empty()) {
            throw InputError("--range", o.range,
                             "holds no " + std::string(series_name(spec.series)) + " value; widen it");
        }
    }
    const double top = parse_number(o.top, "--top");
    if (!(top >= 1.0 && top <= 1000.0) || top != std::floor(top)) {
        throw InputError("--top", o.top, "expected a whole number from 1 to 1000");
    }
    spec.top = static_cast<std::size_t>(top);
    spec.threads = build_threads(o.threads);
    if (!o.dissipation.empty()) {
        spec.dissipation_w_per_k = 1e-3 * parse_number(o.dissipation, "--dissipation");
        if (!(spec.dissipation_w_per_k > 0.0)) {
            throw InputError("--dissipation", o.dissipation, "the dissipation constant must be positive (mW/K)");
        }
    }
    const bool driven = !o.circuit.excitation.empty() || !o.circuit.current.empty();
    Constraints& k = spec.constraints;
    if (!o.max_power.empty()) {
        k.max_power_w = optional_quantity(o.max_power, "--max-power", "W", 0.0);
        if (!driven) throw InputError("--max-power", o.max_power, kNeedsDrive);
    }
    if (!o.max_self_heating.empty()) {
        k.max_self_heating_k = optional_quantity(o.max_self_heating, "--max-self-heating", "K", 0.0);
        if (spec.dissipation_w_per_k == 0.0) {
            throw InputError("--max-self-heating", o.max_self_heating, "needs --dissipation (mW/K)");
        }
        if (!driven) throw InputError("--max-self-heating", o.max_self_heating, kNeedsDrive);
    }
    if (spec.dissipation_w_per_k > 0.0 && !driven) throw InputError("--dissipation", o.dissipation, kNeedsDrive);
    if (!o.min_span.empty()) k.min_span = optional_quantity(o.min_span, "--min-span", "", 0.0);
    if (!o.min_sensitivity.empty()) {
        k.min_sensitivity = optional_quantity(o.min_sensitivity, "--min-sensitivity", "", 0.0);
    }
    spec.null_at_k = null_temperature(o.circuit, span);
    if (!o.circuit.null_at.empty()) {
        try {
            model.check_span(Span{spec.null_at_k - 5e-10, spec.null_at_k + 5e-10}, "--null-at");
        } catch (const InputError& e) {
            throw InputError("--null-at", o.circuit.null_at, e.why());
        }
    }
    ObjectiveSpec obj;
    obj.kind = parse_objective(o.objective, "--objective");
    if (obj.kind != Objective::total_error && !o.confidence.empty()) {
        throw InputError("--confidence", o.confidence, "applies only with --objective total-error");
    }
    if (!o.confidence.empty()) obj.confidence = parse_confidence(o.confidence, "--confidence");
    if (!o.shortlist.empty()) {
        if (obj.kind == Objective::nonlinearity) {
            throw InputError("--shortlist", o.shortlist, "applies only with --objective resolution or total-error");
        }
        obj.shortlist = parse_count(o.shortlist, "--shortlist", 1, 1000, "expected a whole number from 1 to 1000");
    }
    const AmplifierRule amp = amplifier_rule(o.front);
    obj.auto_range = amp.auto_range;
    if (amp.auto_range) obj.headroom = amp.headroom;
    if (obj.kind == Objective::nonlinearity && (amp.auto_range || amp.fixed)) {
        throw InputError(amp.auto_range ? "--auto-range" : "--gain", amp.auto_range ? "" : o.front.gain,
                         "an amplifier maps the output linearly, so the nonlinearity is the network's own; give "
                         "--objective resolution or total-error");
    }
    obj.budget.amplifier = amp.fixed;  // kept by objective_budget
    if (amp.auto_range || amp.fixed) {
        // Through an amplifier the span and sensitivity are the converter's, in codes and codes per K.
        obj.min_span_codes = k.min_span;
        obj.min_sensitivity_codes_per_k = k.min_sensitivity;
        k.min_span = 0.0;
        k.min_sensitivity = 0.0;
    }
    return {std::move(model), span, std::move(grid), spec, obj};
}

// The budget an objective other than nonlinearity judges by, for the drive of `base`: the budget's flags,
// with size's own --dissipation and --threads.
BudgetSpec objective_budget(const SizeCommand& o, const Circuit& base) {
    BudgetFlags parts = o.parts;
    parts.dissipation = o.dissipation;
    parts.threads = o.threads;
    return build_budget_spec(parts, base);
}

// An amplifier in JSON, its output offset keyed by the reading's unit.
Json amplifier_json(const std::optional<Amplifier>& a, const std::string& reading) {
    if (!a) return nullptr;
    return {{"gain_v_per_v", a->gain}, {reading == "V" ? "offset_v" : "offset_v_per_v", a->offset}};
}

// The objective in words, for the header.
std::string objective_words(const Setup& s) {
    const ObjectiveSpec& obj = s.objective;
    if (obj.kind == Objective::nonlinearity) {
        return "largest |nonlinearity| against the " + std::string(line_name(s.spec.line)) + " line";
    }
    const std::string shortlist = free_resistors(s.spec.base.topology).size() == 1 && obj.kind == Objective::resolution
                                      ? "every value in range"
                                      : "the " + std::to_string(obj.shortlist) + " most linear combinations";
    std::string through;
    if (obj.auto_range) {
        through = ", through an amplifier fitted to each candidate (the span onto " +
                  format_number(100.0 * obj.headroom) + " to " + format_number(100.0 - 100.0 * obj.headroom) +
                  " % of the converter's range)";
    } else if (obj.budget.amplifier) {
        through = ", through an amplifier of gain " + format_number(obj.budget.amplifier->gain, 6) + " V/V, offset " +
                  format_number(obj.budget.amplifier->offset, 6);
    }
    if (obj.min_span_codes > 0.0) through += "; at least " + format_number(obj.min_span_codes) + " codes of span";
    if (obj.min_sensitivity_codes_per_k > 0.0) {
        through += "; at least " + format_number(obj.min_sensitivity_codes_per_k) + " codes/K everywhere";
    }
    if (obj.kind == Objective::resolution) {
        return "resolution, the largest " + std::string(kDeg) + " per code of the " +
               std::to_string(obj.budget.adc.bits) + "-bit converter over the span (ranking " + shortlist + ")" +
               through;
    }
    return "total error, the budget's largest |error| over the span at " +
           (obj.confidence == Confidence::worst_case ? std::string("the worst case")
                                                     : std::string(confidence_name(obj.confidence)) + " %") +
           " (ranking " + shortlist + ")" + through;
}

Json resistors_json(const Circuit& c) {
    Json r = Json::object();
    for (const std::string& name : resistor_names(c.topology)) r[name] = resistor_value(c, name);
    return r;
}

std::string resistors_text(const Circuit& c, int digits) {
    std::string s;
    for (const std::string& name : free_resistors(c.topology)) {
        if (!s.empty()) s += ", ";
        s += name + " = " + format_resistance(resistor_value(c, name), digits);
    }
    return s;
}

// Power and self-heating are figures of a drive: a ratiometric design has none.
bool driven(const Candidate& c) { return c.circuit.excitation.drive != Drive::ratiometric; }

// The JSON key of an objective's figure per candidate.
std::string objective_key(Objective o) {
    return o == Objective::resolution ? "resolution_k_per_code" : "total_error_k";
}

Json candidate_json(const Candidate& c) {
    Json j = {{"topology", std::string(topology_name(c.circuit.topology))},
              {"resistors_ohm", resistors_json(c.circuit)},
              {"max_nonlinearity_pct_fsd", c.max_nonlinearity_pct_fsd},
              {"max_error_k", c.max_error_k},
              {"output_span", c.output_span},
              {"sensitivity_per_k", {{"min", c.sensitivity_min_per_k}, {"max", c.sensitivity_max_per_k}}}};
    if (driven(c)) {
        j["max_power_w"] = number(c.max_power_w);
        j["max_self_heating_k"] = number(c.max_self_heating_k);
    }
    return j;
}

Table candidate_table(const std::vector<Candidate>& cs, const std::string& unit, bool csv, bool with_topology,
                      bool self_heating, const std::vector<double>& figures = {},
                      Objective objective = Objective::nonlinearity,
                      const std::vector<std::optional<Amplifier>>& amps = {}, const std::string& reading = "") {
    std::vector<Column> cols;
    if (with_topology) cols.push_back({"circuit", "topology"});
    const std::vector<std::string> names =
        cs.empty() ? std::vector<std::string>{} : free_resistors(cs.front().circuit.topology);
    if (csv) {
        for (const std::string& n : names) cols.push_back({n, n + "_ohm"});
    } else {
        cols.push_back({"resistors", "resistors"});
    }
    cols.push_back({"nonlinearity (%FSD)", "max_nonlinearity_pct_fsd", 3});
    cols.push_back(
        {"error (\xC2\xB0"
         "C)",
         "max_error_k", 3});
    cols.push_back({"span (" + unit + ")", "output_span" + unit_suffix(unit), -1, 4});
    cols.push_back({"min sens (" + unit + "/K)", "sensitivity_min" + unit_suffix(unit) + "_per_k", -1, 4});
    cols.push_back({"max sens (" + unit + "/K)", "sensitivity_max" + unit_suffix(unit) + "_per_k", -1, 4});
    const bool power = !cs.empty() && driven(cs.front());
    if (power) cols.push_back({csv ? "power (W)" : "power (mW)", "max_power_w", -1, 4});
    if (power && self_heating) cols.push_back({"self-heating (K)", "max_self_heating_k", 4});
    if (!figures.empty()) {
        cols.push_back({objective == Objective::resolution ? "resolution (\xC2\xB0" "C/code)" : "total error (\xC2\xB0" "C)",
                        objective_key(objective), 4});
    }
    // Through an amplifier: its gain and output offset (the reading's unit) per candidate.
    if (!amps.empty()) {
        cols.push_back({"gain (V/V)", "gain_v_per_v", -1, 6});
        cols.push_back({"offset (" + reading + ")", reading == "V" ? "offset_v" : "offset_v_per_v", -1, 6});
    }
    Table t(cols);
    for (std::size_t i = 0; i < cs.size(); ++i) {
        const Candidate& c = cs[i];
        std::vector<Cell> row;
        if (with_topology) row.emplace_back(std::string(topology_name(c.circuit.topology)));
        if (csv) {
            for (const std::string& n : names) row.emplace_back(resistor_value(c.circuit, n));
        } else {
            row.emplace_back(resistors_text(c.circuit, 4));
        }
        row.emplace_back(c.max_nonlinearity_pct_fsd);
        row.emplace_back(c.max_error_k);
        row.emplace_back(c.output_span);
        row.emplace_back(c.sensitivity_min_per_k);
        row.emplace_back(c.sensitivity_max_per_k);
        if (power) row.emplace_back(csv ? c.max_power_w : 1e3 * c.max_power_w);
        if (power && self_heating) row.emplace_back(c.max_self_heating_k);
        if (!figures.empty()) row.emplace_back(figures[i]);
        if (!amps.empty()) {
            row.emplace_back(amps[i] ? amps[i]->gain : NAN);
            row.emplace_back(amps[i] ? amps[i]->offset : NAN);
        }
        t.add_row(std::move(row));
    }
    return t;
}

// The warning (on stderr, and in JSON's "warnings") when the chosen design's span is small next to the excitation.
std::string span_warning(const Candidate& c) {
    const Excitation& e = c.circuit.excitation;
    if (gives_resistance(c.circuit.topology) || e.drive == Drive::current) return "";
    const double full = e.drive == Drive::voltage ? e.value : 1.0;
    if (c.output_span >= 0.1 * full) return "";
    return "the output span is only " + format_significant(c.output_span, 3) + " " + output_unit(c.circuit) +
           ", below 10 % of the excitation; consider --min-span";
}

Facts header_facts(const Setup& s, const SizeCommand& o, const std::string& topology_text) {
    return {{"model", describe_model(s.model)},
            {"circuit", topology_text},
            {"span", format_number(kelvin_to_celsius(s.span.lo_k)) + " to " +
                         format_number(kelvin_to_celsius(s.span.hi_k)) + " " + kDeg + ", " +
                         std::to_string(s.grid.size()) + " points; objective: " + objective_words(s)},
            {"values", std::string(series_name(s.spec.series)) + " from " + format_resistance(s.spec.range_lo_ohm) +
                           " to " + format_resistance(s.spec.range_hi_ohm) + " ohm" +
                           (o.range == "1:10M" ? " (the default range)" : "")}};
}

std::string header_text(const Setup& s, const SizeCommand& o, const std::string& topology_text) {
    return facts_text(header_facts(s, o, topology_text), 9);
}

// A Markdown document's opening: its heading and the header facts.
Markdown markdown_start(const Setup& s, const SizeCommand& o, const std::string& what,
                        const std::string& topology_text) {
    Markdown md("rtline size: " + what + ", " + format_number(kelvin_to_celsius(s.span.lo_k)) + " to " +
                format_number(kelvin_to_celsius(s.span.hi_k)) + " " + kDeg + ", " +
                std::string(series_name(s.spec.series)));
    md.facts(header_facts(s, o, topology_text));
    return md;
}

Json header_json(const Setup& s, const std::string& command) {
    Json doc = document(command);
    doc["model"] = model_json(s.model);
    doc["span"] = {
        {"lo_c", kelvin_to_celsius(s.span.lo_k)}, {"hi_c", kelvin_to_celsius(s.span.hi_k)}, {"points", s.grid.size()}};
    doc["line"] = std::string(line_name(s.spec.line));
    doc["series"] = std::string(series_name(s.spec.series));
    doc["range_ohm"] = {{"lo", s.spec.range_lo_ohm}, {"hi", s.spec.range_hi_ohm}};
    const Constraints& k = s.spec.constraints;
    Json c = Json::object();
    if (std::isfinite(k.max_power_w)) c["max_power_w"] = k.max_power_w;
    if (std::isfinite(k.max_self_heating_k)) c["max_self_heating_k"] = k.max_self_heating_k;
    if (k.min_span > 0.0) c["min_output_span"] = k.min_span;
    if (k.min_sensitivity > 0.0) c["min_sensitivity_per_k"] = k.min_sensitivity;
    if (s.objective.min_span_codes > 0.0) c["min_span_codes"] = s.objective.min_span_codes;
    if (s.objective.min_sensitivity_codes_per_k > 0.0) {
        c["min_sensitivity_codes_per_k"] = s.objective.min_sensitivity_codes_per_k;
    }
    doc["constraints"] = c;
    if (s.spec.dissipation_w_per_k > 0.0) doc["dissipation_mw_per_k"] = echoed(1e3 * s.spec.dissipation_w_per_k);
    return doc;
}

// The picture: the objective against the first free resistor with `listed` marked. The plotted
// range is the --range the user gave, or a factor of 4 either side of the continuous optimum by default.
std::string size_svg(const SizeCommand& o, const Setup& s, const Candidate& continuous,
                     const std::vector<Candidate>& listed, const std::string& label) {
    SizePicture p;
    p.spec = &s.spec;
    p.grid = &s.grid;
    p.model = &s.model;
    p.continuous = continuous;
    if (const auto fails = failed_constraint(s.spec, continuous)) p.continuous_fails = flag_name(*fails);
    p.listed = listed;
    p.listed_label = label;
    std::tie(p.lo_ohm, p.hi_ohm) = o.range == "1:10M" ? size_window(s.spec, continuous, listed)
                                                      : std::pair{s.spec.range_lo_ohm, s.spec.range_hi_ohm};
    return svg::render(size_figure(p));
}

std::string run_compare(const SizeCommand& o, Setup& s, Format format) {
    const Circuit drive = build_drive(o.circuit, "divider-low");
    s.spec.base = drive;
    const Comparison cmp = compare_topologies(s.spec, s.grid, s.model);
    const std::vector<Candidate>& rows = cmp.ranked;
    std::vector<std::string> skipped;
    for (const auto& [t, why] : cmp.skipped) {
        skipped.push_back(std::string(topology_name(t)) + " (" + render_inputs(why, flag_name) + ")");
    }
    for (const Candidate& c : rows) {
        if (const std::string w = span_warning(c); !w.empty())
            warn(std::string(topology_name(c.circuit.topology)) + ": " + w);
    }
    const bool power = drive.excitation.drive != Drive::ratiometric;
    if (format == Format::json) {
        Json doc = header_json(s, "size");
        doc["drive"] = circuit_json(drive)["drive"];
        Json arr = Json::array();
        for (const Candidate& c : rows) arr.push_back(candidate_json(c));
        doc["comparison"] = arr;
        Json sk = Json::array();
        for (const std::string& k : skipped) sk.push_back(k);
        doc["skipped"] = sk;
        return dump(doc);
    }
    // Units differ between topologies (ohm for shunt, V/V for dividers): the table names them per row.
    const bool csv = format == Format::csv;
    if (csv) {
        std::vector<Column> cols{{"", "topology"},
                                 {"", "rs_ohm"},
                                 {"", "rp_ohm"},
                                 {"", "r1_ohm"},
                                 {"", "max_nonlinearity_pct_fsd"},
                                 {"", "max_error_k"},
                                 {"", "output_span"},
                                 {"", "output_unit"}};
        if (power) cols.push_back({"", "max_power_w"});
        Table t(cols);
        for (const Candidate& c : rows) {
            auto value = [&](const char* n) {
                const auto names = free_resistors(c.circuit.topology);
                return std::find(names.begin(), names.end(), n) == names.end() ? NAN : resistor_value(c.circuit, n);
            };
            std::vector<Cell> row{std::string(topology_name(c.circuit.topology)),
                                  value("rs"),
                                  value("rp"),
                                  value("r1"),
                                  c.max_nonlinearity_pct_fsd,
                                  c.max_error_k,
                                  c.output_span,
                                  output_unit(c.circuit)};
            if (power) row.emplace_back(c.max_power_w);
            t.add_row(std::move(row));
        }
        return t.csv();
    }
    std::vector<Column> cols{{"circuit", "topology"},
                             {"resistors", "resistors"},
                             {"nonlinearity (%FSD)", "max_nonlinearity_pct_fsd", 3},
                             {"error (\xC2\xB0"
                              "C)",
                              "max_error_k", 3},
                             {"span", "output_span", -1, 4},
                             {"unit", "output_unit"}};
    if (power) cols.push_back({"power (mW)", "max_power_w", -1, 4});
    Table t(cols);
    for (const Candidate& c : rows) {
        std::vector<Cell> row{std::string(topology_name(c.circuit.topology)),
                              resistors_text(c.circuit, 4),
                              c.max_nonlinearity_pct_fsd,
                              c.max_error_k,
                              c.output_span,
                              output_unit(c.circuit)};
        if (power) row.emplace_back(1e3 * c.max_power_w);
        t.add_row(std::move(row));
    }
    const std::string topology_text =
        "every topology, best " + std::string(series_name(s.spec.series)) + " values each";
    if (format == Format::markdown) {
        Markdown md = markdown_start(s, o, "every topology", topology_text);
        md.section("Best of each topology");
        md.table(t);
        Facts notes;
        for (const std::string& k : skipped) notes.push_back({"skipped", k});
        if (!power) notes.push_back({"power", "none without a drive; give --excitation V or --current A"});
        md.facts(notes);
        return md.str();
    }
    std::string text = header_text(s, o, topology_text) + "\n" + t.text();
    for (const std::string& k : skipped) text += "skipped: " + k + "\n";
    if (!power) text += "power: none without a drive; give --excitation V or --current A\n";
    return text;
}

void run_size(const SizeCommand& o) {
    const Format format = parse_format(o.out.format, true);
    if (o.compare && !o.circuit.circuit.empty()) {
        throw InputError("--compare", o.circuit.circuit, "compares every topology; leave out --circuit");
    }
    if (!o.circuit.lead.empty()) {
        // The search kernels scan the thermistor's own resistance; sizing for a remote probe would need
        // the wires in every kernel. Size the board, then check or budget the design with its leads.
        throw InputError("--lead", o.circuit.lead,
                         "size chooses resistors for a thermistor on the board; size without the leads, then give "
                         "--lead to check, table or budget");
    }
    if (o.compare && o.tradeoff) throw InputError("--tradeoff", "", "give either --compare or --tradeoff, not both");
    if (!o.compare && o.circuit.circuit.empty()) {
        throw InputError("--circuit", "", "name the topology to size, or give --compare for all of them");
    }
    if (!o.svg.empty() && o.compare) {
        throw InputError("--svg", o.svg, "draws one topology's objective; leave out --compare, or --svg");
    }
    if (!o.svg.empty()) check_svg_path(o.svg, o.out.output);
    Setup s = build_setup(o);
    if (s.objective.kind != Objective::nonlinearity && (o.compare || o.tradeoff)) {
        throw InputError("--objective", o.objective,
                         std::string("ranks the standard values of one topology; leave out ") +
                             (o.compare ? "--compare" : "--tradeoff"));
    }
    if (s.objective.kind != Objective::nonlinearity && !o.svg.empty()) {
        throw InputError("--svg", o.svg, "draws the nonlinearity objective; leave out --objective, or --svg");
    }
    std::string bytes;
    if (o.compare) {
        emit(o.out.output, run_compare(o, s, format));
        return;
    }
    s.spec.base = build_drive(o.circuit, o.circuit.circuit);
    if (const std::string why = drive_problem(s.spec.base); !why.empty()) {
        throw InputError("--current", o.circuit.current,
                         why + "; size the " + o.circuit.circuit + " with --excitation, or choose shunt or a bridge");
    }
    validate(sized_circuit(s.spec, s.model, std::vector<double>(free_resistors(s.spec.base.topology).size(), 1e3)));
    const Topology topo = s.spec.base.topology;
    const std::vector<std::string> names = free_resistors(topo);
    if (names.empty()) throw InputError("--circuit", o.circuit.circuit, "the bare thermistor has no resistor to size");
    const std::string unit = output_unit(s.spec.base);
    const bool csv = format == Format::csv;
    const bool heat = s.spec.dissipation_w_per_k > 0.0;

    if (o.tradeoff) {
        if (names.size() != 1) {
            throw InputError("--tradeoff", o.circuit.circuit,
                             "applies to one-resistor topologies (divider-high, "
                             "divider-low, shunt, bridge)");
        }
        const std::vector<Candidate> front = tradeoff(s.spec, s.grid, s.model);
        if (front.empty()) throw infeasible(s.spec, search_standard(s.spec, s.grid, s.model), "");  // for its counts
        if (format == Format::json) {
            Json doc = header_json(s, "size");
            doc["circuit"] = circuit_json(s.spec.base);
            doc["circuit"].erase("resistors_ohm");
            Json arr = Json::array();
            for (const Candidate& c : front) arr.push_back(candidate_json(c));
            doc["tradeoff"] = arr;
            bytes = dump(doc);
        } else if (csv) {
            bytes = candidate_table(front, unit, true, false, heat).csv();
        } else if (format == Format::markdown) {
            Markdown md = markdown_start(s, o, o.circuit.circuit + " trade-off", describe_circuit(s.spec.base));
            md.section("Pareto front");
            md.paragraph("Each value is the most linear of all values with at least its output span.");
            md.table(candidate_table(front, unit, false, false, heat));
            if (!driven(front.front()))
                md.facts({{"power, self-heating", "none without a drive; give --excitation V or --current A"}});
            bytes = md.str();
        } else {
            bytes = header_text(s, o, describe_circuit(s.spec.base)) +
                    "\nPareto front: each value is the most linear of all values with at least its output span\n" +
                    candidate_table(front, unit, false, false, heat).text();
            if (!driven(front.front()))
                bytes += "power, self-heating: none without a drive; give --excitation V or --current A\n";
        }
        std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
        if (!o.svg.empty()) {
            outputs.push_back({o.svg,
                               size_svg(o, s, optimize_continuous(s.spec, s.grid, s.model), front,
                                        "Pareto front, " + std::to_string(front.size()) + " " +
                                            std::string(series_name(s.spec.series)) + " values (listed)"),
                               "--svg"});
        }
        emit_all(outputs);
        return;
    }

    const Candidate continuous = optimize_continuous(s.spec, s.grid, s.model);
    const bool one = names.size() == 1;
    const ClosedForms cf = closed_forms(s.model, s.span, s.spec.base);
    std::vector<double> figures;  // the objective's figure per candidate, when it is not the nonlinearity
    StandardSearch found;
    std::size_t ranked_count = 0;  // combinations the objective was evaluated for
    if (s.objective.kind == Objective::nonlinearity) {
        found = search_standard(s.spec, s.grid, s.model);
    } else {
        const std::optional<Amplifier> fixed = s.objective.budget.amplifier;
        s.objective.budget = objective_budget(o, s.spec.base);
        s.objective.budget.amplifier = fixed;
        try {
            const ObjectiveSearch ranked = search_objective(s.objective, s.spec, s.grid, s.model);
            found = ranked.nonlinearity;
            ranked_count = ranked.ranked;
            found.best.clear();
            for (const RankedCandidate& r : ranked.best) {
                found.best.push_back(r.candidate);
                figures.push_back(r.objective);
            }
        } catch (const InputError& e) {
            if (e.input() == Input::trials) throw e.with_value(o.parts.trials);
            throw;
        }
    }
    if (found.best.empty()) throw infeasible(s.spec, found, "");
    // The amplifier each candidate is read through (fixed, or fitted to it with --auto-range).
    std::vector<std::optional<Amplifier>> amps;
    const bool amplified = s.objective.kind != Objective::nonlinearity &&
                           (s.objective.auto_range || s.objective.budget.amplifier.has_value());
    if (amplified) {
        for (const Candidate& c : found.best) amps.push_back(objective_amplifier(s.objective, s.grid, c.circuit));
    }
    const std::string unit_of_reading = amplified ? reading_unit(s.spec.base, s.objective.budget) : std::string();
    const auto fails = failed_constraint(s.spec, continuous);
    const std::string cont_fails = fails ? flag_name(*fails) : std::string();
    if (const std::string w = span_warning(found.best.front()); !w.empty()) warn(w);

    if (format == Format::json) {
        Json doc = header_json(s, "size");
        Json circ = circuit_json(s.spec.base);
        circ.erase("resistors_ohm");
        doc["circuit"] = circ;
        doc["continuous"] = {{"resistors_ohm", resistors_json(continuous.circuit)},
                             {"max_nonlinearity_pct_fsd", continuous.max_nonlinearity_pct_fsd},
                             {"output_span", continuous.output_span},
                             {"meets_constraints", cont_fails.empty()},
                             {"ridge", continuous.ridge}};
        if (one) {
            doc["closed_form"] = {{"inflection_ohm", cf.inflection_ohm ? Json(*cf.inflection_ohm) : Json(nullptr)},
                                  {"three_point_ohm", cf.three_point_ohm ? Json(*cf.three_point_ohm) : Json(nullptr)},
                                  {"centre_c", kelvin_to_celsius(cf.centre_k)},
                                  {"b_k", cf.local_b_k},
                                  {"b_is_local", cf.local_b},
                                  {"load_included", cf.load_included},
                                  {"load_ignored", cf.load_ignored}};
        }
        Json arr = Json::array();
        for (std::size_t i = 0; i < found.best.size(); ++i) {
            Json c = candidate_json(found.best[i]);
            if (!figures.empty()) c[objective_key(s.objective.kind)] = figures[i];
            if (amplified) c["amplifier"] = amplifier_json(amps[i], unit_of_reading);
            arr.push_back(c);
        }
        doc["candidates"] = arr;
        if (s.objective.kind != Objective::nonlinearity) {
            Json obj = {{"name", std::string(objective_name(s.objective.kind))},
                        {"adc_bits", s.objective.budget.adc.bits},
                        {"ranked", ranked_count}};
            obj["auto_range"] = s.objective.auto_range;
            obj["headroom_pct"] = s.objective.auto_range ? Json(100.0 * s.objective.headroom) : Json(nullptr);
            if (s.objective.kind == Objective::total_error) {
                obj["confidence"] = std::string(confidence_name(s.objective.confidence));
                obj["trials"] = s.objective.budget.trials;
            }
            doc["objective"] = obj;
        }
        doc["examined"] = found.examined;
        bytes = dump(doc);
    } else if (csv) {
        bytes = candidate_table(found.best, unit, true, false, heat, figures, s.objective.kind, amps, unit_of_reading)
                    .csv();
    } else if (format == Format::markdown) {
        Markdown md = markdown_start(s, o, o.circuit.circuit, describe_circuit(s.spec.base));
        md.section("Continuous optimum");
        Facts opt{{"resistors", resistors_text(continuous.circuit, 6)},
                  {"nonlinearity", format_decimals(continuous.max_nonlinearity_pct_fsd, 4) + " %FSD"},
                  {"output span", format_significant(continuous.output_span, 4) + " " + unit}};
        if (!cont_fails.empty()) opt.push_back({"constraints", "fails " + cont_fails});
        if (continuous.ridge) {
            opt.push_back({"ridge",
                           "every pair with the same equivalent resistance gives this nonlinearity; shown "
                           "is the pair with the largest output span"});
        }
        if (one) {
            const std::string& r = names.front();
            opt.push_back({"inflection at " + format_number(kelvin_to_celsius(cf.centre_k)) + " " + kDeg +
                               " (Pallas-Areny & Webster, ch. 2)",
                           cf.inflection_ohm ? r + " = " + format_resistance(*cf.inflection_ohm, 5) : "none"});
            opt.push_back({"three-point (ends and centre)",
                           cf.three_point_ohm ? r + " = " + format_resistance(*cf.three_point_ohm, 5) : "none"});
        }
        md.facts(opt);
        md.section("Best " + std::string(series_name(s.spec.series)) + " values");
        md.paragraph(std::to_string(found.examined) + " combinations examined, exhaustively.");
        md.table(
            candidate_table(found.best, unit, false, false, heat, figures, s.objective.kind, amps, unit_of_reading));
        if (!driven(found.best.front()))
            md.facts({{"power, self-heating", "none without a drive; give --excitation V or --current A"}});
        bytes = md.str();
    } else {
        std::string t = header_text(s, o, describe_circuit(s.spec.base)) + "\n";
        t += "continuous optimum   " + resistors_text(continuous.circuit, 6) + "  ->  " +
             format_decimals(continuous.max_nonlinearity_pct_fsd, 4) + " %FSD, span " +
             format_significant(continuous.output_span, 4) + " " + unit +
             (cont_fails.empty() ? "" : "  (fails " + cont_fails + ")") + "\n";
        if (continuous.ridge) {
            t += "  (a ridge: every pair with the same equivalent resistance gives this nonlinearity; shown is the\n"
                 "   pair with the largest output span, so the second resistor buys span, not linearity)\n";
        }
        if (one) {
            const std::string& r = names.front();
            const std::string b_note =
                cf.local_b ? " with the model's local B there (" + format_significant(cf.local_b_k, 5) + " K)" : "";
            t += std::string("closed forms (Pallas-Areny & Webster, ch. 2)") +
                 (cf.load_included  ? ", converted for the load:\n"
                  : cf.load_ignored ? ", for the unloaded bridge:\n"
                                    : ":\n");
            const bool b_ok = cf.local_b_k > 2.0 * cf.centre_k;
            t += "  inflection at " + format_number(kelvin_to_celsius(cf.centre_k)) +
                 " \xC2\xB0"
                 "C" +
                 b_note + "   " +
                 (cf.inflection_ohm ? r + " = " + format_resistance(*cf.inflection_ohm, 5)
                                    : std::string(b_ok ? "none: the load is not above the unloaded value"
                                                       : "none: B <= 2*Tc there")) +
                 "\n";
            t += "  three-point (ends and centre)   " +
                 (cf.three_point_ohm ? r + " = " + format_resistance(*cf.three_point_ohm, 5) : std::string("none")) +
                 "\n";
        }
        t += "\nbest " + std::string(series_name(s.spec.series)) + " values (" + std::to_string(found.examined) +
             " combinations examined, exhaustively)\n" +
             candidate_table(found.best, unit, false, false, heat, figures, s.objective.kind, amps, unit_of_reading)
                 .text();
        if (!driven(found.best.front()))
            t += "power, self-heating: none without a drive; give --excitation V or --current A\n";
        bytes = t;
    }
    std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
    if (!o.svg.empty()) {
        const std::string what = one ? " values" : " combinations, each at its own " + names[1];
        outputs.push_back({o.svg,
                           size_svg(o, s, continuous, found.best,
                                    "best " + std::to_string(found.best.size()) + " " +
                                        std::string(series_name(s.spec.series)) + what + " (listed)"),
                           "--svg"});
    }
    emit_all(outputs);
}

}  // namespace

void setup_size(CLI::App& app) {
    auto opt = std::make_shared<SizeCommand>();
    auto* sub = app.add_subcommand("size", "Find the resistor values that make the output most linear over a span");
    add_model_options(*sub, opt->model);
    add_span_options(*sub, opt->span);
    add_circuit_options(*sub, opt->circuit, true, false);
    sub->get_option("--circuit")
        ->description(
            "divider-high, divider-low, shunt, shunt-divider, bridge or shunt-bridge (bare has no "
            "resistor to size); --compare sizes each of them");
    sub->add_option("--series", opt->series, "Standard values: E3, E6, E12, E24 (default), E48, E96 or E192")
        ->group("Search");
    sub->add_option("--range", opt->range, "Resistor values LO:HI in ohm (default 1:10M)")->group("Search");
    sub->add_option("--top", opt->top, "How many standard combinations to list (default 5)")->group("Search");
    sub->add_option("--line", opt->line, "Reference line: endpoint (default), least-squares or minimax")->group("Search");
    sub->add_option("--threads", opt->threads, "Worker threads for the search (default: one per core; same result)")
        ->group("Search");
    sub->add_flag("--compare", opt->compare, "Size every topology and list the best of each")->group("Search");
    sub->add_flag("--tradeoff", opt->tradeoff, "One-resistor topology: nonlinearity against output span (Pareto front)")
        ->group("Search");
    sub->add_option("--max-power", opt->max_power, "Largest thermistor power, W (e.g. 100u); needs a drive")
        ->group("Constraints");
    sub->add_option("--max-self-heating", opt->max_self_heating, "Largest self-heating, K; needs --dissipation")
        ->group("Constraints");
    sub->add_option("--dissipation", opt->dissipation, "Thermistor dissipation constant, mW/K")->group("Constraints");
    sub->add_option("--min-span", opt->min_span, "Smallest output span, output units (V/V ratiometric); through an amplifier, codes at the converter")
        ->group("Constraints");
    sub->add_option("--min-sensitivity", opt->min_sensitivity,
                    "Smallest |d output/dT| over the span, output units per K; through an amplifier, codes per K")
        ->group("Constraints");
    sub->add_option("--objective", opt->objective,
                    "What the standard values are ranked by: nonlinearity (default), resolution (largest degC per "
                    "code; needs --adc-bits) or total-error (the budget's largest |error|, with its tolerance flags)")
        ->group("Objective");
    sub->add_option("--confidence", opt->confidence,
                    "With total-error: worst-case (default), or the Monte Carlo's 95 or 99.7 % bound of |error|")
        ->group("Objective");
    sub->add_option("--shortlist", opt->shortlist,
                    "With resolution or total-error: how many of the most linear combinations are ranked (default "
                    "24; resolution ranks every value of a one-resistor topology)")
        ->group("Objective");
    add_amplifier_flags(*sub, opt->front);
    add_budget_flags(*sub, opt->parts, {false, false, false, false, true});
    add_output_options(*sub, opt->out, true);
    add_svg_option(*sub, opt->svg);
    sub->footer(
        std::string("Examples:\n"
                    "  rtline size --r25 10k --beta 3950 --span 0:45 --circuit divider-low\n"
                    "  rtline size --r25 10k --beta 3950 --span -20:60 --circuit shunt-divider --series E96 "
                    "--min-span 0.3\n"
                    "  rtline size --r25 10k --beta 3950 --span -30:5 --compare --excitation 3.3 --max-power 1m\n"
                    "\n") +
        kSafetyNote);
    sub->callback([opt] { run_size(*opt); });
}

}  // namespace rtline::cli
