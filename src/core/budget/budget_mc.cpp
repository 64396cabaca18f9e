// The budget's Monte Carlo: trials in fixed blocks of kBlockTrials, block b drawing from its own
// generator stream, so the samples do not depend on which thread ran which block. Sums are kept per
// block and added in block order; the bounds are order statistics of |error|, which do not depend on
// the order of the samples at all. Only the upper tail of |error| is kept in memory: a pilot (the
// first trials of block 0) sets a threshold below the 95 % bound at each temperature.
#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <tuple>

#include "budget/budget_channel.hpp"
#include "parallel.hpp"
#include "rtline/error.hpp"

namespace rtline::budget_detail {

namespace {

constexpr std::uint64_t kBlockTrials = 4096;
constexpr std::uint64_t kPilotTrials = kBlockTrials;  // block 0; a run of more trials uses a pilot
// A block's staging buffer holds kBlockTrials candidates a temperature, each temperature's row a
// cache line longer than that: rows 32 KiB apart would all fall into one set of the level-1 cache
// (and alias the loop's other loads), so that every trial's store to each row evicted another.
constexpr std::size_t kStageRow = kBlockTrials + 8;
// The pilot's 93 % point is the tail threshold: from 4096 samples its estimate of the 93 % point has a
// standard deviation of √(0.93·0.07/4096) = 0.4 %, so the 95 % bound lies five of them above it.
constexpr std::uint64_t kPilotPermille = 930;
// The signed tails' thresholds: the pilot's 3.5 % and 96.5 % points of the error, below the 2.5 % and
// above the 97.5 % points by 1 %, 3.5 standard deviations of the pilot's estimate (√(0.965·0.035/4096)).
constexpr std::uint64_t kPilotSignedPermille = 965;

// One trial's draws: each part's deviation (fractions, K for the shift, 1/K for coefficients), the
// board and cable temperatures, the converter's gain and its offset in LSB.
enum Field : std::size_t {
    kFR25,
    kFBeta,
    kFShift,
    kFDrift,
    kFRes0,
    kFTc0 = kFRes0 + kMaxResistors,
    kFExcitation = kFTc0 + kMaxResistors,
    kFLead,
    kFRef,
    kFRefTc,
    kFAmpGain,
    kFAmpOffset,
    kFAmpDrift,
    kFAmpBias,
    kFAmpOffsetCurrent,
    kFields
};
struct Draw {
    std::array<double, kFields> f{};
    double board_k = 0.0;
    double cable_k = 0.0;
    double gain = 0.0;
    double adc = 0.0;
};

// The parts of one trial drawn from a generator. The parts with a tolerance (thermistor R25, B, dT
// and drift; each resistor's tolerance and coefficient; excitation; the leads; the reference and its
// coefficient) as the distribution says: normal with σ = tolerance/3 (normal-truncated: a pair of
// draws with either beyond 3σ drawn again, which leaves each a normal truncated at ±3σ), or uniform
// over ±tolerance. Always uniform: the board and cable temperatures over their ranges and the
// converter's offset, gain, INL and further error over their bounds. Only what applies is drawn, in
// a fixed order.
class Sampler {
public:
    Sampler(const Channel& ch, const BudgetSpec& spec)
        : dist_(spec.distribution), board_(spec.board), cable_lo_(spec.cable_lo_k), cable_hi_(spec.cable_hi_k) {
        const Tolerances& tol = spec.tolerance;
        const double scale = dist_ == Distribution::uniform ? 1.0 : 1.0 / 3.0;
        auto add = [&](Field f, double half) {
            if (half > 0.0) parts_.push_back({f, half * scale});
        };
        add(kFR25, tol.r25);
        add(kFBeta, tol.beta);
        add(kFShift, tol.thermistor_dt_k);
        add(kFDrift, tol.thermistor_drift);
        for (std::size_t k = 0; k < ch.resistors(); ++k) {
            add(static_cast<Field>(kFRes0 + k), tol.resistors);
            add(static_cast<Field>(kFTc0 + k), tol.resistor_tc_per_k);
        }
        add(kFExcitation, ch.volts() ? tol.excitation : 0.0);
        if (ch.has_lead()) add(kFLead, tol.lead);
        add(kFRef, tol.reference);
        add(kFRefTc, tol.reference_tc_per_k);
        // The amplifier's error terms, drawn as the parts' tolerances are (each bound as 3σ or the
        // uniform half-width); its drift is a coefficient, times the board's offset from where the
        // input offset is stated.
        const AmplifierErrors& amp = spec.amplifier_errors;
        if (spec.amplifier) {
            add(kFAmpGain, amp.gain_error);
            add(kFAmpOffset, amp.offset_v);
            add(kFAmpDrift, amp.offset_drift_v_per_k);
            add(kFAmpBias, amp.bias_current_a);
            add(kFAmpOffsetCurrent, amp.offset_current_a);
        }
        amp_reference_k_ = amp.reference_t_k;
        resistors_ = ch.resistors();
        lead_ = ch.has_lead();
        if (ch.lsb() > 0.0) {
            gain_ = spec.adc.gain;
            for (const double h : {spec.adc.offset_lsb, spec.adc.inl_lsb, spec.adc.error_lsb}) {
                if (h > 0.0) adc_.push_back(h);
            }
        }
        coefficients_ = tol.resistor_tc_per_k > 0.0 || tol.reference_tc_per_k > 0.0 ||
                        (spec.amplifier && amp.offset_drift_v_per_k > 0.0);
    }

    // True when the parts differ from one temperature of the span to the next (the board at the
    // sensed temperature with a coefficient): then compose() is called at each point.
    [[nodiscard]] bool per_point() const { return board_.sensed && coefficients_; }

    // Draws one trial's parts into `d`.
    void draw(SplitMix64& rng, Draw& d) const {
        const std::size_t m = parts_.size();
        if (dist_ == Distribution::uniform) {
            for (const Part& p : parts_) d.f[p.field] = p.scale * (2.0 * rng.uniform01() - 1.0);
        } else {
            // Box–Muller: two independent standard normals from two uniforms.
            for (std::size_t j = 0; j < m; j += 2) {
                double z0 = 0.0;
                double z1 = 0.0;
                do {
                    const double r = std::sqrt(-2.0 * std::log(rng.uniform01_open()));
                    const double phi = 2.0 * std::numbers::pi * rng.uniform01();
                    z0 = r * std::cos(phi);
                    z1 = j + 1 < m ? r * std::sin(phi) : 0.0;
                } while (dist_ == Distribution::normal_truncated && (std::abs(z0) > 3.0 || std::abs(z1) > 3.0));
                d.f[parts_[j].field] = parts_[j].scale * z0;
                if (j + 1 < m) d.f[parts_[j + 1].field] = parts_[j + 1].scale * z1;
            }
        }
        d.board_k = board_.sensed ? NAN : board_.lo_k + (board_.hi_k - board_.lo_k) * rng.uniform01();
        d.cable_k = lead_ ? cable_lo_ + (cable_hi_ - cable_lo_) * rng.uniform01() : kCopperReferenceK;
        d.gain = gain_ > 0.0 ? gain_ * (2.0 * rng.uniform01() - 1.0) : 0.0;
        d.adc = 0.0;
        for (const double h : adc_) d.adc += h * (2.0 * rng.uniform01() - 1.0);
    }

    // The slots of a drawn trial with the board at board_k.
    [[nodiscard]] Slots compose(const Draw& d, double board_k) const {
        Slots s{};
        const double dtb = board_k - kCoefficientReferenceK;
        s[kR25] = d.f[kFR25];
        s[kBeta] = d.f[kFBeta];
        s[kShift] = d.f[kFShift];
        s[kDrift] = d.f[kFDrift];
        for (std::size_t k = 0; k < resistors_; ++k) {
            s[kResistor0 + k] = (1.0 + d.f[kFRes0 + k]) * (1.0 + d.f[kFTc0 + k] * dtb) - 1.0;
        }
        s[kExcitation] = d.f[kFExcitation];
        s[kLead] = (1.0 + d.f[kFLead]) * (1.0 + kCopperAlphaPerK * (d.cable_k - kCopperReferenceK)) - 1.0;
        s[kReference] = (1.0 + d.f[kFRef]) * (1.0 + d.f[kFRefTc] * dtb) - 1.0;
        s[kGain] = d.gain;
        s[kAdc] = d.adc;
        s[kAmpGain] = d.f[kFAmpGain];
        s[kAmpOffset] = d.f[kFAmpOffset] + d.f[kFAmpDrift] * (board_k - amp_reference_k_);
        s[kAmpBias] = d.f[kFAmpBias];
        s[kAmpOffsetCurrent] = d.f[kFAmpOffsetCurrent];
        return s;
    }

private:
    struct Part {
        Field field;
        double scale;  // σ (normal) or the half-width (uniform)
    };
    Distribution dist_;
    BoardTemperature board_;
    double cable_lo_;
    double cable_hi_;
    std::vector<Part> parts_;
    std::size_t resistors_ = 0;
    bool lead_ = false;
    double gain_ = 0.0;
    std::vector<double> adc_;
    bool coefficients_ = false;
    double amp_reference_k_ = kCoefficientReferenceK;  // where the amplifier's input offset is stated
};

std::uint64_t block_state(std::uint64_t seed, std::uint64_t block) { return mix64(mix64(seed) + block); }

// What one worker keeps at each temperature: the errors beyond two thresholds, e > hi or e < lo
// (kept[i][0, count[i])), and how many equal each (errors are discrete once a converter quantizes
// the reading, so ties are common); the rest lie strictly between. One stored sample serves the signed
// percentiles at both ends and the |error| bounds (hi and −lo are at most the |error| threshold). And
// the largest |error|, and the trials this worker ran.
struct Tails {
    explicit Tails(std::size_t n) : kept(n), count(n, 0), equal_hi(n, 0), equal_lo(n, 0), max_abs(n, 0.0) {}
    std::vector<std::vector<double>> kept;
    std::vector<std::size_t> count;
    std::vector<std::uint64_t> equal_hi;
    std::vector<std::uint64_t> equal_lo;  // not counted where lo equals hi (equal_hi has them)
    std::uint64_t trials = 0;
    std::vector<double> max_abs;
    std::vector<double> stage;  // one block's candidates, kStageRow a temperature
};

struct Thresholds {
    std::vector<double> hi;
    std::vector<double> lo;
};

// One block's work: where its samples go.
struct BlockJob {
    std::uint64_t block = 0;
    std::uint64_t count = 0;  // trials, from the block's start
    double* s1 = nullptr;     // per temperature: sum of (error − reference); null to skip the sums
    double* s2 = nullptr;     // and of its square
    const Thresholds* tau = nullptr;
    Tails* tails = nullptr;
};

class Runner;
using BlockFn = void (*)(const Runner&, const BlockJob&);

class Runner {
public:
    Runner(const Channel& ch, const BudgetSpec& spec)
        : ch_(ch),
          seed_(spec.seed),
          sampler_(ch, spec),
          mode_(ch.lsb() > 0.0 ? Adc::rounded : Adc::none),
          solve_(ch.solves()),
          e_ref_(ch.size()) {
        for (std::size_t i = 0; i < ch.size(); ++i) e_ref_[i] = ch.error(ch.nominal(), i, mode_, 0.0, solve_);
        block_fn_ = pick_block_fn(solve_, mode_, ch.inverse());
    }

    [[nodiscard]] double reference(std::size_t i) const { return e_ref_[i]; }

    // Runs the first `count` trials of block b. Adds (error − reference) and its square to s1, s2 (one
    // entry per temperature; null to skip) and keeps the tails above `tau` in `tails`.
    void run(std::uint64_t b, std::uint64_t count, double* s1, double* s2, const Thresholds& tau, Tails& tails) const {
        // Room for every trial of the block at every temperature, so that the loop stores without a
        // branch and advances the count by whether the sample is kept; the kept ones are appended to
        // the tails after the block (no store into memory that is cleared first or left unused).
        tails.stage.resize(ch_.size() * kStageRow);
        block_fn_(*this, BlockJob{b, count, s1, s2, &tau, &tails});
    }

    // The block loop for one kernel; inlined into a plain and an AVX2 copy (see pick_block_fn).
    template <bool kSolve, Adc kMode, Inverse kInverse>
    [[gnu::always_inline]] inline void block(const BlockJob& job) const {
        const Kernel<kSolve, kMode, kInverse> kernel;
        SplitMix64 rng(block_state(seed_, job.block));
        const std::size_t n = ch_.size();
        std::vector<double> e(n);
        std::vector<double> work(n);
        double* const wp = work.data();
        // Where temperature i's next candidate goes in the staging buffer, and whether this trial's is one.
        std::vector<std::uint32_t> flag(n);
        std::vector<std::uint32_t> next(n);
        Tails& tails = *job.tails;
        double* const stage = tails.stage.data();
        for (std::size_t i = 0; i < n; ++i) next[i] = static_cast<std::uint32_t>(i * kStageRow);
        double* const ep = e.data();
        std::uint32_t* const fp = flag.data();
        std::uint32_t* const np = next.data();
        const double* const ref = e_ref_.data();
        const double* const hi = job.tau->hi.data();
        const double* const lo = job.tau->lo.data();
        double* const mx = tails.max_abs.data();
        std::uint64_t* const eq_hi = tails.equal_hi.data();
        std::uint64_t* const eq_lo = tails.equal_lo.data();
        double* const s1 = job.s1;
        double* const s2 = job.s2;
        const bool per_point = sampler_.per_point();
        Draw d;
        for (std::uint64_t t = 0; t < job.count; ++t) {
            sampler_.draw(rng, d);
            if (per_point) {
                for (std::size_t i = 0; i < n; ++i) {
                    const Slots s = sampler_.compose(d, ch_.t(i));
                    ep[i] = ch_.point_error(kernel, ch_.trial(s), i, s[kAdc]);
                }
            } else {
                const Slots s = sampler_.compose(d, std::isnan(d.board_k) ? kCoefficientReferenceK : d.board_k);
                const Trial tr = ch_.trial(s);
                const double adc = s[kAdc];
                ch_.errors(kernel, tr, adc, ep, wp);
            }
            if (s1 != nullptr) {
                for (std::size_t i = 0; i < n; ++i) {
                    const double dv = ep[i] - ref[i];
                    s1[i] += dv;
                    s2[i] += dv * dv;
                }
            }
            // One loop the compiler vectorizes, the scalar staging after it.
            for (std::size_t i = 0; i < n; ++i) {
                const double v = ep[i];
                mx[i] = std::max(mx[i], std::abs(v));
                eq_hi[i] += v == hi[i] ? 1 : 0;
                eq_lo[i] += (v == lo[i]) & (lo[i] != hi[i]) ? 1 : 0;
                fp[i] = (v > hi[i]) | (v < lo[i]) ? 1 : 0;
            }
            for (std::size_t i = 0; i < n; ++i) {
                stage[np[i]] = ep[i];
                np[i] += fp[i];
            }
        }
        for (std::size_t i = 0; i < n; ++i) {
            const double* const row = stage + i * kStageRow;
            const std::size_t count = np[i] - i * kStageRow;
            tails.kept[i].insert(tails.kept[i].end(), row, row + count);
            tails.count[i] += count;
        }
        tails.trials += job.count;
    }

private:
    static BlockFn pick_block_fn(bool solve, Adc mode, Inverse inverse);

    const Channel& ch_;
    std::uint64_t seed_;
    Sampler sampler_;
    Adc mode_;
    bool solve_;
    std::vector<double> e_ref_;
    BlockFn block_fn_ = nullptr;
};

template <bool kSolve, Adc kMode, Inverse kInverse>
void block_plain(const Runner& r, const BlockJob& job) {
    r.block<kSolve, kMode, kInverse>(job);
}

#if defined(__x86_64__) && defined(__GNUC__)
// The same loop compiled for AVX2 (four doubles a vector), chosen at run time when the processor has
// it. AVX2 without FMA rounds every operation as the plain code does, so the results are the same bits.
template <bool kSolve, Adc kMode, Inverse kInverse>
__attribute__((target("avx2"))) void block_avx2(const Runner& r, const BlockJob& job) {
    r.block<kSolve, kMode, kInverse>(job);
}
#endif

BlockFn Runner::pick_block_fn(bool solve, Adc mode, Inverse inverse) {
    return with_kernel(solve, mode, inverse, [](auto kernel) -> BlockFn {
        return [&]<bool kSolve, Adc kMode, Inverse kInverse>(Kernel<kSolve, kMode, kInverse>) -> BlockFn {
#if defined(__x86_64__) && defined(__GNUC__)
            if (__builtin_cpu_supports("avx2")) return &block_avx2<kSolve, kMode, kInverse>;
#endif
            return &block_plain<kSolve, kMode, kInverse>;
        }(kernel);
    });
}

std::uint64_t trials_in(std::uint64_t block, std::uint64_t trials) {
    return std::min(kBlockTrials, trials - block * kBlockTrials);
}

// The rank ⌈permille·n/1000⌉ (1-based), in exact integer arithmetic; and with parts per 10^5.
std::uint64_t rank_of(std::uint64_t permille, std::uint64_t n) {
    return std::max<std::uint64_t>(1, (permille * n + 999) / 1000);
}
std::uint64_t rank_of_1e5(std::uint64_t parts, std::uint64_t n) {
    return std::max<std::uint64_t>(1, (parts * n + 99999) / 100000);
}

// The k1-th and k2-th smallest (1-based, k1 ≤ k2) of v, v left as it is: a histogram of kSelectBins
// equal bins over [min, max] finds the bins that hold the two ranks (bins are ordered intervals, the
// bin index being monotone in the value), and nth_element orders only those bins' values, copied to
// `s1` and `s2`. Three linear passes instead of introselect's several over the whole tail, twice.
constexpr std::size_t kSelectBins = 4096;
std::pair<double, double> kth2(const std::vector<double>& v, std::size_t k1, std::size_t k2, std::vector<double>& s1,
                               std::vector<double>& s2) {
    const auto [lo_it, hi_it] = std::minmax_element(v.begin(), v.end());
    const double lo = *lo_it;
    const double scale = static_cast<double>(kSelectBins) / (*hi_it - lo);
    auto nth = [](std::vector<double>& w, std::size_t k) {
        const auto at = w.begin() + static_cast<std::ptrdiff_t>(k - 1);
        std::nth_element(w.begin(), at, w.end());
        return *at;
    };
    if (!(*hi_it > lo) || !std::isfinite(scale)) {
        s1.assign(v.begin(), v.end());
        const double x1 = nth(s1, k1);
        return {x1, nth(s1, k2)};
    }
    auto bin = [&](double x) { return std::min(kSelectBins - 1, static_cast<std::size_t>((x - lo) * scale)); };
    std::vector<std::size_t> count(kSelectBins, 0);
    for (const double x : v) ++count[bin(x)];
    std::size_t before1 = 0;
    std::size_t b1 = 0;
    while (before1 + count[b1] < k1) before1 += count[b1++];
    std::size_t before2 = before1;
    std::size_t b2 = b1;
    while (before2 + count[b2] < k2) before2 += count[b2++];
    s1.clear();
    s2.clear();
    for (const double x : v) {
        const std::size_t j = bin(x);
        if (j == b1) s1.push_back(x);
        if (j == b2) s2.push_back(x);
    }
    const double x1 = nth(s1, k1 - before1);
    return {x1, nth(s2, k2 - before2)};
}

// The k-th smallest (1-based) of v, v left as it is.
double kth(const std::vector<double>& v, std::size_t k, std::vector<double>& s1, std::vector<double>& s2) {
    return kth2(v, k, k, s1, s2).first;
}

// The statistics of one temperature from every worker's tail: the samples above hi or below lo are
// known, n_hi equal hi and n_lo equal lo, the rest lie strictly between (unknown). Sorted, the full set
// is [below lo][lo × n_lo][between][hi × n_hi][above hi]. A rank that falls between is NaN (the pilot
// misled; the caller runs that temperature again keeping all).
struct Order {
    std::vector<double> above, below, big, s1, s2;
    std::uint64_t n = 0, n_hi = 0, n_lo = 0;
    double hi = 0.0, lo = 0.0;

    // The k1-th and k2-th smallest errors (k1 ≤ k2).
    std::pair<double, double> signed_ranks(std::uint64_t k1, std::uint64_t k2) {
        const std::uint64_t nb = below.size();
        const std::uint64_t na = above.size();
        const std::uint64_t between = n - na - nb - n_hi - n_lo;
        auto side = [&](std::uint64_t k) { return k <= nb ? 0 : k <= n - na ? 1 : 2; };
        auto middle = [&](std::uint64_t k) {
            if (k <= nb + n_lo) return lo;
            if (k <= nb + n_lo + between) return static_cast<double>(NAN);
            return hi;
        };
        // Both in one kept side: one selection serves the two.
        if (side(k1) == 0 && side(k2) == 0) return kth2(below, k1, k2, s1, s2);
        if (side(k1) == 2 && side(k2) == 2) return kth2(above, k1 - (n - na), k2 - (n - na), s1, s2);
        auto one = [&](std::uint64_t k) {
            if (side(k) == 0) return kth(below, k, s1, s2);
            if (side(k) == 2) return kth(above, k - (n - na), s1, s2);
            return middle(k);
        };
        return {one(k1), one(k2)};
    }

    // The k-th smallest |error| for ranks k1 ≤ k2. Every sample between the thresholds has |e| < C =
    // max(|lo|, |hi|); the samples with |e| ≥ C are the kept ones so large and the ties at ±C.
    std::pair<double, double> abs_ranks(std::uint64_t k1, std::uint64_t k2) {
        // Keeping every sample (hi = −∞): all are known, C = 0.
        const double c = std::isfinite(hi) && std::isfinite(lo) ? std::max(std::abs(lo), std::abs(hi)) : 0.0;
        big.clear();
        for (const double v : above) {
            if (std::abs(v) >= c) big.push_back(std::abs(v));
        }
        for (const double v : below) {
            if (std::abs(v) >= c) big.push_back(std::abs(v));
        }
        const std::uint64_t ties = (std::abs(hi) == c ? n_hi : 0) + (std::abs(lo) == c ? n_lo : 0);
        const std::uint64_t small = n - big.size() - ties;
        if (k1 > small + ties) return kth2(big, k1 - small - ties, k2 - small - ties, s1, s2);
        auto at = [&](std::uint64_t k) {
            if (k <= small) return static_cast<double>(NAN);
            if (k <= small + ties) return c;
            return kth(big, static_cast<std::size_t>(k - small - ties), s1, s2);
        };
        return {at(k1), at(k2)};
    }
};

// Gathers point i's samples from every worker's tails (and frees them there).
void gather(std::vector<Tails>& from, std::size_t i, double hi, double lo, Order& o) {
    o.above.clear();
    o.below.clear();
    o.n = 0;
    o.n_hi = 0;
    o.n_lo = 0;
    o.hi = hi;
    o.lo = lo;
    for (Tails& t : from) {
        o.n += t.trials;
        o.n_hi += t.equal_hi[i];
        o.n_lo += t.equal_lo[i];
        for (std::size_t j = 0; j < t.count[i]; ++j) {
            const double v = t.kept[i][j];
            (v > hi ? o.above : o.below).push_back(v);
        }
        std::vector<double>().swap(t.kept[i]);
    }
}

}  // namespace

std::vector<McStats> monte_carlo(const Channel& ch, const BudgetSpec& spec, unsigned threads) {
    const std::size_t n = ch.size();
    const std::uint64_t trials = spec.trials;
    const std::uint64_t blocks = (trials + kBlockTrials - 1) / kBlockTrials;
    const Runner runner(ch, spec);

    // The thresholds at each temperature from the pilot (none for a small run): hi = the smaller of its
    // 96.5 % point of the error and its 93 % point of |error|, lo = the larger of its 3.5 % point and
    // minus that 93 % point. The bounds lie beyond them unless the pilot misleads; then that
    // temperature is run again keeping all.
    Thresholds tau{std::vector<double>(n, -INFINITY), std::vector<double>(n, INFINITY)};
    std::vector<double> kept_fraction(n, 0.0);  // of the pilot's samples beyond the thresholds
    if (trials > kPilotTrials) {
        Tails pilot(n);
        runner.run(0, kPilotTrials, nullptr, nullptr, tau, pilot);
        detail::parallel_for(n, std::min<std::size_t>(threads, n), [&](std::size_t, std::size_t i) {
            std::vector<double>& v = pilot.kept[i];
            v.resize(pilot.count[i]);
            std::vector<double> a(v.size());
            for (std::size_t j = 0; j < v.size(); ++j) a[j] = std::abs(v[j]);
            std::vector<double> s1;
            std::vector<double> s2;
            const double t_abs = kth(a, static_cast<std::size_t>(rank_of(kPilotPermille, a.size())), s1, s2);
            const auto [t_lo, t_hi] = kth2(v, static_cast<std::size_t>(rank_of(1000 - kPilotSignedPermille, v.size())),
                                           static_cast<std::size_t>(rank_of(kPilotSignedPermille, v.size())), s1, s2);
            tau.hi[i] = std::min(t_hi, t_abs);
            tau.lo[i] = std::min(std::max(t_lo, -t_abs), tau.hi[i]);
            const auto beyond =
                std::count_if(v.begin(), v.end(), [&](double e) { return e > tau.hi[i] || e < tau.lo[i]; });
            kept_fraction[i] = static_cast<double>(beyond) / static_cast<double>(kPilotTrials);
        });
    }

    const unsigned workers = static_cast<unsigned>(std::min<std::uint64_t>(std::max(1U, threads), blocks));
    std::vector<double> sums(2 * blocks * n, 0.0);
    std::vector<Tails> tails(workers, Tails(n));
    // Room for a worker's share of the tails as the pilot predicts it, with a quarter to spare, so
    // that they rarely grow (and copy) as blocks append to them.
    for (Tails& t : tails) {
        for (std::size_t i = 0; i < n; ++i) {
            const double share = 1.25 * kept_fraction[i] * static_cast<double>(trials) / workers;
            t.kept[i].reserve(static_cast<std::size_t>(share) + kBlockTrials);
        }
    }
    detail::parallel_for(blocks, workers, [&](std::size_t w, std::size_t b) {
        double* s1 = sums.data() + 2 * b * n;
        runner.run(b, trials_in(b, trials), s1, s1 + n, tau, tails[w]);
    });

    std::vector<McStats> out(n);
    // Ranks: |error| at 95 % and 99.7 %; the error at 0.135 %, 2.5 %, 97.5 % and 99.865 %.
    const std::uint64_t k95 = rank_of(950, trials);
    const std::uint64_t k997 = rank_of(997, trials);
    auto bounds = [&](std::size_t i, std::vector<Tails>& from, const Thresholds& th, Order& o) {
        gather(from, i, th.hi[i], th.lo[i], o);
        std::tie(out[i].p95_k, out[i].p99_7_k) = o.abs_ranks(k95, k997);
        std::tie(out[i].p0_135_k, out[i].p2_5_k) = o.signed_ranks(rank_of_1e5(135, trials), rank_of_1e5(2500, trials));
        std::tie(out[i].p97_5_k, out[i].p99_865_k) =
            o.signed_ranks(rank_of_1e5(97500, trials), rank_of_1e5(99865, trials));
    };
    std::vector<Order> scratch(workers);
    detail::parallel_for(n, std::min<std::size_t>(workers, n), [&](std::size_t w, std::size_t i) {
        McStats& m = out[i];
        double s1 = 0.0;
        double s2 = 0.0;
        for (std::uint64_t b = 0; b < blocks; ++b) {
            s1 += sums[2 * b * n + i];
            s2 += sums[2 * b * n + n + i];
        }
        const double nt = static_cast<double>(trials);
        m.mean_k = runner.reference(i) + s1 / nt;
        m.std_k = trials > 1 ? std::sqrt(std::max(0.0, (s2 - s1 * s1 / nt) / (nt - 1.0))) : NAN;
        if (!std::isfinite(m.mean_k)) out_of_range(ch.t(i));
        for (const Tails& t : tails) m.max_abs_k = std::max(m.max_abs_k, t.max_abs[i]);
        bounds(i, tails, tau, scratch[w]);
    });
    std::vector<std::size_t> redo;
    for (std::size_t i = 0; i < n; ++i) {
        const McStats& m = out[i];
        if (std::isnan(m.p95_k) || std::isnan(m.p99_7_k) || std::isnan(m.p97_5_k) || std::isnan(m.p99_865_k) ||
            std::isnan(m.p2_5_k) || std::isnan(m.p0_135_k)) {
            redo.push_back(i);
        }
    }
    if (!redo.empty()) {
        // Keep every sample at the temperatures the pilot misjudged, none elsewhere.
        Thresholds keep_all{std::vector<double>(n, INFINITY), std::vector<double>(n, -INFINITY)};
        for (const std::size_t i : redo) keep_all.hi[i] = -INFINITY;
        std::vector<Tails> again(workers, Tails(n));
        detail::parallel_for(blocks, workers, [&](std::size_t w, std::size_t b) {
            runner.run(b, trials_in(b, trials), nullptr, nullptr, keep_all, again[w]);
        });
        for (const std::size_t i : redo) bounds(i, again, keep_all, scratch[0]);
    }
    return out;
}

}  // namespace rtline::budget_detail
