// The budget's Monte Carlo: trials in fixed blocks of kBlockTrials, block b drawing from its own
// generator stream, so the samples do not depend on which thread ran which block. Sums are kept per
// block and added in block order; the bounds are order statistics of |error|, which do not depend on
// the order of the samples at all. Only the upper tail of |error| is kept in memory: a pilot (the
// first trials of block 0) sets a threshold below the 95 % bound at each temperature.
#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

#include "budget/budget_channel.hpp"
#include "rtline/error.hpp"

namespace rtline::budget_detail {

namespace {

constexpr std::uint64_t kBlockTrials = 4096;
constexpr std::uint64_t kPilotTrials = kBlockTrials;  // block 0; a run of more trials uses a pilot
// The pilot's 93 % point is the tail threshold: from 4096 samples its estimate of the 93 % point has a
// standard deviation of √(0.93·0.07/4096) = 0.4 %, so the 95 % bound lies five of them above it.
constexpr std::uint64_t kPilotPermille = 930;

// The parts of one trial drawn from a generator: normal with σ = tolerance/3 or uniform over
// ±tolerance; the converter error always uniform over ±error_lsb. Only the parts with a tolerance are
// drawn, in slot order, a fixed count per trial.
class Sampler {
public:
    Sampler(const Channel& ch, const BudgetSpec& spec) : normal_(spec.distribution == Distribution::normal) {
        const Tolerances& tol = spec.tolerance;
        Slots half{};
        half[kR25] = tol.r25;
        half[kBeta] = tol.beta;
        for (std::size_t k = 0; k < ch.resistors(); ++k) half[kResistor0 + k] = tol.resistors;
        half[kExcitation] = ch.volts() ? tol.excitation : 0.0;
        for (std::size_t k = 0; k < kAdc; ++k) {
            if (half[k] > 0.0) active_.push_back({k, normal_ ? half[k] / 3.0 : half[k]});
        }
        adc_ = ch.lsb() > 0.0 ? spec.adc.error_lsb : 0.0;
    }

    void draw(SplitMix64& rng, Slots& s) const {
        const std::size_t m = active_.size();
        if (normal_) {
            // Box–Muller: two independent standard normals from two uniforms.
            for (std::size_t j = 0; j < m; j += 2) {
                const double r = std::sqrt(-2.0 * std::log(rng.uniform01_open()));
                const double phi = 2.0 * std::numbers::pi * rng.uniform01();
                s[active_[j].slot] = active_[j].scale * r * std::cos(phi);
                if (j + 1 < m) s[active_[j + 1].slot] = active_[j + 1].scale * r * std::sin(phi);
            }
        } else {
            for (const Part& p : active_) s[p.slot] = p.scale * (2.0 * rng.uniform01() - 1.0);
        }
        if (adc_ > 0.0) s[kAdc] = adc_ * (2.0 * rng.uniform01() - 1.0);
    }

private:
    struct Part {
        std::size_t slot;
        double scale;  // σ (normal) or the half-width (uniform), as a fraction
    };
    bool normal_;
    std::vector<Part> active_;
    double adc_ = 0.0;
};

std::uint64_t block_state(std::uint64_t seed, std::uint64_t block) { return mix64(mix64(seed) + block); }

// What one worker keeps: |error| above the threshold at each temperature (kept[i][0, count[i])), and
// how many equal it (errors are discrete once a converter quantizes the reading, so ties are common);
// the rest are below it. And the largest |error|.
struct Tails {
    explicit Tails(std::size_t n) : kept(n), count(n, 0), equal(n, 0), max_abs(n, 0.0) {}
    std::vector<std::vector<double>> kept;
    std::vector<std::size_t> count;
    std::vector<std::uint64_t> equal;
    std::uint64_t trials = 0;  // run by this worker: trials − count[i] − equal[i] lie below the threshold
    std::vector<double> max_abs;
};

// One block's work: where its samples go.
struct BlockJob {
    std::uint64_t block = 0;
    std::uint64_t count = 0;  // trials, from the block's start
    double* s1 = nullptr;     // per temperature: sum of (error − reference); null to skip the sums
    double* s2 = nullptr;     // and of its square
    const double* tau = nullptr;
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
          heat_(ch.heats()),
          e_ref_(ch.size()) {
        for (std::size_t i = 0; i < ch.size(); ++i) e_ref_[i] = ch.error(ch.nominal(), i, mode_, 0.0, heat_);
        block_fn_ = pick_block_fn(heat_, mode_, ch.inverse());
    }

    [[nodiscard]] double reference(std::size_t i) const { return e_ref_[i]; }

    // Runs the first `count` trials of block b. Adds (error − reference) and its square to s1, s2 (one
    // entry per temperature; null to skip) and keeps |error| above `tau` in `tails`.
    void run(std::uint64_t b, std::uint64_t count, double* s1, double* s2, const std::vector<double>& tau,
             Tails& tails) const {
        // Room for every trial of the block at every temperature, so that the loop stores without a
        // branch and advances the count by whether the sample is kept.
        for (std::size_t i = 0; i < ch_.size(); ++i) {
            if (tails.kept[i].size() < tails.count[i] + count) tails.kept[i].resize(tails.count[i] + count);
        }
        block_fn_(*this, BlockJob{b, count, s1, s2, tau.data(), &tails});
    }

    // The block loop for one kernel; inlined into a plain and an AVX2 copy (see pick_block_fn).
    template <bool kHeat, Adc kMode, Inverse kInverse>
    [[gnu::always_inline]] inline void block(const BlockJob& job) const {
        const Kernel<kHeat, kMode, kInverse> kernel;
        SplitMix64 rng(block_state(seed_, job.block));
        const std::size_t n = ch_.size();
        std::vector<double> e(n);
        std::vector<double> ae(n);
        std::vector<std::size_t> keep(n);
        std::vector<double*> out(n);
        Tails& tails = *job.tails;
        for (std::size_t i = 0; i < n; ++i) out[i] = tails.kept[i].data();
        double* const ep = e.data();
        double* const ap = ae.data();
        std::size_t* const kp = keep.data();
        const double* const ref = e_ref_.data();
        const double* const th = job.tau;
        double* const mx = tails.max_abs.data();
        std::uint64_t* const eq = tails.equal.data();
        std::size_t* const kept = tails.count.data();
        double* const s1 = job.s1;
        double* const s2 = job.s2;
        Slots s{};
        for (std::uint64_t t = 0; t < job.count; ++t) {
            sampler_.draw(rng, s);
            const Trial tr = ch_.trial(s);
            const double adc = s[kAdc];
            for (std::size_t i = 0; i < n; ++i) ep[i] = ch_.point_error(kernel, tr, i, adc);
            if (s1 != nullptr) {
                for (std::size_t i = 0; i < n; ++i) {
                    const double d = ep[i] - ref[i];
                    s1[i] += d;
                    s2[i] += d * d;
                }
            }
            // Simple loops, each of which the compiler vectorizes.
            for (std::size_t i = 0; i < n; ++i) {
                const double a = std::abs(ep[i]);
                ap[i] = a;
                mx[i] = std::max(mx[i], a);
            }
            for (std::size_t i = 0; i < n; ++i) eq[i] += ap[i] == th[i] ? 1 : 0;
            for (std::size_t i = 0; i < n; ++i) kp[i] = ap[i] > th[i] ? 1 : 0;
            for (std::size_t i = 0; i < n; ++i) {
                out[i][kept[i]] = ap[i];
                kept[i] += kp[i];
            }
        }
        tails.trials += job.count;
    }

private:
    static BlockFn pick_block_fn(bool heat, Adc mode, Inverse inverse);

    const Channel& ch_;
    std::uint64_t seed_;
    Sampler sampler_;
    Adc mode_;
    bool heat_;
    std::vector<double> e_ref_;
    BlockFn block_fn_ = nullptr;
};

template <bool kHeat, Adc kMode, Inverse kInverse>
void block_plain(const Runner& r, const BlockJob& job) {
    r.block<kHeat, kMode, kInverse>(job);
}

#if defined(__x86_64__) && defined(__GNUC__)
// The same loop compiled for AVX2 (four doubles a vector), chosen at run time when the processor has
// it. AVX2 without FMA rounds every operation as the plain code does, so the results are the same bits.
template <bool kHeat, Adc kMode, Inverse kInverse>
__attribute__((target("avx2"))) void block_avx2(const Runner& r, const BlockJob& job) {
    r.block<kHeat, kMode, kInverse>(job);
}
#endif

BlockFn Runner::pick_block_fn(bool heat, Adc mode, Inverse inverse) {
    return with_kernel(heat, mode, inverse, [](auto kernel) -> BlockFn {
        return [&]<bool kHeat, Adc kMode, Inverse kInverse>(Kernel<kHeat, kMode, kInverse>) -> BlockFn {
#if defined(__x86_64__) && defined(__GNUC__)
            if (__builtin_cpu_supports("avx2")) return &block_avx2<kHeat, kMode, kInverse>;
#endif
            return &block_plain<kHeat, kMode, kInverse>;
        }(kernel);
    });
}

std::uint64_t trials_in(std::uint64_t block, std::uint64_t trials) {
    return std::min(kBlockTrials, trials - block * kBlockTrials);
}

// The rank ⌈permille·n/1000⌉ (1-based), in exact integer arithmetic.
std::uint64_t rank_of(std::uint64_t permille, std::uint64_t n) {
    return std::max<std::uint64_t>(1, (permille * n + 999) / 1000);
}

// The bound at rank k when the samples above the threshold `tau` are `kept`, n_equal equal it and
// n_below lie below it; kept[from, end) must hold the kept ranks from `from` on (nth_element leaves
// that true above the rank it places, so a higher rank is searched there only). NaN when the rank
// falls below the threshold (the pilot misled).
double order_statistic(std::vector<double>& kept, std::size_t from, std::uint64_t k, std::uint64_t n_below,
                       std::uint64_t n_equal, double tau) {
    if (k > n_below + n_equal) {
        const auto at = kept.begin() + static_cast<std::ptrdiff_t>(k - n_below - n_equal - 1);
        std::nth_element(kept.begin() + static_cast<std::ptrdiff_t>(from), at, kept.end());
        return *at;
    }
    if (k > n_below) return tau;
    return NAN;
}

}  // namespace

std::vector<McStats> monte_carlo(const Channel& ch, const BudgetSpec& spec, unsigned threads) {
    const std::size_t n = ch.size();
    const std::uint64_t trials = spec.trials;
    const std::uint64_t blocks = (trials + kBlockTrials - 1) / kBlockTrials;
    const Runner runner(ch, spec);

    // The tail threshold at each temperature: the pilot's 93 % point (none for a small run). The 95 %
    // bound lies above it unless the pilot misleads; then that temperature is run again keeping all.
    std::vector<double> tau(n, -INFINITY);
    if (trials > kPilotTrials) {
        Tails pilot(n);
        runner.run(0, kPilotTrials, nullptr, nullptr, tau, pilot);
        parallel_for(n, threads, [&](std::size_t i, unsigned) {
            std::vector<double>& v = pilot.kept[i];
            v.resize(pilot.count[i]);
            const auto at = v.begin() + static_cast<std::ptrdiff_t>(rank_of(kPilotPermille, v.size()) - 1);
            std::nth_element(v.begin(), at, v.end());
            tau[i] = *at;
        });
    }

    const unsigned workers = static_cast<unsigned>(std::min<std::uint64_t>(std::max(1U, threads), blocks));
    std::vector<double> sums(2 * blocks * n, 0.0);
    std::vector<Tails> tails(workers, Tails(n));
    parallel_for(blocks, workers, [&](std::size_t b, unsigned w) {
        double* s1 = sums.data() + 2 * b * n;
        runner.run(b, trials_in(b, trials), s1, s1 + n, tau, tails[w]);
    });

    std::vector<McStats> out(n);
    std::vector<std::size_t> redo;
    const std::uint64_t k95 = rank_of(950, trials);
    const std::uint64_t k997 = rank_of(997, trials);
    auto bounds = [&](std::size_t i, std::vector<Tails>& from, double tau_i, std::vector<double>& kept) {
        std::uint64_t n_below = 0;
        std::uint64_t n_equal = 0;
        kept.clear();
        for (Tails& t : from) {
            n_below += t.trials - t.count[i] - t.equal[i];
            n_equal += t.equal[i];
            kept.insert(kept.end(), t.kept[i].begin(), t.kept[i].begin() + static_cast<std::ptrdiff_t>(t.count[i]));
            std::vector<double>().swap(t.kept[i]);
        }
        out[i].p95_k = order_statistic(kept, 0, k95, n_below, n_equal, tau_i);
        const std::uint64_t placed = k95 > n_below + n_equal ? k95 - n_below - n_equal : 0;  // kept ranks below
        out[i].p99_7_k = order_statistic(kept, static_cast<std::size_t>(placed), k997, n_below, n_equal, tau_i);
    };
    std::vector<std::vector<double>> scratch(workers);
    parallel_for(n, workers, [&](std::size_t i, unsigned w) {
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
        bounds(i, tails, tau[i], scratch[w]);
    });
    for (std::size_t i = 0; i < n; ++i) {
        if (std::isnan(out[i].p95_k) || std::isnan(out[i].p99_7_k)) redo.push_back(i);
    }
    if (!redo.empty()) {
        // Keep every sample at the temperatures the pilot misjudged, none elsewhere.
        std::vector<double> keep_all(n, INFINITY);
        for (const std::size_t i : redo) keep_all[i] = -INFINITY;
        std::vector<Tails> again(workers, Tails(n));
        parallel_for(blocks, workers, [&](std::size_t b, unsigned w) {
            runner.run(b, trials_in(b, trials), nullptr, nullptr, keep_all, again[w]);
        });
        for (const std::size_t i : redo) bounds(i, again, -INFINITY, scratch[0]);
    }
    return out;
}

}  // namespace rtline::budget_detail
