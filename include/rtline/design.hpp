// Design from requirements: the thermistor, topology and standard values whose total error with real
// parts, at a stated confidence, is least, and the firmware table sized to the share of the target the
// analog errors leave. It composes sizing (the most linear combinations of each topology and series),
// the budget (the error of each at the confidence) and the correction (the smallest table that ships
// within the share), and adds nothing they own.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "rtline/budget.hpp"
#include "rtline/correction.hpp"
#include "rtline/objective.hpp"
#include "rtline/sizing.hpp"

namespace rtline {

// A thermistor the design may choose: a label, its model and its own tolerances and dissipation.
struct DesignPart {
    std::string label;
    Thermistor model{BetaModel{}};
    double tol_r25 = 0.01;             // ± fraction at T0 (the budget's Tolerances::r25)
    double tol_beta = 0.01;            // ± fraction of B
    double dissipation_w_per_k = 0.0;  // 0: unknown (no self-heating in the budget)
};

struct DesignSpec {
    // requirements
    Span span;
    double step_k = 1.0;      // the budget's temperatures
    double max_error_k = 0.0; // the error the reading may have, table included, at the confidence
    Confidence confidence = Confidence::worst_case;
    // the parts
    std::vector<DesignPart> parts;
    // The rest of the budget: fixed resistors, converter (bits > 0), environment, Monte Carlo. Its
    // thermistor tolerances and dissipation are each part's; its reference follows `reference`.
    BudgetSpec budget;
    Excitation drive;                // ratiometric unless a voltage drive is given
    ConverterReference reference;    // how the converter reads the divider
    std::vector<Series> series = {Series::e24, Series::e96};
    std::vector<Topology> topologies;  // empty: every divider (divider-high, divider-low, shunt-divider)
    double range_lo_ohm = 100.0;
    double range_hi_ohm = 1e6;
    Constraints constraints;
    std::size_t shortlist = 6;   // the most linear combinations per part, series and topology budgeted
    std::size_t finalists = 8;   // a Monte Carlo confidence: the best by worst case that get the Monte Carlo
    // the table
    Spacing spacing = Spacing::code;
    int scale_per_c = 100;  // fixed-point counts per °C
    unsigned threads = 0;
};

// Checks the spec; throws InputError naming the input (Input::max_error, adc_bits, trials, topology,
// span, model).
void validate(const DesignSpec& spec);

// One design the search weighed.
struct DesignOption {
    std::size_t part = 0;  // index into DesignSpec::parts
    Series series = Series::e24;
    Candidate candidate;        // the circuit and its linearity figures
    double analog_k = 0.0;      // the budget's |error| at the confidence (converter included), K
    double analog_at_k = 0.0;   // where
    double worst_case_k = 0.0;  // the budget's worst case, K
    bool monte_carlo = false;   // analog_k is a Monte Carlo figure
    [[nodiscard]] std::size_t resistor_count() const { return free_resistors(candidate.circuit.topology).size(); }
};

// Why the chosen design misses the target, when it does.
enum class Shortfall {
    none,
    analog,  // the budget alone exceeds the target: `cause` is the largest at the worst temperature
    table,   // the share left is below what a table in the chosen unit can ship
};

struct Design {
    bool met = false;
    std::vector<DesignOption> ranked;  // every option weighed, best first (ranked.front() is the design)
    std::size_t examined = 0;          // standard combinations the searches examined
    // the chosen design in full
    Grid grid;               // the chosen part's grid at the spec's step
    BudgetSpec budget_spec;  // as budgeted (the part's tolerances, the reference set)
    Budget budget;
    Channel channel;
    double table_target_k = 0.0;  // the share of the target the analog errors leave (≤ 0: none)
    std::optional<CodeMap> map;
    std::optional<ShippedTable> table;  // absent when the share is not positive or no table meets it
    double total_k = 0.0;               // analog_k + the table's shipped error (the table's error adds in full)
    Shortfall shortfall = Shortfall::none;
    Cause cause = Cause::nonlinearity;  // Shortfall::analog: the largest cause
    double cause_k = 0.0;               // its figure alone
    double cause_at_k = 0.0;            // at this temperature (the worst)
    double rounding_floor_k = 0.0;      // Shortfall::table: the least a table in the unit errs by
    [[nodiscard]] const DesignOption& chosen() const { return ranked.front(); }
};

// The largest power each fixed resistor of `c` dissipates over the grid, W (NaN without a drive), in
// resistor_names order.
struct ResistorPower {
    std::string name;
    double max_w = 0.0;
};
[[nodiscard]] std::vector<ResistorPower> resistor_powers(const Circuit& c, const Grid& grid);

// Two figures within this are a tie, which goes to the coarser series and then to fewer resistors.
inline constexpr double kDesignTieK = 1e-3;

// The design: every part, series and topology, each topology's `shortlist` most linear standard
// combinations budgeted at the confidence; ranked by that figure (ties: kDesignTieK), the best one's
// table sized to max_error − its figure. Throws InfeasibleError when no combination meets the sizing
// constraints; a design that misses the target is returned with met = false and why.
[[nodiscard]] Design design(const DesignSpec& spec);

}  // namespace rtline
