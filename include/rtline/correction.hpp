// Firmware correction: ADC code → temperature. A ratiometric ADC's code k stands for the output ratio
// k/2^N of its reference, which is the circuit's excitation. The exact inverse (ratio → R_T → T) gives
// every code's temperature; lookup tables with linear interpolation and polynomials approximate it,
// each with its largest error over every code of the span. Temperatures in kelvin.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string_view>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/thermistor.hpp"
#include "rtline/units.hpp"

namespace rtline {

inline constexpr int kMaxAdcBits = 24;                  // wider converters are rare and 2^24 codes is plenty
inline constexpr std::size_t kMaxTableEntries = 65536;  // a larger table is no longer a correction table
inline constexpr std::size_t kMaxSearchEntries = 1024;  // --max-error looks no further than this
inline constexpr int kMaxDegree = 12;                   // higher degrees fit rounding noise, not the curve

// Throws InputError unless the circuit gives a ratiometric V/V output a single-ended ADC can read:
// divider-high, divider-low or shunt-divider without --excitation or --current. Bare and shunt give
// a resistance; a bridge's differential output needs an amplifier whose gain and offset are unknown.
void require_ratiometric(const Circuit& c);

// The thermistor resistance (ohm) at which the circuit's output ratio is v (0 < v < 1), load
// included: the closed-form inverse of output() for the topologies require_ratiometric accepts.
// Returns +infinity or a negative value where no positive finite R_T gives v.
[[nodiscard]] double resistance_at_ratio(const Circuit& c, double v);

// The output ratio code k stands for: k / 2^adc_bits.
[[nodiscard]] double code_ratio(std::int64_t code, int adc_bits);

// Every code of the span with its exact temperature.
struct CodeMap {
    int adc_bits = 12;
    std::int64_t code_lo = 0;  // first code whose ratio lies inside the span's output range
    std::int64_t code_hi = 0;  // last such code
    std::vector<double> t_k;   // exact temperature at code_lo + i, K
    [[nodiscard]] std::size_t size() const { return t_k.size(); }
    [[nodiscard]] bool rising() const { return t_k.back() > t_k.front(); }  // temperature rises with the code
    // The exact temperature at any code; a code outside [code_lo, code_hi] reads as the nearer end code.
    [[nodiscard]] double temperature(std::int64_t code) const;
};

// The exact inverse at every code of the span: ratio k/2^N → R_T (resistance_at_ratio) → T (the
// model), within [span.lo_k, span.hi_k]. Requires require_ratiometric(circuit) and a model that
// covers the span. Throws InputError ("--adc-bits") when adc_bits is not 1..kMaxAdcBits or the span
// covers fewer than two codes.
[[nodiscard]] CodeMap map_codes(const Thermistor& model, const Circuit& circuit, const Span& span, int adc_bits);

// Where a table's breakpoints go: evenly spaced codes, or placed so that every segment's largest
// interpolation error is the same.
enum class Spacing { code, error };
[[nodiscard]] std::string_view spacing_name(Spacing s);  // "code", "error"
[[nodiscard]] Spacing parse_spacing(std::string_view text, std::string_view field);

// A lookup table with linear interpolation between breakpoints, and its error at every code.
struct LookupTable {
    Spacing spacing = Spacing::code;
    std::vector<std::int64_t> codes;  // breakpoints ascending; first code_lo, last code_hi
    std::vector<double> t_k;          // exact temperature at each breakpoint, K
    std::vector<double> error_k;      // at code_lo + i: interpolated − exact, K
    double max_error_k = 0.0;         // largest |error_k|
    std::int64_t at_code = 0;         // the code where it occurs (the first, on a tie)
    // The interpolated temperature, K; codes outside the breakpoints read as the end entries.
    [[nodiscard]] double interpolate(std::int64_t code) const;
};

// A table of `entries` breakpoints. Throws InputError ("--entries") unless 2 ≤ entries ≤
// min(map.size(), kMaxTableEntries). Spacing::error minimizes the largest segment error: bisection on
// a target error, each step placing breakpoints greedily as far apart as the target allows.
[[nodiscard]] LookupTable make_table(const CodeMap& map, std::size_t entries, Spacing spacing);

// The table with the fewest entries whose max_error_k ≤ max_error_k (bisection on the entry count: the
// returned count meets it, one fewer does not). Throws InfeasibleError if kMaxSearchEntries do not.
[[nodiscard]] LookupTable smallest_table(const CodeMap& map, double max_error_k, Spacing spacing);

// A table in fixed point, as firmware holds it: each temperature as round(T_c · scale) in the
// smallest signed integer type that holds every entry, interpolated in integers.
struct FixedTable {
    int scale_per_c = 100;            // counts per °C: 10 (0.1 °C) or 100 (0.01 °C)
    int bits = 16;                    // 16 or 32
    std::vector<std::int64_t> codes;  // the breakpoints, as in the LookupTable
    std::vector<std::int32_t> t;      // temperature counts at each breakpoint
    double max_error_k = 0.0;         // largest |interpolate(code)/scale − exact| over the span's codes
    std::int64_t at_code = 0;
    // t[i] + round((t[i+1] − t[i])·(code − codes[i]) / (codes[i+1] − codes[i])), rounding halves away
    // from zero in 64-bit integers; codes outside the breakpoints read as the end entries.
    [[nodiscard]] std::int32_t interpolate(std::int64_t code) const;
};

// The table in fixed point. Throws InputError ("--unit") unless scale_per_c is 10 or 100.
[[nodiscard]] FixedTable to_fixed(const LookupTable& table, const CodeMap& map, int scale_per_c);

// How a polynomial is fitted: least squares over every code, or minimax (the smallest largest error).
enum class FitKind { least_squares, minimax };
[[nodiscard]] std::string_view fit_name(FitKind k);  // "least-squares", "minimax"
[[nodiscard]] FitKind parse_fit(std::string_view text, std::string_view field);

// T(x) = Σ coefficients_k[i]·x^i in the normalized code x = (2·code − (code_lo + code_hi)) /
// (code_hi − code_lo), which runs from −1 to 1 over the span. Codes outside the span read as its ends.
struct Polynomial {
    FitKind fit = FitKind::least_squares;
    int degree = 1;
    std::int64_t code_lo = 0;
    std::int64_t code_hi = 0;
    std::vector<double> coefficients_k;  // degree + 1 of them, constant first, K
    std::vector<double> error_k;         // at code_lo + i: polynomial − exact, K
    double max_error_k = 0.0;
    std::int64_t at_code = 0;
    [[nodiscard]] double x(std::int64_t code) const;         // the normalized code, clamped to [−1, 1]
    [[nodiscard]] double evaluate(std::int64_t code) const;  // K, by Horner's rule
};

// Fits a polynomial of `degree` to the exact inverse at every code of the span. Least squares solves
// the normal equations in the Legendre basis with Eigen's LDLT: the basis is nearly orthogonal on
// evenly spaced points (condition number about 25 at degree 12 for 30 codes or more, against about
// 3e8 for powers of x). Minimax runs the Remez exchange on the codes themselves. Either result is
// converted to powers of x. Throws InputError ("--degree") unless 1 ≤ degree ≤ kMaxDegree
// and the span has at least degree + 2 codes.
[[nodiscard]] Polynomial fit_polynomial(const CodeMap& map, int degree, FitKind fit);

// The lowest degree whose polynomial has max_error_k ≤ max_error_k; InfeasibleError if kMaxDegree does not.
[[nodiscard]] Polynomial lowest_degree(const CodeMap& map, double max_error_k, FitKind fit);

}  // namespace rtline
