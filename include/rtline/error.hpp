// rtline's errors. Everything the core throws on bad input or infeasibility derives from rtline::Error,
// and names the inputs it concerns by rtline::Input, in the core's own terms ("the step", "the R-T
// points"). A front end (the command line, a GUI, a program linking the library) renders the same
// error in its own terms: Error::render takes the name to give each input.
#pragma once

#include <array>
#include <functional>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>

namespace rtline {

// The inputs the core can blame. The key (input_key) is stable: messages refer to another input as
// "{key}", and front ends map keys to their own names. Append new inputs; never renumber.
enum class Input : unsigned char {
    // the thermistor and the temperatures
    points,            // the R-T points a table model or a fit is built from
    r0,                // the resistance at T0
    b_value,           // the beta model's B-value
    t0,                // the temperature at which R0 holds
    sh_coefficients,   // the Steinhart-Hart A, B, C
    model,             // the choice of model
    part,              // a particular part's own curve (for the budget)
    span,              // the temperature span
    step,              // the grid step
    // the circuit and its front end
    topology,          // the circuit topology
    lead,              // the lead wires' loop resistance
    load,              // the load on the output
    excitation,        // the drive voltage
    current,           // the drive current
    gain,              // the amplifier's gain
    offset,            // the amplifier's offset
    amp_output,        // the amplifier's output resistance
    headroom,          // the headroom kept at each end of the converter
    output_range,      // the amplifier range chosen to fill the converter
    reference,         // the converter's reference (full scale)
    adc_bits,          // the converter's resolution
    sample_cap,        // the converter's sampling capacitance
    acquisition,       // the converter's acquisition time
    // the correction
    entries,           // the number of table entries
    degree,            // the polynomial degree
    unit,              // the unit of a shipped table's values
    max_error,         // the error a correction may leave
    // the budget
    tol_r0,            // the R0 tolerance
    tol_b,             // the B-value tolerance
    tol_resistors,     // the fixed resistors' tolerance
    tol_excitation,    // the drive's tolerance
    drift,             // the thermistor's drift
    tol_lead,          // the lead resistance's tolerance
    tol_reference,     // the converter reference's tolerance
    resistor_tc,       // the fixed resistors' temperature coefficient
    reference_tc,      // the reference's temperature coefficient
    board_temperature, // the board's temperature range
    cable_temperature, // the cable's temperature range
    tol_dt,            // the thermistor's interchangeability in kelvin
    dt_range,          // the range the interchangeability holds over
    lead_compensation, // the lead compensation
    adc_offset,        // the converter's offset error
    adc_gain,          // the converter's gain error
    adc_inl,           // the converter's integral nonlinearity
    adc_error,         // the converter's total error
    dissipation,       // the thermistor's dissipation constant
    trials,            // the Monte Carlo trial count
    threads,           // the thread count
    // the sizing constraints
    min_span,          // the least output span
    min_sensitivity,   // the least sensitivity
    max_power,         // the most power in the thermistor
    max_self_heating,  // the most self-heating
    // the circuit's fixed resistors, by their names in circuit.hpp
    rs,                // the series resistor of a divider
    rp,                // the resistor in parallel with the thermistor
    r1,                // a bridge's resistor over the thermistor
    r2,                // the top of a bridge's reference arm
    r3,                // the bottom of a bridge's reference arm
    // the amplifier's errors (the budget)
    amp_gain_tol,        // the amplifier's gain error
    amp_offset,          // the amplifier's input offset voltage
    amp_offset_drift,    // the amplifier's input offset drift
    amp_bias,            // the amplifier's input bias current
    amp_offset_current,  // the amplifier's input offset current
};

// How many inputs there are: one more than the last enumerator.
inline constexpr std::size_t kInputCount = static_cast<std::size_t>(Input::amp_offset_current) + 1;

// Every input, in declaration order (for tests and front ends that map them all).
[[nodiscard]] const std::array<Input, kInputCount>& all_inputs();
// The stable key ("step", "b_value", "min_span"): the enumerator's name.
[[nodiscard]] std::string_view input_key(Input input);
// The input in the core's words ("the step", "the B-value").
[[nodiscard]] std::string_view input_noun(Input input);
// "{key}": how a message names another input, for a front end to render.
[[nodiscard]] std::string input_placeholder(Input input);
// The input whose key is `key`, if any.
[[nodiscard]] std::optional<Input> input_from_key(std::string_view key);

// How a front end names an input.
using InputNamer = std::function<std::string(Input)>;

// The base of everything the core throws on bad input or infeasibility. The message may name inputs
// as "{key}"; what() names them in the core's words, render() in a front end's.
class Error : public std::runtime_error {
public:
    explicit Error(std::string message);

    // The message with each "{key}" replaced by name(input); other braces are left alone.
    [[nodiscard]] virtual std::string render(const InputNamer& name) const;
    // The message with its "{key}"s as written.
    [[nodiscard]] const std::string& message() const noexcept { return message_; }

protected:
    Error(std::string what, std::string message);

private:
    std::string message_;
};

// Replaces each "{key}" of a known input in `text` by name(input).
[[nodiscard]] std::string render_inputs(const std::string& text, const InputNamer& name);

// Bad input: the input (or a field the caller names: a file column, a spec key, a command-line flag),
// the offending text, and why it is wrong. `why` may name other inputs as "{key}".
class InputError : public Error {
public:
    InputError(Input input, std::string value, std::string why);
    InputError(std::string field, std::string value, std::string why);

    // The input the error concerns, when it is one of the core's; empty for a field the caller named.
    [[nodiscard]] std::optional<Input> input() const noexcept { return input_; }
    // The caller's field, or the input's key.
    [[nodiscard]] const std::string& field() const noexcept { return field_; }
    [[nodiscard]] const std::string& value() const noexcept { return value_; }
    // Why, with other inputs as "{key}".
    [[nodiscard]] const std::string& why() const noexcept { return why_; }

    // The same error quoting `value` instead (a front end quoting the text as the user typed it).
    [[nodiscard]] InputError with_value(std::string value) const;

    // "NAME 'VALUE': WHY", the input (and any in `why`) named by `name`.
    [[nodiscard]] std::string render(const InputNamer& name) const override;

private:
    std::optional<Input> input_;
    std::string field_;
    std::string value_;
    std::string why_;
};

// A search found no candidate that meets the constraints (exit code 1).
class InfeasibleError : public Error {
public:
    explicit InfeasibleError(std::string message) : Error(std::move(message)) {}
};

// Formats a number for an error message with enough digits to be recognisable (%.6g).
[[nodiscard]] std::string describe(double value);

}  // namespace rtline
