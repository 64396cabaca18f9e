// rtline fit: Steinhart–Hart or beta coefficients from R–T points, with the residual at each point.
#include <cmath>
#include <memory>
#include <tuple>
#include <utility>

#include "commands.hpp"
#include "common.hpp"
#include "rtline/error.hpp"
#include "rtline/fit.hpp"
#include "rtline/rtcsv.hpp"

namespace rtline::cli {

namespace {

struct FitCommand {
    std::string points;
    std::string model = "sh";
    std::string t0 = "25";
    OutputOptions out;
};

Json residuals_json(const std::vector<Residual>& rs) {
    Json arr = Json::array();
    for (const Residual& r : rs) {
        arr.push_back({{"t_c", kelvin_to_celsius(r.t_k)}, {"r_ohm", r.r_ohm}, {"residual_k", r.residual_k}});
    }
    return arr;
}

const Residual& worst(const std::vector<Residual>& rs) {
    std::size_t k = 0;
    for (std::size_t i = 1; i < rs.size(); ++i) {
        if (std::abs(rs[i].residual_k) > std::abs(rs[k].residual_k)) k = i;
    }
    return rs[k];
}

// The other model fitted to the same points, for comparison: its JSON and its line of text. The fit
// asked for stands on its own, so when the points cannot give the other one it is only left out, and
// the text says why.
template <class MaxResidual>
std::pair<Json, std::string> other_fit(const char* kind, const char* name, MaxResidual max_residual_k) {
    try {
        const double max_k = max_residual_k();
        return {Json{{"kind", kind}, {"max_residual_k", max_k}},
                std::string("a ") + name + " fit to the same points: largest |residual| " +
                    format_decimals(1e3 * max_k, 2) + " mK\n"};
    } catch (const InputError& e) {
        // The reason without its advice (after "; "), which is for the fit asked for, not this one.
        const std::string why = e.why().substr(0, e.why().find("; "));
        return {Json(), std::string("a ") + name + " fit to the same points is not possible: " + why + "\n"};
    }
}

void run_fit(const FitCommand& o) {
    const Format format = parse_format(o.out.format);
    if (o.model != "sh" && o.model != "beta") {
        throw InputError("--model", o.model, "fit takes sh (Steinhart-Hart) or beta");
    }
    const std::string source = o.points == "-" ? std::string("stdin") : o.points;
    const std::vector<RtPoint> raw = read_rt_points(read_text(o.points, "--points"), source);
    const double t0_k = build_t0(o.t0);

    std::vector<Residual> residuals;
    double max_residual_k = 0.0;
    Json model;
    std::string heading;
    std::string comparison;
    Json alternative;
    if (o.model == "sh") {
        const std::vector<RtPoint> pts = validate_points(raw, 3, source);
        const ShFit fit = fit_steinhart_hart(pts);
        judge_points(pts, source);
        residuals = fit.residuals;
        max_residual_k = fit.max_residual_k;
        model = model_json(Thermistor(fit.model));
        heading =
            "Steinhart-Hart fit to " + std::to_string(pts.size()) + " points (" +
            (pts.size() == 3 ? "exact through three points" : "least squares, weighted for temperature residuals") +
            ")\n  A = " + format_number(fit.model.a, 10) + "\n  B = " + format_number(fit.model.b, 10) +
            "\n  C = " + format_number(fit.model.c, 10) + "\n";
        std::tie(alternative, comparison) =
            other_fit("beta", "beta", [&] { return fit_beta(pts, t0_k).max_residual_k; });
    } else {
        const std::vector<RtPoint> pts = validate_points(raw, 2, source);
        const BetaFit fit = fit_beta(pts, t0_k);
        judge_points(pts, source);
        residuals = fit.residuals;
        max_residual_k = fit.max_residual_k;
        model = model_json(Thermistor(fit.model));
        heading = "beta fit to " + std::to_string(pts.size()) +
                  " points (least squares, weighted for temperature residuals)\n" +
                  "  R0 = " + format_resistance(fit.model.r0_ohm, 6) + " ohm at " +
                  format_number(kelvin_to_celsius(t0_k)) +
                  " \xC2\xB0"
                  "C\n  B = " +
                  format_number(fit.model.b_k, 7) + " K\n";
        if (pts.size() >= 3) {
            std::tie(alternative, comparison) =
                other_fit("steinhart-hart", "Steinhart-Hart", [&] { return fit_steinhart_hart(pts).max_residual_k; });
        }
    }

    std::string bytes;
    if (format == Format::json) {
        Json doc = document("fit");
        doc["model"] = model;
        doc["residuals"] = residuals_json(residuals);
        doc["max_residual_k"] = max_residual_k;
        if (!alternative.is_null()) doc["alternative"] = alternative;
        bytes = dump(doc);
    } else {
        Table table({{"T (\xC2\xB0"
                      "C)",
                      "t_c", 2},
                     {"R (ohm)", "r_ohm", -1, 7, true},
                     {"residual (mK)", "residual_k", 3}});
        // Text reads residuals in mK; CSV keeps kelvin, the one unit of a temperature difference in data.
        const bool csv = format == Format::csv;
        for (const Residual& r : residuals) {
            table.add_row({kelvin_to_celsius(r.t_k), r.r_ohm, csv ? r.residual_k : 1e3 * r.residual_k});
        }
        if (csv) {
            bytes = table.csv();
        } else {
            const Residual& w = worst(residuals);
            bytes = heading + "\nresidual = T(model at R) - T(point)\n" + table.text() +
                    "\nlargest |residual|: " + format_decimals(1e3 * max_residual_k, 3) + " mK at " + celsius(w.t_k) +
                    " \xC2\xB0"
                    "C\n" +
                    comparison;
        }
    }
    emit(o.out.output, bytes);
}

}  // namespace

void setup_fit(CLI::App& app) {
    auto opt = std::make_shared<FitCommand>();
    auto* sub = app.add_subcommand("fit", "Fit Steinhart-Hart or beta coefficients to R-T points");
    sub->add_option("--points", opt->points, "R-T points, CSV with header t_c,r_ohm ('-' reads stdin)")
        ->required()
        ->check(non_empty_file_name);
    sub->add_option("--model", opt->model, "sh (Steinhart-Hart, default) or beta");
    sub->add_option("--t0", opt->t0, "Beta fit: temperature at which R0 is stated, degC (default 25)");
    add_output_options(*sub, opt->out);
    sub->footer(
        "Example:\n"
        "  rtline fit --points examples/freezer-room-rt.csv\n"
        "  rtline fit --points examples/freezer-room-rt.csv --model beta --format json\n"
        "Three points give the exact Steinhart-Hart coefficients; more are fitted by least squares.");
    sub->callback([opt] { run_fit(*opt); });
}

}  // namespace rtline::cli
