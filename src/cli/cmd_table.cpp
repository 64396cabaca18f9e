// rtline table: ADC code → temperature for firmware, as a lookup table and optionally a polynomial,
// each with its largest error over every code of the span; text, JSON, CSV or a C99 header.
#include <cmath>
#include <memory>
#include <optional>

#include "commands.hpp"
#include "common.hpp"
#include "emit_c.hpp"
#include "frontend_report.hpp"
#include "markdown.hpp"
#include "pictures.hpp"
#include "rtline/budget.hpp"
#include "rtline/correction.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

struct TableCommand {
    ModelOptions model;
    SpanOptions span;
    CircuitOptions circuit;
    FrontEndOptions front;         // the amplifier and --adc-ref (its settling flags are not offered)
    std::string adc_bits = "12";   // ADC resolution, bits
    std::string adc_transfer;      // rounding (default) | truncating | full-scale
    std::string entries;           // table breakpoints (default: the fewest that meet the target)
    std::string spacing = "code";  // code | error | power-of-two
    std::string degree;            // polynomial degree; empty: no polynomial, or searched by --max-error
    std::string fit;               // least-squares (default) | minimax
    std::string max_error;         // °C
    std::string unit = "0.01";     // °C per count of the fixed-point table
    std::string fault_margin;      // codes ("12") or °C ("2C"); default from the budget's tolerances
    std::string emit;              // "c": a C99 header instead of the report
    std::string prefix;            // C name prefix (default "ntc_")
    OutputOptions out;
    std::string svg;  // --svg FILE
};

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

// How the converter's input relates to the network: the reference, and the amplifier when there is one.
std::vector<std::string> channel_lines(const Channel& ch, const AmplifierChoice& amp) {
    std::vector<std::string> lines;
    if (ch.ratiometric()) {
        lines.push_back("ratiometric: the ADC reference is the circuit's excitation");
    } else {
        const bool current = ch.circuit.excitation.drive == Drive::current;
        lines.push_back(std::string("not ratiometric: the ADC reads the voltage ") +
                        (current ? "the current makes across the network" : "of the network on its supply") +
                        " against a " + format_number(ch.reference, 6) + " V reference (the " +
                        (current ? "current's" : "supply's") + " and the reference's own errors move every reading)");
    }
    if (ch.amplifier) {
        lines.push_back(std::string("through an amplifier, ") +
                        (is_bridge(ch.circuit.topology) ? "differential, " : "") + describe_amplifier(amp, ch.circuit) +
                        "; its output taken to saturate at 0 and full scale");
    }
    return lines;
}

// The convention as short lines for text and the C header; `deg` spells the degree sign.
std::vector<std::string> reading_lines(const CodeMap& map, const Channel& ch, const AmplifierChoice& amp,
                                       const std::string& deg) {
    std::vector<std::string> lines = channel_lines(ch, amp);
    lines.push_back(describe_adc_transfer(map.transfer, map.adc_bits));
    lines.push_back("codes " + std::to_string(map.code_lo) + " to " + std::to_string(map.code_hi) + " of " +
                    std::to_string(map.adc_bits) + " bits span " + celsius(map.t_k.front()) + " to " +
                    celsius(map.t_k.back()) + " " + deg + "; codes outside read as the nearer end");
    return lines;
}

std::string convention(const CodeMap& map, const Channel& ch, const AmplifierChoice& amp) {
    std::string t;
    for (const std::string& line : channel_lines(ch, amp)) t += line + "; ";
    return t + describe_adc_transfer(map.transfer, map.adc_bits) + "; codes outside " + std::to_string(map.code_lo) +
           ".." + std::to_string(map.code_hi) + " read as the nearer end";
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
            {"max_error_k", p.max_error_k},
            {"at_code", p.at_code},
            {"at_t_c", kelvin_to_celsius(map.temperature(p.at_code))}};
}

// Where the fault margin came from, in words.
struct Margin {
    std::int64_t below = 0;
    std::int64_t above = 0;
    std::string source;
};

struct Result {
    Thermistor thermistor;
    Span span;
    Circuit circuit;
    Channel channel;      // the circuit, the amplifier and the converter's reference
    AmplifierChoice amp;  // how the amplifier was chosen, for the words
    CodeMap map;
    LookupTable table;
    FixedTable fixed;
    std::optional<Polynomial> polynomial;
    FaultBands faults;
    Margin margin;
    double target_k = 0.0;              // the target the table meets: --max-error, or the default
    bool target_given = false;          // --max-error was given
    std::optional<double> max_error_k;  // the --max-error target, when given
    bool table_searched = false;        // the entry count was chosen by --max-error
    bool degree_searched = false;       // the degree was chosen by --max-error
};

Json fault_json(const Result& r) {
    Json bands = Json::array();
    for (const CodeBand& b : r.faults.bands) {
        bands.push_back(
            {{"first_code", b.first}, {"last_code", b.last}, {"meaning", std::string(meaning_name(b.meaning))}});
    }
    Json hidden = Json::array();
    for (const CodeMeaning m : r.faults.hidden) hidden.push_back(std::string(meaning_name(m)));
    return {{"margin_codes_below", r.margin.below}, {"margin_codes_above", r.margin.above},
            {"margin_source", r.margin.source},     {"open_code", r.faults.open_code},
            {"short_code", r.faults.short_code},    {"bands", bands},
            {"not_told_from_a_reading", hidden}};
}

std::string json_report(const Result& r) {
    Json doc = document("table");
    doc["model"] = model_json(r.thermistor);
    doc["span"] = {{"lo_c", kelvin_to_celsius(r.span.lo_k)}, {"hi_c", kelvin_to_celsius(r.span.hi_k)}};
    doc["circuit"] = circuit_json(r.circuit);
    doc["adc_bits"] = r.map.adc_bits;
    doc["adc_transfer"] = std::string(adc_transfer_name(r.map.transfer));
    Json front = {{"ratiometric", r.channel.ratiometric()},
                  {"reference", r.channel.reference},
                  {"reference_unit", output_unit(r.circuit)},
                  {"amplifier", nullptr}};
    if (r.channel.amplifier) {
        front["amplifier"] = {{"gain_v_per_v", r.channel.amplifier->gain},
                              {"offset", r.channel.amplifier->offset},
                              {"auto_range", r.amp.auto_ranged}};
        if (r.amp.auto_ranged) front["amplifier"]["headroom_pct"] = echoed(100.0 * r.amp.headroom);
    }
    doc["front_end"] = front;
    doc["reading"] = {{"convention", convention(r.map, r.channel, r.amp)},
                      {"code_lo", r.map.code_lo},
                      {"code_hi", r.map.code_hi},
                      {"t_at_code_lo_c", kelvin_to_celsius(r.map.t_k.front())},
                      {"t_at_code_hi_c", kelvin_to_celsius(r.map.t_k.back())},
                      {"temperature_rises_with_code", r.map.rising()}};
    doc["spacing"] = std::string(spacing_name(r.table.spacing));
    if (r.table.spacing == Spacing::power_of_two) doc["shift"] = r.table.shift;
    doc["unit_k"] = 1.0 / r.fixed.scale_per_c;
    doc["fixed_type"] = fixed_type(r.fixed);
    doc["arithmetic_bits"] = r.fixed.arithmetic_bits;
    doc["interpolation"] = "linear";
    doc["max_error_target_k"] = r.target_k;
    doc["max_error_target_source"] = r.target_given ? "--max-error" : "default";
    Json searched = Json::array();
    if (r.table_searched) searched.push_back("entries");
    if (r.degree_searched) searched.push_back("degree");
    doc["searched"] = searched;  // what the target chose
    doc["entries"] = r.table.codes.size();
    Json rows = Json::array();
    for (std::size_t i = 0; i < r.table.codes.size(); ++i) {
        rows.push_back(
            {{"code", r.table.codes[i]}, {"t_c", kelvin_to_celsius(r.table.t_k[i])}, {"t_fixed", r.fixed.t[i]}});
    }
    doc["table"] = rows;
    doc["shipped"] = {{"max_error_k", r.fixed.max_error_k},
                      {"at_code", r.fixed.at_code},
                      {"at_t_c", kelvin_to_celsius(r.map.temperature(r.fixed.at_code))}};
    doc["interpolation_error"] = {{"max_error_k", r.table.max_error_k},
                                  {"at_code", r.table.at_code},
                                  {"at_t_c", kelvin_to_celsius(r.map.temperature(r.table.at_code))}};
    doc["faults"] = fault_json(r);
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

std::string spacing_words(const LookupTable& t) {
    switch (t.spacing) {
        case Spacing::code: return "evenly spaced codes";
        case Spacing::error: return "spaced for equal error per segment";
        case Spacing::power_of_two: return "every 2^" + std::to_string(t.shift) + " codes (segment found by a shift)";
    }
    return "";
}

std::string band_words(const CodeBand& b, const std::string& deg) {
    switch (b.meaning) {
        case CodeMeaning::reading: return "a temperature (the span, widened by the fault margin)";
        case CodeMeaning::open: return "open thermistor or broken wire";
        case CodeMeaning::short_circuit: return "shorted thermistor";
        case CodeMeaning::out_of_range: return "no reading and no thermistor fault gives it (check the wiring)";
    }
    (void)deg;
    return "";
}

std::vector<std::string> fault_lines(const Result& r, const std::string& deg) {
    std::vector<std::string> lines;
    lines.push_back("margin " + std::to_string(r.margin.below) + " codes below " + std::to_string(r.map.code_lo) +
                    ", " + std::to_string(r.margin.above) + " above " + std::to_string(r.map.code_hi) + " (" +
                    r.margin.source + ")");
    for (const CodeBand& b : r.faults.bands) {
        lines.push_back("codes " + std::to_string(b.first) + " to " + std::to_string(b.last) + ": " +
                        std::string(meaning_name(b.meaning)) + ", " + band_words(b, deg));
    }
    // What the fault codes assume beyond the circuit equations.
    std::string assumed;
    if (r.channel.amplifier) assumed = "the amplifier saturating at 0 and full scale";
    if (r.circuit.excitation.drive == Drive::current) {
        assumed += std::string(assumed.empty() ? "" : ", ") + "the current source's compliance above full scale";
    }
    lines.push_back("an open thermistor gives code " + std::to_string(r.faults.open_code) + ", a short code " +
                    std::to_string(r.faults.short_code) + (assumed.empty() ? "" : " (" + assumed + ")"));
    for (const CodeMeaning m : r.faults.hidden) {
        lines.push_back("a" + std::string(m == CodeMeaning::open ? "n open" : " shorted") +
                        " thermistor cannot be told from a reading with this circuit and margin");
    }
    return lines;
}

std::string target_words(const Result& r, const std::string& deg) {
    return format_number(r.target_k, 4) + " " + deg +
           (r.target_given ? " (--max-error)" : " (default: one unit or half the widest code step, the larger)");
}

std::string text_report(const Result& r) {
    const CodeMap& m = r.map;
    std::string t = "model:    " + describe_model(r.thermistor) + "\n";
    t += "circuit:  " + describe_circuit(r.circuit) + "\n";
    const std::vector<std::string> reading = reading_lines(m, r.channel, r.amp, kDeg);
    for (std::size_t i = 0; i < reading.size(); ++i) t += (i == 0 ? "reading:  " : "          ") + reading[i] + "\n";
    t += "table:    " + std::to_string(r.table.codes.size()) + " entries, " + spacing_words(r.table) +
         ", linear interpolation; fixed point in " + unit_text(r.fixed) + " " + kDeg + " (" + fixed_type(r.fixed) +
         ", " + std::to_string(r.fixed.arithmetic_bits) + "-bit arithmetic)\n";
    t += "target:   " + target_words(r, kDeg) + "\n";
    if (r.table_searched) t += "          the fewest entries whose shipped error meets it\n";
    t += "\n" + breakpoint_table(r).text() + "\n";
    t += "shipped error        " + format_decimals(r.fixed.max_error_k, 4) + " " + kDeg + " " + at(m, r.fixed.at_code) +
         ": the integer code as emitted, over all " + std::to_string(m.size()) + " codes of the span\n";
    t += "interpolation error  " + format_decimals(r.table.max_error_k, 4) + " " + kDeg + " " + at(m, r.table.at_code) +
         ", before rounding to " + unit_text(r.fixed) + " " + kDeg + "\n";
    t += "\nfaults:\n";
    for (const std::string& line : fault_lines(r, kDeg)) t += "  " + line + "\n";
    if (r.polynomial) {
        const Polynomial& p = *r.polynomial;
        t += "\npolynomial:  " + std::string(fit_name(p.fit)) + ", degree " + std::to_string(p.degree) +
             (r.degree_searched ? " (the lowest that meets " + format_number(r.target_k, 4) + " " + kDeg + ")" : "") +
             ", T(x) = sum of c_i x^i in " + kDeg + ", " + x_definition(p) + "\n";
        const std::vector<double> c = coefficients_c(p);
        for (std::size_t i = 0; i < c.size(); ++i)
            t += "  c" + std::to_string(i) + " = " + format_number(c[i], 12) + "\n";
        t += "shipped error (double precision)  " + format_decimals(p.max_error_k, 4) + " " + kDeg + " " +
             at(m, p.at_code) + "\n";
    }
    return t;
}

// The review document: the reading and the table's figures, the breakpoints, the fault codes and the
// polynomial, in the text report's words.
std::string markdown_report(const Result& r) {
    const CodeMap& m = r.map;
    const std::vector<std::string> reading = reading_lines(m, r.channel, r.amp, kDeg);
    Facts header{{"model", describe_model(r.thermistor)}, {"circuit", describe_circuit(r.circuit)}};
    for (std::size_t i = 0; i < reading.size(); ++i) header.push_back({i == 0 ? "reading" : "", reading[i]});
    header.insert(header.end(), {
        {"table", std::to_string(r.table.codes.size()) + " entries, " + spacing_words(r.table) +
                      ", linear interpolation; fixed point in " + unit_text(r.fixed) + " " + kDeg + " (" +
                      fixed_type(r.fixed) + ", " + std::to_string(r.fixed.arithmetic_bits) + "-bit arithmetic)"},
        {"target",
         target_words(r, kDeg) + (r.table_searched ? "; the fewest entries whose shipped error meets it" : "")}});
    Markdown md("rtline table: " + std::string(topology_name(r.circuit.topology)) + ", " +
                format_number(kelvin_to_celsius(r.span.lo_k)) + " to " + format_number(kelvin_to_celsius(r.span.hi_k)) +
                " " + kDeg + ", " + std::to_string(m.adc_bits) + "-bit codes");
    md.facts(header);
    md.section("Breakpoints");
    md.table(breakpoint_table(r));
    md.facts({{"shipped error", format_decimals(r.fixed.max_error_k, 4) + " " + kDeg + " " + at(m, r.fixed.at_code) +
                                    ": the integer code as emitted, over all " + std::to_string(m.size()) +
                                    " codes of the span"},
              {"interpolation error", format_decimals(r.table.max_error_k, 4) + " " + kDeg + " " + at(m, r.table.at_code) +
                                          ", before rounding to " + unit_text(r.fixed) + " " + kDeg}});
    md.section("Fault codes");
    md.list(fault_lines(r, kDeg));
    if (r.polynomial) {
        const Polynomial& p = *r.polynomial;
        md.section("Polynomial");
        md.facts({{"fit",
                   std::string(fit_name(p.fit)) + ", degree " + std::to_string(p.degree) +
                       (r.degree_searched ? " (the lowest that meets " + format_number(r.target_k, 4) + " " + kDeg + ")"
                                          : "")},
                  {"form", std::string("T(x) = sum of c_i x^i in ") + kDeg + ", " + x_definition(p)},
                  {"shipped error (double precision)",
                   format_decimals(p.max_error_k, 4) + " " + kDeg + " " + at(m, p.at_code)}});
        Table coefficients({{"i", "i", 0}, {"c_i", "c_i", -1, 12}});
        const std::vector<double> c = coefficients_c(p);
        for (std::size_t i = 0; i < c.size(); ++i) coefficients.add_row({static_cast<double>(i), c[i]});
        md.table(coefficients);
    }
    return md.str();
}

std::string c_report(const Result& r, const std::string& prefix) {
    const CodeMap& m = r.map;
    CHeader h;
    h.prefix = prefix.empty() ? "ntc_" : prefix;
    h.adc_bits = m.adc_bits;
    h.table = &r.fixed;
    h.faults = &r.faults;
    if (r.polynomial) h.polynomial = &*r.polynomial;
    // The comment is ASCII: the model line's degree sign and ohm words come from describe_*.
    auto ascii = [](std::string s) {
        for (std::size_t pos; (pos = s.find("\xC2\xB0")) != std::string::npos;) s.replace(pos, 2, "deg");
        return s;
    };
    h.comment = {"ADC code to temperature, written by rtline " RTLINE_VERSION " (rtline table).", "",
                 "model:   " + ascii(describe_model(r.thermistor)), "circuit: " + describe_circuit(r.circuit)};
    const std::vector<std::string> reading = reading_lines(m, r.channel, r.amp, "degC");
    for (std::size_t i = 0; i < reading.size(); ++i)
        h.comment.push_back((i == 0 ? "reading: " : "         ") + reading[i]);
    h.comment.insert(h.comment.end(), {"table:   " + std::to_string(r.table.codes.size()) + " entries, spacing " +
                                           std::string(spacing_name(r.table.spacing)) + ", in " + unit_text(r.fixed) +
                                           " degC, " + std::to_string(r.fixed.arithmetic_bits) + "-bit arithmetic",
                                       "target:  " + target_words(r, "degC"),
                                       "error:   this integer code " + format_decimals(r.fixed.max_error_k, 4) +
                                           " degC at code " + std::to_string(r.fixed.at_code) +
                                           " (interpolation alone " + format_decimals(r.table.max_error_k, 4) +
                                           " degC at code " + std::to_string(r.table.at_code) + ")"});
    if (r.polynomial) {
        h.comment.push_back("poly:    " + std::string(fit_name(r.polynomial->fit)) + ", degree " +
                            std::to_string(r.polynomial->degree) + ", error " +
                            format_decimals(r.polynomial->max_error_k, 4) + " degC at code " +
                            std::to_string(r.polynomial->at_code) + " (double precision)");
    }
    const std::vector<std::string> faults = fault_lines(r, "degC");
    for (std::size_t i = 0; i < faults.size(); ++i)
        h.comment.push_back((i == 0 ? "faults:  " : "         ") + faults[i]);
    h.comment.insert(h.comment.end(),
                     {"", "rtline is not a protective device; verify the design with measured parts."});
    return c_header(h);
}

// --fault-margin: a whole number of codes, or a temperature beyond each span end ("2C"); by default
// the codes the span's ends move by with the budget's default part tolerances.
Margin fault_margin(const std::string& text, const Result& r) {
    Margin m;
    if (text.empty()) {
        const Tolerances tol;
        const auto [below, above] = tolerance_margin(r.map, r.thermistor, r.channel, r.span, tol);
        m = {below, above,
             "default: where the span's ends move with R25, B and resistors at +-" + format_number(100.0 * tol.r25) +
                 " %, plus one code"};
        return m;
    }
    std::string number = text;
    bool degrees = false;
    for (const std::string& suffix : {std::string("\xC2\xB0") + "C", std::string("degC"), std::string("C")}) {
        if (number.size() > suffix.size() &&
            number.compare(number.size() - suffix.size(), suffix.size(), suffix) == 0) {
            number.resize(number.size() - suffix.size());
            degrees = true;
            break;
        }
    }
    const double v = parse_number(number, "--fault-margin");
    if (!(v >= 0.0)) throw InputError("--fault-margin", text, "a margin must be 0 or more (codes, or degC with C)");
    if (degrees) {
        const auto [below, above] = temperature_margin(r.map, v);
        return {below, above, format_number(v, 4) + " degC beyond the span's ends (--fault-margin)"};
    }
    if (v != std::floor(v) || v > 1e9)
        throw InputError("--fault-margin", text, "a margin in codes must be a whole number (or give degC with C)");
    const auto codes = static_cast<std::int64_t>(v);
    return {codes, codes, "--fault-margin"};
}

// The core quotes its own numbers; the table quotes the text as the user typed it.
[[noreturn]] void as_typed(const InputError& e, const TableCommand& o) {
    const std::optional<Input> in = e.input();
    if (in == Input::topology) throw e.with_value(o.circuit.circuit);
    if (in == Input::excitation) throw e.with_value(o.circuit.excitation);
    if (in == Input::current) throw e.with_value(o.circuit.current);
    if (in == Input::reference) throw e.with_value(o.front.adc_ref);
    if (in == Input::gain && !e.value().empty() && !o.front.gain.empty()) throw e.with_value(o.front.gain);
    throw e;
}

// Refuses a circuit the table cannot read before asking for its resistors.
void refuse_unreadable(const TableCommand& o) {
    Channel probe;
    probe.circuit.topology = parse_topology(o.circuit.circuit, "--circuit");
    if (!o.circuit.excitation.empty()) probe.circuit.excitation = {Drive::voltage, 1.0};
    if (!o.circuit.current.empty()) probe.circuit.excitation = {Drive::current, 1.0};
    if (!o.front.gain.empty() || o.front.auto_range) probe.amplifier = Amplifier{};
    const bool volts = !o.front.adc_ref.empty() && o.front.adc_ref != "excitation";
    if (probe.circuit.excitation.drive == Drive::current && !volts) probe.reference = std::nan("");
    try {
        validate(probe);
    } catch (const InputError& e) {
        as_typed(e, o);
    }
}

void run_table(const TableCommand& o) {
    const Format format = parse_format(o.out.format, true);
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
        target_k = c;  // a temperature difference: the same in kelvin
    } else if (want_poly && !degree) {
        throw InputError("--fit", o.fit, "give --degree D, or --max-error C to find the lowest degree");
    }
    const AdcTransfer transfer = build_adc_transfer(o.adc_transfer);

    refuse_unreadable(o);
    Result r{build_model(o.model),
             build_span(o.span),
             {},
             {},
             {},
             {},
             {},
             {},
             {},
             {},
             {},
             0.0,
             target_k.has_value(),
             target_k};
    r.circuit = build_circuit(o.circuit, r.thermistor, r.span);
    // The output is monotone in R_T: the span's ends are the extremes --auto-range maps.
    const Grid ends{{r.span.lo_k, r.span.hi_k},
                    {r.thermistor.resistance(r.span.lo_k), r.thermistor.resistance(r.span.hi_k)}};
    r.amp = choose_amplifier(o.front, r.circuit, ends);
    r.channel = {r.circuit, r.amp.amplifier, r.amp.full_scale};
    try {
        r.map = map_codes(r.thermistor, r.channel, r.span, bits, transfer);
    } catch (const InputError& e) {
        if (e.input() == Input::span) throw e.with_value(o.span.span);  // as typed, not kelvin turned back into °C
        as_typed(e, o);
    }
    // Without --max-error the table meets one unit or half the widest step between adjacent codes (the
    // converter's own resolution there), the larger: our own choice, so the table adds no more than
    // the converter already does.
    double widest_step_k = 0.0;
    for (std::size_t i = 0; i + 1 < r.map.size(); ++i)
        widest_step_k = std::max(widest_step_k, std::abs(r.map.t_k[i + 1] - r.map.t_k[i]));
    r.target_k = target_k ? *target_k : std::max(1.0 / scale, 0.5 * widest_step_k);
    r.table_searched = !entries;
    r.degree_searched = target_k && want_poly && !degree;
    const std::string deg(kDeg);
    if (r.table_searched) {
        ShippedTable s = smallest_table(r.map, r.target_k, spacing, scale);
        r.table = std::move(s.table);
        r.fixed = std::move(s.fixed);
    } else {
        r.table = make_table(r.map, static_cast<std::size_t>(*entries), spacing);
        r.fixed = to_fixed(r.table, r.map, scale);
        if (target_k && r.fixed.max_error_k > *target_k) {
            throw InfeasibleError("the " + std::to_string(r.table.codes.size()) + "-entry table ships " +
                                  format_significant(r.fixed.max_error_k, 4) + " " + deg + ", more than the " +
                                  format_number(*target_k, 4) + " " + deg +
                                  " target; leave out --entries to find the fewest that meet it");
        }
    }
    if (want_poly) {
        r.polynomial = degree ? fit_polynomial(r.map, *degree, fit) : lowest_degree(r.map, *target_k, fit);
        if (degree && target_k && r.polynomial->max_error_k > *target_k) {
            throw InfeasibleError("the degree-" + std::to_string(*degree) + " polynomial errs by " +
                                  format_significant(r.polynomial->max_error_k, 4) + " " + deg + ", more than the " +
                                  format_number(*target_k, 4) + " " + deg +
                                  " target; leave out --degree to find the lowest that meets it");
        }
    }
    r.margin = fault_margin(o.fault_margin, r);
    r.faults = fault_bands(r.map, r.channel, r.margin.below, r.margin.above);

    std::string bytes;
    if (emit_c) {
        bytes = c_report(r, o.prefix);
    } else if (format == Format::json) {
        bytes = json_report(r);
    } else if (format == Format::csv) {
        bytes = breakpoint_table(r).csv();
    } else if (format == Format::markdown) {
        bytes = markdown_report(r);
    } else {
        bytes = text_report(r);
    }
    std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
    if (!o.svg.empty()) {
        outputs.push_back({o.svg,
                           svg::render(table_figure(r.thermistor, r.circuit, r.map, r.table, r.fixed, r.polynomial,
                                                    r.target_k, r.target_given ? "--max-error" : "default")),
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
    sub->get_option("--circuit")
        ->description(
            "divider-high, divider-low or shunt-divider (ratiometric); bridge or shunt-bridge "
            "(ratiometric, through --gain/--offset or --auto-range); bare or shunt (with --current and "
            "--adc-ref)");
    add_amplifier_options(*sub, opt->front);
    sub->add_option("--adc-bits", opt->adc_bits, "ADC resolution N, 1 to 24 bits (default 12)")->group("Reading");
    add_adc_transfer_option(*sub, opt->adc_transfer, "Reading");
    sub->add_option("--fault-margin", opt->fault_margin,
                    "Codes beyond the span that still read as a temperature: N codes, or XC degC (default from "
                    "+-1 % part tolerances)")
        ->group("Reading");
    sub->add_option("--entries", opt->entries, "Table breakpoints, at least 2 (default: the fewest meeting the target)")
        ->group("Table");
    sub->add_option("--spacing", opt->spacing,
                    "code (evenly spaced codes, default), error (equal error per segment) or power-of-two (every "
                    "2^s codes, found by a shift)")
        ->group("Table");
    sub->add_option("--unit", opt->unit, "Fixed-point step of the table's temperatures: 0.1 or 0.01 degC (default)")
        ->group("Table");
    sub->add_option("--degree", opt->degree, "Also fit a polynomial T(x) of this degree, 1 to 12")->group("Polynomial");
    sub->add_option("--fit", opt->fit, "Polynomial fit: least-squares (default) or minimax")->group("Polynomial");
    sub->add_option("--max-error", opt->max_error,
                    "Largest shipped error in degC: find the smallest table (and lowest degree with --fit); default "
                    "one unit or half the widest code step")
        ->group("Table");
    add_output_options(*sub, opt->out, true);
    sub->add_option("--emit", opt->emit, "c: write a C99 header (table and interpolation function) instead")
        ->group("Output");
    sub->add_option("--prefix", opt->prefix, "With --emit c: prefix of the C names (default ntc_)")->group("Output");
    add_svg_option(*sub, opt->svg);
    sub->footer(std::string("Examples:\n"
                            "  rtline table --r25 10k --beta 3950 --span 0:45 --circuit divider-low --rs 10k "
                            "--adc-bits 12 --entries 17\n"
                            "  rtline table --r25 10k --beta 3950 --span -20:60 --circuit divider-high --rs 10k "
                            "--max-error 0.1 --spacing error --emit c --prefix pack_ -o pack_temp.h\n"
                            "  rtline table --r25 10k --beta 3950 --span 0:50 --circuit bridge --r1 10k --auto-range "
                            "--max-error 0.05\n"
                            "  rtline table --r25 10k --beta 3950 --span 10:60 --circuit bare --current 50u "
                            "--adc-ref 2.5 --max-error 0.2\n"
                            "A divider or bridge is read ratiometrically (the ADC reference is its excitation), or "
                            "with --excitation V against a fixed --adc-ref V;\na current drive against --adc-ref "
                            "volts. --adc-transfer says which ratio a code stands "
                            "for. The shipped error is the emitted integer code's, measured over every code of the "
                            "span\nagainst the exact inverse (code -> ratio -> amplifier -> network -> R_T -> T by "
                            "the model).\n\n") +
                kSafetyNote);
    sub->callback([opt] { run_table(*opt); });
}

}  // namespace rtline::cli
