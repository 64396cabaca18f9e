// rtline design: from requirements to a reviewed channel. Parses the requirements and the candidate
// parts, calls design() once, and writes the report (text, JSON, Markdown) and, with -o DIR, the review
// package: report.md, design.json (a spec that size, budget and table read back), the C header, SVGs.
#include <cmath>
#include <filesystem>
#include <memory>
#include <sstream>

#include "budget_flags.hpp"
#include "commands.hpp"
#include "common.hpp"
#include "design_report.hpp"
#include "emit_c.hpp"
#include "rtline/design.hpp"
#include "rtline/error.hpp"
#include "rtline/rtcsv.hpp"

namespace rtline::cli {

namespace {

struct DesignCommand {
    ModelOptions model;
    std::string candidates;  // CSV of the user's own parts
    SpanOptions span;
    std::string max_error;  // °C
    std::string confidence = "worst-case";
    std::string excitation;  // V; empty: ratiometric
    std::string series = "E24,E96";
    std::string circuit;  // comma list; empty: every divider
    std::string range = "100:1M";
    std::string shortlist = "6";
    std::string max_power, max_self_heating, min_span, min_sensitivity;
    std::string spacing = "code";
    std::string unit = "0.01";
    std::string prefix;
    std::string runners_up = "5";
    BudgetFlags parts;
    std::string format = "text";
    std::string output_dir;  // -o DIR: the review package
};

std::vector<std::string> split(const std::string& text, char sep) {
    std::vector<std::string> out;
    std::string item;
    std::istringstream in(text);
    while (std::getline(in, item, sep)) {
        const std::size_t a = item.find_first_not_of(" \t\r");
        const std::size_t b = item.find_last_not_of(" \t\r");
        out.push_back(a == std::string::npos ? std::string() : item.substr(a, b - a + 1));
    }
    return out;
}

// --candidates: a header line naming the columns (label, r25_ohm, b_k or points, and optionally
// r25_tol_pct, b_tol_pct, dissipation_mw_per_k; t0_c), then one part per line. A points file is taken
// from the CSV's folder. Empty tolerance cells take the flags' values.
std::vector<DesignPart> read_candidates(const std::string& path, const DesignPart& defaults) {
    const std::string text = read_text(path, "--candidates");
    const std::string base = path == "-" ? std::string() : std::filesystem::path(path).parent_path().string();
    std::istringstream in(text);
    std::vector<std::string> header;
    std::vector<DesignPart> parts;
    std::size_t line_no = 0;
    for (std::string line; std::getline(in, line);) {
        ++line_no;
        if (!line.empty() && line.back() == '\r') line.pop_back();
        if (line.find_first_not_of(" \t") == std::string::npos || line.front() == '#') continue;
        const std::vector<std::string> cells = split(line, ',');
        const std::string where = "--candidates line " + std::to_string(line_no);
        if (header.empty()) {
            header = cells;
            for (const std::string& h : header) {
                if (h != "label" && h != "r25_ohm" && h != "b_k" && h != "t0_c" && h != "points" &&
                    h != "r25_tol_pct" && h != "b_tol_pct" && h != "dissipation_mw_per_k") {
                    throw InputError(where, h,
                                     "unknown column; the columns are label, r25_ohm, b_k, t0_c, points, "
                                     "r25_tol_pct, b_tol_pct and dissipation_mw_per_k");
                }
            }
            if (std::find(header.begin(), header.end(), "label") == header.end()) {
                throw InputError(where, line, "the header must name a label column");
            }
            continue;
        }
        if (cells.size() != header.size()) {
            throw InputError(
                where, line,
                "has " + std::to_string(cells.size()) + " cells for " + std::to_string(header.size()) + " columns");
        }
        auto cell = [&](const std::string& name) {
            const auto it = std::find(header.begin(), header.end(), name);
            return it == header.end() ? std::string() : cells[static_cast<std::size_t>(it - header.begin())];
        };
        DesignPart p = defaults;
        p.label = cell("label");
        if (p.label.empty()) throw InputError(where, line, "the label is empty");
        ModelOptions m;
        m.r25 = cell("r25_ohm");
        m.beta = cell("b_k");
        if (!cell("t0_c").empty()) m.t0 = cell("t0_c");
        m.points = cell("points");
        if (!m.points.empty() && !base.empty() && m.points.front() != '/') {
            m.points = (std::filesystem::path(base) / m.points).string();
        }
        try {
            p.model = build_model(m);
        } catch (const InputError& e) {
            throw InputError(where + " (" + p.label + ")", e.value(), e.why());
        }
        if (!cell("r25_tol_pct").empty()) p.tol_r25 = parse_percent(cell("r25_tol_pct"), where + " r25_tol_pct");
        if (!cell("b_tol_pct").empty()) p.tol_beta = parse_percent(cell("b_tol_pct"), where + " b_tol_pct");
        if (!cell("dissipation_mw_per_k").empty()) {
            p.dissipation_w_per_k = 1e-3 * parse_number(cell("dissipation_mw_per_k"), where + " dissipation_mw_per_k");
            if (!(p.dissipation_w_per_k > 0.0)) {
                throw InputError(where + " dissipation_mw_per_k", cell("dissipation_mw_per_k"),
                                 "the dissipation constant must be positive (mW/K)");
            }
        }
        parts.push_back(std::move(p));
    }
    if (parts.empty()) throw InputError("--candidates", path, "holds no part (a header line, then one part a line)");
    return parts;
}

DesignRun build_run(const DesignCommand& o) {
    DesignRun r;
    DesignSpec& s = r.spec;
    s.span = build_span(o.span);
    s.step_k = build_step(o.span);
    if (o.max_error.empty()) throw InputError("--max-error", "", "give the accuracy the design must meet, degC");
    s.max_error_k = parse_number(o.max_error, "--max-error");
    if (!(s.max_error_k > 0.0)) throw InputError("--max-error", o.max_error, "the target must be positive (degC)");
    s.confidence = parse_confidence(o.confidence, "--confidence");
    if (!o.excitation.empty()) s.drive = {Drive::voltage, parse_quantity(o.excitation, "--excitation", "V")};
    s.series.clear();
    for (const std::string& t : split(o.series, ',')) s.series.push_back(parse_series(t, "--series"));
    for (const std::string& t : split(o.circuit, ',')) {
        if (!o.circuit.empty()) s.topologies.push_back(parse_topology(t, "--circuit"));
    }
    {
        const std::size_t colon = o.range.find(':');
        if (colon == std::string::npos) throw InputError("--range", o.range, "expected LO:HI in ohm, e.g. 100:1M");
        s.range_lo_ohm = parse_resistance(o.range.substr(0, colon), "--range");
        s.range_hi_ohm = parse_resistance(o.range.substr(colon + 1), "--range");
        if (!(s.range_lo_ohm < s.range_hi_ohm)) {
            throw InputError("--range", o.range, "the low end must be below the high end");
        }
    }
    s.shortlist = parse_count(o.shortlist, "--shortlist", 1, 100, "expected a whole number from 1 to 100");
    r.runners_up = parse_count(o.runners_up, "--runners-up", 0, 100, "expected a whole number from 0 to 100");
    const bool driven = !o.excitation.empty();
    if (!o.max_power.empty()) {
        s.constraints.max_power_w = optional_quantity(o.max_power, "--max-power", "W", 0.0);
        if (!driven) throw InputError("--max-power", o.max_power, kNeedsDrive);
    }
    if (!o.max_self_heating.empty()) {
        s.constraints.max_self_heating_k = optional_quantity(o.max_self_heating, "--max-self-heating", "K", 0.0);
        if (!driven) throw InputError("--max-self-heating", o.max_self_heating, kNeedsDrive);
    }
    if (!o.min_span.empty()) s.constraints.min_span = optional_quantity(o.min_span, "--min-span", "", 0.0);
    if (!o.min_sensitivity.empty()) {
        s.constraints.min_sensitivity = optional_quantity(o.min_sensitivity, "--min-sensitivity", "", 0.0);
    }
    s.spacing = parse_spacing(o.spacing, "--spacing");
    {
        const double u = parse_number(o.unit, "--unit");
        if (std::abs(u - 0.1) < 1e-12)
            s.scale_per_c = 10;
        else if (std::abs(u - 0.01) < 1e-12)
            s.scale_per_c = 100;
        else
            throw InputError("--unit", o.unit, "choose 0.1 or 0.01 (degC per count of the fixed-point table)");
    }
    // The budget: its flags for a divider under the drive (its reading unit and default drive tolerance).
    Circuit probe;
    probe.excitation = s.drive;
    BudgetFlags flags = o.parts;
    if (o.parts.adc_bits.empty()) throw InputError("--adc-bits", "", "give the converter's resolution in bits");
    s.budget = build_budget_spec(flags, probe);
    s.threads = s.budget.threads;
    if (o.parts.adc_ref == "excitation")
        s.reference.kind = ConverterReference::Kind::excitation;
    else if (!o.parts.adc_ref.empty()) {
        s.reference.kind = ConverterReference::Kind::fixed;
        s.reference.volts = s.budget.adc.full_scale;
    }
    DesignPart defaults;
    defaults.tol_r25 = s.budget.tolerance.r25;
    defaults.tol_beta = s.budget.tolerance.beta;
    defaults.dissipation_w_per_k = s.budget.dissipation_w_per_k;
    if (!o.candidates.empty()) {
        if (!o.model.r25.empty() || !o.model.beta.empty() || !o.model.sh.empty() || !o.model.points.empty()) {
            throw InputError("--candidates", o.candidates, "give the thermistor one way: a model, or --candidates");
        }
        s.parts = read_candidates(o.candidates, defaults);
        r.candidates_file = o.candidates;
    } else {
        if (o.model.r25.empty() && o.model.beta.empty() && o.model.sh.empty() && o.model.points.empty()) {
            throw InputError("--r25", "",
                             "no thermistor given; use --r25 and --beta, --sh A,B,C, --points FILE, or a parts file "
                             "of candidates with --candidates FILE");
        }
        defaults.model = build_model(o.model);
        defaults.label = "thermistor";
        s.parts.push_back(defaults);
    }
    r.flags = o.parts;
    r.max_error_text = o.max_error;
    r.prefix = o.prefix;
    if (!o.prefix.empty()) check_c_prefix(o.prefix);
    return r;
}

void run_design(const DesignCommand& o) {
    const Format format = parse_format(o.format, true);
    if (format == Format::csv) throw InputError("--format", o.format, "design writes text, json or markdown");
    if (!o.output_dir.empty() && std::filesystem::exists(o.output_dir) && !std::filesystem::is_directory(o.output_dir)) {
        throw InputError("-o", o.output_dir,
                         "is a file; design writes its review package (report.md, design.json, the header, the "
                         "pictures) into a folder");
    }
    DesignRun r = build_run(o);
    try {
        r.design = design(r.spec);
    } catch (const InputError& e) {
        if (e.input() == Input::trials) throw e.with_value(o.parts.trials);
        if (e.input() == Input::dissipation && o.parts.dissipation.empty() && !o.candidates.empty()) {
            // The dissipation constant came from the parts file, not from a flag: say so.
            throw InputError("--candidates", o.candidates,
                             "a part's dissipation_mw_per_k asks for its self-heating, which needs the real drive; "
                             "give --excitation V (with --adc-ref excitation for a ratiometric reading)");
        }
        throw;
    }
    std::string bytes;
    switch (format) {
        case Format::json: bytes = dump(design_json(r)); break;
        case Format::markdown: bytes = design_markdown(r, false); break;
        default: bytes = design_text(r); break;
    }
    if (!r.design.met) {
        // Nothing meets the target: the closest design and the binding cause, on stderr; exit 1.
        throw InfeasibleError(shortfall_words(r) + "; the closest design: " + chosen_words(r));
    }
    std::vector<Output> outputs{{"", bytes, "-o"}};
    if (!o.output_dir.empty()) {
        std::error_code ec;
        std::filesystem::create_directories(o.output_dir, ec);
        if (ec) throw InputError("-o", o.output_dir, "cannot create the folder (" + ec.message() + ")");
        for (const auto& [name, text] : design_package(r)) {
            outputs.push_back({(std::filesystem::path(o.output_dir) / name).string(), text, "-o"});
        }
    }
    emit_all(outputs);
}

}  // namespace

void setup_design(CLI::App& app) {
    auto opt = std::make_shared<DesignCommand>();
    auto* sub = app.add_subcommand(
        "design",
        "From requirements to a design: thermistor, topology, standard values and firmware table by total error");
    add_model_options(*sub, opt->model);
    sub->add_option("--candidates", opt->candidates,
                    "CSV of your own parts: label, r25_ohm and b_k (or points), r25_tol_pct, b_tol_pct, "
                    "dissipation_mw_per_k")
        ->check(non_empty_file_name)
        ->group("Thermistor");
    add_span_options(*sub, opt->span);
    const char* req = "Requirements";
    sub->add_option("--max-error", opt->max_error, "Accuracy target: the largest |error| in degC, table included")
        ->group(req);
    sub->add_option("--confidence", opt->confidence,
                    "worst-case (default), or the Monte Carlo's 95 or 99.7 % bound of |error|")
        ->group(req);
    sub->add_option("--excitation", opt->excitation, "Drive voltage, V (default: ratiometric, no drive)")->group(req);
    const char* search = "Search";
    sub->add_option("--series", opt->series, "Standard series allowed, comma-separated (default E24,E96)")
        ->group(search);
    sub->add_option("--circuit", opt->circuit,
                    "Topologies allowed, comma-separated: divider-high, divider-low, shunt-divider (default all)")
        ->group(search);
    sub->add_option("--range", opt->range, "Resistor values LO:HI in ohm (default 100:1M)")->group(search);
    sub->add_option("--shortlist", opt->shortlist,
                    "Most linear combinations budgeted per part, series and topology (default 6)")
        ->group(search);
    sub->add_option("--runners-up", opt->runners_up, "Runners-up listed beside the design (default 5)")->group(search);
    const char* cons = "Constraints";
    sub->add_option("--max-power", opt->max_power, "Largest thermistor power, W; needs --excitation")->group(cons);
    sub->add_option("--max-self-heating", opt->max_self_heating, "Largest self-heating, K; needs --dissipation")
        ->group(cons);
    sub->add_option("--min-span", opt->min_span, "Smallest output span, output units")->group(cons);
    sub->add_option("--min-sensitivity", opt->min_sensitivity, "Smallest |d output/dT|, output units per K")
        ->group(cons);
    add_budget_flags(*sub, opt->parts, {true, false, false, false});
    const char* tab = "Table";
    sub->add_option("--spacing", opt->spacing, "Table breakpoints: code (default), error or power-of-two")->group(tab);
    sub->add_option("--unit", opt->unit, "Fixed-point step of the table: 0.1 or 0.01 degC (default)")->group(tab);
    sub->add_option("--prefix", opt->prefix, "Prefix of the C header's names (default ntc_)")->group(tab);
    sub->add_option("--format", opt->format, "text (default), json or markdown")->group("Output");
    sub->add_option("-o,--output", opt->output_dir,
                    "Write the review package to this folder: report.md, design.json, the C header and SVGs "
                    "(only when the design meets the target)")
        ->check(non_empty_file_name)
        ->group("Output");
    sub->footer(std::string("Examples:\n"
                            "  rtline design --r25 10k --beta 3950 --span -20:60 --step 5 --max-error 1 --adc-bits 12\n"
                            "  rtline design --candidates parts.csv --span -30:10 --step 5 --max-error 0.5 "
                            "--confidence 99.7 --adc-bits 12 --trials 10000 -o review\n"
                            "Exit 1 when nothing meets --max-error: the closest design and the cause that binds.\n\n") +
                kSafetyNote);
    sub->callback([opt] { run_design(*opt); });
}

}  // namespace rtline::cli
