#include "common.hpp"

#include <cmath>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <iterator>
#include <sstream>

#include "rtline/budget.hpp"
#include "rtline/error.hpp"
#include "rtline/fit.hpp"
#include "rtline/plausibility.hpp"
#include "rtline/rtcsv.hpp"

namespace rtline::cli {

const char* const kSafetyNote =
    "Caution: rtline designs measurement circuits; it is not a protective device. Over-temperature\n"
    "protection in heating or mains-powered equipment must use protective devices that follow the\n"
    "applicable safety standards and local codes, and any design must be verified with measured parts\n"
    "before use.";

const char* const kNeedsDrive = "power and self-heating depend on the drive; give --excitation V or --current A";

std::string read_text(const std::string& path, const std::string& field) {
    if (path == "-") {
        std::ostringstream ss;
        ss << std::cin.rdbuf();
        return ss.str();
    }
    std::error_code ec;
    if (std::filesystem::is_directory(path, ec)) throw InputError(field, path, "is a folder, not a file");
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(field, path, "cannot be opened");
    try {
        std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
        if (in.bad()) throw InputError(field, path, "cannot be read");
        return text;
    } catch (const std::ios_base::failure&) {
        throw InputError(field, path, "cannot be read");
    }
}

double optional_quantity(const std::string& text, const std::string& field, const std::string& unit, double fallback) {
    if (text.empty()) return fallback;
    const double v = parse_quantity(text, field, unit);
    if (!(v > 0.0)) throw InputError(field, text, "must be positive");
    return v;
}

unsigned build_threads(const std::string& text) {
    if (text.empty()) return 0;
    const std::string why = "give 1 to " + std::to_string(kMaxThreads) + " threads";
    double v = 0.0;
    try {
        v = parse_number(text, "--threads");
    } catch (const InputError&) {
        throw InputError("--threads", text, why);
    }
    if (!(v >= 1.0 && v <= static_cast<double>(kMaxThreads)) || v != std::floor(v)) {
        throw InputError("--threads", text, why);
    }
    return static_cast<unsigned>(v);
}

std::string celsius(double t_k, int decimals) { return format_fixed(kelvin_to_celsius(t_k), decimals); }

// -------------------------------------------------------------------------------------- model

void add_model_options(CLI::App& app, ModelOptions& o) {
    app.add_option("--r25", o.r25, "Thermistor resistance at T0 (beta model), e.g. 10k")->group("Thermistor");
    app.add_option("--beta", o.beta, "B-value in kelvin (beta model), e.g. 3950")->group("Thermistor");
    app.add_option("--t0", o.t0, "Reference temperature of --r25, degC (default 25)")->group("Thermistor");
    app.add_option("--sh", o.sh, "Steinhart-Hart coefficients A,B,C (1/T = A + B ln R + C ln^3 R)")
        ->group("Thermistor");
    app.add_option("--points", o.points, "R-T points, CSV with header t_c,r_ohm ('-' reads stdin)")
        ->check(non_empty_file_name)
        ->group("Thermistor");
    app.add_option("--model", o.model, "With --points: sh (fit, default), beta (fit) or table (interpolate)")
        ->group("Thermistor");
}

namespace {

SteinhartHart parse_sh(const std::string& text) {
    std::vector<double> v;
    std::size_t start = 0;
    while (true) {
        const std::size_t comma = text.find(',', start);
        const std::string part = text.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
        try {
            v.push_back(parse_number(part, "--sh"));
        } catch (const InputError&) {
            throw InputError("--sh", text, "expected three numbers A,B,C, e.g. 1.1e-3,2.4e-4,7.5e-8");
        }
        if (comma == std::string::npos) break;
        start = comma + 1;
    }
    if (v.size() != 3) throw InputError("--sh", text, "expected three numbers A,B,C, e.g. 1.1e-3,2.4e-4,7.5e-8");
    return {v[0], v[1], v[2]};
}

}  // namespace

Thermistor build_model(const ModelOptions& o) {
    const int sources = (!o.r25.empty() || !o.beta.empty()) + !o.sh.empty() + !o.points.empty();
    if (sources == 0) {
        throw InputError("--r25", "", "no thermistor given; use --r25 and --beta, --sh A,B,C, or --points FILE");
    }
    if (sources > 1) {
        // Name a flag the user did give: --sh or --points is always one of two or more sources.
        const bool sh = !o.sh.empty();
        throw InputError(sh ? "--sh" : "--points", sh ? o.sh : o.points,
                         "give one thermistor: --r25 with --beta, or --sh, or --points, not several");
    }
    if (!o.model.empty() && o.points.empty()) {
        throw InputError("--model", o.model, "applies only with --points");
    }
    if (!o.r25.empty() || !o.beta.empty()) {
        if (o.beta.empty()) throw InputError("--beta", "", "the beta model needs --beta with --r25");
        if (o.r25.empty()) throw InputError("--r25", "", "the beta model needs --r25 with --beta");
        BetaModel m;
        m.r0_ohm = parse_resistance(o.r25, "--r25");
        std::string b = o.beta;
        if (!b.empty() && b.back() == 'K') b.pop_back();
        m.b_k = parse_number(b, "--beta");
        if (!(m.b_k > 0.0)) throw InputError("--beta", o.beta, "the B-value of an NTC must be positive (kelvin)");
        m.t0_k = build_t0(o.t0);
        heed("--beta", o.beta, judge_b_value(m.b_k));
        heed("--r25", o.r25, judge_r25(Thermistor(m).resistance(k25CelsiusK)));
        return Thermistor(m);
    }
    if (!o.sh.empty()) return Thermistor(parse_sh(o.sh));
    const std::string source = o.points == "-" ? std::string("stdin") : o.points;
    const std::vector<RtPoint> pts = read_rt_points(read_text(o.points, "--points"), source);
    const std::string kind = o.model.empty() ? "sh" : o.model;
    if (kind != "sh" && kind != "beta" && kind != "table") {
        throw InputError("--model", o.model, "unknown model; choose sh, beta or table");
    }
    const std::vector<RtPoint> valid = validate_points(pts, kind == "sh" ? 3 : 2, source);
    const Thermistor model = kind == "sh"     ? Thermistor(fit_steinhart_hart(valid).model)
                             : kind == "beta" ? Thermistor(fit_beta(valid, build_t0(o.t0)).model)
                                              : Thermistor(TableModel(valid));
    judge_points(valid, source);
    return model;
}

void heed(const std::string& field, const std::string& text, const Judgement& j) {
    if (j.fine()) return;
    if (j.impossible()) throw InputError(field, text, j.why);
    warn(text.empty() ? field + ": " + j.why : field + " '" + text + "': " + j.why);
}

double build_t0(const std::string& text) {
    const double t0_k = parse_temperature(text, "--t0");
    heed("--t0", text, kelvin_typed_as_celsius(text));
    return t0_k;
}

void judge_points(const std::vector<RtPoint>& points, const std::string& source) {
    heed(source, "", judge_rt_points(points));
}

std::string describe_model(const Thermistor& t) {
    const auto& m = t.model();
    if (const auto* b = std::get_if<BetaModel>(&m)) {
        const bool at25 = std::abs(b->t0_k - k25CelsiusK) < 1e-9;
        return std::string("beta model: ") + (at25 ? "R25" : "R0") + " = " + format_resistance(b->r0_ohm, 6) + " ohm" +
               (at25 ? ""
                     : " at " + format_number(kelvin_to_celsius(b->t0_k)) +
                           " \xC2\xB0"
                           "C") +
               ", B = " + format_number(b->b_k, 6) + " K";
    }
    if (const auto* s = std::get_if<SteinhartHart>(&m)) {
        return "Steinhart-Hart model: A = " + format_number(s->a, 8) + ", B = " + format_number(s->b, 8) +
               ", C = " + format_number(s->c, 8);
    }
    const auto& tab = std::get<TableModel>(m);
    return "table model: " + std::to_string(tab.points().size()) + " R-T points from " +
           format_number(kelvin_to_celsius(tab.t_min_k())) + " to " + format_number(kelvin_to_celsius(tab.t_max_k())) +
           " \xC2\xB0"
           "C, monotone cubic in ln R against 1/T";
}

Json model_json(const Thermistor& t) {
    const auto& m = t.model();
    Json j;
    j["kind"] = t.kind();
    if (const auto* b = std::get_if<BetaModel>(&m)) {
        j["r0_ohm"] = b->r0_ohm;
        j["t0_c"] = kelvin_to_celsius(b->t0_k);
        j["b_k"] = b->b_k;
    } else if (const auto* s = std::get_if<SteinhartHart>(&m)) {
        j["a"] = s->a;
        j["b"] = s->b;
        j["c"] = s->c;
    } else {
        const auto& tab = std::get<TableModel>(m);
        Json pts = Json::array();
        for (const RtPoint& p : tab.points()) pts.push_back({{"t_c", echoed(kelvin_to_celsius(p.t_k))}, {"r_ohm", echoed(p.r_ohm)}});
        j["points"] = pts;
    }
    return j;
}

// --------------------------------------------------------------------------------------- span

void add_span_options(CLI::App& app, SpanOptions& o) {
    app.add_option("--span", o.span, "Temperature span LO:HI in degC, e.g. -30:5 (a K suffix takes kelvin)")
        ->required()
        ->group("Span");
    app.add_option("--step", o.step, "Temperature step in K (= degC), default 1; the span's end is always included")
        ->group("Span");
}

Span build_span(const SpanOptions& o) {
    const Span span = parse_span(o.span, "--span");
    heed("--span", o.span, span_kelvin_typed_as_celsius(o.span));
    return span;
}

double build_step(const SpanOptions& o) {
    std::string s = o.step.empty() ? std::string("1") : o.step;
    if (!s.empty() && (s.back() == 'K' || s.back() == 'C')) s.pop_back();
    const double step = parse_number(s, "--step");
    if (!(step > 0.0)) throw InputError("--step", o.step, "the step must be a positive number of kelvin");
    return step;
}

std::pair<std::string, std::string> grid_size_culprit(const SpanOptions& o) {
    if (o.step.empty()) return {"--span", o.span};
    return {"--step", o.step};
}

Grid build_grid(const Thermistor& model, const Span& span, const SpanOptions& o, bool judge_linearity) {
    const double step = build_step(o);
    try {
        Grid g = make_grid(model, span, step);
        if (judge_linearity) check_linearity_points(span, step);
        return g;
    } catch (const InputError& e) {
        if (e.input() == Input::span) throw e.with_value(o.span);
        if (e.input() == Input::step) {
            const auto [flag, text] = grid_size_culprit(o);
            throw InputError(flag, text, e.why());
        }
        throw;
    }
}

// ------------------------------------------------------------------------------------ circuit

void add_circuit_options(CLI::App& app, CircuitOptions& o, bool circuit_optional, bool with_resistors) {
    auto* c = app.add_option("--circuit", o.circuit,
                             "bare, divider-high, divider-low, shunt, shunt-divider, bridge or shunt-bridge")
                  ->group("Circuit");
    if (!circuit_optional) c->required();
    app.add_option("--null-at", o.null_at, "Bridge: temperature of zero output, degC (default: span low end)")
        ->group("Circuit");
    app.add_option("--load", o.load, "Input resistance across the output (between A and B for bridges), ohm")
        ->group("Circuit");
    app.add_option("--excitation", o.excitation, "Supply voltage, V (default: ratiometric output, V/V)")
        ->group("Circuit");
    app.add_option("--current", o.current, "Current-source drive, A (e.g. 100u)")->group("Circuit");
    app.add_option("--lead", o.lead,
                   "Loop resistance of the wires to a remote thermistor, ohm, in series with it (default 0); "
                   "the firmware's inverse subtracts it")
        ->group("Circuit");
    if (!with_resistors) return;
    app.add_option("--rs", o.rs, "Series resistor of a divider, ohm (e.g. 10k)")->group("Circuit");
    app.add_option("--rp", o.rp, "Resistor in parallel with the thermistor, ohm")->group("Circuit");
    app.add_option("--r1", o.r1, "Bridge: resistor over the thermistor (node A), ohm")->group("Circuit");
    app.add_option("--r2", o.r2, "Bridge: top of the reference arm (node B), ohm (default r1)")->group("Circuit");
    app.add_option("--r3", o.r3, "Bridge: bottom of the reference arm, ohm (default: null at --null-at)")
        ->group("Circuit");
}

Circuit build_drive(const CircuitOptions& o, const std::string& topology) {
    Circuit c;
    c.topology = parse_topology(topology, "--circuit");
    if (!o.null_at.empty() && !is_bridge(c.topology)) {
        throw InputError("--null-at", o.null_at, "applies only to bridge circuits");
    }
    if (!o.load.empty()) c.load_ohm = parse_resistance(o.load, "--load");
    if (!o.excitation.empty() && !o.current.empty()) {
        throw InputError("--current", o.current, "give either --excitation or --current, not both");
    }
    if (!o.excitation.empty()) {
        c.excitation = {Drive::voltage, parse_quantity(o.excitation, "--excitation", "V")};
    } else if (!o.current.empty()) {
        c.excitation = {Drive::current, parse_quantity(o.current, "--current", "A")};
    }
    return c;
}

double null_temperature(const CircuitOptions& o, const Span& span) {
    return o.null_at.empty() ? span.lo_k : parse_temperature(o.null_at, "--null-at");
}

Circuit build_circuit(const CircuitOptions& o, const Thermistor& model, const Span& span) {
    Circuit c = build_drive(o, o.circuit);
    if (!o.lead.empty()) {
        c.lead_ohm = parse_resistance(o.lead, "--lead");
        if (!(c.lead_ohm >= 0.0)) throw InputError("--lead", o.lead, "a lead resistance must be 0 or positive");
    }
    const std::vector<std::string> names = resistor_names(c.topology);
    const std::pair<const char*, const std::string*> given[] = {
        {"rs", &o.rs}, {"rp", &o.rp}, {"r1", &o.r1}, {"r2", &o.r2}, {"r3", &o.r3}};
    for (const auto& [name, text] : given) {
        if (text->empty()) continue;
        if (std::find(names.begin(), names.end(), name) == names.end()) {
            throw InputError(std::string("--") + name, *text,
                             "the " + o.circuit + " circuit has no " + name + " resistor");
        }
        set_resistor(c, name, parse_resistance(*text, std::string("--") + name));
    }
    if (!o.null_at.empty() && c.r3 != 0.0) {
        throw InputError("--null-at", o.null_at, "has no effect when --r3 is given; give one of them");
    }
    if (is_bridge(c.topology) && c.r1 > 0.0) {
        const double null_k = null_temperature(o, span);
        if (c.r3 == 0.0) {
            // The model must cover the null temperature itself: a span 1 nK wide about it (within the
            // table's edge tolerance, so a null at a table's end point is allowed).
            try {
                model.check_span(Span{null_k - 5e-10, null_k + 5e-10}, "--null-at");
            } catch (const InputError& e) {
                throw InputError("--null-at", o.null_at.empty() ? celsius(null_k) : o.null_at, e.why());
            }
        }
        complete_bridge(c, model, null_k);
    }
    validate(c);
    return c;
}

Json circuit_json(const Circuit& c) {
    Json j;
    j["topology"] = std::string(topology_name(c.topology));
    Json r = Json::object();
    for (const std::string& name : resistor_names(c.topology)) r[name] = resistor_value(c, name);
    j["resistors_ohm"] = r;
    if (std::isfinite(c.load_ohm)) j["load_ohm"] = c.load_ohm;
    if (c.lead_ohm > 0.0) j["lead_ohm"] = c.lead_ohm;
    switch (c.excitation.drive) {
        case Drive::ratiometric:
            // Without a drive there is no power and no self-heating: the documents leave those keys out.
            j["drive"] = {{"kind", "ratiometric"}};
            break;
        case Drive::voltage: j["drive"] = {{"kind", "voltage"}, {"excitation_v", c.excitation.value}}; break;
        case Drive::current: j["drive"] = {{"kind", "current"}, {"current_a", c.excitation.value}}; break;
    }
    j["output_unit"] = output_unit(c);
    return j;
}

std::string describe_circuit(const Circuit& c) {
    std::string s = std::string(topology_name(c.topology));
    for (const std::string& name : resistor_names(c.topology)) {
        const double v = resistor_value(c, name);
        if (v > 0.0) s += ", " + name + " = " + format_resistance(v, 6);
    }
    if (std::isfinite(c.load_ohm)) s += ", load = " + format_resistance(c.load_ohm, 6);
    if (c.lead_ohm > 0.0) s += ", leads = " + format_resistance(c.lead_ohm, 6) + " (loop, in series with the thermistor)";
    switch (c.excitation.drive) {
        case Drive::ratiometric:
            s += gives_resistance(c.topology) ? "; output in ohm" : "; ratiometric output (V/V)";
            break;
        case Drive::voltage: s += "; excitation " + format_number(c.excitation.value) + " V"; break;
        case Drive::current: s += "; current drive " + format_si(c.excitation.value, "A"); break;
    }
    return s;
}

// ------------------------------------------------------------------------------------- output

std::string non_empty_file_name(const std::string& path) {
    // An empty name reads as "not given" later on: say so now instead of writing nothing.
    return path.empty() ? std::string("expects a file name, not an empty text") : std::string();
}

void add_output_options(CLI::App& app, OutputOptions& o, bool markdown) {
    app.add_option(
           "--format", o.format,
           markdown ? "text (default), json, csv or markdown (for a design review)" : "text (default), json or csv")
        ->group("Output");
    app.add_option("-o,--output", o.output, "Write to FILE (replaced only when the run succeeds)")
        ->check(non_empty_file_name)
        ->group("Output");
}

// ------------------------------------------------------------------------------ converter

void add_adc_transfer_option(CLI::App& app, std::string& text, const std::string& group) {
    app.add_option("--adc-transfer", text,
                   "Which ratio code k stands for: rounding (k/2^N, the default), truncating ((k + 1/2)/2^N) "
                   "or full-scale (k/(2^N - 1))")
        ->group(group);
}

AdcTransfer build_adc_transfer(const std::string& text) {
    return text.empty() ? AdcTransfer::rounding : parse_adc_transfer(text, "--adc-transfer");
}

std::string describe_adc_transfer(AdcTransfer t, int bits) {
    const std::string full = std::to_string(1LL << bits);
    const std::string top = std::to_string((1LL << bits) - 1);
    switch (t) {
        case AdcTransfer::rounding:
            return "rounding: code k is the ratio k/" + full + " of the reference (transitions at k - 1/2 LSB)";
        case AdcTransfer::truncating:
            return "truncating: code k covers k to k + 1 LSB of " + full + ", so it stands for (k + 1/2)/" + full;
        case AdcTransfer::full_scale: return "full-scale: the top code is the reference, code k is the ratio k/" + top;
    }
    return "";
}

}  // namespace rtline::cli
