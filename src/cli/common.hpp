// Option groups shared by several commands: the thermistor model, the span, the circuit and the
// output. Each is a struct of the flags' texts (empty = not given) with a function that declares the
// flags and one that turns the texts into core values, so error messages name the flag.
#pragma once

#include <CLI/CLI.hpp>
#include <string>
#include <utility>

#include "report.hpp"
#include "rtline/analysis.hpp"
#include "rtline/converter.hpp"
#include "rtline/error.hpp"
#include "rtline/grid.hpp"
#include "rtline/plausibility.hpp"
#include "rtline/thermistor.hpp"

namespace rtline::cli {

// The flag that sets a core input ("--step" for Input::step), and a core error in those terms.
[[nodiscard]] std::string flag_name(Input input);
[[nodiscard]] std::string message(const Error& e);

// The caution every design command's help carries (see README).
extern const char* const kSafetyNote;
// Why a power or self-heating flag is refused without --excitation or --current.
extern const char* const kNeedsDrive;

struct ModelOptions {
    std::string r25;        // resistance at T0, e.g. "10k"
    std::string beta;       // B-value, K
    std::string t0 = "25";  // reference temperature of r25, °C
    std::string sh;         // "A,B,C"
    std::string points;     // R–T CSV file, or "-" for stdin
    std::string model;      // with --points: "sh", "beta" or "table" (default: sh)
};
void add_model_options(CLI::App& app, ModelOptions& o);
// The thermistor the flags describe. Reads --points through read_text().
[[nodiscard]] Thermistor build_model(const ModelOptions& o);
// A judgement of the core's plausibility rules applied to `field` as typed (`text`): fine passes, unusual
// warns, impossible throws InputError.
void heed(const std::string& field, const std::string& text, const Judgement& j);
// --t0 as kelvin, refused when it can only be kelvin typed as °C.
[[nodiscard]] double build_t0(const std::string& text);
// Validated R–T points that a model could be fitted to, judged for a temperature column in the wrong
// unit (refused or warned by `source`).
void judge_points(const std::vector<RtPoint>& points, const std::string& source);
// A one-line description of the model for text output, e.g. "beta: R25 = 10k, B = 3950 K".
[[nodiscard]] std::string describe_model(const Thermistor& t);
// The model for JSON: {"kind", ...coefficients}.
[[nodiscard]] Json model_json(const Thermistor& t);

struct SpanOptions {
    std::string span;  // "LO:HI", °C
    std::string step;  // K (= °C of difference); empty: 1 K
};
void add_span_options(CLI::App& app, SpanOptions& o);
// --span, refused when it can only be kelvin typed as °C.
[[nodiscard]] Span build_span(const SpanOptions& o);
[[nodiscard]] double build_step(const SpanOptions& o);
// The flag to blame for too many grid points, with its text as typed: --step when it was given,
// else --span (the default step of 1 K is not the user's doing).
[[nodiscard]] std::pair<std::string, std::string> grid_size_culprit(const SpanOptions& o);
// make_grid over `span` at the --step, its errors quoting --span and --step as the user typed them.
// With `judge_linearity` (check, size, budget), a grid too coarse to judge a line is refused.
[[nodiscard]] Grid build_grid(const Thermistor& model, const Span& span, const SpanOptions& o,
                              bool judge_linearity = false);

struct CircuitOptions {
    std::string circuit;
    std::string rs, rp, r1, r2, r3;
    std::string null_at;     // bridge null temperature, °C (default: the span's low end)
    std::string load;        // ohm
    std::string excitation;  // V
    std::string current;     // A
    std::string lead;        // loop resistance of the wires to a remote thermistor, ohm
};
// Declares --circuit (required unless `circuit_optional`), the resistor flags (unless not
// `with_resistors`: sizing chooses them), --null-at, --load and the drive flags.
void add_circuit_options(CLI::App& app, CircuitOptions& o, bool circuit_optional = false, bool with_resistors = true);
// The circuit the flags describe; a bridge's missing r2/r3 follow from --null-at.
[[nodiscard]] Circuit build_circuit(const CircuitOptions& o, const Thermistor& model, const Span& span);
// The topology (parsed from `topology`), load and drive the flags describe, without resistor values.
[[nodiscard]] Circuit build_drive(const CircuitOptions& o, const std::string& topology);
// The bridge null temperature: --null-at, or the span's low end.
[[nodiscard]] double null_temperature(const CircuitOptions& o, const Span& span);
[[nodiscard]] Json circuit_json(const Circuit& c);
[[nodiscard]] std::string describe_circuit(const Circuit& c);

struct OutputOptions {
    std::string format = "text";
    std::string output;  // -o FILE
};
// --format (text, json, csv, and markdown when `markdown`) and -o.
void add_output_options(CLI::App& app, OutputOptions& o, bool markdown = false);
// A CLI11 check for a FILE flag: an empty name is refused (it would read as "not given").
[[nodiscard]] std::string non_empty_file_name(const std::string& path);

// Reads a whole file ("-" = stdin); throws InputError naming `field` when it cannot be read.
[[nodiscard]] std::string read_text(const std::string& path, const std::string& field);

// Parses an optional positive quantity flag ("" → `fallback`).
[[nodiscard]] double optional_quantity(const std::string& text, const std::string& field, const std::string& unit,
                                       double fallback);

// --adc-transfer (default rounding): which ratio a converter code stands for; in `group`.
void add_adc_transfer_option(CLI::App& app, std::string& text, const std::string& group);
[[nodiscard]] AdcTransfer build_adc_transfer(const std::string& text);
// The transfer in words for reports and the C header, e.g. "rounding: code k is the ratio k/4096 of the
// reference (transitions at k - 1/2 LSB)".
[[nodiscard]] std::string describe_adc_transfer(AdcTransfer t, int bits);

// --threads for every command that takes it: "" → 0 (one per core), else a whole number from 1 to
// kMaxThreads; any other text is refused with the same message everywhere.
[[nodiscard]] unsigned build_threads(const std::string& text);

// "25.00 °C" style label and °C formatting helpers for text output.
[[nodiscard]] std::string celsius(double t_k, int decimals = 2);

}  // namespace rtline::cli
