// rtline table: ADC code → temperature for firmware, as a lookup table and optionally a polynomial,
// each with its largest error over every code of the span; text, JSON, CSV or a C99 header.
#include <cmath>
#include <memory>
#include <optional>

#include "commands.hpp"
#include "common.hpp"
#include "emit_c.hpp"
#include "pictures.hpp"
#include "rtline/correction.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

struct TableCommand {
    ModelOptions model;
    SpanOptions span;
    CircuitOptions circuit;
    std::string adc_bits = "12";   // ADC resolution, bits
    std::string entries;           // table breakpoints (default 17 unless --max-error searches)
    std::string spacing = "code";  // code | error
    std::string degree;            // polynomial degree; empty: no polynomial, or searched by --max-error
    std::string fit;               // least-squares (default) | minimax
    std::string max_error;         // °C
    std::string unit = "0.01";     // °C per count of the fixed-point table
    std::string emit;              // "c": a C99 header instead of the report
    std::string prefix;            // C name prefix (default "ntc_")
    OutputOptions out;
    std::string svg;  // --svg FILE
};

constexpr std::size_t kDefaultEntries = 17;  // 16 segments: common practice, no formal source
const char* const kDeg =
    "\xC2\xB0"
    "C";

long long whole_number(const std::string& text, const std::string& field, const std::string& what) {
    const double v = parse_number(text, field);
    if (v != std::floor(v) || std::abs(v) > 1e9) throw InputError(field, text, what + " must be a whole number");
    return static_cast<long long>(v);
}

int parse_scale(const std::string& text) {
    const double u = parse_number(text, "--unit");
    if (std::abs(u - 0.1) < 1e-12) return 10;
    if (std::abs(u - 0.01) < 1e-12) return 100;
    throw InputError("--unit", text,
                     "choose 0.1 or 0.01 (\xC2\xB0"
                     "C per count of the fixed-point table)");
}

std::string convention(const CodeMap& map) {
    const std::string full = std::to_string(1LL << map.adc_bits);
    return "ratiometric: code k is the output ratio k/" + full +
           " of the ADC reference, which is the circuit's excitation; codes outside " + std::to_string(map.code_lo) +
           ".." + std::to_string(map.code_hi) + " read as the nearer end";
}

// The convention as two short lines for text and the C header; `deg` spells the degree sign.
std::vector<std::string> reading_lines(const CodeMap& map, const std::string& deg) {
    return {"ratiometric: code k is the output ratio k/" + std::to_string(1LL << map.adc_bits) +
                " of the ADC reference (the circuit's excitation)",
            "codes " + std::to_string(map.code_lo) + " to " + std::to_string(map.code_hi) + " of " +
                std::to_string(map.adc_bits) + " bits span " + celsius(map.t_k.front()) + " to " +
                celsius(map.t_k.back()) + " " + deg + "; codes outside read as the nearer end"};
}

std::string fixed_type(const FixedTable& f) { return f.bits == 16 ? "int16" : "int32"; }
std::string unit_text(const FixedTable& f) { return f.scale_per_c == 100 ? "0.01" : "0.1"; }

std::string x_definition(const Polynomial& p) {
    return "x = (2*code - " + std::to_string(p.code_lo + p.code_hi) + ") / " + std::to_string(p.code_hi - p.code_lo);
}

std::vector<double> coefficients_c(const Polynomial& p) {
    std::vector<double> c = p.coefficients_k;
    c[0] = kelvin_to_celsius(c[0]);
    return c;
}

Json polynomial_json(const Polynomial& p, const CodeMap& map) {
    return {{"fit", std::string(fit_name(p.fit))},
            {"degree", p.degree},
            {"x", x_definition(p)},
            {"code_lo", p.code_lo},
            {"code_hi", p.code_hi},
            {"coefficients", coefficients_c(p)},
            {"max_error_c", p.max_error_k},
            {"at_code", p.at_code},
            {"at_t_c", kelvin_to_celsius(map.temperature(p.at_code))}};
}

struct Result {
    Thermistor thermistor;
    Span span;
    Circuit circuit;
    CodeMap map;
    LookupTable table;
    FixedTable fixed;
    std::optional<Polynomial> polynomial;
    std::optional<double> max_error_k;  // the --max-error target, when given
    bool table_searched = false;        // the entry count was chosen by --max-error
    bool degree_searched = false;       // the degree was chosen by --max-error
};

std::string json_report(const Result& r) {
    Json doc = document("table");
    doc["model"] = model_json(r.thermistor);
    doc["span"] = {{"lo_c", kelvin_to_celsius(r.span.lo_k)}, {"hi_c", kelvin_to_celsius(r.span.hi_k)}};
    doc["circuit"] = circuit_json(r.circuit);
    doc["adc_bits"] = r.map.adc_bits;
    doc["reading"] = {{"convention", convention(r.map)},
                      {"code_lo", r.map.code_lo},
                      {"code_hi", r.map.code_hi},
                      {"t_at_code_lo_c", kelvin_to_celsius(r.map.t_k.front())},
                      {"t_at_code_hi_c", kelvin_to_celsius(r.map.t_k.back())},
                      {"temperature_rises_with_code", r.map.rising()}};
    doc["spacing"] = std::string(spacing_name(r.table.spacing));
    doc["unit_c"] = 1.0 / r.fixed.scale_per_c;
    doc["fixed_type"] = fixed_type(r.fixed);
    doc["interpolation"] = "linear";
    if (r.max_error_k) {
        doc["max_error_target_c"] = *r.max_error_k;
        Json searched = Json::array();
        if (r.table_searched) searched.push_back("entries");
        if (r.degree_searched) searched.push_back("degree");
        doc["searched"] = searched;  // what --max-error chose
    }
    doc["entries"] = r.table.codes.size();
    Json rows = Json::array();
    for (std::size_t i = 0; i < r.table.codes.size(); ++i) {
        rows.push_back(
            {{"code", r.table.codes[i]}, {"t_c", kelvin_to_celsius(r.table.t_k[i])}, {"t_fixed", r.fixed.t[i]}});
    }
    doc["table"] = rows;
    doc["max_error_c"] = r.table.max_error_k;
    doc["at_code"] = r.table.at_code;
    doc["at_t_c"] = kelvin_to_celsius(r.map.temperature(r.table.at_code));
    doc["fixed_point"] = {{"max_error_c", r.fixed.max_error_k},
                          {"at_code", r.fixed.at_code},
                          {"rounding_bound_c", 1.0 / r.fixed.scale_per_c}};
    if (r.polynomial) doc["polynomial"] = polynomial_json(*r.polynomial, r.map);
    return dump(doc);
}

Table breakpoint_table(const Result& r) {
    Table table({{"code", "code", 0},
                 {std::string("T (") + kDeg + ")", "t_c", 3},
                 {"T (" + unit_text(r.fixed) + " " + kDeg + ")", "t_fixed", 0}});
    for (std::size_t i = 0; i < r.table.codes.size(); ++i) {
        table.add_row({static_cast<double>(r.table.codes[i]), kelvin_to_celsius(r.table.t_k[i]),
                       static_cast<double>(r.fixed.t[i])});
    }
    return table;
}

std::string at(const CodeMap& map, std::int64_t code) {
    return "at code " + std::to_string(code) + " (" + celsius(map.temperature(code)) + " " + kDeg + ")";
}

std::string text_report(const Result& r) {
    const CodeMap& m = r.map;
    std::string t = "model:    " + describe_model(r.thermistor) + "\n";
    t += "circuit:  " + describe_circuit(r.circuit) + "\n";
    const std::vector<std::string> reading = reading_lines(m, kDeg);
    t += "reading:  " + reading[0] + "\n          " + reading[1] + "\n";
    t += "table:    " + std::to_string(r.table.codes.size()) + " entries, " +
         (r.table.spacing == Spacing::code ? "evenly spaced codes" : "spaced for equal error per segment") +
         ", linear interpolation; fixed point in " + unit_text(r.fixed) + " " + kDeg + " (" + fixed_type(r.fixed) +
         ")\n";
    if (r.table_searched) {
        t += "          the fewest entries whose interpolation error is at most " + format_number(*r.max_error_k, 4) +
             " " + kDeg + " (--max-error; rounding comes on top)\n";
    }
    t += "\n" + breakpoint_table(r).text() + "\n";
    t += "largest interpolation error  " + format_fixed(r.table.max_error_k, 4) + " " + kDeg + " " +
         at(m, r.table.at_code) + ", over all " + std::to_string(m.size()) + " codes of the span\n";
    t += "in fixed point               " + format_fixed(r.fixed.max_error_k, 4) + " " + kDeg + " " +
         at(m, r.fixed.at_code) + ", rounding included (at most " + unit_text(r.fixed) + " " + kDeg + " more)\n";
    if (r.polynomial) {
        const Polynomial& p = *r.polynomial;
        t += "\npolynomial:  " + std::string(fit_name(p.fit)) + ", degree " + std::to_string(p.degree) +
             (r.degree_searched ? " (the lowest that meets " + format_number(*r.max_error_k, 4) + " " + kDeg + ")"
                                : "") +
             ", T(x) = sum of c_i x^i in " + kDeg + ", " + x_definition(p) + "\n";
        const std::vector<double> c = coefficients_c(p);
        for (std::size_t i = 0; i < c.size(); ++i)
            t += "  c" + std::to_string(i) + " = " + format_number(c[i], 12) + "\n";
        t += "largest polynomial error     " + format_fixed(p.max_error_k, 4) + " " + kDeg + " " + at(m, p.at_code) +
             "\n";
    }
    return t;
}

std::string c_report(const Result& r, const std::string& prefix) {
    const CodeMap& m = r.map;
    CHeader h;
    h.prefix = prefix.empty() ? "ntc_" : prefix;
    h.adc_bits = m.adc_bits;
    h.table = &r.fixed;
    if (r.polynomial) h.polynomial = &*r.polynomial;
    // The comment is ASCII: the model line's degree sign and ohm words come from describe_*.
    auto ascii = [](std::string s) {
        for (std::size_t pos; (pos = s.find("\xC2\xB0")) != std::string::npos;) s.replace(pos, 2, "deg");
        return s;
    };
    h.comment = {"ADC code to temperature, written by rtline " RTLINE_VERSION " (rtline table).",
                 "",
                 "model:   " + ascii(describe_model(r.thermistor)),
                 "circuit: " + describe_circuit(r.circuit),
                 "reading: " + reading_lines(m, "degC")[0],
                 "         " + reading_lines(m, "degC")[1],
                 "table:   " + std::to_string(r.table.codes.size()) + " entries, spacing " +
                     std::string(spacing_name(r.table.spacing)) + ", in " + unit_text(r.fixed) + " degC",
                 "error:   interpolation " + format_fixed(r.table.max_error_k, 4) + " degC at code " +
                     std::to_string(r.table.at_code) + "; this integer code " + format_fixed(r.fixed.max_error_k, 4) +
                     " degC at code " + std::to_string(r.fixed.at_code)};
    if (r.polynomial) {
        h.comment.push_back("poly:    " + std::string(fit_name(r.polynomial->fit)) + ", degree " +
                            std::to_string(r.polynomial->degree) + ", error " +
                            format_fixed(r.polynomial->max_error_k, 4) + " degC at code " +
                            std::to_string(r.polynomial->at_code));
    }
    h.comment.insert(h.comment.end(),
                     {"", "rtline is not a protective device; verify the design with measured parts."});
    return c_header(h);
}

// Refuses a circuit the table cannot read before asking for its resistors, naming the flag as typed.
void refuse_unreadable(const CircuitOptions& o) {
    Circuit probe;
    probe.topology = parse_topology(o.circuit, "--circuit");
    if (!o.excitation.empty()) probe.excitation = {Drive::voltage, 1.0};
    if (!o.current.empty()) probe.excitation = {Drive::current, 1.0};
    try {
        require_ratiometric(probe);
    } catch (const InputError& e) {
        const std::string& text = e.field() == "--excitation" ? o.excitation
                                  : e.field() == "--current"  ? o.current
                                                              : o.circuit;
        throw InputError(e.field(), text, e.why());
    }
}

void run_table(const TableCommand& o) {
    const Format format = parse_format(o.out.format);
    const bool emit_c = !o.emit.empty();
    if (emit_c && o.emit != "c") throw InputError("--emit", o.emit, "the only form is c (a C99 header)");
    if (emit_c && format != Format::text) {
        throw InputError("--format", o.out.format, "give either --emit c or --format, not both");
    }
    if (!o.prefix.empty() && !emit_c) throw InputError("--prefix", o.prefix, "applies only with --emit c");
    if (!o.prefix.empty()) check_c_prefix(o.prefix);
    if (!o.svg.empty()) check_svg_path(o.svg, o.out.output);

    const int bits = static_cast<int>(whole_number(o.adc_bits, "--adc-bits", "a bit count"));
    const int scale = parse_scale(o.unit);
    const Spacing spacing = parse_spacing(o.spacing, "--spacing");
    const bool want_poly = !o.degree.empty() || !o.fit.empty();
    const FitKind fit = o.fit.empty() ? FitKind::least_squares : parse_fit(o.fit, "--fit");
    if (want_poly && format == Format::csv) {
        throw InputError("--format", o.out.format, "CSV carries the table alone; use text or json for the polynomial");
    }
    std::optional<long long> entries;
    if (!o.entries.empty()) {
        entries = whole_number(o.entries, "--entries", "an entry count");
        if (*entries < 2) throw InputError("--entries", o.entries, "a table needs at least 2 entries");
    }
    std::optional<int> degree;
    if (!o.degree.empty()) {
        const long long d = whole_number(o.degree, "--degree", "a degree");
        if (d < 1 || d > kMaxDegree) {
            throw InputError("--degree", o.degree, "choose a degree from 1 to " + std::to_string(kMaxDegree));
        }
        degree = static_cast<int>(d);
    }
    std::optional<double> target_k;
    if (!o.max_error.empty()) {
        const double c = parse_number(o.max_error, "--max-error");
        if (!(c > 0.0))
            throw InputError("--max-error", o.max_error,
                             "the largest error must be positive (" + std::string(kDeg) + ")");
        if (entries && (!want_poly || degree)) {
            throw InputError("--max-error", o.max_error,
                             "nothing left to choose; leave out --entries (and --degree) to find the smallest");
        }
        target_k = c;  // a temperature difference: the same in kelvin
    } else if (want_poly && !degree) {
        throw InputError("--fit", o.fit, "give --degree D, or --max-error C to find the lowest degree");
    }

    refuse_unreadable(o.circuit);
    Result r{build_model(o.model), build_span(o.span), {}, {}, {}, {}, {}, target_k};
    r.circuit = build_circuit(o.circuit, r.thermistor, r.span);
    try {
        r.map = map_codes(r.thermistor, r.circuit, r.span, bits);
    } catch (const InputError& e) {
        if (e.field() != "--span") throw;
        throw InputError("--span", o.span.span, e.why());  // quoted as typed, not as kelvin turned back into °C
    }
    r.table_searched = target_k && !entries;
    r.degree_searched = target_k && want_poly && !degree;
    if (r.table_searched) {
        r.table = smallest_table(r.map, *target_k, spacing);
    } else {
        r.table = make_table(r.map, entries ? static_cast<std::size_t>(*entries) : kDefaultEntries, spacing);
    }
    r.fixed = to_fixed(r.table, r.map, scale);
    if (want_poly) {
        r.polynomial = degree ? fit_polynomial(r.map, *degree, fit) : lowest_degree(r.map, *target_k, fit);
    }

    std::string bytes;
    if (emit_c) {
        bytes = c_report(r, o.prefix);
    } else if (format == Format::json) {
        bytes = json_report(r);
    } else if (format == Format::csv) {
        bytes = breakpoint_table(r).csv();
    } else {
        bytes = text_report(r);
    }
    std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
    if (!o.svg.empty()) {
        outputs.push_back(
            {o.svg, svg::render(table_figure(r.thermistor, r.circuit, r.map, r.table, r.polynomial, r.max_error_k)),
             "--svg"});
    }
    emit_all(outputs);
}

}  // namespace

void setup_table(CLI::App& app) {
    auto opt = std::make_shared<TableCommand>();
    auto* sub = app.add_subcommand("table", "ADC code to temperature: a lookup table or polynomial for firmware");
    add_model_options(*sub, opt->model);
    add_span_options(*sub, opt->span);
    sub->remove_option(sub->get_option("--step"));  // every ADC code of the span is evaluated instead
    add_circuit_options(*sub, opt->circuit);
    sub->add_option("--adc-bits", opt->adc_bits, "ADC resolution N, 1 to 24 bits (default 12)")->group("Reading");
    sub->add_option("--entries", opt->entries, "Table breakpoints, at least 2 (default 17)")->group("Table");
    sub->add_option("--spacing", opt->spacing, "code (evenly spaced codes, default) or error (equal error per segment)")
        ->group("Table");
    sub->add_option("--unit", opt->unit, "Fixed-point step of the table's temperatures: 0.1 or 0.01 degC (default)")
        ->group("Table");
    sub->add_option("--degree", opt->degree, "Also fit a polynomial T(x) of this degree, 1 to 12")->group("Polynomial");
    sub->add_option("--fit", opt->fit, "Polynomial fit: least-squares (default) or minimax")->group("Polynomial");
    sub->add_option("--max-error", opt->max_error,
                    "Largest error in degC: find the smallest table (and lowest degree with --fit)")
        ->group("Table");
    add_output_options(*sub, opt->out);
    sub->add_option("--emit", opt->emit, "c: write a C99 header (table and interpolation function) instead")
        ->group("Output");
    sub->add_option("--prefix", opt->prefix, "With --emit c: prefix of the C names (default ntc_)")->group("Output");
    add_svg_option(*sub, opt->svg);
    sub->footer(std::string("Examples:\n"
                            "  rtline table --r25 10k --beta 3950 --span 0:45 --circuit divider-low --rs 10k "
                            "--adc-bits 12 --entries 17\n"
                            "  rtline table --r25 10k --beta 3950 --span -20:60 --circuit divider-high --rs 10k "
                            "--max-error 0.1 --spacing error --emit c --prefix pack_ -o pack_temp.h\n"
                            "Code k is the output ratio k/2^N of the ADC reference (ratiometric: the reference is "
                            "the divider's excitation).\nThe errors are measured over every code of the span "
                            "against the exact inverse (ratio -> R_T -> T by the model).\n\n") +
                kSafetyNote);
    sub->callback([opt] { run_table(*opt); });
}

}  // namespace rtline::cli
