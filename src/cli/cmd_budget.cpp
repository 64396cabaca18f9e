// rtline budget: the temperature error of a design with real parts — worst case over the tolerances,
// Monte Carlo, and the split by cause (nonlinearity, R25, B, resistors, excitation, ADC, self-heating).
#include <charconv>
#include <cmath>
#include <memory>

#include "commands.hpp"
#include "common.hpp"
#include "pictures.hpp"
#include "rtline/budget.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

struct BudgetOptions {
    ModelOptions model;
    SpanOptions span;
    CircuitOptions circuit;
    std::string r25_tol = "1";       // %
    std::string beta_tol = "1";      // %
    std::string resistor_tol = "1";  // %
    std::string excitation_tol;      // %; default 1 when the reading is in volts, else not applicable
    std::string distribution = "normal";
    std::string reading = "model";
    std::string adc_bits;
    std::string adc_error;    // LSB
    std::string adc_ref;      // "excitation" or a voltage; default: the excitation voltage as a fixed reference
    std::string dissipation;  // mW/K
    std::string trials = "100000";
    std::string seed;
    std::string threads;
    OutputOptions out;
    std::string svg;  // --svg FILE
};

const char* const kDegC =
    "\xC2\xB0"
    "C";

double parse_percent(const std::string& text, const std::string& flag) {
    std::string s = text;
    if (!s.empty() && s.back() == '%') s.pop_back();
    const double v = parse_number(s, flag);
    if (!(v >= 0.0 && v < 100.0))
        throw InputError(flag, text, "a tolerance must be at least 0 and below 100 (percent)");
    return v / 100.0;
}

// A whole number in [lo, hi] (written plainly or as 1e6); throws InputError naming `flag`.
std::uint64_t parse_count(const std::string& text, const std::string& flag, double lo, double hi,
                          const std::string& why) {
    double v = 0.0;
    try {
        v = parse_number(text, flag);
    } catch (const InputError&) {
        throw InputError(flag, text, why);
    }
    if (!(v >= lo && v <= hi) || v != std::floor(v)) throw InputError(flag, text, why);
    return static_cast<std::uint64_t>(v);
}

std::uint64_t parse_seed(const std::string& text) {
    std::uint64_t v = 0;
    const char* end = text.data() + text.size();
    const auto [ptr, ec] = std::from_chars(text.data(), end, v);
    if (text.empty() || ec != std::errc() || ptr != end) {
        throw InputError("--seed", text, "the seed must be a whole number from 0 to 18446744073709551615");
    }
    return v;
}

BudgetSpec build_spec(const BudgetOptions& o, const Circuit& circuit) {
    BudgetSpec s;
    s.tolerance.r25 = parse_percent(o.r25_tol, "--r25-tol");
    s.tolerance.beta = parse_percent(o.beta_tol, "--beta-tol");
    s.tolerance.resistors = parse_percent(o.resistor_tol, "--resistor-tol");
    s.distribution = parse_distribution(o.distribution, "--distribution");
    s.reading = parse_reading(o.reading, "--reading");

    const Drive drive = circuit.excitation.drive;
    if (o.adc_ref.empty()) {
        s.ratiometric = drive == Drive::ratiometric;
        s.adc.full_scale = drive == Drive::voltage ? circuit.excitation.value : 1.0;
    } else if (o.adc_ref == "excitation") {
        s.ratiometric = true;
    } else {
        s.ratiometric = false;
        s.adc.full_scale = parse_quantity(o.adc_ref, "--adc-ref", "V");
        if (!(s.adc.full_scale > 0.0)) {
            throw InputError("--adc-ref", o.adc_ref, "give excitation (ratiometric) or a positive voltage");
        }
        if (drive == Drive::ratiometric) {
            throw InputError("--adc-ref", o.adc_ref,
                             "a fixed reference needs a drive; give --excitation V or --current A");
        }
    }
    const bool volts = drive != Drive::ratiometric && !s.ratiometric;
    s.tolerance.excitation =
        o.excitation_tol.empty() ? (volts ? 0.01 : 0.0) : parse_percent(o.excitation_tol, "--excitation-tol");
    if (!o.adc_bits.empty()) {
        s.adc.bits = static_cast<int>(parse_count(o.adc_bits, "--adc-bits", 1, 24, "a converter has 1 to 24 bits"));
        if (drive == Drive::current && o.adc_ref.empty()) {
            throw InputError("--adc-ref", "", "a current-driven circuit needs the converter's reference in volts");
        }
    }
    if (!o.adc_error.empty()) {
        std::string e = o.adc_error;
        if (e.size() > 3 && e.compare(e.size() - 3, 3, "LSB") == 0) e.resize(e.size() - 3);
        s.adc.error_lsb = parse_number(e, "--adc-error");
        if (!(s.adc.error_lsb >= 0.0))
            throw InputError("--adc-error", o.adc_error, "the converter error must be at least 0 LSB");
    }
    if (!o.dissipation.empty()) {
        s.dissipation_w_per_k = 1e-3 * parse_number(o.dissipation, "--dissipation");
        if (!(s.dissipation_w_per_k > 0.0)) {
            throw InputError("--dissipation", o.dissipation, "the dissipation constant must be positive (mW/K)");
        }
    }
    s.trials = parse_count(o.trials, "--trials", 0, static_cast<double>(kMaxTrials),
                           "the number of trials must be a whole number from 0 to " + std::to_string(kMaxTrials));
    s.seed = o.seed.empty() ? kDefaultSeed : parse_seed(o.seed);
    if (!o.threads.empty()) {
        s.threads = static_cast<unsigned>(parse_count(o.threads, "--threads", 1, kMaxThreads,
                                                      "give 1 to " + std::to_string(kMaxThreads) + " threads"));
    }
    return s;
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

std::string parts_description(const BudgetSpec& s, bool volts) {
    auto p = [](double f) { return "\xC2\xB1" + format_number(100.0 * f) + " %"; };
    std::string t =
        "R25 " + p(s.tolerance.r25) + ", B " + p(s.tolerance.beta) + ", resistors " + p(s.tolerance.resistors);
    if (volts) t += ", excitation " + p(s.tolerance.excitation);
    return t + (s.distribution == Distribution::normal ? " (normal, tolerance = 3 sigma)"
                                                       : " (uniform over the tolerance)");
}

Json components_json(const BudgetComponents& k) {
    return {{"nonlinearity", number(k.nonlinearity_k)},
            {"r25", number(k.r25_k)},
            {"beta", number(k.beta_k)},
            {"resistors", number(k.resistors_k)},
            {"excitation", number(k.excitation_k)},
            {"adc", number(k.adc_k)},
            {"self_heating", number(k.self_heating_k)}};
}

Json budget_json(const Budget& b, const BudgetSpec& s, const Thermistor& model, const Span& span,
                 const Circuit& circuit, const std::string& unit) {
    const bool volts = unit == "V";
    Json doc = document("budget");
    doc["model"] = model_json(model);
    doc["span"] = {{"lo_c", kelvin_to_celsius(span.lo_k)}, {"hi_c", kelvin_to_celsius(span.hi_k)}};
    doc["circuit"] = circuit_json(circuit);
    Json a;
    a["reading"] = std::string(reading_name(s.reading));
    a["reading_unit"] = unit;
    a["ratiometric"] = unit == "V/V";
    a["distribution"] = std::string(distribution_name(s.distribution));
    a["sigmas_per_tolerance"] = s.distribution == Distribution::normal ? Json(3) : Json(nullptr);
    a["trials"] = s.trials;
    a["seed"] = s.seed;
    a["tolerances_pct"] = {{"r25", 100.0 * s.tolerance.r25},
                           {"beta", 100.0 * s.tolerance.beta},
                           {"resistors", 100.0 * s.tolerance.resistors},
                           {"excitation", volts ? Json(100.0 * s.tolerance.excitation) : Json(nullptr)}};
    a["r25_at_t_c"] = kelvin_to_celsius(tolerance_reference_k(model));
    if (s.adc.bits > 0) {
        a["adc"] = {
            {"bits", s.adc.bits}, {"error_lsb", s.adc.error_lsb}, {"full_scale", s.adc.full_scale}, {"lsb", b.lsb}};
    } else {
        a["adc"] = nullptr;
    }
    a["dissipation_mw_per_k"] = s.dissipation_w_per_k > 0.0 ? Json(1e3 * s.dissipation_w_per_k) : Json(nullptr);
    doc["assumptions"] = a;
    if (s.reading == Reading::line) {
        doc["line"] = {{"slope_per_k", b.line.slope}, {"intercept_at_0_c", b.line.at(kZeroCelsiusK)}};
    }
    const bool mc = s.trials > 0;
    doc["summary"] = {{"worst_case_c", b.summary.worst_case_k},
                      {"at_t_c", kelvin_to_celsius(b.summary.at_t_k)},
                      {"p99_7_c", number(b.summary.p99_7_k)},
                      {"p99_7_at_t_c", mc ? Json(kelvin_to_celsius(b.summary.p99_7_at_t_k)) : Json(nullptr)}};
    Json pts = Json::array();
    for (const BudgetPoint& p : b.points) {
        Json j;
        j["t_c"] = kelvin_to_celsius(p.t_k);
        j["worst_case_c"] = p.worst_case_k;
        j["nominal_error_c"] = p.nominal_error_k;
        if (mc) {
            j["mc"] = {{"mean_c", p.mc.mean_k},
                       {"std_c", number(p.mc.std_k)},
                       {"p95_c", p.mc.p95_k},
                       {"p99_7_c", p.mc.p99_7_k},
                       {"max_abs_c", p.mc.max_abs_k}};
        } else {
            j["mc"] = nullptr;
        }
        j["components_c"] = components_json(p.components);
        j["resolution_c_per_lsb"] = number(p.resolution_k_per_lsb);
        pts.push_back(j);
    }
    doc["points"] = pts;
    return doc;
}

std::string budget_csv(const Budget& b) {
    Table t({{"", "t_c"},
             {"", "worst_case_c"},
             {"", "nominal_error_c"},
             {"", "mc_mean_c"},
             {"", "mc_std_c"},
             {"", "mc_p95_c"},
             {"", "mc_p99_7_c"},
             {"", "mc_max_abs_c"},
             {"", "nonlinearity_c"},
             {"", "r25_c"},
             {"", "beta_c"},
             {"", "resistors_c"},
             {"", "excitation_c"},
             {"", "adc_c"},
             {"", "self_heating_c"},
             {"", "resolution_c_per_lsb"}});
    for (const BudgetPoint& p : b.points) {
        const BudgetComponents& k = p.components;
        t.add_row({kelvin_to_celsius(p.t_k), p.worst_case_k, p.nominal_error_k, p.mc.mean_k, p.mc.std_k, p.mc.p95_k,
                   p.mc.p99_7_k, p.mc.max_abs_k, k.nonlinearity_k, k.r25_k, k.beta_k, k.resistors_k, k.excitation_k,
                   k.adc_k, k.self_heating_k, p.resolution_k_per_lsb});
    }
    return t.csv();
}

// The cause with the largest share at point p, for the summary line.
std::string largest_cause(const BudgetPoint& p) {
    const BudgetComponents& k = p.components;
    const std::pair<const char*, double> causes[] = {
        {"nonlinearity", k.nonlinearity_k}, {"thermistor R25", k.r25_k},    {"thermistor B-value", k.beta_k},
        {"fixed resistors", k.resistors_k}, {"excitation", k.excitation_k}, {"ADC", k.adc_k},
        {"self-heating", k.self_heating_k}};
    const char* name = "";
    double best = -1.0;
    for (const auto& [n, v] : causes) {
        if (std::isfinite(v) && v > best) {
            best = v;
            name = n;
        }
    }
    return std::string(name) + " (" + format_fixed(best, 4) + " " + kDegC + ")";
}

std::string budget_text(const Budget& b, const BudgetSpec& s, const Thermistor& model, const Circuit& circuit,
                        const std::string& unit) {
    const bool mc = s.trials > 0;
    const std::string deg = std::string(" (") + kDegC + ")";
    std::string t = "model:        " + describe_model(model) + "\n";
    t += "circuit:      " + describe_circuit(circuit) + "\n";
    t += "reading:      " + reading_description(s, circuit, unit) + "\n";
    t += "parts:        " + parts_description(s, unit == "V") + "; R25 at " +
         format_number(kelvin_to_celsius(tolerance_reference_k(model))) + " " + kDegC + "\n";
    if (s.adc.bits > 0) {
        t += "converter:    " + std::to_string(s.adc.bits) + " bits, 1 LSB = " + format_number(b.lsb, 4) + " " + unit +
             "; quantization \xC2\xB1"
             "0.5 LSB" +
             (s.adc.error_lsb > 0.0 ? " + converter error \xC2\xB1" + format_number(s.adc.error_lsb) + " LSB" : "") +
             "\n";
    }
    if (s.dissipation_w_per_k > 0.0) {
        t += "self-heating: dissipation constant " + format_number(1e3 * s.dissipation_w_per_k) + " mW/K\n";
    }
    t += "Monte Carlo:  " +
         (mc ? std::to_string(s.trials) + " trials, seed " + std::to_string(s.seed) : std::string("off (--trials 0)")) +
         "\n\n";

    std::vector<Column> cols = {{"T" + deg, "", 2}, {"worst case" + deg, "", 4}};
    if (mc) {
        cols.insert(cols.end(), {{"MC mean" + deg, "", 4},
                                 {"MC std" + deg, "", 4},
                                 {"95 % bound" + deg, "", 4},
                                 {"99.7 % bound" + deg, "", 4},
                                 {"MC max |error|" + deg, "", 4}});
    }
    Table errors(cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row = {kelvin_to_celsius(p.t_k), p.worst_case_k};
        if (mc) row.insert(row.end(), {p.mc.mean_k, p.mc.std_k, p.mc.p95_k, p.mc.p99_7_k, p.mc.max_abs_k});
        errors.add_row(row);
    }
    t += errors.text() + "\n";

    // The split: one column per cause that applies.
    const BudgetComponents& k0 = b.points.front().components;
    struct Cause {
        const char* header;
        double BudgetComponents::*field;
    };
    const Cause causes[] = {{"nonlinearity", &BudgetComponents::nonlinearity_k},
                            {"R25", &BudgetComponents::r25_k},
                            {"B-value", &BudgetComponents::beta_k},
                            {"resistors", &BudgetComponents::resistors_k},
                            {"excitation", &BudgetComponents::excitation_k},
                            {"ADC", &BudgetComponents::adc_k},
                            {"self-heating", &BudgetComponents::self_heating_k}};
    std::vector<Column> split_cols = {{"T" + deg, "", 2}};
    std::vector<const Cause*> shown;
    for (const Cause& cause : causes) {
        if (!std::isnan(k0.*cause.field)) {
            split_cols.push_back({cause.header + deg, "", 4});
            shown.push_back(&cause);
        }
    }
    if (s.adc.bits > 0) split_cols.push_back({std::string("resolution (") + kDegC + "/LSB)", "", 5});
    Table split(split_cols);
    for (const BudgetPoint& p : b.points) {
        std::vector<Cell> row = {kelvin_to_celsius(p.t_k)};
        for (const Cause* cause : shown) row.push_back(p.components.*(cause->field));
        if (s.adc.bits > 0) row.push_back(p.resolution_k_per_lsb);
        split.add_row(row);
    }
    t += "each cause alone (largest |change of error| over its tolerance):\n" + split.text() + "\n";

    const BudgetSummary& sm = b.summary;
    t += "worst case over the span   " + format_fixed(sm.worst_case_k, 4) + " " + kDegC + " at " + celsius(sm.at_t_k) +
         " " + kDegC + "\n";
    if (mc) {
        t += "99.7 % bound over the span " + format_fixed(sm.p99_7_k, 4) + " " + kDegC + " at " +
             celsius(sm.p99_7_at_t_k) + " " + kDegC + "\n";
    }
    for (const BudgetPoint& p : b.points) {
        if (p.t_k == sm.at_t_k) t += "largest cause there        " + largest_cause(p) + "\n";
    }
    return t;
}

void run_budget(const BudgetOptions& o) {
    const Format format = parse_format(o.out.format);
    const Thermistor thermistor = build_model(o.model);
    const Span span = build_span(o.span);
    const Grid grid = build_grid(thermistor, span, o.span);
    if (grid.size() > kMaxBudgetPoints) {
        const auto [flag, text] = grid_size_culprit(o.span);
        throw InputError(flag, text,
                         "gives " + std::to_string(grid.size()) + " temperatures; a budget takes at most " +
                             std::to_string(kMaxBudgetPoints));
    }
    const Circuit circuit = build_circuit(o.circuit, thermistor, span);
    const BudgetSpec spec = build_spec(o, circuit);
    if (!o.svg.empty()) check_svg_path(o.svg, o.out.output);
    const Budget b = compute_budget(grid, thermistor, circuit, spec);
    const std::string unit = reading_unit(circuit, spec);

    std::string bytes;
    switch (format) {
        case Format::json: bytes = dump(budget_json(b, spec, thermistor, span, circuit, unit)); break;
        case Format::csv: bytes = budget_csv(b); break;
        case Format::text: bytes = budget_text(b, spec, thermistor, circuit, unit); break;
    }
    std::vector<Output> outputs{{o.out.output, bytes, "-o"}};
    if (!o.svg.empty()) {
        outputs.push_back(
            {o.svg,
             svg::render(budget_figure(thermistor, circuit, b,
                                       spec.distribution == Distribution::normal ? "normal, tolerance = 3 sigma"
                                                                                 : "uniform over the tolerance")),
             "--svg"});
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
    const char* tol = "Tolerances";
    sub->add_option("--r25-tol", opt->r25_tol, "Thermistor resistance at T0, +-% (default 1)")->group(tol);
    sub->add_option("--beta-tol", opt->beta_tol, "Thermistor B-value, +-% (default 1)")->group(tol);
    sub->add_option("--resistor-tol", opt->resistor_tol, "Every fixed resistor, +-% (default 1)")->group(tol);
    sub->add_option("--excitation-tol", opt->excitation_tol,
                    "Drive voltage or current, +-% (default 1; only for a reading in volts)")
        ->group(tol);
    sub->add_option("--distribution", opt->distribution,
                    "Monte Carlo spread: normal (tolerance = 3 sigma, default) or uniform")
        ->group(tol);
    const char* rd = "Reading";
    sub->add_option("--reading", opt->reading,
                    "model (firmware inverts the nominal model, default) or line (the endpoint line)")
        ->group(rd);
    sub->add_option("--adc-bits", opt->adc_bits, "Converter resolution, 1 to 24 bits (default: no converter)")
        ->group(rd);
    sub->add_option("--adc-error", opt->adc_error, "Converter error bound, +-LSB (needs --adc-bits)")->group(rd);
    sub->add_option("--adc-ref", opt->adc_ref,
                    "Converter reference: excitation (ratiometric) or volts (default: the --excitation voltage as "
                    "a fixed reference; ratiometric without a drive)")
        ->group(rd);
    sub->add_option("--dissipation", opt->dissipation, "Thermistor dissipation constant, mW/K (self-heating)")
        ->group(rd);
    const char* mc = "Monte Carlo";
    sub->add_option("--trials", opt->trials, "Monte Carlo trials (default 100000; 0 = worst case only)")->group(mc);
    sub->add_option("--seed", opt->seed, "Random seed (default " + std::to_string(kDefaultSeed) + ")")->group(mc);
    sub->add_option("--threads", opt->threads, "Threads (default: every core; the result does not depend on it)")
        ->group(mc);
    add_output_options(*sub, opt->out);
    add_svg_option(*sub, opt->svg);
    sub->footer(
        std::string("Example:\n"
                    "  rtline budget --r25 10k --beta 3950 --span 0:45 --step 5 --circuit divider-low --rs 10k\n"
                    "  rtline budget --r25 10k --beta 3950 --span -20:60 --step 10 --circuit divider-low --rs 10k "
                    "--excitation 3.3 --adc-ref excitation --adc-bits 12 --adc-error 2 --dissipation 1.5 "
                    "--reading line\n"
                    "Errors are the temperature the firmware reads minus the true one. The worst case spans "
                    "every tolerance at once; each cause alone shows which part to buy better.\n\n") +
        kSafetyNote);
    sub->callback([opt] { run_budget(*opt); });
}

}  // namespace rtline::cli
