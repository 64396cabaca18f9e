// Error budget of a design: how far the temperature the firmware reads strays from the true one once
// part tolerances, the converter and self-heating count. Worst case over the tolerance box, Monte Carlo
// statistics (deterministic for a seed, whatever the thread count), and the split by cause.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/converter.hpp"
#include "rtline/frontend.hpp"
#include "rtline/grid.hpp"
#include "rtline/linearity.hpp"
#include "rtline/thermistor.hpp"

namespace rtline {

// How each part value spreads in the Monte Carlo: normal with the tolerance as 3σ (its tails reach
// past the tolerance: 0.27 % of the draws), normal with the draws beyond the tolerance redrawn (parts
// screened at the tolerance), or uniform over ±tolerance. The worst case always spans ±tolerance.
enum class Distribution { normal, normal_truncated, uniform };
[[nodiscard]] std::string_view distribution_name(Distribution d);  // "normal", "normal-truncated", "uniform"
[[nodiscard]] Distribution parse_distribution(std::string_view text, std::string_view field);

// How the firmware turns the reading into a temperature: `model` inverts the nominal circuit and
// thermistor model exactly; `line` reads through the nominal endpoint line (nonlinearity counts).
enum class Reading { model, line };
[[nodiscard]] std::string_view reading_name(Reading r);  // "model", "line"
[[nodiscard]] Reading parse_reading(std::string_view text, std::string_view field);

// The temperature the resistors' and the reference's coefficients count from (common practice: the
// temperature at which resistor tolerances are specified), and the one a copper resistance is given
// at (IEC 60028, International standard of resistance for copper: 20 °C).
inline constexpr double kCoefficientReferenceK = k25CelsiusK;
inline constexpr double kCopperReferenceK = 293.15;
// Temperature coefficient of annealed copper at 20 °C, 1/K (IEC 60028: 0.00393 per K).
inline constexpr double kCopperAlphaPerK = 0.00393;

// Part tolerances as fractions (0.01 = 1 %), each the half-width of the part's spread; coefficients
// per kelvin, each ± like a tolerance.
struct Tolerances {
    double r25 = 0.01;                // thermistor resistance at T0 (the beta model's t0, else 25 °C)
    double beta = 0.01;               // B-value: scales the local B = −alpha·T² at every temperature
    double resistors = 0.01;          // every fixed resistor, each independently (the load is taken as exact)
    double excitation = 0.0;          // the drive's voltage or current; counts only when the reading is in volts
    double resistor_tc_per_k = 0.0;   // every fixed resistor's temperature coefficient, ±1/K, independently
    double thermistor_dt_k = 0.0;     // interchangeability: the part's curve is the nominal one shifted by ±dT
    double thermistor_drift = 0.0;    // long-term drift of the thermistor's resistance, ± fraction
    double lead = 0.0;                // the lead wires' loop resistance, ± fraction of Circuit::lead_ohm
    double reference = 0.0;           // the converter's reference voltage, ± fraction
    double reference_tc_per_k = 0.0;  // and its temperature coefficient, ±1/K
};

// The converter reading the output: quantization by its transfer, offset, gain and integral
// nonlinearity, and a further error bound.
struct Converter {
    int bits = 0;             // resolution, 1..24; 0 = no converter (the reading is exact)
    double error_lsb = 0.0;   // further converter error bound, ±LSB
    double offset_lsb = 0.0;  // offset, ±LSB
    double gain = 0.0;        // gain error, ± fraction of the reading
    double inl_lsb = 0.0;     // integral nonlinearity, ±LSB (its shape unknown: a bound at every code)
    double full_scale = 1.0;  // in the reading's unit: 1 V/V when ratiometric, the reference in V otherwise
    AdcTransfer transfer = AdcTransfer::rounding;
    [[nodiscard]] double lsb() const;  // full_scale / adc_steps(bits, transfer); 0 without a converter
};

// Where the fixed resistors and the reference sit: at the sensed temperature (a probe inside the
// product, the default), or anywhere in a range of their own (a remote probe; the board's span).
struct BoardTemperature {
    bool sensed = true;
    double lo_k = kCoefficientReferenceK;  // the range, when not sensed
    double hi_k = kCoefficientReferenceK;
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
    // The amplifier between the network and the converter (none: the converter reads the network's
    // output), in the reading's unit (reading_unit): converter input = gain·output + offset, the offset
    // in V/V of the excitation when ratiometric. The firmware inverts it as nominal.
    std::optional<Amplifier> amplifier;
    // The amplifier's error bounds, each ± and each needing the amplifier: gain error (fraction), input
    // offset (V, at reference_t_k), its drift (V/K, from reference_t_k to the board temperature), input
    // bias and offset currents (A) through the network's source impedance. Every term but the gain
    // error is in volts, so a ratiometric reading needs the excitation in volts to take them.
    AmplifierErrors amplifier_errors;
    double dissipation_w_per_k = 0.0;  // thermistor dissipation constant, W/K; 0 = no self-heating
    BoardTemperature board;
    // The range the lead wires' temperature takes (copper's coefficient from kCopperReferenceK).
    double cable_lo_k = kCopperReferenceK;
    double cable_hi_k = kCopperReferenceK;
    // The firmware knows Circuit::lead_ohm and subtracts it; false: it inverts the circuit without
    // leads, so their whole resistance is an error.
    bool lead_compensated = true;
    // The range over which Tolerances::thermistor_dt_k holds; the span must lie inside it.
    double dt_lo_k = 0.0;
    double dt_hi_k = 0.0;
    // The part's real R–T curve when it is not the model the firmware inverts (the model error);
    // empty: the part follows the model.
    std::optional<Thermistor> part;
    std::uint64_t trials = 100'000;  // Monte Carlo trials; 0 = worst case only
    std::uint64_t seed = kDefaultSeed;
    unsigned threads = 0;  // 0 = every core; the result does not depend on it
};

// Checks the spec against the circuit it will budget; throws InputError naming the input (rtline::Input).
void validate(const BudgetSpec& spec, const Circuit& circuit);

// The unit of the reading the converter sees: "V/V", "V" or "ohm".
[[nodiscard]] std::string reading_unit(const Circuit& circuit, const BudgetSpec& spec);

// Monte Carlo statistics of the error (read − true), kelvin. The |error| bounds are two-sided: a
// fraction p of the samples has |error| ≤ the bound (nearest rank: the ⌈p·n⌉-th smallest |error|).
// The signed percentiles are the ⌈p·n⌉-th smallest error (nearest rank).
struct McStats {
    double mean_k = 0.0;
    double std_k = 0.0;  // sample standard deviation (n − 1); NaN with fewer than two trials
    double p95_k = 0.0;
    double p99_7_k = 0.0;
    double max_abs_k = 0.0;
    double p0_135_k = 0.0;  // signed: 0.135 %, 2.5 %, 97.5 % and 99.865 % (±3σ and ±1.96σ of a normal)
    double p2_5_k = 0.0;
    double p97_5_k = 0.0;
    double p99_865_k = 0.0;
};

// The causes of the split, in the order reports list them. A new cause is a new entry here, a name
// in cause_key/cause_label, and its dimensions in the budget's point_bounds.
enum class Cause : std::size_t {
    nonlinearity,        // |nominal error| of the line reading; the model reading has none
    model_error,         // the part follows Budget::part while the firmware inverts the model
    r25,                 // thermistor R25 tolerance
    beta,                // thermistor B-value tolerance
    thermistor_dt,       // interchangeability ±dT
    drift,               // thermistor long-term drift
    resistors,           // fixed resistors' tolerance
    resistor_drift,      // their temperature coefficient over the board temperature
    lead,                // lead wires: tolerance and copper's coefficient over the cable temperature
    excitation,          // the drive's tolerance (reading in volts)
    amp_gain,            // the amplifier's gain error
    amp_offset,          // its input offset voltage
    amp_offset_drift,    // the input offset's drift over the board temperature
    amp_bias,            // its input bias current through the network's source impedance
    amp_offset_current,  // the difference of the inputs' bias currents, likewise
    reference,           // the converter's reference: tolerance and drift (cancels when ratiometric)
    adc_offset,
    adc_gain,
    adc_inl,
    quantization,  // ±0.5 LSB by the transfer, plus the further converter error bound
    self_heating,
    count
};
inline constexpr std::size_t kCauses = static_cast<std::size_t>(Cause::count);
[[nodiscard]] std::string_view cause_key(Cause c);    // snake_case for JSON and CSV, e.g. "adc_offset"
[[nodiscard]] std::string_view cause_label(Cause c);  // for text, e.g. "ADC offset"

// Each cause alone, the others nominal, no converter and no self-heating unless it is the cause: the
// largest |error − nominal error| over that cause's tolerance box, kelvin. NaN where not applicable.
struct BudgetComponents {
    std::array<double, kCauses> k{};
    [[nodiscard]] double operator[](Cause c) const { return k[static_cast<std::size_t>(c)]; }
    double& operator[](Cause c) { return k[static_cast<std::size_t>(c)]; }
};

struct BudgetPoint {
    double t_k = 0.0;
    double nominal_error_k = 0.0;  // read − true with nominal parts, self-heating included, no converter
    double worst_case_k = 0.0;     // largest |error| over the tolerance box, every cause together
    double worst_low_k = 0.0;      // the smallest (most negative) error over the box
    double worst_high_k = 0.0;     // the largest error over the box
    McStats mc;                    // all NaN when trials == 0
    BudgetComponents components;
    double resolution_k_per_lsb = 0.0;  // one LSB over |d reading / dT|; NaN without a converter
};

struct BudgetSummary {
    double worst_case_k = 0.0;  // largest worst case over the span
    double at_t_k = 0.0;        // where
    double worst_low_k = 0.0;   // the most negative error over the span
    double worst_high_k = 0.0;  // the most positive
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

// The T0 at which the R0 tolerance applies: the beta model's t0, else 25 °C (298.15 K).
[[nodiscard]] double tolerance_reference_k(const Thermistor& model);

}  // namespace rtline

namespace rtline {

// How the converter reads the circuit: against the drive itself (ratiometric), against a fixed
// reference of `volts`, or, when unstated, as the drive implies.
struct ConverterReference {
    enum class Kind { unstated, excitation, fixed } kind = Kind::unstated;
    double volts = 0.0;  // for fixed
};

// Sets spec.ratiometric and spec.adc.full_scale for `circuit` read against `ref`. Unstated, a
// ratiometric drive is read ratiometrically (full scale 1 V/V) and a voltage drive against its own
// voltage; a current drive needs a stated reference once there is a converter (spec.adc.bits > 0).
// A fixed reference must be a positive voltage and needs a drive. Throws InputError (Input::reference).
void set_converter_reference(BudgetSpec& spec, const Circuit& circuit, const ConverterReference& ref);

// The drive's tolerance when none is stated: 1 % when the reading is in volts (a drive read against a
// fixed reference), else 0 (a ratiometric reading cancels it). Call after set_converter_reference.
[[nodiscard]] double default_excitation_tolerance(const BudgetSpec& spec, const Circuit& circuit);

}  // namespace rtline
