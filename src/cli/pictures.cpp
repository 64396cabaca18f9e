#include "pictures.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>

#include "common.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

const std::string kDeg =
    "\xC2\xB0"
    "C";
const std::string kMinus = "\xE2\x88\x92";
constexpr const char* kBlue = "#1f4e9a";
constexpr const char* kOrange = "#d35400";
constexpr const char* kGreen = "#1e8449";
constexpr const char* kRed = "#c0392b";
constexpr const char* kPurple = "#6c3483";
constexpr const char* kGrey = "#8c8c8c";

// A number with a typographic minus sign.
std::string with_minus(std::string s) { return !s.empty() && s.front() == '-' ? kMinus + s.substr(1) : s; }

std::string span_text(double lo_k, double hi_k) {
    return with_minus(format_number(kelvin_to_celsius(lo_k))) + " to " +
           with_minus(format_number(kelvin_to_celsius(hi_k))) + " " + kDeg;
}

std::string provenance(const std::string& command) {
    return "Written by rtline " RTLINE_VERSION " (rtline " + command + " --svg).";
}

}  // namespace

void add_svg_option(CLI::App& app, std::string& path) {
    app.add_option("--svg", path,
                   "Also draw the result as an SVG picture into FILE (written only when the run succeeds)")
        ->check(non_empty_file_name)
        ->group("Output");
}

void check_svg_path(const std::string& svg_path, const std::string& output_path) {
    if (svg_path == "-") {
        throw InputError("--svg", svg_path, "the picture goes to a file; give a file name (stdout carries the report)");
    }
    if (output_path.empty() || output_path == "-") return;
    namespace fs = std::filesystem;
    std::error_code ec;
    const fs::path a = fs::weakly_canonical(fs::absolute(svg_path, ec), ec);
    const fs::path b = fs::weakly_canonical(fs::absolute(output_path, ec), ec);
    if (svg_path == output_path || (!ec && a == b)) {
        throw InputError("--svg", svg_path, "is also the -o file; give the picture its own name");
    }
}

// ------------------------------------------------------------------------------------- check

svg::Figure check_figure(const Thermistor& model, const Circuit& circuit, const Analysis& a) {
    const std::string unit = output_unit(circuit);
    const std::string line = std::string(line_name(a.line_kind));
    std::vector<double> t;
    std::vector<double> out;
    std::vector<double> nl;
    for (const PointResult& p : a.points) {
        t.push_back(kelvin_to_celsius(p.t_k));
        out.push_back(p.output);
        nl.push_back(p.nonlinearity_pct_fsd);
    }
    const double lo_k = a.points.front().t_k;
    const double hi_k = a.points.back().t_k;

    svg::Figure f;
    f.title = "rtline check: " + std::string(topology_name(circuit.topology)) + " from " + span_text(lo_k, hi_k) +
              ", against the " + line + " line";
    f.notes = {describe_model(model), "circuit: " + describe_circuit(circuit)};
    f.description = provenance("check") + " " + std::to_string(a.points.size()) + " points: the output and the " +
                    line + " line against temperature, then the nonlinearity.";

    svg::Plot top;
    top.title = "Output and the " + line + " line";
    top.x.label = "temperature (" + kDeg + ")";
    top.y.label = "output (" + unit + ")";
    svg::Series output_series{"output (" + unit + ")", t, out, kBlue, 2.2, false};
    svg::Series line_series{
        line + " line", {t.front(), t.back()}, {a.line.at(lo_k), a.line.at(hi_k)}, kOrange, 1.8, true};
    top.lines = {output_series, line_series};
    f.plots.push_back(top);

    svg::Plot bottom;
    bottom.title = "Nonlinearity: output " + kMinus + " " + line + " line, in %FSD of the output span";
    bottom.x.label = "temperature (" + kDeg + ")";
    bottom.y.label = "nonlinearity (%FSD)";
    bottom.zero_line = true;
    // error = deviation / slope and nonlinearity = deviation / span × 100, so error = nonlinearity × factor.
    const double factor = a.summary.output_span / (100.0 * a.line.slope);
    if (std::isfinite(factor) && factor != 0.0)
        bottom.right = {"error (" + kDeg + ", read " + kMinus + " true)", factor};
    bottom.lines.push_back({"nonlinearity against the " + line + " line", t, nl, kGreen, 2.2, false});
    std::size_t worst = 0;
    for (std::size_t i = 1; i < nl.size(); ++i) {
        if (std::abs(nl[i]) > std::abs(nl[worst])) worst = i;
    }
    svg::Markers m;
    m.label = "largest |nonlinearity| " + format_fixed(a.summary.max_nonlinearity_pct_fsd, 3) + " %FSD (error " +
              with_minus(format_fixed(a.points[worst].error_k, 3)) + " " + kDeg + ") at " +
              with_minus(format_number(t[worst], 5)) + " " + kDeg;
    m.x = {t[worst]};
    m.y = {nl[worst]};
    m.colour = kRed;
    bottom.markers.push_back(m);
    f.plots.push_back(bottom);
    return f;
}

// -------------------------------------------------------------------------------------- size

std::pair<double, double> size_window(const SizingSpec& spec, const Candidate& continuous,
                                      const std::vector<Candidate>& listed) {
    const std::string first = free_resistors(spec.base.topology).front();
    const double opt = resistor_value(continuous.circuit, first);
    double lo = opt / 4.0;
    double hi = opt * 4.0;
    for (const Candidate& c : listed) {
        const double v = resistor_value(c.circuit, first);
        lo = std::min(lo, v / 1.5);
        hi = std::max(hi, v * 1.5);
    }
    return {std::max(lo, spec.range_lo_ohm), std::min(hi, spec.range_hi_ohm)};
}

svg::Figure size_figure(const SizePicture& p) {
    const SizingSpec& spec = *p.spec;
    const std::vector<std::string> names = free_resistors(spec.base.topology);
    const std::string& first = names.front();
    const bool two = names.size() == 2;
    const std::string topology(topology_name(spec.base.topology));
    const std::string line(line_name(spec.line));

    const double opt = resistor_value(p.continuous.circuit, first);
    const ObjectiveCurve curve = objective_curve(spec, *p.grid, *p.model, p.lo_ohm, p.hi_ohm, p.points, opt);
    const std::vector<double>& xs = curve.first_ohm;
    const std::vector<double>& ys = curve.objective_pct_fsd;

    svg::Figure f;
    f.title = "rtline size: " + topology + ", the objective against " + first;
    f.notes = {describe_model(*p.model), "circuit: " + describe_circuit(spec.base),
               "span: " + span_text(p.grid->t_k.front(), p.grid->t_k.back()) + ", " + std::to_string(p.grid->size()) +
                   " points; objective: largest |nonlinearity| against the " + line + " line"};
    const Constraints& k = spec.constraints;
    const bool constrained = std::isfinite(k.max_power_w) || std::isfinite(k.max_self_heating_k) || k.min_span > 0.0 ||
                             k.min_sensitivity > 0.0;
    if (constrained && two) f.notes.push_back("the curve ignores the constraints; the listed values meet them");
    f.description = provenance("size") + " The objective at " + std::to_string(xs.size()) + " values of " + first +
                    " from " + format_resistance(p.lo_ohm, 4) + " to " + format_resistance(p.hi_ohm, 4) + " ohm" +
                    (two ? ", each with " + names[1] + " at its best (the continuous search's inner step)" : "") + ".";

    svg::Plot plot;
    plot.title = two ? "Largest |nonlinearity| against " + first + ", " + names[1] + " at its best for each " + first
                     : "Largest |nonlinearity| against " + first;
    plot.x = {first + " (ohm, log scale)", svg::Scale::log10, svg::Ticks::resistance, p.lo_ohm, p.hi_ohm};
    plot.y = {"largest |nonlinearity| (%FSD, log)", svg::Scale::log10, svg::Ticks::number};
    if (constrained && !two) {
        // One resistor: the values that fail a constraint drawn apart, in grey. A run of either kind
        // takes in its neighbours on both sides, so the two lines meet.
        const std::vector<bool>& ok = curve.meets;
        std::vector<double> meets(ys.size(), NAN);
        std::vector<double> fails(ys.size(), NAN);
        for (std::size_t i = 0; i < ys.size(); ++i) {
            const bool near_ok = ok[i] || (i > 0 && ok[i - 1]) || (i + 1 < ok.size() && ok[i + 1]);
            const bool near_fail = !ok[i] || (i > 0 && !ok[i - 1]) || (i + 1 < ok.size() && !ok[i + 1]);
            if (near_ok) meets[i] = ys[i];
            if (near_fail) fails[i] = ys[i];
        }
        if (std::find(ok.begin(), ok.end(), true) != ok.end()) {
            plot.lines.push_back({"objective, meets the constraints", xs, meets, kBlue, 2.2, false});
        }
        if (std::find(ok.begin(), ok.end(), false) != ok.end()) {
            plot.lines.push_back({"objective, fails a constraint", xs, fails, kGrey, 2.0, true});
        }
    } else {
        plot.lines.push_back(
            {two ? "objective, " + names[1] + " at its best" : "objective", xs, ys, kBlue, 2.2, false});
    }

    std::string opt_text;
    for (const std::string& name : names) {
        opt_text += (opt_text.empty() ? "" : ", ") + name + " = " +
                    format_resistance(resistor_value(p.continuous.circuit, name), 5);
    }
    svg::Markers cont;
    cont.label = "continuous optimum " + opt_text + ": " + format_fixed(p.continuous.max_nonlinearity_pct_fsd, 4) +
                 " %FSD" + (p.continuous_fails.empty() ? "" : " (fails " + p.continuous_fails + ")");
    cont.x = {opt};
    cont.y = {p.continuous.max_nonlinearity_pct_fsd};
    cont.colour = kRed;
    cont.shape = svg::Shape::diamond;
    cont.size_px = 5.5;
    svg::Markers std_values;
    std_values.label = p.listed_label;
    for (const Candidate& c : p.listed) {
        std_values.x.push_back(resistor_value(c.circuit, first));
        std_values.y.push_back(c.max_nonlinearity_pct_fsd);
    }
    std_values.colour = kPurple;
    std_values.shape = svg::Shape::square;
    std_values.filled = false;
    std_values.size_px = 4.5;
    plot.markers = {std_values, cont};
    f.plots.push_back(plot);
    return f;
}

// ------------------------------------------------------------------------------------- table

namespace {

// The fractional code at which the exact temperature is t_k (the map is monotone in the code).
double code_at(const CodeMap& map, double t_k) {
    const bool rising = map.rising();
    auto before = [&](double a, double b) { return rising ? a < b : a > b; };
    const auto it = std::lower_bound(map.t_k.begin(), map.t_k.end(), t_k, before);
    if (it == map.t_k.begin()) return static_cast<double>(map.code_lo);
    if (it == map.t_k.end()) return static_cast<double>(map.code_hi);
    const std::size_t i = static_cast<std::size_t>(it - map.t_k.begin());
    const double frac = (t_k - map.t_k[i - 1]) / (map.t_k[i] - map.t_k[i - 1]);
    return static_cast<double>(map.code_lo) + static_cast<double>(i - 1) + frac;
}

}  // namespace

svg::Figure table_figure(const Thermistor& model, const Circuit& circuit, const CodeMap& map, const LookupTable& table,
                         const FixedTable& fixed, const std::optional<Polynomial>& polynomial, double target_k,
                         const std::string& target_source) {
    std::vector<double> codes;
    for (std::size_t i = 0; i < map.size(); ++i)
        codes.push_back(static_cast<double>(map.code_lo) + static_cast<double>(i));
    auto celsius_at = [&](std::int64_t code) {
        return with_minus(format_fixed(kelvin_to_celsius(map.temperature(code)), 2)) + " " + kDeg;
    };

    svg::Figure f;
    f.title = "rtline table: the shipped error at every ADC code of the span";
    f.notes = {describe_model(model), "circuit: " + describe_circuit(circuit),
               describe_adc_transfer(map.transfer, map.adc_bits) + "; error = value read " + kMinus + " exact inverse"};
    f.description = provenance("table") + " The error at each of " + std::to_string(map.size()) + " codes.";

    svg::Plot plot;
    plot.title = "Error against ADC code, codes " + std::to_string(map.code_lo) + " to " + std::to_string(map.code_hi);
    plot.x = {"ADC code (" + std::to_string(map.adc_bits) + " bits)", svg::Scale::linear, svg::Ticks::whole,
              codes.front(), codes.back()};
    plot.y = {"error (" + kDeg + ")", svg::Scale::linear, svg::Ticks::number};
    plot.zero_line = true;
    const std::string unit = fixed.scale_per_c == 100 ? "0.01" : "0.1";
    std::vector<double> shipped_c(fixed.error_k.begin(), fixed.error_k.end());  // a difference: K = °C
    plot.lines.push_back({"shipped: the integer code in " + unit + " " + kDeg + ", " +
                              std::to_string(table.codes.size()) + " entries, largest " +
                              format_fixed(fixed.max_error_k, 4) + " " + kDeg,
                          codes, shipped_c, kBlue, 1.2, false});
    std::vector<double> table_c(table.error_k.begin(), table.error_k.end());
    plot.lines.push_back({"interpolation alone (" + std::string(spacing_name(table.spacing)) + " spacing), largest " +
                              format_fixed(table.max_error_k, 4) + " " + kDeg,
                          codes, table_c, kGrey, 1.2, true});
    if (polynomial) {
        std::vector<double> poly_c(polynomial->error_k.begin(), polynomial->error_k.end());
        plot.lines.push_back({"polynomial, " + std::string(fit_name(polynomial->fit)) + " degree " +
                                  std::to_string(polynomial->degree) + ": largest " +
                                  format_fixed(polynomial->max_error_k, 4) + " " + kDeg,
                              codes, poly_c, kOrange, 1.6, false});
    }
    {
        const double t = target_k;
        plot.lines.push_back({"target \xC2\xB1" + format_number(t, 4) + " " + kDeg + " (" + target_source + ")",
                              {codes.front(), codes.back(), codes.back(), codes.front(), codes.back()},
                              {t, t, NAN, -t, -t},
                              kRed,
                              1.2,
                              true});
    }
    svg::Markers breaks;
    breaks.label = "breakpoints";
    for (const std::int64_t c : table.codes) {
        breaks.x.push_back(static_cast<double>(c));
        breaks.y.push_back(fixed.error_k[static_cast<std::size_t>(std::min(c, map.code_hi) - map.code_lo)]);
    }
    breaks.colour = kBlue;
    breaks.filled = false;
    breaks.size_px = 3.5;
    svg::Markers worst;
    worst.label = "largest shipped error, " + format_fixed(fixed.max_error_k, 4) + " " + kDeg + " at code " +
                  std::to_string(fixed.at_code) + " (" + celsius_at(fixed.at_code) + ")";
    worst.x = {static_cast<double>(fixed.at_code)};
    worst.y = {fixed.error_k[static_cast<std::size_t>(fixed.at_code - map.code_lo)]};
    worst.colour = kRed;
    plot.markers = {breaks, worst};

    // The temperature along the top, at nice values placed at the codes that read them.
    const double t_lo = kelvin_to_celsius(std::min(map.t_k.front(), map.t_k.back()));
    const double t_hi = kelvin_to_celsius(std::max(map.t_k.front(), map.t_k.back()));
    plot.top.label = "temperature (" + kDeg + ")";
    const double step = svg::nice_step(t_lo, t_hi, 8);
    for (const double tc : svg::nice_ticks(t_lo, t_hi, 8)) {
        plot.top.at.push_back(code_at(map, celsius_to_kelvin(tc)));
        plot.top.labels.push_back(svg::tick_label(tc, step, svg::Ticks::number));
    }
    f.plots.push_back(plot);
    return f;
}

// ------------------------------------------------------------------------------------ budget

svg::Figure budget_figure(const Thermistor& model, const Circuit& circuit, const Budget& b,
                          const std::string& distribution) {
    std::vector<double> t;
    std::vector<double> wc_hi, wc_lo, p997_hi, p997_lo, p95_hi, p95_lo, mean, nominal;
    bool have_mc = false;
    for (const BudgetPoint& p : b.points) {
        t.push_back(kelvin_to_celsius(p.t_k));
        wc_hi.push_back(p.worst_high_k);
        wc_lo.push_back(p.worst_low_k);
        p997_hi.push_back(p.mc.p99_865_k);
        p997_lo.push_back(p.mc.p0_135_k);
        p95_hi.push_back(p.mc.p97_5_k);
        p95_lo.push_back(p.mc.p2_5_k);
        mean.push_back(p.mc.mean_k);
        nominal.push_back(p.nominal_error_k);
        have_mc = have_mc || std::isfinite(p.mc.p99_7_k);
    }
    const double lo_k = b.points.front().t_k;
    const double hi_k = b.points.back().t_k;
    svg::Figure f;
    f.title = "rtline budget: " + std::string(topology_name(circuit.topology)) + " from " + span_text(lo_k, hi_k) +
              ", error with real parts";
    f.notes = {describe_model(model), "circuit: " + describe_circuit(circuit),
               have_mc ? "Monte Carlo: " + distribution : std::string("no Monte Carlo trials: the worst case only")};
    f.description = provenance("budget") + " " + std::to_string(b.points.size()) +
                    " temperatures: the signed worst case (low and high), the Monte Carlo percentiles and mean, the nominal "
                    "error.";
    svg::Plot plot;
    plot.title = "Error band: reading " + kMinus + " true temperature";
    plot.x.label = "temperature (" + kDeg + ")";
    plot.y.label = "error (" + kDeg + ")";
    plot.zero_line = true;
    plot.lines.push_back({"worst case, low and high", t, wc_hi, kRed, 2.0, true});
    plot.lines.push_back({"", t, wc_lo, kRed, 2.0, true});
    if (have_mc) {
        plot.lines.push_back({"0.135 % and 99.865 % of the error", t, p997_hi, kBlue, 2.0, false});
        plot.lines.push_back({"", t, p997_lo, kBlue, 2.0, false});
        plot.lines.push_back({"2.5 % and 97.5 % of the error", t, p95_hi, kPurple, 1.5, false});
        plot.lines.push_back({"", t, p95_lo, kPurple, 1.5, false});
        plot.lines.push_back({"Monte Carlo mean", t, mean, kGreen, 2.0, false});
    }
    plot.lines.push_back({"nominal parts", t, nominal, kGrey, 1.5, true});
    svg::Markers worst;
    worst.label = "largest worst case " + format_fixed(b.summary.worst_case_k, 3) + " " + kDeg + " at " +
                  with_minus(format_number(kelvin_to_celsius(b.summary.at_t_k), 5)) + " " + kDeg;
    worst.x = {kelvin_to_celsius(b.summary.at_t_k)};
    for (const BudgetPoint& p : b.points) {
        if (p.t_k == b.summary.at_t_k) worst.y = {p.worst_high_k >= -p.worst_low_k ? p.worst_high_k : p.worst_low_k};
    }
    worst.colour = kRed;
    plot.markers.push_back(worst);
    f.plots.push_back(plot);
    return f;
}

}  // namespace rtline::cli
