// The analog front end between the network and the converter: an amplifier stage (gain and output
// offset; differential across a bridge's A and B, single-ended otherwise), the gain and offset that map
// a span onto the converter's range, the amplifier's error terms, and the converter's input settling
// against the source impedance that drives it.
#pragma once

#include <optional>

#include "rtline/circuit.hpp"
#include "rtline/converter.hpp"
#include "rtline/grid.hpp"
#include "rtline/units.hpp"

namespace rtline {

// An amplifier: out = gain·in + offset, `in` the network's output (V_A − V_B for bridges). Units are
// the circuit's output unit: volts, or V/V of the excitation when ratiometric (the offset then is a
// fraction of the excitation, as a reference derived from it is).
struct Amplifier {
    double gain = 1.0;        // V/V, finite and nonzero (negative: the inputs swapped)
    double offset = 0.0;      // output offset, the reference the output sits on
    double output_ohm = 0.0;  // output resistance into the converter, series resistor included; 0 = ideal
};

// Checks that the converter can read this circuit through `amp` (none: directly): a bridge needs an
// amplifier (its output is a difference), and a bare or shunt thermistor needs a current drive (its
// output is otherwise a resistance). Also checks the amplifier's own numbers. Throws InputError.
void validate_front_end(const Circuit& c, const std::optional<Amplifier>& amp);

// The value at the converter input for thermistor resistance r_t: the network's output, through the
// amplifier when there is one. In output_unit(c).
[[nodiscard]] double converter_input(const Circuit& c, const std::optional<Amplifier>& amp, double r_t);

// The amplifier that maps the network's outputs over the grid onto [h·fs, (1 − h)·fs]: the lowest
// output to h·fs and the highest to (1 − h)·fs, positive gain (the output keeps its sense), with the
// resulting converter input at the span's low and high ends. fs is the converter's full scale in the
// output unit (1 when ratiometric), h the headroom at each end. Requires fs > 0, 0 ≤ h < 0.5, and
// outputs that change over the grid; throws InputError naming Input::headroom or Input::output_range.
struct RangeFit {
    Amplifier amplifier;
    double at_lo = 0.0;  // converter input at the span's low end
    double at_hi = 0.0;  // and at its high end
};
[[nodiscard]] RangeFit fit_range(const Circuit& c, const Grid& grid, double full_scale, double headroom);

// ---------------------------------------------------------------- the channel: network to converter

// What a converter reads and against what: the network, the amplifier between them (none: the
// converter reads the network directly), and the converter's reference in output_unit(circuit) —
// 1 when the reading is ratiometric (the reference is the excitation, V/V), volts with a current drive
// or a supply in volts (its own value when the converter's reference is the supply).
// The one place that maps a thermistor resistance to the converter's input ratio and back; the table,
// its fault bands and its shipped error all go through it.
struct Channel {
    Circuit circuit;
    std::optional<Amplifier> amplifier;
    double reference = 1.0;
    // The reference is the excitation: no supply value (V/V), or the supply's own volts.
    [[nodiscard]] bool ratiometric() const {
        const Excitation& e = circuit.excitation;
        return e.drive == Drive::ratiometric || (e.drive == Drive::voltage && reference == e.value);
    }
};

// Checks that the channel's input ratio can be turned back into R_T by a closed form: a divider
// (divider-high, divider-low, shunt-divider) or a bridge or shunt-bridge through an amplifier, read
// ratiometrically (no supply value, reference 1) or under a supply in volts against a reference in volts
// (the fixed reference of a converter, or the supply's own value); or a bare or shunt thermistor driven
// by a current and read against a reference in volts; an amplifier is optional except for bridges. Throws InputError naming
// the input: Input::topology, excitation, current, gain (a bridge without an amplifier) or reference
// (and the amplifier's own numbers as validate_front_end does).
void validate(const Channel& ch);

// The converter's input as a fraction of its reference for thermistor resistance r_t (ohm; 0 and
// +infinity give a short and an open), the lead wires included: (gain·out + offset)/reference, or
// out/reference without an amplifier. Not clipped: a converter reads a value past 0 or 1 as its rail
// code (ratio_code), as does an amplifier's output saturating at 0 and at the full scale.
[[nodiscard]] double channel_ratio(const Channel& ch, double r_t);

// The exact inverse of channel_ratio: the thermistor resistance (ohm) at which the converter input is
// `ratio` of the reference, the known lead wires subtracted. Closed forms (Ohm's law on each network):
//   network output  y = (ratio·reference − offset)/gain (or ratio·reference), divided by the supply
//                   for a divider or bridge under a supply in volts
//   bare            R_arm = (y/I) unparallel load
//   shunt           R_arm = ((y/I) unparallel load) unparallel rp
//   divider-high    R_arm = B·(1 − y)/y, B = rs ∥ load
//   divider-low     R_arm = (rs·y/(1 − y)) unparallel load
//   shunt-divider   R_arm = (B·(1 − y)/y) unparallel rp
//   bridge          V_A0 = (V_B0·RL + y·(R_B + RL))/(RL − y·r1) (V_A0 = V_B0 + y without a load),
//                   R_x = r1·V_A0/(1 − V_A0); the shunt-bridge's R_arm = R_x unparallel rp
// with V_B0 = r3/(r2 + r3), R_B = r2 ∥ r3, "p unparallel a" the R with a ∥ R = p, and R_T = R_arm −
// lead_ohm. Returns +infinity or a value ≤ 0 where no positive finite R_T gives the ratio.
[[nodiscard]] double channel_resistance(const Channel& ch, double ratio);

// The amplifier's error terms, each a bound (±): what the budget takes as causes.
struct AmplifierErrors {
    double gain_error = 0.0;             // fraction of the gain (0.001 = 0.1 %)
    double offset_v = 0.0;               // input offset voltage at reference_t_k, V
    double offset_drift_v_per_k = 0.0;   // its drift, V/K
    double reference_t_k = k25CelsiusK;  // where offset_v is stated
    double bias_current_a = 0.0;         // input bias current into each input, A
    double offset_current_a = 0.0;       // difference between the two inputs' bias currents, A
};

// The output shift, volts, each term causes at one operating point, signed as the terms are given.
struct AmplifierShift {
    double gain_v = 0.0;    // gain_error·gain·in
    double offset_v = 0.0;  // gain·V_os
    double drift_v = 0.0;   // gain·drift·(T_board − T_ref)
    double bias_v = 0.0;    // −gain·(I_b·(Z_A − Z_B) + I_os/2·Z_AB), the bias currents through the source
    [[nodiscard]] double total() const { return gain_v + offset_v + drift_v + bias_v; }
};
// `in_v` the network's output in volts, `z` its source impedance there (source_impedance()),
// `board_t_k` the amplifier's temperature.
[[nodiscard]] AmplifierShift amplifier_shift(const Amplifier& amp, const AmplifierErrors& e, double in_v,
                                             const SourceImpedance& z, double board_t_k);

// The converter's sampling input: a capacitor that charges through the source during the acquisition.
struct Sampling {
    int bits = 12;                                 // resolution, 1..24
    AdcTransfer transfer = AdcTransfer::rounding;  // sets the steps of full scale one LSB is
    double capacitance_f = 0.0;                    // sampling capacitor, F (> 0)
    double acquisition_s = 0.0;                    // acquisition time, s (> 0)
};
// Checks bits, capacitance and time; throws InputError naming Input::adc_bits, Input::sample_cap or
// Input::acquisition.
void validate(const Sampling& s);

inline constexpr double kSettlingLimitLsb = 0.5;  // a sample within ½ LSB has settled (common practice)

// The error left at the end of the acquisition when the sampling capacitor charges a full-scale step
// through source_ohm, in LSB: steps·exp(−t_acq/(R·C_s)) (first-order RC charge, common practice).
[[nodiscard]] double settling_error_lsb(const Sampling& s, double source_ohm);
// The acquisition time that settles a full-scale step to ½ LSB through source_ohm: R·C_s·ln(2·steps).
[[nodiscard]] double settling_time_s(const Sampling& s, double source_ohm);
// The filter capacitor at the converter input that holds the charge-sharing step C_s/(C_s + C_f) of a
// full-scale step to ½ LSB: C_f = C_s·(2·steps − 1) (common practice).
[[nodiscard]] double filter_capacitance_f(const Sampling& s);

}  // namespace rtline
