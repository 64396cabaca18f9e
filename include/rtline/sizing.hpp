// Sizing: the resistor values that make a topology's output most linear over the span. A continuous
// optimum (scan, then golden-section refinement on log-resistance; nested for two resistors), the
// textbook closed forms for one-resistor topologies, and an exhaustive search over IEC 60063 values
// with constraints on power, self-heating, output span and sensitivity.
#pragma once

#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "rtline/error.hpp"
#include "rtline/analysis.hpp"
#include "rtline/eseries.hpp"

namespace rtline {

struct Constraints {
    double max_power_w = std::numeric_limits<double>::infinity();         // thermistor dissipation
    double max_self_heating_k = std::numeric_limits<double>::infinity();  // needs dissipation_w_per_k
    double min_span = 0.0;         // |output(T_hi) − output(T_lo)|, output units
    double min_sensitivity = 0.0;  // smallest |d output/dT| over the span, output units per K
};

struct SizingSpec {
    Circuit base;  // topology, load and drive; its resistor values are ignored
    LineKind line = LineKind::endpoint;
    double null_at_k = 0.0;  // bridges: temperature of zero output (r2 = r1, r3 from the model)
    Series series = Series::e24;
    double range_lo_ohm = 1.0;  // standard values and the continuous search stay in this range
    double range_hi_ohm = 10e6;
    std::size_t top = 5;  // how many standard combinations to keep
    Constraints constraints;
    double dissipation_w_per_k = 0.0;  // 0: unknown
    std::size_t threads = 0;  // worker threads for large searches, 0: one per core (results do not depend on it)
};

// The resistors sizing chooses for a topology: rs; rp; rp, rs; r1; rp, r1 (bare: none).
[[nodiscard]] std::vector<std::string> free_resistors(Topology t);

// A candidate: the circuit and what it gives over the span.
struct Candidate {
    Circuit circuit;
    double max_nonlinearity_pct_fsd = 0.0;
    double max_error_k = 0.0;
    double output_span = 0.0;
    double sensitivity_min_per_k = 0.0;
    double sensitivity_max_per_k = 0.0;
    double max_power_w = 0.0;         // NaN when the circuit has no drive
    double max_self_heating_k = 0.0;  // NaN when unknown
    bool ridge = false;               // continuous optimum of two resistors: other pairs give the same objective
};

// The circuit with the free resistors set to `values` (in free_resistors order), bridges completed.
[[nodiscard]] Circuit sized_circuit(const SizingSpec& spec, const Thermistor& model, const std::vector<double>& values);

// The objective: largest |nonlinearity| %FSD of the circuit over the grid against spec.line
// (+infinity when the output does not change).
[[nodiscard]] double objective(const SizingSpec& spec, const Grid& grid, const Circuit& c);

// The full figures of a circuit (via analyze()).
[[nodiscard]] Candidate evaluate(const SizingSpec& spec, const Grid& grid, const Thermistor& model, const Circuit& c);

// The continuous optimum over [range_lo, range_hi] for each free resistor, to 1e-6 relative or better.
// Constraints are not applied (the result says whether it meets them: see meets()).
[[nodiscard]] Candidate optimize_continuous(const SizingSpec& spec, const Grid& grid, const Thermistor& model);

// For a two-resistor topology, the inner search optimize_continuous runs for each value of the first
// free resistor: the second resistor's best value in [range_lo, range_hi] with the first at
// `first_ohm`, and the objective there (+infinity when the output cannot change). Requires two free
// resistors.
struct InnerBest {
    double second_ohm = 0.0;
    double objective_pct_fsd = 0.0;
};
[[nodiscard]] InnerBest best_second(const SizingSpec& spec, const Grid& grid, const Thermistor& model,
                                    double first_ohm);

// The objective along the first free resistor, for a picture of the search: n values log-spaced from
// lo_ohm to hi_ohm (n >= 2), with optimum_ohm inserted in order when it lies strictly inside; for a
// two-resistor topology each with the second at its best (best_second). `objective_pct_fsd` is NaN where
// the output cannot change. For one resistor, `meets` says whether the value meets every constraint
// (failed_constraint); for two, or without constraints, it is true throughout.
struct ObjectiveCurve {
    std::vector<double> first_ohm;
    std::vector<double> objective_pct_fsd;
    std::vector<bool> meets;
};
[[nodiscard]] ObjectiveCurve objective_curve(const SizingSpec& spec, const Grid& grid, const Thermistor& model,
                                             double lo_ohm, double hi_ohm, int n, double optimum_ohm);

// Closed forms for one-resistor topologies (Pallàs-Areny & Webster, Sensors and Signal Conditioning,
// 2nd ed., ch. 2): the inflection value R = R_Tc·(B − 2Tc)/(B + 2Tc) at the span's centre, with the
// model's local B there (absent when B ≤ 2Tc), and the three-point value
// R = [R2(R1 + R3) − 2·R1·R3]/(R1 + R3 − 2·R2) for the ends and centre (absent when not positive).
struct ClosedForms {
    std::optional<double> inflection_ohm;
    std::optional<double> three_point_ohm;
    double centre_k = 0.0;
    double local_b_k = 0.0;      // the B used for the inflection value
    bool local_b = false;        // true when the model is not a beta model, so B is the local B at Tc
    bool load_included = false;  // the values account for base.load_ohm (dividers and the shunt)
    bool load_ignored = false;   // a loaded bridge: the values are for the unloaded bridge
};
[[nodiscard]] ClosedForms closed_forms(const Thermistor& model, const Span& span);
// The same for the circuit `base` (topology and load): with a load across a divider's output or the
// shunt, the value R*·L/(L − R*) that gives the unloaded optimum R*; a loaded bridge keeps the unloaded
// values and says so.
[[nodiscard]] ClosedForms closed_forms(const Thermistor& model, const Span& span, const Circuit& base);

// Which constraint a candidate fails first (Input::min_span, min_sensitivity, max_power or
// max_self_heating), or empty when it meets them all.
[[nodiscard]] std::optional<Input> failed_constraint(const SizingSpec& spec, const Candidate& c);

struct StandardSearch {
    std::vector<Candidate> best;                               // at most spec.top, best first
    std::size_t examined = 0;                                  // combinations evaluated
    std::vector<std::pair<Input, std::size_t>> removed;        // constraint → candidates it removed
};

// Every combination of series values in range for the free resistors, ranked by the objective;
// objectives equal in their leading 30 bits (within about 1e-9 relative) are a tie, broken by the larger
// output span, then by the smaller resistor values. Exhaustive: every combination is examined and every
// constraint failure counted; a combination whose endpoint-line scan already shows it cannot rank in the
// top is not scanned to the end (the result is the same as with full scans).
[[nodiscard]] StandardSearch search_standard(const SizingSpec& spec, const Grid& grid, const Thermistor& model);

// For a one-resistor topology: the series values on the Pareto front of nonlinearity (lower is better)
// against output span (higher is better), by descending span. Constraints apply.
[[nodiscard]] std::vector<Candidate> tradeoff(const SizingSpec& spec, const Grid& grid, const Thermistor& model);

}  // namespace rtline

namespace rtline {

// Why sizing `c` under its drive would be meaningless, or empty: a current source forces its current
// through a divider, so the output is I·rs (divider-high, shunt-divider) or I·R_T (divider-low).
[[nodiscard]] std::string drive_problem(const Circuit& c);

// The InfeasibleError for a standard search `s` that found nothing: names the constraint that removed
// the most combinations (as "{key}", see error.hpp) and what the others removed, or, when none removed
// any, says the searched values are out of reach of the thermistor. `what` qualifies the combination
// ("for any topology"), or is empty.
[[nodiscard]] InfeasibleError infeasible(const SizingSpec& spec, const StandardSearch& s, const std::string& what);

// Every topology with a resistor to size, each searched for its best standard-value design under the
// drive of spec.base (its topology is ignored), ranked most linear first.
struct Comparison {
    std::vector<Candidate> ranked;                            // each topology's best, most linear first
    std::vector<std::pair<Topology, std::string>> skipped;    // left out, and why (inputs as "{key}")
    StandardSearch total;                                     // examined and removed, over all searched
};
// Throws infeasible(spec, total, "for any topology") when no topology has a design.
[[nodiscard]] Comparison compare_topologies(const SizingSpec& spec, const Grid& grid, const Thermistor& model);

}  // namespace rtline
