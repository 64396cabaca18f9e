// rtline check: a candidate network analysed point by point against a straight reference line.
#include <algorithm>
#include <cmath>
#include <iostream>
#include <memory>

#include "commands.hpp"
#include "common.hpp"
#include "frontend_report.hpp"
#include "markdown.hpp"
#include "pictures.hpp"
#include "rtline/analysis.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

const char* const kDeg =
    "\xC2\xB0"
    "C";

struct CheckCommand {
    ModelOptions model;
    SpanOptions span;
    CircuitOptions circuit;
    std::string dissipation;  // mW/K
    std::string line = "endpoint";
    OutputOptions out;
    std::string svg;  // --svg FILE
    FrontEndOptions front_end;
};

std::string line_description(LineKind k) {
    switch (k) {
        case LineKind::endpoint: return "endpoint line (through the outputs at the span's two ends)";
        case LineKind::best_fit: return "least-squares line (over the span's points)";
        case LineKind::minimax: return "minimax line (the smallest largest deviation)";
    }
    return "";
}

Json summary_json(const AnalysisSummary& s, bool driven) {
    Json j = {{"max_nonlinearity_pct_fsd", s.max_nonlinearity_pct_fsd},
              {"at_t_c", kelvin_to_celsius(s.at_t_k)},
              {"max_error_k", s.max_error_k},
              {"output_span", s.output_span},
              {"sensitivity_per_k", {{"min", s.sensitivity_min_per_k}, {"max", s.sensitivity_max_per_k}}}};
    if (driven) {
        j["max_power_w"] = number(s.max_power_w);
        j["max_self_heating_k"] = number(s.max_self_heating_k);
    }
    return j;
}

// The nominal shift of the lead wires over the span, K (lowest, highest): what a firmware that does
// not subtract them would read.
std::pair<double, double> lead_shift_range(const Circuit& c, const Thermistor& model, const Grid& grid) {
    double lo = INFINITY;
    double hi = -INFINITY;
    for (const double t_k : grid.t_k) {
        const double d = lead_shift_k(c, model, t_k);
        lo = std::min(lo, d);
        hi = std::max(hi, d);
    }
    return {lo, hi};
}

// The summary under the points table, in the text's words.
Facts summary_facts(const AnalysisSummary& s, const Circuit& circuit, const Thermistor& thermistor, const Grid& grid,
                    LineKind line, double dissipation_w_per_k) {
    const std::string unit = output_unit(circuit);
    const std::string deg(kDeg);
    Facts f{{"largest |nonlinearity|", format_decimals(s.max_nonlinearity_pct_fsd, 3) + " %FSD at " + celsius(s.at_t_k) +
                                           " " + deg + " (against the " + std::string(line_name(line)) + " line)"},
            {"largest |error|", format_decimals(s.max_error_k, 3) + " " + deg},
            {"output span", format_significant(s.output_span, 5) + " " + unit},
            {"sensitivity", format_significant(s.sensitivity_min_per_k, 4) + " to " +
                                format_significant(s.sensitivity_max_per_k, 4) + " " + unit + " per K"}};
    if (circuit.lead_ohm > 0.0) {
        const auto [lo, hi] = lead_shift_range(circuit, thermistor, grid);
        f.push_back({"lead wires", format_decimals(lo, 3) + " to " + format_decimals(hi, 3) + " " + deg +
                                       " if the firmware does not subtract their " +
                                       format_resistance(circuit.lead_ohm, 6) + " ohm"});
    }
    if (circuit.excitation.drive == Drive::ratiometric) {
        f.push_back({"power, self-heating", "none without a drive; give --excitation V or --current A"});
    } else if (std::isfinite(s.max_power_w)) {
        f.push_back({"largest power", format_significant(1e3 * s.max_power_w, 4) + " mW"});
    }
    if (std::isfinite(s.max_self_heating_k)) {
        f.push_back({"largest self-heating", format_significant(s.max_self_heating_k, 4) + " K (dissipation constant " +
                                                 format_number(1e3 * dissipation_w_per_k) + " mW/K)"});
    }
    return f;
}

void run_check(const CheckCommand& o) {
    const Format format = parse_format(o.out.format, true);
    const Thermistor thermistor = build_model(o.model);
    const Span span = build_span(o.span);
    const LineKind line = parse_line(o.line, "--line");
    if (!o.svg.empty()) check_svg_path(o.svg, o.out.output);
    double dissipation_w_per_k = 0.0;
    if (!o.dissipation.empty()) {
        dissipation_w_per_k = 1e-3 * parse_number(o.dissipation, "--dissipation");
        if (!(dissipation_w_per_k > 0.0)) {
            throw InputError("--dissipation", o.dissipation, "the dissipation constant must be positive (mW/K)");
        }
    }
    const Grid grid = build_grid(thermistor, span, o.span, true);
    const Circuit circuit = build_circuit(o.circuit, thermistor, span);
    const Analysis a = analyze(grid, thermistor, circuit, line, dissipation_w_per_k);
    const std::string unit = output_unit(circuit);
    std::optional<FrontEndReport> fe;
    if (o.front_end.given()) fe = front_end_report(o.front_end, circuit, a, grid);
    // Power and self-heating are figures of a drive: without one there are none to print.
    const bool driven = circuit.excitation.drive != Drive::ratiometric;
    if (!driven && dissipation_w_per_k > 0.0) {
        throw InputError("--dissipation", o.dissipation, kNeedsDrive);
    }

    std::string bytes;
    if (format == Format::json) {
        Json doc = document("check");
        doc["model"] = model_json(thermistor);
        doc["span"] = {{"lo_c", kelvin_to_celsius(span.lo_k)}, {"hi_c", kelvin_to_celsius(span.hi_k)}};
        doc["circuit"] = circuit_json(circuit);
        doc["line"] = std::string(line_name(line));
        doc["line_coefficients"] = {{"slope_per_k", a.line.slope}, {"intercept", a.line.at(kZeroCelsiusK)}};
        if (dissipation_w_per_k > 0.0) doc["dissipation_mw_per_k"] = echoed(1e3 * dissipation_w_per_k);
        doc["summary"] = summary_json(a.summary, driven);
        if (circuit.lead_ohm > 0.0) {
            const auto [lo, hi] = lead_shift_range(circuit, thermistor, grid);
            doc["summary"]["lead_shift_k"] = {{"min", lo}, {"max", hi}};
        }
        Json pts = Json::array();
        for (const PointResult& p : a.points) {
            Json pt = {{"t_c", kelvin_to_celsius(p.t_k)},
                       {"r_t_ohm", p.r_t_ohm},
                       {"output", p.output},
                       {"ideal", p.ideal},
                       {"deviation", p.deviation},
                       {"nonlinearity_pct_fsd", p.nonlinearity_pct_fsd},
                       {"error_k", p.error_k},
                       {"sensitivity_per_k", p.sensitivity_per_k}};
            if (driven) {
                pt["power_w"] = number(p.power_w);
                pt["self_heating_k"] = number(p.self_heating_k);
            }
            pts.push_back(pt);
        }
        doc["points"] = pts;
        if (fe) doc["front_end"] = front_end_json(*fe, circuit);
        bytes = dump(doc);
    } else {
        const bool csv = format == Format::csv;
        std::vector<Column> columns{{"T (\xC2\xB0"
                                     "C)",
                                     "t_c", 2},
                                    {"R_T (ohm)", "r_t_ohm", -1, 5, true},
                                    {"output (" + unit + ")", "output" + unit_suffix(unit), -1, 6},
                                    {"ideal (" + unit + ")", "ideal" + unit_suffix(unit), -1, 6},
                                    {"deviation (" + unit + ")", "deviation" + unit_suffix(unit), -1, 4},
                                    {"nonlinearity (%FSD)", "nonlinearity_pct_fsd", 3},
                                    {"error (\xC2\xB0"
                                     "C)",
                                     "error_k", 3}};
        if (driven) {
            columns.push_back({csv ? "power (W)" : "power (mW)", "power_w", -1, 4});
            columns.push_back({"self-heating (K)", "self_heating_k", 4});
        }
        // CSV has no place for a title, so each row names the line its ideal and deviation refer to.
        if (csv) columns.push_back({"line", "line"});
        if (csv && fe) add_front_end_columns(columns, circuit);
        Table table(columns);
        std::size_t i = 0;
        for (const PointResult& p : a.points) {
            std::vector<Cell> row{kelvin_to_celsius(p.t_k), p.r_t_ohm, p.output, p.ideal, p.deviation,
                                  p.nonlinearity_pct_fsd,   p.error_k};
            if (driven) {
                row.emplace_back(csv ? p.power_w : 1e3 * p.power_w);
                row.emplace_back(p.self_heating_k);
            }
            if (csv) row.emplace_back(std::string(line_name(line)));
            if (csv && fe) add_front_end_cells(row, *fe, circuit, i);
            ++i;
            table.add_row(std::move(row));
        }
        if (csv) {
            bytes = table.csv();
        } else {
            const Facts header{{"model", describe_model(thermistor)},
                               {"circuit", describe_circuit(circuit)},
                               {"line", line_description(line)}};
            const Facts summary = summary_facts(a.summary, circuit, thermistor, grid, line, dissipation_w_per_k);
            if (format == Format::markdown) {
                Markdown md("rtline check: " + std::string(topology_name(circuit.topology)) + ", " +
                            format_number(kelvin_to_celsius(span.lo_k)) + " to " +
                            format_number(kelvin_to_celsius(span.hi_k)) + " " + kDeg);
                md.facts(header);
                md.section("Points");
                md.table(table);
                md.section("Summary");
                md.facts(summary);
                if (fe) {
                    md.section("Front end");
                    md.code(front_end_text(*fe, circuit));
                }
                // The front end's warnings go to stderr as "rtline: warning: ..." after the output.
                std::vector<std::string> fe_warnings;
                for (std::string w : fe ? fe->warnings : std::vector<std::string>{}) {
                    if (w.rfind("warning: ", 0) == 0) w.erase(0, 9);
                    fe_warnings.push_back(w);
                }
                bytes = md.str(fe_warnings);
            } else {
                bytes = facts_text(header, 9) + "\n" + table.text() + "\n" + facts_text(summary, 24, "");
                if (fe) bytes += front_end_text(*fe, circuit);
            }
        }
    }
    std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
    if (!o.svg.empty()) outputs.push_back({o.svg, svg::render(check_figure(thermistor, circuit, a)), "--svg"});
    emit_all(outputs);
    if (fe) {
        for (const std::string& w : fe->warnings) std::cerr << "rtline: " << w << "\n";
    }
}

}  // namespace

void setup_check(CLI::App& app) {
    auto opt = std::make_shared<CheckCommand>();
    auto* sub = app.add_subcommand("check", "Analyse a network's output against a straight line over a span");
    add_model_options(*sub, opt->model);
    add_span_options(*sub, opt->span);
    add_circuit_options(*sub, opt->circuit);
    sub->add_option("--dissipation", opt->dissipation, "Thermistor dissipation constant, mW/K (for self-heating)")
        ->group("Circuit");
    sub->add_option("--line", opt->line, "Reference line: endpoint (default), least-squares or minimax")->group("Analysis");
    add_front_end_options(*sub, opt->front_end);
    add_output_options(*sub, opt->out, true);
    add_svg_option(*sub, opt->svg);
    sub->footer(
        std::string("Example:\n"
                    "  rtline check --r25 10k --beta 3950 --span 0:45 --step 5 --circuit divider-low --rs 5k6\n"
                    "  rtline check --r25 10k --beta 3950 --span -20:60 --circuit bridge --r1 10k --load 100k "
                    "--excitation 3.3 --format json\n"
                    "  rtline check --r25 10k --beta 3950 --span -20:60 --circuit bridge --r1 10k --excitation 3.3 "
                    "--auto-range --sample-cap 10p --acquisition 1u\n"
                    "Nonlinearity = (output - line) / |output(T_hi) - output(T_lo)| x 100 %FSD; "
                    "error = deviation / line slope.\n\n") +
        kSafetyNote);
    sub->callback([opt] { run_check(*opt); });
}

}  // namespace rtline::cli
