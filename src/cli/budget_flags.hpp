// The budget's part and converter flags (tolerances, environment, the converter, the Monte Carlo), shared
// by every command that takes a budget: budget itself, size --objective total-error and design. The texts
// as typed, the flags that declare them, and the BudgetSpec they stand for.
#pragma once

#include <CLI/CLI.hpp>
#include <cstdint>
#include <string>

#include "rtline/budget.hpp"

namespace rtline::cli {

struct BudgetFlags {
    std::string r25_tol;             // %; default 1, or 0 with --dt-tol
    std::string beta_tol;            // %; default 1, or 0 with --dt-tol
    std::string resistor_tol = "1";  // %
    std::string resistor_tc;         // ppm/K
    std::string board_temp = "sensed";
    std::string dt_tol;    // K
    std::string dt_range;  // °C LO:HI
    std::string drift;     // %
    std::string part_sh;
    std::string part_points;
    std::string lead_tol;  // %
    std::string cable_temp;
    std::string lead_compensation = "yes";
    std::string adc_offset;  // LSB
    std::string adc_gain;    // %
    std::string adc_inl;     // LSB
    std::string adc_transfer;
    std::string ref_tol;         // %
    std::string ref_tc;          // ppm/K
    std::string excitation_tol;  // %; default 1 when the reading is in volts, else not applicable
    std::string distribution = "normal";
    std::string reading = "model";
    std::string adc_bits;
    std::string adc_error;           // LSB
    std::string adc_ref;             // "excitation" or a voltage; default: the excitation voltage as a fixed reference
    std::string dissipation;         // mW/K
    std::string amp_gain_tol;        // %
    std::string amp_offset;          // V, e.g. 50u
    std::string amp_offset_drift;    // V/K, e.g. 1u
    std::string amp_bias;            // A, e.g. 10n
    std::string amp_offset_current;  // A
    std::string trials = "100000";
    std::string seed;
    std::string threads;
};

// Which of the flags a command declares (the others keep their defaults).
struct BudgetFlagSet {
    bool dissipation_and_threads = true;  // --dissipation and --threads (size declares its own)
    bool reading = true;                  // --reading (design always inverts the model)
    bool part_curve = true;               // --part-sh and --part-points
    bool leads = true;                    // --lead-tol, --cable-temp, --lead-compensation
    bool amplifier = false;               // the amplifier's errors: --amp-gain-tol ... (budget alone)
};
void add_budget_flags(CLI::App& sub, BudgetFlags& o, const BudgetFlagSet& which = {});

// The budget the flags describe for `circuit` (its drive decides the reading unit and the default
// excitation tolerance), the amplifier's errors included (the amplifier itself is the caller's to
// set: --auto-range needs the grid). Throws InputError naming the flag.
[[nodiscard]] BudgetSpec build_budget_spec(const BudgetFlags& o, const Circuit& circuit);

// Parsers the budget's flags use, for commands that take the same kind of value.
[[nodiscard]] double parse_percent(const std::string& text, const std::string& flag);
[[nodiscard]] std::uint64_t parse_count(const std::string& text, const std::string& flag, double lo, double hi,
                                        const std::string& why);

}  // namespace rtline::cli
