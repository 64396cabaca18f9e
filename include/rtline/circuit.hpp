// Circuits around the thermistor: each topology with its resistor values gives the output and the
// thermistor's voltage and power for a thermistor resistance R_T. Solved exactly, loads included.
#pragma once

#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "rtline/thermistor.hpp"

namespace rtline {

enum class Topology {
    bare,           // the thermistor alone: output is its resistance (volts with a current drive)
    divider_high,   // thermistor from excitation to output, rs to ground: v = rs/(rs + R_T)
    divider_low,    // rs from excitation to output, thermistor to ground: v = R_T/(rs + R_T)
    shunt,          // thermistor ∥ rp: output is the network resistance (volts with a current drive)
    shunt_divider,  // (thermistor ∥ rp) on top, rs to ground: v = rs/(rs + R_T∥rp)
    bridge,         // Wheatstone bridge: r1 over the thermistor (node A), r2 over r3 (node B); V_A − V_B
    shunt_bridge,   // the bridge with rp across the thermistor
};

[[nodiscard]] std::string_view topology_name(Topology t);
// Parses a topology name as topology_name prints it; throws InputError naming `field`.
[[nodiscard]] Topology parse_topology(std::string_view text, std::string_view field);
[[nodiscard]] const std::vector<Topology>& all_topologies();

enum class Drive {
    ratiometric,  // output as a fraction of the excitation (1 V notionally; resistance for bare/shunt)
    voltage,      // a voltage source of `value` volts across the network
    current,      // a current source of `value` amperes into the network
};

struct Excitation {
    Drive drive = Drive::ratiometric;
    double value = 1.0;  // V for voltage, A for current, 1 for ratiometric
};

inline constexpr double kNoLoad = std::numeric_limits<double>::infinity();

struct Circuit {
    Topology topology = Topology::divider_low;
    // Resistor values, ohm; 0 where the topology has no such resistor.
    double rs = 0.0;
    double rp = 0.0;
    double r1 = 0.0;
    double r2 = 0.0;
    double r3 = 0.0;
    double load_ohm = kNoLoad;  // input resistance across the output (between A and B for bridges)
    // Loop resistance of the wires to a remote thermistor, ohm, in series with it (inside any rp,
    // which sits on the board): the network sees R_T + lead_ohm, the thermistor's power excludes the
    // wires. 0 = the thermistor sits on the board.
    double lead_ohm = 0.0;
    Excitation excitation;
};

// The resistor names a topology uses, in the order rs, rp, r1, r2, r3.
[[nodiscard]] std::vector<std::string> resistor_names(Topology t);
// The value of a named resistor ("rs", "rp", "r1", "r2", "r3").
[[nodiscard]] double resistor_value(const Circuit& c, std::string_view name);
void set_resistor(Circuit& c, std::string_view name, double ohm);

// Checks that each resistor the topology needs is present and positive, the load positive, and the
// drive meaningful for the topology. Throws InputError naming the flag.
void validate(const Circuit& c);

// The unit of output(): "V/V" (ratiometric), "V" or "ohm" (bare and shunt without a current drive).
[[nodiscard]] std::string output_unit(const Circuit& c);

struct OperatingPoint {
    double output = 0.0;        // in output_unit
    double thermistor_v = 0.0;  // volts across the thermistor (per volt of excitation when ratiometric)
    double power_w = 0.0;       // thermistor dissipation, W; NaN when the circuit has no drive
};

// The operating point for thermistor resistance r_t (ohm), the lead wires included.
[[nodiscard]] OperatingPoint operate(const Circuit& c, double r_t);
[[nodiscard]] double output(const Circuit& c, double r_t);

// What the lead wires alone do to a reading at t_k: the temperature of the model at R_T(t_k) +
// c.lead_ohm minus t_k, kelvin (negative for an NTC: the wires read cold). This is the error of a
// firmware that does not subtract the leads; 0 without them.
[[nodiscard]] double lead_shift_k(const Circuit& c, const Thermistor& model, double t_k);

// The network's Thevenin source impedance at its output for thermistor resistance r_t, ohm: the drive
// set to zero (a voltage source shorted, a current source open), the load and the lead wires included. What an amplifier's
// input bias current or a converter's sampling capacitor sees.
struct SourceImpedance {
    double out_ohm = 0.0;  // at the output: to ground, or between A and B for bridges (differential)
    double a_ohm = 0.0;    // bridges: node A to ground; otherwise the output to ground (= out_ohm)
    double b_ohm = 0.0;    // bridges: node B to ground; otherwise 0 (the amplifier's other input is ground)
};
[[nodiscard]] SourceImpedance source_impedance(const Circuit& c, double r_t);

// Resistance of a ∥ b, ohm (an infinite resistance is an open circuit).
[[nodiscard]] double parallel(double a, double b);

// Fills a bridge's reference arm for a null at `null_t_k`: r2 = r1 when r2 is 0, then r3 = r2·Rx/r1
// when r3 is 0 (Rx = R_T(null_t_k), or R_T ∥ rp for the shunt-bridge: the balance r1/Rx = r2/r3).
// No effect on other topologies.
void complete_bridge(Circuit& c, const Thermistor& model, double null_t_k);

[[nodiscard]] constexpr bool is_bridge(Topology t) { return t == Topology::bridge || t == Topology::shunt_bridge; }
[[nodiscard]] constexpr bool gives_resistance(Topology t) { return t == Topology::bare || t == Topology::shunt; }

}  // namespace rtline
