// The front end in `check`: the amplifier (gain and offset, or chosen to fill the converter's range)
// and the converter's sampling input, given by flags; reported as the value at the converter input, the
// network's source impedance over the span, the settling error in LSB and the suggested filter capacitor.
#pragma once

#include <CLI/CLI.hpp>
#include <optional>
#include <string>
#include <vector>

#include "report.hpp"
#include "rtline/analysis.hpp"
#include "rtline/frontend.hpp"

namespace rtline::cli {


struct FrontEndOptions {
    std::string gain;         // V/V
    std::string offset;       // output offset, V (V/V of the excitation when ratiometric)
    bool auto_range = false;  // choose gain and offset to fill the converter's range
    std::string headroom;     // %, at each end of the range (default 5)
    std::string amp_output;   // amplifier output resistance into the converter, ohm (default 0)
    std::string adc_bits;     // default 12
    std::string adc_ref;      // "excitation" or volts
    std::string sample_cap;   // F, e.g. 10p
    std::string acquisition;  // s, e.g. 1u
    [[nodiscard]] bool given() const;
};
// Every front-end flag (check): the amplifier's, --adc-ref, and the converter's sampling input.
void add_front_end_options(CLI::App& app, FrontEndOptions& o);
// The amplifier's flags and --adc-ref alone (table: its own --adc-bits, no settling).
void add_amplifier_options(CLI::App& app, FrontEndOptions& o);
// The amplifier's flags alone: --gain, --offset, --auto-range, --headroom (budget: its own --adc-ref).
void add_amplifier_flags(CLI::App& app, FrontEndOptions& o);

// The amplifier the flags describe (none without --gain or --auto-range) and the converter's full
// scale in the circuit's output unit (1 when ratiometric, the excitation for a voltage drive,
// --adc-ref volts otherwise; NaN when unknown). --auto-range fits the gain and offset over `grid`.
struct AmplifierChoice {
    std::optional<Amplifier> amplifier;
    bool auto_ranged = false;
    double headroom = 0.0;  // fraction at each end, with --auto-range
    double full_scale = 0.0;
};
// How the flags choose the amplifier before any circuit is known: a fixed one (--gain, --offset), or
// --auto-range with its headroom (a fraction at each end), or none. Checks the flags' combinations.
struct AmplifierRule {
    std::optional<Amplifier> fixed;
    bool auto_range = false;
    double headroom = 0.0;
};
[[nodiscard]] AmplifierRule amplifier_rule(const FrontEndOptions& o);
[[nodiscard]] AmplifierChoice choose_amplifier(const FrontEndOptions& o, const Circuit& circuit, const Grid& grid);
// The same against a full scale the caller knows (the budget's converter), in output_unit(circuit); NaN
// when unknown, which --auto-range refuses.
[[nodiscard]] AmplifierChoice choose_amplifier(const FrontEndOptions& o, const Circuit& circuit, const Grid& grid,
                                               double full_scale);
// The amplifier in words: "gain 12.5 V/V, offset -0.3 V/V (chosen: the span onto 5 to 95 % of 1 V/V)".
[[nodiscard]] std::string describe_amplifier(const AmplifierChoice& a, const Circuit& circuit);

struct FrontEndPoint {
    double t_k = 0.0;
    SourceImpedance source;
    double converter_input = 0.0;
    double settling_error_lsb = 0.0;  // NaN without a sampling input
};

struct FrontEndReport {
    std::optional<Amplifier> amplifier;
    bool auto_ranged = false;
    double headroom = 0.0;
    double full_scale = 0.0;  // in the output unit; NaN when unknown
    std::optional<Sampling> sampling;
    double settling_source_ohm = 0.0;  // what charges the sampling capacitor at the worst point
    std::vector<FrontEndPoint> points;
    std::vector<std::string> warnings;  // for stderr and the JSON
};

// The front end of `circuit` at each analysed point. Throws InputError naming the flag.
[[nodiscard]] FrontEndReport front_end_report(const FrontEndOptions& o, const Circuit& circuit,
                                              const Analysis& analysis, const Grid& grid);
[[nodiscard]] std::string front_end_text(const FrontEndReport& r, const Circuit& circuit);
[[nodiscard]] Json front_end_json(const FrontEndReport& r, const Circuit& circuit);
// CSV: the columns appended to check's rows, and point i's cells.
void add_front_end_columns(std::vector<Column>& columns, const Circuit& circuit);
void add_front_end_cells(std::vector<Cell>& row, const FrontEndReport& r, const Circuit& circuit, std::size_t i);

}  // namespace rtline::cli
