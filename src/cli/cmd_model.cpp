// rtline model: a thermistor model evaluated over a span: T, R and alpha.
#include <memory>

#include "commands.hpp"
#include "common.hpp"
#include "rtline/error.hpp"
#include "rtline/grid.hpp"

namespace rtline::cli {

namespace {

struct ModelCommand {
    ModelOptions model;
    SpanOptions span;
    OutputOptions out;
};

void run_model(const ModelCommand& o) {
    const Format format = parse_format(o.out.format);
    const Thermistor thermistor = build_model(o.model);
    const Span span = build_span(o.span);
    const Grid grid = build_grid(thermistor, span, o.span);

    std::string bytes;
    if (format == Format::json) {
        Json doc = document("model");
        doc["model"] = model_json(thermistor);
        doc["span"] = {{"lo_c", kelvin_to_celsius(span.lo_k)}, {"hi_c", kelvin_to_celsius(span.hi_k)}};
        Json pts = Json::array();
        for (std::size_t i = 0; i < grid.size(); ++i) {
            pts.push_back({{"t_c", kelvin_to_celsius(grid.t_k[i])},
                           {"r_ohm", grid.r_ohm[i]},
                           {"alpha_per_k", thermistor.alpha(grid.t_k[i])}});
        }
        doc["points"] = pts;
        bytes = dump(doc);
    } else {
        Table table({{"T (\xC2\xB0"
                      "C)",
                      "t_c", 2},
                     {"R (ohm)", "r_ohm", -1, 5, true},
                     {"alpha (%/K)", "alpha_per_k", 3},
                     {"local B (K)", "local_b_k", 1}});
        for (std::size_t i = 0; i < grid.size(); ++i) {
            const double t = grid.t_k[i];
            if (format == Format::csv) {
                table.add_row({kelvin_to_celsius(t), grid.r_ohm[i], thermistor.alpha(t), thermistor.local_beta(t)});
            } else {
                table.add_row(
                    {kelvin_to_celsius(t), grid.r_ohm[i], 100.0 * thermistor.alpha(t), thermistor.local_beta(t)});
            }
        }
        if (format == Format::csv) {
            bytes = table.csv();
        } else {
            bytes = describe_model(thermistor) + "\n\n" + table.text();
        }
    }
    emit(o.out.output, bytes);
}

}  // namespace

void setup_model(CLI::App& app) {
    auto opt = std::make_shared<ModelCommand>();
    auto* sub = app.add_subcommand("model", "Evaluate a thermistor model over a span: R and alpha at each temperature");
    add_model_options(*sub, opt->model);
    add_span_options(*sub, opt->span);
    add_output_options(*sub, opt->out);
    sub->footer(
        "Example:\n"
        "  rtline model --r25 10k --beta 3950 --span -30:5 --step 5\n"
        "  rtline model --points examples/freezer-room-rt.csv --model table --span -30:5 --format json\n"
        "alpha is (1/R)dR/dT; the local B is -alpha*T^2 (equal to B everywhere for the beta model).");
    sub->callback([opt] { run_model(*opt); });
}

}  // namespace rtline::cli
