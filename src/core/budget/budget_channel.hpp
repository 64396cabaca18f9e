// Private to the budget module: the channel (a design with everything that does not change from
// trial to trial precomputed) and its error at one temperature for one set of parts, the bilinear maps
// it rests on, the random number generator, and a small thread pool. Shared by the worst case and the
// Monte Carlo so that both evaluate exactly the same function.
#pragma once

#include <algorithm>
#include <array>
#include <atomic>
#include <bit>
#include <cmath>
#include <cstdint>
#include <exception>
#include <limits>
#include <mutex>
#include <string>
#include <thread>
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

// The parameters a trial varies, as fractions of nominal, and the converter slot.
enum Slot : std::size_t { kR25 = 0, kBeta = 1, kResistor0 = 2, kExcitation = 6, kAdc = 7, kSlots = 8 };
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
// of a beta or Steinhart–Hart model, or Newton on a table model. `scaled` is `closed` for a circuit
// whose nominal inverse returns R_T times one factor per trial (see Channel::scales).
enum class Inverse { line, closed, scaled, table };

// A compile-time choice of the error's branches, so that each loop is straight-line code.
template <bool kHeat, Adc kMode, Inverse kInverse>
struct Kernel {};

// Calls f(Kernel<heat, mode, inverse>{}) with the run-time choices made compile-time constants.
template <class F>
decltype(auto) with_kernel(bool heat, Adc mode, Inverse inverse, F&& f) {
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
    return heat ? by_mode(std::true_type{}) : by_mode(std::false_type{});
}

// One set of fixed parts: the circuit's maps with its resistors and drive as drawn.
struct Trial {
    double g = 1.0;         // 1 + dr
    double db = 0.0;        // B-value fraction
    Bilinear reading;       // reading against R_T
    Bilinear vt;            // thermistor volts against R_T (self-heating)
    Bilinear to_r;          // R_T ↦ the R_T the nominal circuit gives for the same reading
    double ln_scale = 0.0;  // Inverse::scaled: ln(1 + dr) + ln(to_r(x)/x)
};

// The design with everything that does not change from trial to trial precomputed.
class Channel {
public:
    Channel(const Grid& grid, const Thermistor& model, const Circuit& circuit, const BudgetSpec& spec)
        : model_(model), t_(grid.t_k), r_(grid.r_ohm) {
        const std::size_t n = grid.size();
        power_ = circuit;
        reading_ = circuit;
        if (circuit.excitation.drive == Drive::voltage && spec.ratiometric) reading_.excitation = Excitation{};
        volts_ = reads_volts(circuit, spec);
        for (const std::string& name : resistor_names(circuit.topology)) fields_.push_back(field_of(name));
        heat_ = spec.dissipation_w_per_k > 0.0;
        inv_dissipation_ = heat_ ? 1.0 / spec.dissipation_w_per_k : 0.0;
        lsb_ = spec.adc.lsb();
        inv_lsb_ = lsb_ > 0.0 ? 1.0 / lsb_ : 0.0;

        const double r0 = model.resistance(tolerance_reference_k(model));
        lnq_.resize(n);
        alpha_.resize(n);
        alpha_dot_.resize(n);
        for (std::size_t i = 0; i < n; ++i) {
            lnq_[i] = std::log(r_[i] / r0);
            alpha_[i] = model.alpha(t_[i]);
            const double h = 0.01;  // K; alpha is smooth on this scale
            alpha_dot_[i] = (model.alpha(t_[i] + h) - model.alpha(t_[i] - h)) / (2.0 * h);
        }
        // The bilinear maps are fitted through three values of R_T: the span's ends and centre, spread
        // to at least a factor 3 from the centre so that a narrow span still fits well-conditioned.
        const Span span{t_.front(), t_.back()};
        const double r_mid = model.resistance(span.centre_k());
        fit_x_ = {std::max(model.resistance(span.lo_k), 3.0 * r_mid), r_mid,
                  std::min(model.resistance(span.hi_k), r_mid / 3.0)};
        inverse_ = Inverse::table;
        if (const auto* b = std::get_if<BetaModel>(&model.model())) {
            sh_ = to_steinhart_hart(*b);
            inverse_ = Inverse::closed;
        } else if (const auto* s = std::get_if<SteinhartHart>(&model.model())) {
            sh_ = *s;
            inverse_ = Inverse::closed;
        }
        if (spec.reading == Reading::line) inverse_ = Inverse::line;
        if (inverse_ == Inverse::closed && scales(circuit, volts_)) inverse_ = Inverse::scaled;
        lnr_.resize(n);
        for (std::size_t i = 0; i < n; ++i) lnr_[i] = std::log(r_[i]);
        nominal_ = trial(Slots{});
        nominal_ = trial(Slots{});  // again, now that the nominal map it inverts exists
        Analysis a = analyze(grid, model, reading_, LineKind::endpoint, 0.0);
        line_ = a.line;
        inv_slope_ = 1.0 / line_.slope;
        sensitivity_.resize(n);
        for (std::size_t i = 0; i < n; ++i) sensitivity_[i] = a.points[i].sensitivity_per_k;
        for (const PointResult& p : a.points) largest_reading_ = std::max(largest_reading_, std::abs(p.output));
    }

    [[nodiscard]] std::size_t size() const { return t_.size(); }
    [[nodiscard]] double t(std::size_t i) const { return t_[i]; }
    [[nodiscard]] std::size_t resistors() const { return fields_.size(); }
    [[nodiscard]] bool volts() const { return volts_; }
    [[nodiscard]] bool heats() const { return heat_; }
    [[nodiscard]] double lsb() const { return lsb_; }
    [[nodiscard]] const Line& line() const { return line_; }
    [[nodiscard]] double sensitivity(std::size_t i) const { return sensitivity_[i]; }
    [[nodiscard]] double largest_reading() const { return largest_reading_; }
    [[nodiscard]] const Trial& nominal() const { return nominal_; }

    // The circuit's maps with the parts in `s`.
    [[nodiscard]] Trial trial(const Slots& s) const {
        Circuit rc = reading_;
        Circuit pc = power_;
        for (std::size_t k = 0; k < fields_.size(); ++k) {
            const double f = 1.0 + s[kResistor0 + k];
            rc.*fields_[k] *= f;
            pc.*fields_[k] *= f;
        }
        const double drive = 1.0 + s[kExcitation];
        std::array<double, 3> y{};
        std::array<double, 3> v{};
        for (std::size_t k = 0; k < 3; ++k) {
            y[k] = operate(rc, fit_x_[k]).output * (volts_ ? drive : 1.0);
            if (heat_) v[k] = operate(pc, fit_x_[k]).thermistor_v * drive;
        }
        Trial tr;
        tr.g = 1.0 + s[kR25];
        tr.db = s[kBeta];
        tr.reading = through(fit_x_, y);
        tr.to_r = inverse_after(nominal_.reading, tr.reading);
        if (heat_) tr.vt = through(fit_x_, v);
        if (inverse_ == Inverse::scaled) tr.ln_scale = std::log(tr.g) + std::log(tr.to_r.at(fit_x_[1]) / fit_x_[1]);
        return tr;
    }

    // True when the nominal inverse of a trial's reading is R_T times a factor of the trial's parts:
    // a divider without a load read ratiometrically (v = x/(x + rs) or rs/(rs + x) depends on x/rs
    // only, so x̂ = x·rs_nominal/rs), or the bare thermistor without a load (x̂ = x, or x·I/I_nominal
    // with a current drive).
    [[nodiscard]] static bool scales(const Circuit& c, bool volts) {
        if (std::isfinite(c.load_ohm)) return false;
        if (c.topology == Topology::bare) return true;
        return (c.topology == Topology::divider_low || c.topology == Topology::divider_high) && !volts;
    }

    // The temperature read minus the true one at grid point i, kelvin, with the parts of `tr`.
    // `adc` is an offset in the reading's unit (Adc::offset) or a converter error in LSB (Adc::rounded).
    [[nodiscard]] double error(const Trial& tr, std::size_t i, Adc mode, double adc, bool heat) const {
        return with_kernel(heat, mode, inverse_, [&](auto kernel) { return point_error(kernel, tr, i, adc); });
    }

    [[nodiscard]] Inverse inverse() const { return inverse_; }

    // error() with its branches chosen at compile time: straight-line code that vectorizes.
    template <bool kHeat, Adc kMode, Inverse kInverse>
    [[nodiscard]] [[gnu::always_inline]] inline double point_error(Kernel<kHeat, kMode, kInverse>, const Trial& tr,
                                                                   std::size_t i, double adc) const {
        if constexpr (kInverse == Inverse::scaled && kMode == Adc::none && !kHeat) {
            // ln of the R_T the firmware infers: ln R + ln(1 + dr) + db·ln(R/R0) + ln(factor).
            const double l = lnr_[i] + tr.ln_scale + tr.db * lnq_[i];
            return 1.0 / (sh_.a + l * (sh_.b + sh_.c * l * l)) - t_[i];
        }
        // R'(T) = R(T)·(1 + dr)·(R(T)/R(T0))^db.
        double x = r_[i] * tr.g * exp_fast(tr.db * lnq_[i]);
        if constexpr (kHeat) {
            // The body runs warm by dT = P/δ; R' there from its Taylor series in ln R (dln R'/dT is
            // (1 + db)·alpha). Three fixed-point steps from dT = 0.
            const double k1 = (1.0 + tr.db) * alpha_[i];
            const double k2 = 0.5 * (1.0 + tr.db) * alpha_dot_[i];
            // P = v²/x with v = (a·x + b)/(c·x + d): one division a step. The exponent is below 0.25
            // in size (alpha ≤ 0.1/K, dT ≤ 2 K by the limit), where exp_small is exact.
            const Bilinear& v = tr.vt;
            double xh = x;
            for (int step = 0; step < kHeatSteps; ++step) {
                const double num = v.a * xh + v.b;
                const double den = v.c * xh + v.d;
                const double dt = num * num / (den * den * xh) * inv_dissipation_;
                xh = x * exp_small(dt * (k1 + k2 * dt));
            }
            x = xh;
        }
        double t_read = 0.0;
        constexpr bool kClosed = kInverse == Inverse::closed || kInverse == Inverse::scaled;
        if constexpr (kClosed && kMode == Adc::none) {
            const double l = log_fast(tr.to_r.at(x));
            t_read = 1.0 / (sh_.a + l * (sh_.b + sh_.c * l * l));
        } else {
            double y = tr.reading.at(x);
            if constexpr (kMode == Adc::offset) y += adc;
            if constexpr (kMode == Adc::rounded) y = round_even(y * inv_lsb_ + adc) * lsb_;
            if constexpr (kInverse == Inverse::line) {
                t_read = (y - line_.intercept) * inv_slope_;
            } else if constexpr (kClosed) {
                const double l = log_fast(nominal_.reading.inverse(y));
                t_read = 1.0 / (sh_.a + l * (sh_.b + sh_.c * l * l));
            } else {
                t_read = table_temperature(nominal_.reading.inverse(y), i);
            }
        }
        return t_read - t_[i];
    }

    static constexpr int kHeatSteps = 3;

private:
    static double Circuit::*field_of(const std::string& name) {
        if (name == "rs") return &Circuit::rs;
        if (name == "rp") return &Circuit::rp;
        if (name == "r1") return &Circuit::r1;
        if (name == "r2") return &Circuit::r2;
        return &Circuit::r3;
    }

    // A table model's temperature at resistance x: Newton on ln R(T) = ln x from the grid
    // temperature (R and its derivative are the table's own monotone cubic, so this converges to
    // its exact inverse); the table's bisection if Newton stalls.
    [[nodiscard]] double table_temperature(double x, std::size_t i) const {
        if (!(x > 0.0) || !std::isfinite(x)) return std::numeric_limits<double>::quiet_NaN();
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
    Circuit power_;                          // the circuit as driven (self-heating)
    Circuit reading_;                        // the circuit whose output is the reading (per volt when ratiometric)
    std::vector<double Circuit::*> fields_;  // the topology's resistors
    bool volts_ = false;
    bool heat_ = false;
    double inv_dissipation_ = 0.0;
    double lsb_ = 0.0;
    double inv_lsb_ = 0.0;
    std::vector<double> t_, r_, lnr_, lnq_, alpha_, alpha_dot_, sensitivity_;
    std::array<double, 3> fit_x_{};
    Inverse inverse_ = Inverse::closed;
    SteinhartHart sh_;
    Trial nominal_;
    Line line_;
    double inv_slope_ = 0.0;
    double largest_reading_ = 0.0;
};

// Runs f(k, worker) for k in [0, n) on `threads` threads (the caller's included); rethrows the first
// exception. Which worker runs which k varies; callers make their results independent of it.
template <class F>
void parallel_for(std::size_t n, unsigned threads, F&& f) {
    const unsigned workers = static_cast<unsigned>(std::max<std::size_t>(1, std::min<std::size_t>(threads, n)));
    std::atomic<std::size_t> next{0};
    std::exception_ptr failure;
    std::mutex failure_mutex;
    auto work = [&](unsigned w) {
        try {
            for (std::size_t k; (k = next.fetch_add(1)) < n;) f(k, w);
        } catch (...) {
            const std::lock_guard<std::mutex> lock(failure_mutex);
            if (!failure) failure = std::current_exception();
            next.store(n);
        }
    };
    std::vector<std::thread> pool;
    pool.reserve(workers - 1);
    for (unsigned w = 1; w < workers; ++w) pool.emplace_back(work, w);
    work(0);
    for (std::thread& t : pool) t.join();
    if (failure) std::rethrow_exception(failure);
}

// Throws the InputError for a reading carried past the end of the output's range at t_k.
[[noreturn]] void out_of_range(double t_k);

// Monte Carlo statistics at each temperature of the channel (spec.trials > 0).
[[nodiscard]] std::vector<McStats> monte_carlo(const Channel& ch, const BudgetSpec& spec, unsigned threads);

}  // namespace rtline::budget_detail
