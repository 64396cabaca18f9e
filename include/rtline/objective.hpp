// Sizing objectives: what makes one set of standard values better than another. The analog
// nonlinearity (the textbook objective, searched exhaustively), the resolution at the converter (the
// largest °C per code over the span) and the total error with real parts (the budget's largest |error|
// at a stated confidence). The last two rank a shortlist of the nonlinearity search's candidates.
#pragma once

#include <cstddef>
#include <optional>
#include <string_view>
#include <vector>

#include "rtline/budget.hpp"
#include "rtline/sizing.hpp"

namespace rtline {

enum class Objective { nonlinearity, resolution, total_error };
[[nodiscard]] std::string_view objective_name(Objective o);  // "nonlinearity", "resolution", "total-error"
// Parses a name as objective_name prints it; throws InputError naming `field`.
[[nodiscard]] Objective parse_objective(std::string_view text, std::string_view field);

// The confidence a total error holds at: the worst case over the tolerance box, or a two-sided Monte
// Carlo bound (95 % or 99.7 % of the trials have |error| at most the figure).
enum class Confidence { worst_case, p95, p99_7 };
[[nodiscard]] std::string_view confidence_name(Confidence c);  // "worst-case", "95", "99.7"
[[nodiscard]] Confidence parse_confidence(std::string_view text, std::string_view field);

struct ObjectiveSpec {
    Objective kind = Objective::nonlinearity;
    // resolution: its converter (bits, transfer, full scale); total-error: the whole budget (its trials
    // must be above 0 for a Monte Carlo confidence).
    BudgetSpec budget;
    Confidence confidence = Confidence::worst_case;
    // How many of the nonlinearity search's best combinations the other objectives rank; a
    // one-resistor topology under the resolution objective ranks every series value instead.
    std::size_t shortlist = 24;
    // An amplifier between each candidate and the converter (resolution and total-error): the fixed one
    // in budget.amplifier, or, with auto_range, for each candidate the one that maps its output over
    // the span onto the converter's range less `headroom` (a fraction) at each end (fit_range).
    bool auto_range = false;
    double headroom = 0.05;
    // Constraints at the converter's input through that amplifier, in codes (0: none): the span's
    // codes between the grid's ends and the smallest |d code/dT| over it. They judge the candidates the
    // objective ranks (the shortlist, or every value), after the search; the network-unit constraints
    // of SizingSpec judge the search itself.
    double min_span_codes = 0.0;
    double min_sensitivity_codes_per_k = 0.0;
};

// Checks the spec (a converter for resolution and total-error, Monte Carlo trials for a percentile);
// throws InputError naming Input::adc_bits or Input::trials; an amplifier for the nonlinearity (which
// an amplifier maps linearly) names Input::gain or Input::output_range, a headroom outside 0 to under
// 50 % Input::headroom.
void validate(const ObjectiveSpec& spec);

// The amplifier the objective reads candidate `c` through (none without one): the fixed one, or the
// one fitted to c's output over the grid, in the reading's unit (per volt of the excitation when
// ratiometric).
[[nodiscard]] std::optional<Amplifier> objective_amplifier(const ObjectiveSpec& spec, const Grid& grid,
                                                           const Circuit& c);

// What candidate `c` gives at the converter's input through the objective's amplifier (none: the
// network directly), in codes of obj.budget.adc: |reading(T_hi) − reading(T_lo)|·|gain|/LSB over the
// grid, and the smallest |d reading/dT|·|gain|/LSB over it (codes per K); and whether the input stays
// within the converter's range (an amplifier of fixed gain can drive it past a rail). Requires
// adc.bits > 0.
struct ConverterCodes {
    double span_codes = 0.0;
    double min_sensitivity_codes_per_k = 0.0;
    bool in_range = true;  // the converter input stays within 0 to full scale over the grid
};
[[nodiscard]] ConverterCodes converter_codes(const ObjectiveSpec& obj, const Grid& grid, const Thermistor& model,
                                             const Circuit& c);

// The largest temperature step one converter code stands for over the grid, K per code: one LSB over
// |d output/dT| at each point (the circuit's output in the converter's unit). Requires adc.bits > 0.
[[nodiscard]] double resolution_k_per_code(const Grid& grid, const Thermistor& model, const Circuit& c,
                                           const Converter& adc);

// The budget's largest |error| over the span at the confidence, K, and where (t_k).
struct TotalError {
    double error_k = 0.0;
    double at_t_k = 0.0;
};
[[nodiscard]] TotalError total_error(const Budget& b, Confidence c);

// The objective of `c`: %FSD for nonlinearity, K for the others (smaller is better). Through an
// amplifier the resolution is one LSB over |gain·d output/dT|, and the total error is the budget's
// with the amplifier (and its errors, budget.amplifier_errors).
[[nodiscard]] double objective_value(const ObjectiveSpec& obj, const SizingSpec& spec, const Grid& grid,
                                     const Thermistor& model, const Circuit& c);

// The unit objective_value is in: "%FSD" or "K".
[[nodiscard]] std::string_view objective_unit(Objective o);

struct RankedCandidate {
    Candidate candidate;
    double objective = 0.0;  // objective_value()
};

struct ObjectiveSearch {
    std::vector<RankedCandidate> best;  // at most spec.top, best first
    std::size_t ranked = 0;             // combinations the objective was evaluated for
    std::size_t removed_codes = 0;      // of those, removed by the converter-input constraints
    StandardSearch nonlinearity;        // the exhaustive search the shortlist came from (its counts)
};

// The standard-value search under `obj`: nonlinearity is search_standard itself; the others evaluate
// their objective for the shortlist (constraints apply to it as to the search, and the converter-input
// constraints in codes after it; through an amplifier, a candidate it drives past a rail of the
// converter is left out) and rank by it, equal figures keeping the nonlinearity order.
// Validates obj first; throws InfeasibleError when the codes constraints leave no candidate.
[[nodiscard]] ObjectiveSearch search_objective(const ObjectiveSpec& obj, const SizingSpec& spec, const Grid& grid,
                                               const Thermistor& model);

}  // namespace rtline
