// Firmware correction: ADC code → temperature. A code stands for a ratio of the converter's reference
// (the excitation when ratiometric, volts with a current drive); which ratio depends on the converter's
// transfer (converter.hpp). The channel (frontend.hpp) maps that ratio back to R_T through any
// amplifier and the network. The exact inverse (code → ratio → R_T → T) gives every code's temperature; lookup
// tables with linear interpolation and polynomials approximate it. The figure a target bounds is the
// shipped error: what the integer code firmware runs computes, over every code of the span. A broken
// sensor drives the code towards a rail: fault bands say which codes mean an open or a shorted
// thermistor. Temperatures in kelvin.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string_view>
#include <utility>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/converter.hpp"
#include "rtline/frontend.hpp"
#include "rtline/thermistor.hpp"
#include "rtline/units.hpp"

namespace rtline {

struct Tolerances;  // budget.hpp

inline constexpr int kMaxAdcBits = 24;                  // wider converters are rare and 2^24 codes is plenty
inline constexpr std::size_t kMaxTableEntries = 65536;  // a larger table is no longer a correction table
inline constexpr std::size_t kMaxSearchEntries = 1024;  // a search for the fewest entries meeting an error looks no further
inline constexpr int kMaxDegree = 12;                   // higher degrees fit rounding noise, not the curve

// Every code of the span with its exact temperature.
struct CodeMap {
    int adc_bits = 12;
    AdcTransfer transfer = AdcTransfer::rounding;
    std::int64_t code_lo = 0;  // first code whose ratio lies inside the span's output range
    std::int64_t code_hi = 0;  // last such code
    std::vector<double> t_k;   // exact temperature at code_lo + i, K
    [[nodiscard]] std::size_t size() const { return t_k.size(); }
    [[nodiscard]] bool rising() const { return t_k.back() > t_k.front(); }  // temperature rises with the code
    // The exact temperature at any code; a code outside [code_lo, code_hi] reads as the nearer end code.
    [[nodiscard]] double temperature(std::int64_t code) const;
};

// The exact inverse at every code of the span: code → ratio (code_ratio under `transfer`) → R_T
// (channel_resistance) → T (the model), within [span.lo_k, span.hi_k]. The span's codes are those
// whose ratio lies between the channel's ratios at the span's ends; the rail codes 0 and 2^N − 1 are
// never readings (a converter at its rail says nothing of how far past it the input is). Requires
// validate(channel) to pass and a model that covers the span. Throws InputError (Input::adc_bits) when
// adc_bits is not 1..kMaxAdcBits or the span covers fewer codes than the grid rule's kMinLinearityPoints, and (Input::gain with an amplifier, else Input::current) when the
// converter input at a span end lies outside 0 … 1 of the reference (that part of the span would read
// as a rail).
[[nodiscard]] CodeMap map_codes(const Thermistor& model, const Channel& channel, const Span& span, int adc_bits,
                                AdcTransfer transfer = AdcTransfer::rounding);

// Where a table's breakpoints go: evenly spaced codes, placed so that every segment's largest
// interpolation error is the same, or every 2^s codes from the span's first code (firmware finds the
// segment by a shift, with no search, and divides by 2^s).
enum class Spacing { code, error, power_of_two };
[[nodiscard]] std::string_view spacing_name(Spacing s);  // "code", "error", "power-of-two"
[[nodiscard]] Spacing parse_spacing(std::string_view text, std::string_view field);

// A lookup table with linear interpolation between breakpoints, and its error at every code.
struct LookupTable {
    Spacing spacing = Spacing::code;
    int shift = 0;             // Spacing::power_of_two: breakpoints every 2^shift codes
    std::int64_t code_lo = 0;  // the span's codes; a code outside reads as the nearer end
    std::int64_t code_hi = 0;
    std::vector<std::int64_t> codes;  // breakpoints ascending; first code_lo, last code_hi (power-of-two:
                                      // the first multiple of 2^shift past code_lo at or beyond code_hi)
    std::vector<double> t_k;          // temperature at each breakpoint, K: the exact inverse (power-of-two:
                                      // the last is the chord through code_hi, extended to its breakpoint)
    std::vector<double> error_k;      // at code_lo + i: interpolated − exact, K
    double max_error_k = 0.0;         // largest |error_k|
    std::int64_t at_code = 0;         // the code where it occurs (the first, on a tie)
    // The interpolated temperature, K, the code first clamped to [code_lo, code_hi].
    [[nodiscard]] double interpolate(std::int64_t code) const;
};

// A table of `entries` breakpoints. Throws InputError (Input::entries) unless 2 ≤ entries ≤
// min(map.size(), kMaxTableEntries). Spacing::error minimizes the largest segment error: bisection on
// a target error, each step placing breakpoints greedily as far apart as the target allows.
// Spacing::power_of_two takes the smallest shift whose table has at most `entries` breakpoints.
[[nodiscard]] LookupTable make_table(const CodeMap& map, std::size_t entries, Spacing spacing);

// The power-of-two table with breakpoints every 2^shift codes; requires 0 ≤ shift ≤ 30.
[[nodiscard]] LookupTable power_of_two_table(const CodeMap& map, int shift);

// A table in fixed point, as the emitted C holds and computes it: each temperature as
// round(T_c · scale) counts, and the reading interpolated in integers.
struct FixedTable {
    int scale_per_c = 100;     // counts per °C: 10 (0.1 °C) or 100 (0.01 °C)
    int bits = 16;             // the entries' type: int16 or int32
    int arithmetic_bits = 32;  // the interpolation's products: 32 when proven to fit, else 64
    Spacing spacing = Spacing::code;
    int shift = 0;  // Spacing::power_of_two
    std::int64_t code_lo = 0;
    std::int64_t code_hi = 0;
    std::vector<std::int64_t> codes;  // the breakpoints, as in the LookupTable
    std::vector<std::int32_t> t;      // temperature counts at each breakpoint
    std::vector<double> error_k;      // at code_lo + i: shipped − exact, K
    double max_error_k = 0.0;         // the shipped error: largest |interpolate(code)/scale − exact| over the span
    std::int64_t at_code = 0;
    // The emitted C's arithmetic: the code clamped to [code_lo, code_hi], its segment i (codes[i] ≤ code
    // < codes[i + 1], or the last), then t[i] + q with num = (t[i+1] − t[i])·(code − codes[i]), den =
    // codes[i+1] − codes[i], q = (num ± den/2)/den (the sign of num; C's division truncates toward zero,
    // so halves round away from zero; den/2 truncates too).
    [[nodiscard]] std::int32_t interpolate(std::int64_t code) const;
};

// The table in fixed point with its shipped error over every code. arithmetic_bits is 32 when every
// segment's largest |num| + den/2 (at the segment's far end: |t[i+1] − t[i]|·den + den/2) is at most
// 2^31 − 1, which proves the 32-bit products exact at every code. Throws InputError (Input::unit) unless
// scale_per_c is 10 or 100.
[[nodiscard]] FixedTable to_fixed(const LookupTable& table, const CodeMap& map, int scale_per_c);

// The least any integer reading at this unit can err over the span: max over codes of the distance
// from T_c·scale to the nearest integer, in K. No table meets a target below it.
[[nodiscard]] double rounding_floor_k(const CodeMap& map, int scale_per_c);

// A table sized for a shipped error: the fixed-point table and the exact table it rounds.
struct ShippedTable {
    LookupTable table;
    FixedTable fixed;
};

// The table with the fewest entries (power-of-two: the largest shift) whose shipped error is at most
// max_error_k. Counts whose interpolation error exceeds max_error_k plus one unit are skipped (the
// rounding moves a reading by at most one unit: half of it at the entries, half at the division): a
// bracket by doubling then bisection on that bound, then every count upward from it, so the count
// returned meets the target and the one before it does not. Throws InfeasibleError when the target
// is below rounding_floor_k (the unit alone errs by more) or kMaxSearchEntries do not meet it.
[[nodiscard]] ShippedTable smallest_table(const CodeMap& map, double max_error_k, Spacing spacing, int scale_per_c);

// ------------------------------------------------------------------------------- fault bands

// What a code means to firmware: a temperature, a broken sensor, or neither.
enum class CodeMeaning { reading, open, short_circuit, out_of_range };
[[nodiscard]] std::string_view meaning_name(CodeMeaning m);  // "reading", "open", "short", "out-of-range"

// The converter's input ratio with the thermistor open (R_T → ∞) or shorted (R_T → 0, the lead wires
// left), by the circuit equations through the channel, limited to 0 … 1: an amplifier saturates at 0
// and at the full scale (a rail-to-rail output swinging over the converter's range: our assumption),
// a current source's compliance is taken to exceed the full scale, and the converter reads anything
// beyond as its rail code.
[[nodiscard]] double open_ratio(const Channel& ch);
[[nodiscard]] double short_ratio(const Channel& ch);

// A run of codes with one meaning.
struct CodeBand {
    std::int64_t first = 0;
    std::int64_t last = 0;
    CodeMeaning meaning = CodeMeaning::reading;
};

// The classification of every code 0 … 2^N − 1: readings over the span's codes widened by a margin on
// each side, and beyond them a fault band on each side (empty when the margin reaches the rail). A
// band is `open` or `short` when that fault's code lies in it; the output is monotone in R_T, so
// the two faults lie on opposite sides. A fault whose code lies among the readings cannot be told
// from a reading and is listed in `hidden`; a band no fault reaches is out-of-range.
struct FaultBands {
    std::int64_t margin_lo = 0;       // codes below code_lo still read as a temperature
    std::int64_t margin_hi = 0;       // codes above code_hi
    std::int64_t open_code = 0;       // the code an open thermistor gives
    std::int64_t short_code = 0;      // the code a shorted thermistor gives
    std::vector<CodeBand> bands;      // ascending, covering 0 … 2^N − 1 without gaps
    std::vector<CodeMeaning> hidden;  // faults that read as a temperature
    [[nodiscard]] CodeMeaning classify(std::int64_t code) const;
    [[nodiscard]] std::int64_t reading_lo() const;  // first code that reads as a temperature
    [[nodiscard]] std::int64_t reading_hi() const;  // last
};

// The bands for margins of `margin_lo` and `margin_hi` codes (each ≥ 0) beyond the span's codes.
[[nodiscard]] FaultBands fault_bands(const CodeMap& map, const Channel& channel, std::int64_t margin_lo,
                                     std::int64_t margin_hi);

// Codes to widen each end of the span by so that a good sensor with parts at their tolerances still
// reads: at each span end, the largest shift of the code over the corners of R25 ± tol.r25 and B ±
// tol.beta (perturbed_resistance, budget.hpp), every fixed resistor of the topology ± tol.resistors
// (the load exact) and, with a current drive, the current ± tol.excitation and the reference ±
// tol.reference, rounded up, plus one code for the converter's transition. Returns {below code_lo,
// above code_hi}.
[[nodiscard]] std::pair<std::int64_t, std::int64_t> tolerance_margin(const CodeMap& map, const Thermistor& model,
                                                                     const Channel& channel, const Span& span,
                                                                     const Tolerances& tol);

// Codes to widen each end by for a margin of `margin_k` beyond the span: margin_k over the
// temperature step per code at that end (the span's end codes), rounded up.
[[nodiscard]] std::pair<std::int64_t, std::int64_t> temperature_margin(const CodeMap& map, double margin_k);

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
// converted to powers of x. Throws InputError (Input::degree) unless 1 ≤ degree ≤ kMaxDegree
// and the span has at least degree + 2 codes.
[[nodiscard]] Polynomial fit_polynomial(const CodeMap& map, int degree, FitKind fit);

// The lowest degree whose polynomial has max_error_k ≤ max_error_k; InfeasibleError if kMaxDegree does
// not. The polynomial ships in double precision with the coefficients as fitted (the C header prints
// them to 17 digits, which reads back the same double), so its error is its shipped error.
[[nodiscard]] Polynomial lowest_degree(const CodeMap& map, double max_error_k, FitKind fit);

}  // namespace rtline
