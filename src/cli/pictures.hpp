// The pictures behind --svg: each command's result turned into an svg::Figure (what to draw, with
// which labels and units). The numbers are the result structs' own; only the size picture's curve is
// computed here, by evaluating the core's sizing objective over the plotted range.
#pragma once

#include <CLI/CLI.hpp>
#include <optional>
#include <string>
#include <vector>

#include "rtline/analysis.hpp"
#include "rtline/budget.hpp"
#include "rtline/correction.hpp"
#include "rtline/sizing.hpp"
#include "svg.hpp"

namespace rtline::cli {

// Declares --svg FILE in the Output group.
void add_svg_option(CLI::App& app, std::string& path);

// Rejects an --svg path the picture cannot go to ("-": stdout carries the normal output; the same
// file as -o). Throws InputError ("--svg").
void check_svg_path(const std::string& svg_path, const std::string& output_path);

// check: output and the reference line against temperature over the nonlinearity (%FSD, with the
// error in °C on the right) against temperature.
[[nodiscard]] svg::Figure check_figure(const Thermistor& model, const Circuit& circuit, const Analysis& a);

// size: the objective against the first free resistor (log axis) over `lo_ohm`..`hi_ohm`, at
// `points` log-spaced values; for two-resistor topologies with the second resistor at its best
// (best_second). The continuous optimum and the `listed` candidates are marked.
struct SizePicture {
    const SizingSpec* spec = nullptr;
    const Grid* grid = nullptr;
    const Thermistor* model = nullptr;
    Candidate continuous;
    std::string continuous_fails;   // the constraint it fails first (failed_constraint), or empty
    std::vector<Candidate> listed;  // what the report lists
    std::string listed_label;       // e.g. "best 5 E24 values (listed)"
    double lo_ohm = 0.0;
    double hi_ohm = 0.0;
    int points = 200;
};
// The plotted range when the user gave no --range: a factor of 4 either side of the continuous optimum, widened
// to take in the listed values, within the search range.
[[nodiscard]] std::pair<double, double> size_window(const SizingSpec& spec, const Candidate& continuous,
                                                    const std::vector<Candidate>& listed);
[[nodiscard]] svg::Figure size_figure(const SizePicture& p);

// table: the shipped error (°C, the integer code as emitted) against ADC code with the breakpoints
// marked, the interpolation error before rounding, the polynomial's error too when there is one, and
// the temperature along the top. `target_k`: the bound the table meets, drawn at ± its value;
// `target_source` ("--max-error" or "default") labels it.
[[nodiscard]] svg::Figure table_figure(const Thermistor& model, const Circuit& circuit, const CodeMap& map,
                                       const LookupTable& table, const FixedTable& fixed,
                                       const std::optional<Polynomial>& polynomial, double target_k,
                                       const std::string& target_source);

// budget: the error band against temperature: ± the worst case, ± the Monte Carlo 99.7 % and 95 %
// bounds of |error| (when trials were run), the Monte Carlo mean and the nominal error.
[[nodiscard]] svg::Figure budget_figure(const Thermistor& model, const Circuit& circuit, const Budget& b,
                                        const std::string& distribution);

}  // namespace rtline::cli
