// Error budget of a design: how far the temperature the firmware reads strays from the true one once
// part tolerances, the converter and self-heating count. Worst case over the tolerance box, Monte Carlo
// statistics (deterministic for a seed, whatever the thread count), and the split by cause.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/grid.hpp"
#include "rtline/linearity.hpp"
#include "rtline/thermistor.hpp"

namespace rtline {

// How each part value spreads in the Monte Carlo: normal with the tolerance as 3σ, or uniform over
// ±tolerance. The worst case always spans ±tolerance.
enum class Distribution { normal, uniform };
[[nodiscard]] std::string_view distribution_name(Distribution d);  // "normal", "uniform"
[[nodiscard]] Distribution parse_distribution(std::string_view text, std::string_view field);

// How the firmware turns the reading into a temperature: `model` inverts the nominal circuit and
// thermistor model exactly; `line` reads through the nominal endpoint line (nonlinearity counts).
enum class Reading { model, line };
[[nodiscard]] std::string_view reading_name(Reading r);  // "model", "line"
[[nodiscard]] Reading parse_reading(std::string_view text, std::string_view field);

// Part tolerances as fractions (0.01 = 1 %), each the half-width of the part's spread.
struct Tolerances {
    double r25 = 0.01;        // thermistor resistance at T0 (the beta model's t0, else 25 °C)
    double beta = 0.01;       // B-value: scales the local B = −alpha·T² at every temperature
    double resistors = 0.01;  // every fixed resistor, each independently (the load is taken as exact)
    double excitation = 0.0;  // the drive's voltage or current; counts only when the reading is in volts
};

// The converter reading the output: quantization ±0.5 LSB plus a converter error bound.
struct Converter {
    int bits = 0;                      // resolution, 1..24; 0 = no converter (the reading is exact)
    double error_lsb = 0.0;            // converter error bound (offset, gain, INL together), ±LSB
    double full_scale = 1.0;           // in the reading's unit: 1 V/V when ratiometric, the reference in V otherwise
    [[nodiscard]] double lsb() const;  // full_scale / 2^bits; 0 without a converter
};

inline constexpr std::uint64_t kDefaultSeed = 20250101;
inline constexpr std::uint64_t kMaxTrials = 100'000'000;
inline constexpr std::uint64_t kMaxSamples = 200'000'000;  // trials × temperatures
inline constexpr std::size_t kMaxBudgetPoints = 10'001;    // temperatures in one budget
inline constexpr unsigned kMaxThreads = 256;
inline constexpr double kMaxSelfHeatingK = 2.0;  // the largest nominal self-heating a budget takes

struct BudgetSpec {
    Tolerances tolerance;
    Distribution distribution = Distribution::normal;
    Reading reading = Reading::model;
    // The converter's reference is the excitation, so the reading is output per volt of excitation and
    // the excitation's own tolerance cancels. Always so for a circuit without a drive; never for a
    // current drive. A voltage drive read against a fixed reference sets this false.
    bool ratiometric = true;
    Converter adc;
    double dissipation_w_per_k = 0.0;  // thermistor dissipation constant, W/K; 0 = no self-heating
    std::uint64_t trials = 100'000;    // Monte Carlo trials; 0 = worst case only
    std::uint64_t seed = kDefaultSeed;
    unsigned threads = 0;  // 0 = every core; the result does not depend on it
};

// Checks the spec against the circuit it will budget; throws InputError naming the flag.
void validate(const BudgetSpec& spec, const Circuit& circuit);

// The unit of the reading the converter sees: "V/V", "V" or "ohm".
[[nodiscard]] std::string reading_unit(const Circuit& circuit, const BudgetSpec& spec);

// Monte Carlo statistics of the error (read − true), kelvin. The bounds are two-sided: a fraction p of
// the samples has |error| ≤ the bound (nearest rank: the ⌈p·n⌉-th smallest |error|).
struct McStats {
    double mean_k = 0.0;
    double std_k = 0.0;  // sample standard deviation (n − 1); NaN with fewer than two trials
    double p95_k = 0.0;
    double p99_7_k = 0.0;
    double max_abs_k = 0.0;
};

// Each cause alone, the others nominal, no converter and no self-heating unless it is the cause: the
// largest |error − nominal error| over that cause's tolerance box, kelvin. NaN where not applicable.
struct BudgetComponents {
    double nonlinearity_k = 0.0;  // |nominal error| of the line reading; NaN for the model reading
    double r25_k = 0.0;
    double beta_k = 0.0;
    double resistors_k = 0.0;     // NaN for a circuit without fixed resistors
    double excitation_k = 0.0;    // NaN when the reading is ratiometric or in ohm
    double adc_k = 0.0;           // NaN without a converter
    double self_heating_k = 0.0;  // NaN without a dissipation constant
};

struct BudgetPoint {
    double t_k = 0.0;
    double nominal_error_k = 0.0;  // read − true with nominal parts, self-heating included, no converter
    double worst_case_k = 0.0;     // largest |error| over the tolerance box, every cause together
    McStats mc;                    // all NaN when trials == 0
    BudgetComponents components;
    double resolution_k_per_lsb = 0.0;  // one LSB over |d reading / dT|; NaN without a converter
};

struct BudgetSummary {
    double worst_case_k = 0.0;  // largest worst case over the span
    double at_t_k = 0.0;        // where
    double p99_7_k = 0.0;       // largest 99.7 % bound over the span; NaN when trials == 0
    double p99_7_at_t_k = 0.0;  // where; NaN when trials == 0
};

struct Budget {
    Line line;         // the nominal endpoint line of the reading against T (K)
    double lsb = 0.0;  // one LSB in the reading's unit; 0 without a converter
    std::vector<BudgetPoint> points;
    BudgetSummary summary;
};

// The budget of `circuit` around `model` at each temperature of `grid`. Validates the spec first;
// throws InputError when the output is flat over the span, the thermistor self-heats by more than
// kMaxSelfHeatingK, or the tolerances carry the reading past the end of its range.
[[nodiscard]] Budget compute_budget(const Grid& grid, const Thermistor& model, const Circuit& circuit,
                                    const BudgetSpec& spec);

// The thermistor's resistance at t_k with its R at T0 and its B-value off by the fractions dr and db:
// R'(T) = R(T)·(1 + dr)·(R(T)/R(T0))^db, which for the beta model is exactly
// R0·(1 + dr)·exp(B·(1 + db)·(1/T − 1/T0)).
[[nodiscard]] double perturbed_resistance(const Thermistor& model, double t_k, double dr, double db);

// The T0 at which --r25-tol applies: the beta model's t0, else 25 °C (298.15 K).
[[nodiscard]] double tolerance_reference_k(const Thermistor& model);

}  // namespace rtline
