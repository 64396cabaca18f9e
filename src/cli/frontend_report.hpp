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
void add_front_end_options(CLI::App& app, FrontEndOptions& o);

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
