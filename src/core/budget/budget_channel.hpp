// Private to the budget module: the channel (a design with everything that does not change from
// trial to trial precomputed) and its error at one temperature for one set of parts, the bilinear maps
// it rests on, and the random number generator. Shared by the worst case and the
// Monte Carlo so that both evaluate exactly the same function.
#pragma once

#include <algorithm>
#include <array>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <type_traits>
#include <vector>

#include "rtline/analysis.hpp"
#include "rtline/budget.hpp"

namespace rtline::budget_detail {

// A reading in volts: a drive read against a fixed reference (the excitation tolerance counts).
[[nodiscard]] inline bool reads_volts(const Circuit& c, const BudgetSpec& s) {
    return c.excitation.drive != Drive::ratiometric && !s.ratiometric;
}

// ------------------------------------------------------------------------------- bilinear maps

// y(x) = (a·x + b)/(c·x + d). By the bilinear theorem of linear networks every node voltage and port
// resistance of a network with one source is of this form in the resistance x of any one element.
struct Bilinear {
    double a = 0.0;
    double b = 0.0;
    double c = 0.0;
    double d = 1.0;
    [[nodiscard]] double at(double x) const { return (a * x + b) / (c * x + d); }
    [[nodiscard]] double inverse(double y) const { return (d * y - b) / (a - c * y); }
};

// The map x ↦ outer⁻¹(inner(x)) as one bilinear map (2×2 matrix product).
[[nodiscard]] inline Bilinear inverse_after(const Bilinear& outer, const Bilinear& inner) {
    return {outer.d * inner.a - outer.b * inner.c, outer.d * inner.b - outer.b * inner.d,
            outer.a * inner.c - outer.c * inner.a, outer.a * inner.d - outer.c * inner.b};
}

// The bilinear map through three points (x ascending or descending, distinct): the cross-ratio
// (y − y0)(y2 − y1)/((y − y1)(y2 − y0)) = (x − x0)(x2 − x1)/((x − x1)(x2 − x0)) solved for y.
inline Bilinear through(const std::array<double, 3>& x, const std::array<double, 3>& y) {
    if (y[0] == y[1] && y[1] == y[2]) return {0.0, y[0], 0.0, 1.0};
    const double p = (y[2] - y[1]) * (x[2] - x[0]);
    const double q = (y[2] - y[0]) * (x[2] - x[1]);
    Bilinear m{y[0] * p - y[1] * q, -y[0] * p * x[1] + y[1] * q * x[0], p - q, -p * x[1] + q * x[0]};
    const double scale = std::max(std::abs(m.c) * std::abs(x[1]), std::abs(m.d));
    if (scale > 0.0) {
        m.a /= scale;
        m.b /= scale;
        m.c /= scale;
        m.d /= scale;
    }
    return m;
}

// ------------------------------------------------------------------------------ random numbers

// splitmix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014):
// a counter stepped by the golden gamma and a 64-bit finalizer. Block b of the Monte Carlo starts
// its own stream at mix(mix(seed) + b), so every block draws the same numbers on any thread.
inline std::uint64_t mix64(std::uint64_t z) {
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

class SplitMix64 {
public:
    explicit SplitMix64(std::uint64_t state) : state_(state) {}
    std::uint64_t next() { return mix64(state_ += 0x9E3779B97F4A7C15ULL); }
    double uniform01() { return static_cast<double>(next() >> 11) * 0x1.0p-53; }             // [0, 1)
    double uniform01_open() { return static_cast<double>((next() >> 11) + 1) * 0x1.0p-53; }  // (0, 1]

private:
    std::uint64_t state_;
};

// ---------------------------------------------------------------------------------- the channel

// The parameters a trial varies and the converter slot. Each part slot is its final factor minus 1
// (a resistor's tolerance and temperature coefficient together, the reference's likewise, the lead
// wires' tolerance and copper's coefficient); kShift is the interchangeability shift in kelvin; kAdc
// an offset in the reading's unit (worst case) or in LSB (Monte Carlo). The amplifier's: kAmpGain its
// gain error (fraction), kAmpOffset its input offset in volts with the drift to the board temperature
// included, kAmpBias and kAmpOffsetCurrent its input currents in amperes.
enum Slot : std::size_t {
    kR25 = 0,
    kBeta = 1,
    kResistor0 = 2,
    kExcitation = 6,
    kAdc = 7,
    kShift = 8,
    kDrift = 9,
    kLead = 10,
    kReference = 11,
    kGain = 12,
    kAmpGain = 13,
    kAmpOffset = 14,
    kAmpBias = 15,
    kAmpOffsetCurrent = 16,
    kSlots = 17
};
constexpr std::size_t kMaxResistors = kExcitation - kResistor0;
using Slots = std::array<double, kSlots>;

// ------------------------------------------------------------------------- elementary functions

// exp and log in plain double arithmetic (no calls, no tables), so that the compiler vectorizes the
// loops over them and a vector lane gives the same bits as the scalar code the worst case runs.
// Both are within a few units in the last place of the C library's (the tests check).

// e^z for |z| ≤ 708 (the callers' arguments stay far inside): z = n·ln 2 + r with
// |r| ≤ ln 2/2 (ln 2 split in two parts so that n·ln2_hi is exact), e^r by its Taylor series to r^13
// (remainder below 5e−18 relative), times 2^n built in the exponent bits.
[[nodiscard]] [[gnu::always_inline]] inline double exp_fast(double z) {
    constexpr double kLog2e = 1.4426950408889634074;
    constexpr double kLn2Hi = 0x1.62e42fee00000p-1;   // ln 2 rounded to 32 significant bits
    constexpr double kLn2Lo = 0x1.a39ef35793c76p-33;  // ln 2 − kLn2Hi
    constexpr double kShift = 0x1.8p52;               // adding it rounds to an integer
    const double t = z * kLog2e + kShift;
    const double n = t - kShift;
    const double r = (z - n * kLn2Hi) - n * kLn2Lo;
    double p = 1.0 / 6227020800.0;  // 1/13!
    p = p * r + 1.0 / 479001600.0;
    p = p * r + 1.0 / 39916800.0;
    p = p * r + 1.0 / 3628800.0;
    p = p * r + 1.0 / 362880.0;
    p = p * r + 1.0 / 40320.0;
    p = p * r + 1.0 / 5040.0;
    p = p * r + 1.0 / 720.0;
    p = p * r + 1.0 / 120.0;
    p = p * r + 1.0 / 24.0;
    p = p * r + 1.0 / 6.0;
    p = p * r + 0.5;
    p = p * r + 1.0;
    p = p * r + 1.0;
    // The low bits of t hold n; shifted into the exponent field and added to 1.0's bits: 2^n.
    const std::uint64_t scale = (std::bit_cast<std::uint64_t>(t) << 52) + 0x3FF0000000000000ULL;
    return p * std::bit_cast<double>(scale);
}

// ln x for a positive normal x (NaN for x ≤ 0, infinity or NaN): x = m·2^k with m in [√½, √2),
// ln m = 2·atanh(s), s = (m − 1)/(m + 1), |s| ≤ 0.172, by its series to s^23 (remainder below 1e−18).
[[nodiscard]] [[gnu::always_inline]] inline double log_fast(double x) {
    constexpr double kLn2Hi = 0x1.62e42fee00000p-1;
    constexpr double kLn2Lo = 0x1.a39ef35793c76p-33;
    constexpr std::uint64_t kSqrtHalf = 0x3FE6A09E667F3BCDULL;  // the bits of √½
    const std::uint64_t bits = std::bit_cast<std::uint64_t>(x);
    const std::uint64_t u = bits + (0x3FF0000000000000ULL - kSqrtHalf);
    const std::uint64_t biased = u >> 52;  // k + 1023
    const double k = std::bit_cast<double>(biased | 0x4330000000000000ULL) - (0x1p52 + 1023.0);
    const double m = std::bit_cast<double>((u & 0x000FFFFFFFFFFFFFULL) + kSqrtHalf);
    const double f = m - 1.0;
    const double s = f / (2.0 + f);
    const double s2 = s * s;
    double p = 2.0 / 23.0;
    p = p * s2 + 2.0 / 21.0;
    p = p * s2 + 2.0 / 19.0;
    p = p * s2 + 2.0 / 17.0;
    p = p * s2 + 2.0 / 15.0;
    p = p * s2 + 2.0 / 13.0;
    p = p * s2 + 2.0 / 11.0;
    p = p * s2 + 2.0 / 9.0;
    p = p * s2 + 2.0 / 7.0;
    p = p * s2 + 2.0 / 5.0;
    p = p * s2 + 2.0 / 3.0;
    // ln m = 2s + s·s²·p = f − (f − 2s) + s·s²·p; with f − 2s = s·f written to keep the bits of f.
    const double ln_m = f - (s * f - s * s2 * p);
    const double result = k * kLn2Hi + (k * kLn2Lo + ln_m);
    // Zero, subnormal, negative, infinite and NaN inputs have sign-and-exponent bits e outside
    // [1, 2046]; for them a quiet NaN's exponent bits are or-ed in, without a branch.
    const auto e = static_cast<std::int64_t>(bits >> 52);
    const std::int64_t bad = ((e - 1) >> 63) | ((2046 - e) >> 63);  // all ones when outside
    return std::bit_cast<double>(std::bit_cast<std::uint64_t>(result) |
                                 (static_cast<std::uint64_t>(bad) & 0x7FF8000000000000ULL));
}

// e^u for a small |u| (≤ 0.25: the self-heating step): its Taylor series to u^11 (remainder below
// 1.2e−16 relative there), cheaper than exp_fast's range reduction.
[[nodiscard]] [[gnu::always_inline]] inline double exp_small(double u) {
    double p = 1.0 / 39916800.0;  // 1/11!
    p = p * u + 1.0 / 3628800.0;
    p = p * u + 1.0 / 362880.0;
    p = p * u + 1.0 / 40320.0;
    p = p * u + 1.0 / 5040.0;
    p = p * u + 1.0 / 720.0;
    p = p * u + 1.0 / 120.0;
    p = p * u + 1.0 / 24.0;
    p = p * u + 1.0 / 6.0;
    p = p * u + 0.5;
    p = p * u + 1.0;
    return p * u + 1.0;
}

// The nearest integer (ties to even) for |z| < 2^51, in plain arithmetic.
[[nodiscard]] [[gnu::always_inline]] inline double round_even(double z) {
    constexpr double kShift = 0x1.8p52;
    return (z + kShift) - kShift;
}

// ---------------------------------------------------------------------------------- the channel

// What the converter does to the reading: nothing, add an offset (worst case: a continuous bound in
// the reading's unit), or quantize with a converter error in LSB (Monte Carlo).
enum class Adc { none, offset, rounded };

// How the firmware's temperature comes from the reading: the endpoint line, the closed-form inverse
// of a beta or Steinhart–Hart model, or the general path (a table model as the part or the
// firmware's model: Newton on the model's own functions). `scaled` is `closed` for a circuit whose
// nominal inverse returns R_T times one factor per trial (see Channel::scales).
enum class Inverse { line, closed, scaled, table };

// A compile-time choice of the error's branches, so that each loop is straight-line code. kSolve:
// the body temperature is solved (self-heating, or an interchangeability shift).
template <bool kSolve, Adc kMode, Inverse kInverse>
struct Kernel {};

// Calls f(Kernel<solve, mode, inverse>{}) with the run-time choices made compile-time constants.
template <class F>
decltype(auto) with_kernel(bool solve, Adc mode, Inverse inverse, F&& f) {
    auto by_inverse = [&](auto h, auto m) -> decltype(auto) {
        constexpr bool kH = decltype(h)::value;
        constexpr Adc kM = decltype(m)::value;
        switch (inverse) {
            case Inverse::line: return f(Kernel<kH, kM, Inverse::line>{});
            case Inverse::closed: return f(Kernel<kH, kM, Inverse::closed>{});
            case Inverse::scaled: return f(Kernel<kH, kM, Inverse::scaled>{});
            case Inverse::table: break;
        }
        return f(Kernel<kH, kM, Inverse::table>{});
    };
    auto by_mode = [&](auto h) -> decltype(auto) {
        switch (mode) {
            case Adc::none: return by_inverse(h, std::integral_constant<Adc, Adc::none>{});
            case Adc::offset: return by_inverse(h, std::integral_constant<Adc, Adc::offset>{});
            case Adc::rounded: break;
        }
        return by_inverse(h, std::integral_constant<Adc, Adc::rounded>{});
    };
    return solve ? by_mode(std::true_type{}) : by_mode(std::false_type{});
}

// One set of parts: the circuit's maps with its resistors, leads, drive and reference as drawn.
struct Trial {
    double g = 1.0;         // (1 + dr)(1 + drift): the thermistor's resistance factor
    double ln_g = 0.0;      // its logarithm
    double db = 0.0;        // B-value fraction
    double shift_k = 0.0;   // interchangeability shift
    double gain = 1.0;      // the converter's gain
    Bilinear reading;       // reading against R_T (in the firmware's units: the reference as nominal)
    Bilinear vt;            // thermistor volts against R_T (self-heating)
    Bilinear to_r;          // R_T ↦ the R_T the firmware's circuit gives for the same reading
    double ln_scale = 0.0;  // Inverse::scaled: ln g + ln(to_r(x)/x)
};

// 1/T of Steinhart–Hart at L = ln R.
[[nodiscard]] [[gnu::always_inline]] inline double sh_inverse_t(const SteinhartHart& m, double l) {
    return m.a + l * (m.b + m.c * l * l);
}

// The design with everything that does not change from trial to trial precomputed. `model` is what
// the firmware inverts; spec.part (else the model) is the part's real curve.
class Channel {
public:
    Channel(const Grid& grid, const Thermistor& model, const Circuit& circuit, const BudgetSpec& spec)
        : model_(model), part_(spec.part ? *spec.part : model), t_(grid.t_k) {
        const std::size_t n = grid.size();
        power_ = circuit;
        reading_ = circuit;
        if (circuit.excitation.drive == Drive::voltage && spec.ratiometric) reading_.excitation = Excitation{};
        volts_ = reads_volts(circuit, spec);
        ratiometric_ = !volts_;
        lead_ohm_ = circuit.lead_ohm;
        amp_ = spec.amplifier;
        // Volts per unit of the reading: the excitation when the reading is per volt of it (a voltage
        // drive read ratiometrically), else 1 (a reading in volts, or no voltage known: then validate()
        // has refused the amplifier's voltage errors).
        vscale_ = ratiometric_ && circuit.excitation.drive == Drive::voltage ? circuit.excitation.value : 1.0;
        bias_ = spec.amplifier_errors.bias_current_a > 0.0 || spec.amplifier_errors.offset_current_a > 0.0;
        for (const std::string& name : resistor_names(circuit.topology)) fields_.push_back(field_of(name));
        heat_ = spec.dissipation_w_per_k > 0.0;
        solve_ = heat_ || spec.tolerance.thermistor_dt_k > 0.0;
        inv_dissipation_ = heat_ ? 1.0 / spec.dissipation_w_per_k : 0.0;
        lsb_ = spec.adc.lsb();
        inv_lsb_ = lsb_ > 0.0 ? 1.0 / lsb_ : 0.0;
        // Truncating: code k = floor(z) stands for k + ½, i.e. round(z − ½) + ½ (ties have measure 0).
        if (spec.adc.transfer == AdcTransfer::truncating) {
            code_in_ = -0.5;
            code_out_ = 0.5;
        }

        const double r0 = part_.resistance(tolerance_reference_k(part_));
        ln_r0_ = std::log(r0);
        r_.resize(n);
        lnr_.resize(n);
        lnq_.resize(n);
        alpha_.resize(n);
        for (std::size_t i = 0; i < n; ++i) {
            r_[i] = part_.resistance(t_[i]);
            lnr_[i] = std::log(r_[i]);
            lnq_[i] = lnr_[i] - ln_r0_;
            alpha_[i] = part_.alpha(t_[i]);
        }
        // The bilinear maps are fitted through three values of R_T: the span's ends and centre, spread
        // to at least a factor 3 from the centre so that a narrow span still fits well-conditioned.
        const Span span{t_.front(), t_.back()};
        const double r_mid = part_.resistance(span.centre_k());
        fit_x_ = {std::max(part_.resistance(span.lo_k), 3.0 * r_mid), r_mid,
                  std::min(part_.resistance(span.hi_k), r_mid / 3.0)};
        const bool part_closed = closed_form(part_, psh_);
        const bool model_closed = closed_form(model_, sh_);
        inverse_ = part_closed && model_closed ? Inverse::closed : Inverse::table;
        if (spec.reading == Reading::line && part_closed) inverse_ = Inverse::line;
        line_general_ = spec.reading == Reading::line && !part_closed;
        if (inverse_ == Inverse::closed && !amp_ && scales(circuit, volts_)) inverse_ = Inverse::scaled;

        // The firmware's circuit: nominal parts, and the leads only when it subtracts them.
        firmware_ = reading_;
        if (!spec.lead_compensated) firmware_.lead_ohm = 0.0;
        fw_reading_ = maps(firmware_, power_, Slots{}).reading;
        nominal_ = trial(Slots{});
        // The nominal body resistance, from the first-order rise by Newton to convergence (closed-form
        // curves; the table path solves on its own).
        dl_nominal_.assign(n, 0.0);
        if (heat_ && inverse_ != Inverse::table) {
            for (std::size_t i = 0; i < n; ++i) {
                const double x0 = r_[i];
                const double vx = nominal_.vt.at(x0);
                const double l = newton_body(nominal_, i, lnr_[i] + alpha_[i] * vx * vx / x0 * inv_dissipation_, 8);
                dl_nominal_[i] = l - lnr_[i];
            }
        }
        Analysis a = analyze(grid, model, firmware_, LineKind::endpoint, 0.0);
        line_ = a.line;
        // Through the amplifier the converter reads gain·output + offset: the line and the sensitivity
        // of the network's output scale by the gain (an endpoint line maps onto the endpoint line).
        const double amp_gain = amp_ ? amp_->gain : 1.0;
        if (amp_) line_ = Line{amp_gain * line_.slope, amp_gain * line_.intercept + amp_->offset};
        inv_slope_ = 1.0 / line_.slope;
        sensitivity_.resize(n);
        for (std::size_t i = 0; i < n; ++i) sensitivity_[i] = std::abs(amp_gain) * a.points[i].sensitivity_per_k;
        smallest_reading_ = INFINITY;
        for (std::size_t i = 0; i < n; ++i) {
            largest_reading_ = std::max(largest_reading_, std::abs(nominal_.reading.at(r_[i])));
            smallest_reading_ = std::min(smallest_reading_, nominal_.reading.at(r_[i]));
        }
        // The table of the firmware's temperature by code, for a closed-form inverse: the codes of the
        // nominal readings with a quarter of that range and 64 codes to spare at each end (codes
        // outside are computed), up to kMaxCodeTable entries (a finer converter computes each). Only
        // the Monte Carlo uses it.
        if (spec.trials > 0 && lsb_ > 0.0 && (inverse_ == Inverse::closed || inverse_ == Inverse::scaled)) {
            const double top = std::ceil(largest_reading_ * inv_lsb_);
            const double margin = std::ceil(top / 4.0) + 64.0;
            if (top + 2.0 * margin < static_cast<double>(kMaxCodeTable)) {
                code_lo_ = -margin;
                code_span_ = top + 2.0 * margin;
                code_table_.resize(static_cast<std::size_t>(code_span_) + 1);
                for (std::size_t j = 0; j < code_table_.size(); ++j) {
                    code_table_[j] = code_temperature_exact(code_lo_ + static_cast<double>(j));
                }
            }
        }
    }

    [[nodiscard]] std::size_t size() const { return t_.size(); }
    [[nodiscard]] double t(std::size_t i) const { return t_[i]; }
    [[nodiscard]] std::size_t resistors() const { return fields_.size(); }
    [[nodiscard]] bool volts() const { return volts_; }
    [[nodiscard]] bool heats() const { return heat_; }
    [[nodiscard]] bool solves() const { return solve_; }
    [[nodiscard]] bool has_lead() const { return lead_ohm_ > 0.0; }
    [[nodiscard]] double lsb() const { return lsb_; }
    [[nodiscard]] const Line& line() const { return line_; }
    [[nodiscard]] double sensitivity(std::size_t i) const { return sensitivity_[i]; }
    [[nodiscard]] double largest_reading() const { return largest_reading_; }
    [[nodiscard]] double smallest_reading() const { return smallest_reading_; }  // signed
    [[nodiscard]] bool amplified() const { return amp_.has_value(); }
    [[nodiscard]] const Trial& nominal() const { return nominal_; }
    [[nodiscard]] Inverse inverse() const { return inverse_; }

    // The circuit's maps with the parts in `s`.
    [[nodiscard]] Trial trial(const Slots& s) const {
        Circuit rc = reading_;
        for (std::size_t k = 0; k < fields_.size(); ++k) rc.*fields_[k] *= 1.0 + s[kResistor0 + k];
        rc.lead_ohm = lead_ohm_ * (1.0 + s[kLead]);
        Circuit pc = power_;
        for (std::size_t k = 0; k < fields_.size(); ++k) pc.*fields_[k] *= 1.0 + s[kResistor0 + k];
        pc.lead_ohm = rc.lead_ohm;
        Trial tr = maps(rc, pc, s);
        tr.g = (1.0 + s[kR25]) * (1.0 + s[kDrift]);
        tr.ln_g = std::log(tr.g);
        tr.db = s[kBeta];
        tr.shift_k = s[kShift];
        tr.gain = 1.0 + s[kGain];
        tr.to_r = inverse_after(fw_reading_, tr.reading);
        if (inverse_ == Inverse::scaled) tr.ln_scale = tr.ln_g + std::log(tr.to_r.at(fit_x_[1]) / fit_x_[1]);
        return tr;
    }

    // True when the firmware's inverse of a trial's reading is R_T times a factor of the trial's
    // parts: a divider without a load or leads read ratiometrically (v = x/(x + rs) or rs/(rs + x)
    // depends on x/rs only, so x̂ = x·rs_nominal/rs), or the bare thermistor without a load or leads
    // (x̂ = x, or x·I/I_nominal with a current drive).
    [[nodiscard]] static bool scales(const Circuit& c, bool volts) {
        if (std::isfinite(c.load_ohm) || c.lead_ohm > 0.0) return false;
        if (c.topology == Topology::bare) return true;
        return (c.topology == Topology::divider_low || c.topology == Topology::divider_high) && !volts;
    }

    // The temperature read minus the true one at grid point i, kelvin, with the parts of `tr`.
    // `adc` is an offset in the reading's unit (Adc::offset) or a converter error in LSB (Adc::rounded).
    [[nodiscard]] double error(const Trial& tr, std::size_t i, Adc mode, double adc, bool solve) const {
        return with_kernel(solve, mode, inverse_, [&](auto kernel) { return point_error(kernel, tr, i, adc); });
    }

    // ---- one sample in stages. point_error() runs them at one point; errors() runs each stage over
    // every point of a trial before the next, so that the processor overlaps the points' long
    // dependency chains (an exponential, then divisions). Both call the same functions in the same
    // order, so they give the same bits. A further circuit enters through maps() (its reading and
    // thermistor-voltage maps); the stages below do not change with the topology.

    // Stage 1: ln R' of the part at grid point i before self-heating, or the self-heating Newton's
    // start. ln R' = ln g + ln R + db·(ln R − ln R0), R the part's nominal curve.
    template <bool kSolve>
    [[nodiscard]] [[gnu::always_inline]] inline double body_start(const Trial& tr, std::size_t i) const {
        const double l0 = lnr_[i] + tr.ln_g + tr.db * lnq_[i];
        if constexpr (!kSolve) {
            return l0;
        } else {
            // Newton from the nominal parts' body resistance, moved by the trial's curve and shift:
            // ln R' at the nominal body temperature plus the shift's first-order move. That start is
            // off by the change of the rise with the parts (a few % of at most kMaxSelfHeatingK) and
            // the shift's curvature; quadratic convergence takes two steps to rounding.
            return l0 + (1.0 + tr.db) * (dl_nominal_[i] + alpha_[i] * tr.shift_k);
        }
    }

    // The thermistor's resistance in the circuit at grid point i: its body runs warm by
    // P(R(T_b))/δ, and its curve is the part's with R25, B, drift and the shift as drawn.
    template <bool kSolve, Inverse kInverse>
    [[nodiscard]] [[gnu::always_inline]] inline double body_resistance(const Trial& tr, std::size_t i) const {
        if constexpr (kSolve && kInverse == Inverse::table) {
            return body_resistance_general(tr, i);
        } else {
            double l = body_start<kSolve>(tr, i);
            if constexpr (kSolve) l = newton_body(tr, i, l, kNewtonSteps);
            return exp_fast(l);
        }
    }

    // Stage 2: one Newton step on l = ln R' for f(l) = T_part(l) − shift − T − P(e^l)/δ, where
    // T_part(l) is the part's temperature at that resistance, explicit for Steinhart–Hart (and the
    // beta model): 1/T = a + b·L + c·L³ with L = (l − ln g + db·ln R0)/(1 + db).
    [[nodiscard]] [[gnu::always_inline]] inline double newton_step(const Trial& tr, std::size_t i, double l) const {
        return newton_update(tr, i, l, exp_fast(l));
    }

    // The step from l with x = e^l given (errors() computes the exponentials in a loop of their own).
    [[nodiscard]] [[gnu::always_inline]] inline double newton_update(const Trial& tr, std::size_t i, double l,
                                                                     double x) const {
        const double inv1db = 1.0 / (1.0 + tr.db);
        const double lshift = -tr.ln_g + tr.db * ln_r0_;
        const Bilinear& v = tr.vt;
        const double det = v.a * v.d - v.b * v.c;
        const double den = v.c * x + v.d;
        const double vx = (v.a * x + v.b) / den;
        const double p = vx * vx / x;
        const double dp = 2.0 * vx * det / (den * den) - p;
        const double big_l = (l + lshift) * inv1db;
        const double inv_t = sh_inverse_t(psh_, big_l);
        const double t_part = 1.0 / inv_t;
        const double f = t_part - tr.shift_k - t_[i] - p * inv_dissipation_;
        const double df = -t_part * t_part * (psh_.b + 3.0 * psh_.c * big_l * big_l) * inv1db - dp * inv_dissipation_;
        return l - f / df;
    }

    // `steps` Newton steps from l.
    [[nodiscard]] [[gnu::always_inline]] inline double newton_body(const Trial& tr, std::size_t i, double l,
                                                                   int steps) const {
        for (int step = 0; step < steps; ++step) l = newton_step(tr, i, l);
        return l;
    }

    // Stage 3: the temperature read minus the true one at grid point i for the thermistor at x ohm.
    template <bool kSolve, Adc kMode, Inverse kInverse>
    [[nodiscard]] [[gnu::always_inline]] inline double read_error(Kernel<kSolve, kMode, kInverse>, const Trial& tr,
                                                                  std::size_t i, double x, double adc) const {
        double t_read = 0.0;
        constexpr bool kClosed = kInverse == Inverse::closed || kInverse == Inverse::scaled;
        if constexpr (kClosed && kMode == Adc::none) {
            t_read = 1.0 / sh_inverse_t(sh_, log_fast(tr.to_r.at(x)));
        } else {
            double y = tr.reading.at(x);
            if constexpr (kMode == Adc::offset) y = y * tr.gain + adc;
            if constexpr (kMode == Adc::rounded) {
                const double k = code_of(tr, x, adc);
                if constexpr (kClosed) return code_temperature(k) - t_[i];
                y = (k + code_out_) * lsb_;
            }
            if constexpr (kInverse == Inverse::line) {
                t_read = (y - line_.intercept) * inv_slope_;
            } else if constexpr (kClosed) {
                t_read = 1.0 / sh_inverse_t(sh_, log_fast(fw_reading_.inverse(y)));
            } else {
                t_read = line_general_ ? (y - line_.intercept) * inv_slope_
                                       : firmware_temperature(fw_reading_.inverse(y), i);
            }
        }
        return t_read - t_[i];
    }

    // error() with its branches chosen at compile time: straight-line code that vectorizes.
    template <bool kSolve, Adc kMode, Inverse kInverse>
    [[nodiscard]] [[gnu::always_inline]] inline double point_error(Kernel<kSolve, kMode, kInverse> kernel,
                                                                   const Trial& tr, std::size_t i, double adc) const {
        if constexpr (kInverse == Inverse::scaled && kMode == Adc::none && !kSolve) {
            // ln of the R_T the firmware infers: ln R + ln g + db·ln(R/R0) + ln(factor).
            const double l = lnr_[i] + tr.ln_scale + tr.db * lnq_[i];
            return 1.0 / sh_inverse_t(sh_, l) - t_[i];
        } else {
            return read_error(kernel, tr, i, body_resistance<kSolve, kInverse>(tr, i), adc);
        }
    }

    // point_error() at every grid point into e[0, size()), stage by stage; `work` holds size() doubles.
    template <bool kSolve, Adc kMode, Inverse kInverse>
    [[gnu::always_inline]] inline void errors(Kernel<kSolve, kMode, kInverse> kernel, const Trial& tr, double adc,
                                              double* __restrict e, double* __restrict work) const {
        const std::size_t n = t_.size();
        if constexpr ((kInverse == Inverse::scaled && kMode == Adc::none && !kSolve) ||
                      (kSolve && kInverse == Inverse::table)) {
            for (std::size_t i = 0; i < n; ++i) e[i] = point_error(kernel, tr, i, adc);
        } else {
            // Each exponential in a loop of its own, then what depends on it (a chain of divisions):
            // short loop bodies let the processor run several points' chains at once.
            double* const x = e;
            for (std::size_t i = 0; i < n; ++i) work[i] = body_start<kSolve>(tr, i);
            for (std::size_t i = 0; i < n; ++i) x[i] = exp_fast(work[i]);
            if constexpr (kSolve) {
                for (int step = 0; step < kNewtonSteps; ++step) {
                    for (std::size_t i = 0; i < n; ++i) work[i] = newton_update(tr, i, work[i], x[i]);
                    for (std::size_t i = 0; i < n; ++i) x[i] = exp_fast(work[i]);
                }
            }
            constexpr bool kClosed = kInverse == Inverse::closed || kInverse == Inverse::scaled;
            if constexpr (kMode == Adc::rounded && kClosed) {
                // The firmware's temperature is a function of the code alone: looked up in the table
                // of code_temperature_exact(), the codes outside it (none in a sound design) computed.
                for (std::size_t i = 0; i < n; ++i) work[i] = code_of(tr, x[i], adc);
                if (!code_lookup(work, e)) {
                    for (std::size_t i = 0; i < n; ++i) e[i] = code_temperature(work[i]) - t_[i];
                }
            } else {
                for (std::size_t i = 0; i < n; ++i) e[i] = read_error(kernel, tr, i, x[i], adc);
            }
        }
    }

    // The converter's code (an integer as a double) for the thermistor at x ohm: the reading with the
    // trial's gain and an error of `adc` LSB, rounded (or truncated: see code_in_).
    [[nodiscard]] [[gnu::always_inline]] inline double code_of(const Trial& tr, double x, double adc) const {
        return round_even(tr.reading.at(x) * tr.gain * inv_lsb_ + adc + code_in_);
    }

    // The firmware's temperature for code k, closed-form inverse: its reading (k + code_out)·LSB
    // through the nominal circuit's inverse to R_T and the model's 1/T = a + b·ln R + c·ln³R.
    [[nodiscard]] double code_temperature_exact(double k) const {
        return 1.0 / sh_inverse_t(sh_, log_fast(fw_reading_.inverse((k + code_out_) * lsb_)));
    }

    // code_temperature_exact(k), from the table where it holds k.
    [[nodiscard]] double code_temperature(double k) const {
        if (k >= code_lo_ && k <= code_lo_ + code_span_) {
            return code_table_[static_cast<std::size_t>(k - code_lo_)];
        }
        return code_temperature_exact(k);
    }

    // e[i] = code_temperature(k[i]) − T_i at every point from the table; false (e partly unset) when a
    // code (or NaN) lies outside it.
    [[gnu::always_inline]] inline bool code_lookup(const double* __restrict k, double* __restrict e) const {
        const std::size_t n = t_.size();
        if (code_table_.empty()) return false;
        const double lo = code_lo_;
        const double span = code_span_;
        const double* const table = code_table_.data();
        const double* const t = t_.data();
        int outside = 0;
        for (std::size_t i = 0; i < n; ++i) {
            const double j = k[i] - lo;
            outside |= !(j >= 0.0) | !(j <= span);
            const double at = std::min(j > 0.0 ? j : 0.0, span);  // NaN to 0
            e[i] = table[static_cast<int>(at)] - t[i];
        }
        return outside == 0;
    }

    static constexpr int kNewtonSteps = 2;
    static constexpr std::size_t kMaxCodeTable = std::size_t{1} << 17;

private:
    static double Circuit::*field_of(const std::string& name) {
        if (name == "rs") return &Circuit::rs;
        if (name == "rp") return &Circuit::rp;
        if (name == "r1") return &Circuit::r1;
        if (name == "r2") return &Circuit::r2;
        return &Circuit::r3;
    }

    // A beta or Steinhart–Hart model as Steinhart–Hart coefficients; false for a table.
    static bool closed_form(const Thermistor& m, SteinhartHart& out) {
        if (const auto* b = std::get_if<BetaModel>(&m.model())) {
            out = to_steinhart_hart(*b);
            return true;
        }
        if (const auto* s = std::get_if<SteinhartHart>(&m.model())) {
            out = *s;
            return true;
        }
        return false;
    }

    // The reading and thermistor-voltage maps of a reading circuit `rc` and a driven circuit `pc` with
    // the drive and reference of `s`. In volts the code is the reading over the reference, so the
    // firmware sees y·(1 + excitation)/(1 + reference); ratiometric, the excitation is the reference:
    // y·(1 + reference)/(1 + reference), computed as such so that the cancellation is a figure.
    //
    // Through an amplifier the converter reads its output: gain·(1 + gain error)·in + offset + the
    // shifts of its input offset and of its bias currents through the network's source impedance at
    // that R_T (amplifier_shift), in volts, with `in` the network's output in volts and the offset,
    // when ratiometric, a fraction of the excitation (derived from it, it moves with it). The reading
    // stays bilinear in R_T: the output and the source impedance of a node share the network's
    // determinant as their denominator, so the three-point fit holds it exactly.
    [[nodiscard]] Trial maps(const Circuit& rc, const Circuit& pc, const Slots& s) const {
        const double ref = 1.0 + s[kReference];
        const double drive = volts_ ? 1.0 + s[kExcitation] : ref;
        std::array<double, 3> y{};
        std::array<double, 3> v{};
        for (std::size_t k = 0; k < 3; ++k) {
            const double out = operate(rc, fit_x_[k]).output;
            if (amp_) {
                AmplifierErrors e;
                e.gain_error = s[kAmpGain];
                e.offset_v = s[kAmpOffset];
                e.bias_current_a = s[kAmpBias];
                e.offset_current_a = s[kAmpOffsetCurrent];
                const double in_v = out * drive * vscale_;
                const SourceImpedance z = bias_ ? source_impedance(rc, fit_x_[k]) : SourceImpedance{};
                const AmplifierShift shift = amplifier_shift(*amp_, e, in_v, z, e.reference_t_k);
                const double offset_v = amp_->offset * (ratiometric_ ? vscale_ * drive : 1.0);
                y[k] = (amp_->gain * in_v + offset_v + shift.total()) / (vscale_ * ref);
            } else {
                y[k] = out * drive / ref;
            }
            if (heat_) v[k] = operate(pc, fit_x_[k]).thermistor_v * drive;
        }
        Trial tr;
        tr.reading = through(fit_x_, y);
        if (heat_) tr.vt = through(fit_x_, v);
        return tr;
    }

    // The general body resistance (a table model as the part): Newton on T_b = T + P/δ with the
    // part's own functions, R'(T_b) = g·R(T_b + shift)^(1+db)/R0^db.
    [[nodiscard]] double body_resistance_general(const Trial& tr, std::size_t i) const {
        const Bilinear& v = tr.vt;
        auto resistance = [&](double tb) {
            return std::exp(tr.ln_g + (1.0 + tr.db) * std::log(part_.resistance(tb + tr.shift_k)) - tr.db * ln_r0_);
        };
        double tb = t_[i];
        for (int k = 0; k < 60; ++k) {
            const double x = resistance(tb);
            const double den = v.c * x + v.d;
            const double vx = (v.a * x + v.b) / den;
            const double p = vx * vx / x;
            const double dp_dl = 2.0 * vx * (v.a * v.d - v.b * v.c) / (den * den) - p;
            const double dl_dt = (1.0 + tr.db) * part_.alpha(tb + tr.shift_k);
            const double f = tb - t_[i] - p * inv_dissipation_;
            const double step = f / (1.0 - dp_dl * dl_dt * inv_dissipation_);
            tb -= step;
            if (std::abs(step) < 1e-13) break;
        }
        return resistance(tb);
    }

    // The firmware model's temperature at resistance x: closed form, or Newton on ln R(T) = ln x from
    // the grid temperature (R and its derivative are the table's own monotone cubic, so this converges
    // to its exact inverse); the table's bisection if Newton stalls.
    [[nodiscard]] double firmware_temperature(double x, std::size_t i) const {
        if (!(x > 0.0) || !std::isfinite(x)) return std::numeric_limits<double>::quiet_NaN();
        if (!std::holds_alternative<TableModel>(model_.model())) return 1.0 / sh_inverse_t(sh_, std::log(x));
        const double lx = std::log(x);
        double t = t_[i];
        for (int k = 0; k < 12; ++k) {
            const double step = (std::log(model_.resistance(t)) - lx) / model_.alpha(t);
            t -= step;
            if (std::abs(step) < 1e-11) return t;
        }
        return model_.temperature(x);
    }

    const Thermistor& model_;
    const Thermistor& part_;
    Circuit power_;                          // the circuit as driven (self-heating)
    Circuit reading_;                        // the circuit whose output is the reading (per volt when ratiometric)
    Circuit firmware_;                       // the circuit the firmware inverts
    std::vector<double Circuit::*> fields_;  // the topology's resistors
    bool volts_ = false;
    bool ratiometric_ = true;
    std::optional<Amplifier> amp_;  // between the network and the converter; none: it reads the network
    double vscale_ = 1.0;           // volts per unit of the reading
    bool bias_ = false;             // the amplifier's input currents count
    bool heat_ = false;
    bool solve_ = false;
    bool line_general_ = false;
    double lead_ohm_ = 0.0;
    double inv_dissipation_ = 0.0;
    double lsb_ = 0.0;
    double inv_lsb_ = 0.0;
    double code_in_ = 0.0;
    double code_out_ = 0.0;
    double code_lo_ = 0.0;                 // the first code of code_table_
    double code_span_ = 0.0;               // its size − 1
    std::vector<double> code_table_;       // code_temperature_exact() of the codes from code_lo_
    double ln_r0_ = 0.0;
    std::vector<double> t_, r_, lnr_, lnq_, alpha_, sensitivity_;
    std::vector<double> dl_nominal_;  // ln R_body − ln R of the nominal parts at each point
    std::array<double, 3> fit_x_{};
    Inverse inverse_ = Inverse::closed;
    SteinhartHart sh_;   // the firmware's model
    SteinhartHart psh_;  // the part's curve
    Bilinear fw_reading_;
    Trial nominal_;
    Line line_;
    double inv_slope_ = 0.0;
    double largest_reading_ = 0.0;
    double smallest_reading_ = 0.0;
};

// Throws the InputError for a reading carried past the end of the output's range at t_k.
[[noreturn]] void out_of_range(double t_k);

// Monte Carlo statistics at each temperature of the channel (spec.trials > 0).
[[nodiscard]] std::vector<McStats> monte_carlo(const Channel& ch, const BudgetSpec& spec, unsigned threads);

}  // namespace rtline::budget_detail
