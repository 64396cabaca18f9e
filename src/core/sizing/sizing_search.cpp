// The standard-value searches: every combination of series values, assessed by the topology's kernel
// (search_kernels.hpp), constraints counted for every combination, the best N kept under a total order
// so that pruning and the split over threads cannot change which N they are.
#include <algorithm>
#include <array>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>

#include "parallel.hpp"
#include "rtline/sizing.hpp"
#include "circuit/search_kernels.hpp"

namespace rtline {

namespace {

// The constraints, in the order StandardSearch::removed lists them.
constexpr std::array<Input, 4> kConstraints = {Input::min_span, Input::min_sensitivity, Input::max_power, Input::max_self_heating};

// What every assessment reads: the spec, the grid in scan order and the model's alpha at each point.
struct Context {
    const SizingSpec& spec;
    const Grid& grid;
    const Thermistor& model;
    kernel::ScanGrid scan;
    std::vector<double> alpha;  // 1/K at each scan position, for {min_sensitivity}
    bool need_power = false;
    bool need_sensitivity = false;

    Context(const SizingSpec& s, const Grid& g, const Thermistor& m)
        : spec(s), grid(g), model(m), scan(kernel::scan_grid(g)) {
        const Constraints& k = s.constraints;
        need_power = std::isfinite(k.max_power_w) || std::isfinite(k.max_self_heating_k);
        need_sensitivity = k.min_sensitivity > 0.0;
        if (need_sensitivity) {
            for (const double t : scan.t_k) alpha.push_back(m.alpha(t));
        }
    }
    [[nodiscard]] double r_null() const {
        return is_bridge(spec.base.topology) ? model.resistance(spec.null_at_k) : 0.0;
    }
};

// A combination as the ranking sees it.
struct Ranked {
    std::array<double, 2> values{};  // free_resistors order; one-resistor topologies use the first
    double objective = INFINITY;
    double span = 0.0;
};

// Objectives whose bit patterns differ only in the last 22 of the 52 mantissa bits (within 2^-30, about
// 9.3e-10, relative) are one tie class. Rounding leaves equal objectives, such as a shunt-divider's
// mirror-image pairs (a, b) and (b, a), a few last bits apart; classes absorb that, and unlike a tolerance
// (|a − b| ≤ 1e-9·max, which is not transitive) they give a total order, so the best N do not depend on
// the order the combinations are seen in. For objectives ≥ 0 the bit pattern is ordered like the value.
std::uint64_t tie_class(double objective) { return std::bit_cast<std::uint64_t>(objective) >> 22; }

// Lower objective class first, then the larger span, then the smaller values.
bool better(const Ranked& a, const Ranked& b) {
    const std::uint64_t ca = tie_class(a.objective);
    const std::uint64_t cb = tie_class(b.objective);
    if (ca != cb) return ca < cb;
    if (a.span != b.span) return a.span > b.span;
    return a.values < b.values;
}

// The best `k` so far, best first.
class TopList {
public:
    explicit TopList(std::size_t k) : k_(k) {}

    // The tie class above which a combination cannot enter the list (every class while it is not full).
    [[nodiscard]] std::uint64_t stop_class() const {
        if (k_ == 0) return 0;
        return items_.size() < k_ ? kAnyClass : tie_class(items_.back().objective);
    }
    void offer(const Ranked& r) {
        if (k_ == 0 || (items_.size() >= k_ && !better(r, items_.back()))) return;
        items_.insert(std::upper_bound(items_.begin(), items_.end(), r, better), r);
        if (items_.size() > k_) items_.pop_back();
    }
    [[nodiscard]] const std::vector<Ranked>& items() const { return items_; }

    static constexpr std::uint64_t kAnyClass = std::numeric_limits<std::uint64_t>::max();

private:
    std::size_t k_;
    std::vector<Ranked> items_;
};

// A scored combination.
struct Score {
    double objective = INFINITY;
    double span = 0.0;
    bool complete = true;  // false: the scan stopped once the combination could not rank
};

// Marks a combination that is out of the ranking (its output does not change, or it fails a constraint).
constexpr double kOut = INFINITY;

// One combination at a time on kernel K, in two steps. screen(): the constraints, each failure counted
// (power and sensitivity need every point), and for a combination that meets them a lower bound on its
// objective; score(): the objective, the endpoint-line scan stopping once its partial maximum puts the
// combination above a given tie class. A combination that fails a constraint is never scored, and every
// combination is screened, so the counts are exactly those of full scans.
template <class K>
class Assessor {
public:
    Assessor(const Context& ctx, const K& k) : ctx_(ctx), k_(k) {}

    void outer(double a) {
        values_[0] = a;
        k_.outer(a);
    }

    // The lower bound of the combination (outer, b), or (b) for one resistor, or kOut. Against the
    // endpoint line: the largest deviation over the first block of the scan order (the ends, the middle,
    // the quarters, …), which a full scan can only raise; other lines have no such bound (0).
    double screen(double b) {
        set_inner(b);
        const kernel::Ends e = kernel::ends(k_);
        if (e.unchanging || !meets_constraints(e.full_scale)) return kOut;
        if (ctx_.spec.line != LineKind::endpoint) return 0.0;
        return kernel::endpoint_scan(k_, ctx_.scan.t_k, e, [](double) { return true; }).pct_fsd;  // first block
    }

    // The objective of a combination that screen() let through; stops (complete = false) once it is
    // known to lie in a tie class above stop_class.
    Score score(double b, std::uint64_t stop_class) {
        set_inner(b);
        const kernel::Ends e = kernel::ends(k_);
        Score s;
        s.span = e.full_scale;
        if (ctx_.spec.line == LineKind::endpoint) {
            const kernel::Scan scan =
                kernel::endpoint_scan(k_, ctx_.scan.t_k, e, [&](double pct) { return tie_class(pct) > stop_class; });
            s.objective = scan.pct_fsd;
            s.complete = scan.complete;
        } else {
            kernel::outputs_in_grid_order(k_, ctx_.scan, y_);
            s.objective = max_nonlinearity_pct_fsd(ctx_.grid.t_k, y_, ctx_.spec.line);
        }
        return s;
    }

    [[nodiscard]] const std::array<double, 2>& values() const { return values_; }
    [[nodiscard]] const std::array<std::size_t, 4>& removed() const { return removed_; }

private:
    void set_inner(double b) {
        values_[K::kFree - 1] = b;
        k_.inner(b);
    }

    // Checks every constraint (not only up to the first failure: each counts what it removes).
    bool meets_constraints(double span) {
        const Constraints& k = ctx_.spec.constraints;
        bool ok = true;
        auto fail = [&](std::size_t which) {
            ++removed_[which];
            ok = false;
        };
        if (span < k.min_span) fail(0);
        if (ctx_.need_sensitivity && min_sensitivity() < k.min_sensitivity) fail(1);
        if (ctx_.need_power) {
            double max_power = 0.0;
            for (std::size_t i = 0; i < k_.size(); ++i) max_power = std::max(max_power, k_.power(i));
            if (std::isfinite(k.max_power_w) && !(max_power <= k.max_power_w)) fail(2);
            if (std::isfinite(k.max_self_heating_k) &&
                !(max_power / ctx_.spec.dissipation_w_per_k <= k.max_self_heating_k)) {
                fail(3);
            }
        }
        return ok;
    }

    // The smallest |d output/dT| over the span, by sensitivity() on the circuit itself (a derivative by
    // central differences in R_T, which the kernels do not give).
    [[nodiscard]] double min_sensitivity() const {
        const Circuit c =
            sized_circuit(ctx_.spec, ctx_.model, std::vector<double>(values_.begin(), values_.begin() + K::kFree));
        double smin = INFINITY;
        for (std::size_t i = 0; i < ctx_.scan.index.size(); ++i) {
            smin = std::min(smin, sensitivity(c, ctx_.alpha[i], ctx_.scan.r_ohm[i]));
        }
        return smin;
    }

    const Context& ctx_;
    K k_;
    std::array<double, 2> values_{};
    std::array<std::size_t, 4> removed_{};
    std::vector<double> y_;
};

// The `size` lowest (bound, combination) pairs seen, lowest first; the pairs are totally ordered.
class Lowest {
public:
    explicit Lowest(std::size_t size) : size_(size) {}
    void offer(double bound, std::size_t index) {
        if (items_.size() == size_ && (size_ == 0 || !(std::pair(bound, index) < items_.back()))) return;  // usually
        insert({bound, index});
    }
    [[nodiscard]] const std::vector<std::pair<double, std::size_t>>& items() const { return items_; }

private:
    void insert(const std::pair<double, std::size_t>& p) {
        items_.insert(std::upper_bound(items_.begin(), items_.end(), p), p);
        if (items_.size() > size_) items_.pop_back();
    }

    std::size_t size_;
    std::vector<std::pair<double, std::size_t>> items_;
};

// One thread's share of a search: its assessor (with its counts), its lowest bounds, its best N. On a
// cache line of its own: the kernel's per-combination values are written for every combination, and
// two threads writing one line would keep taking it from each other.
template <class K>
struct alignas(64) Worker {
    Assessor<K> assessor;
    Lowest lowest;
    TopList top;
};

// Combinations are numbered row by row: row = the outer value's index (0 for one-resistor topologies),
// column = the inner value's.
//
// Every combination over kernel K, in three passes:
// 1. screen every combination: constraints counted, a lower bound kept for each that meets them;
// 2. seed: score in full the few with the lowest bounds. The N-th best of them is no better than the
//    N-th best of all (they are among all), so a combination whose bound lies in a tie class above it
//    cannot rank: N others are strictly better;
// 3. score every combination whose bound is not above the N-th best known (the seeds' at first, then
//    the list's), each scan stopping as soon as its partial maximum is above it.
// Pass 3 scores the seeds again; they are seen once there, as every other combination, so the result
// is exactly the best N of full scans of every combination. Passes 1 and 3 split the rows over threads.
template <class K>
StandardSearch run_search(const Context& ctx, const std::vector<double>& values, const K& k) {
    constexpr bool kTwo = K::kFree == 2;
    const std::size_t n = values.size();
    const std::size_t rows = kTwo ? n : 1;
    const std::size_t top = ctx.spec.top;
    const double work = static_cast<double>(rows * n) * static_cast<double>(ctx.scan.size());
    const std::size_t workers = detail::worker_count(ctx.spec.threads, rows, work);
    std::vector<Worker<K>> w(workers, Worker<K>{Assessor<K>(ctx, k), Lowest(top == 0 ? 0 : top + 8), TopList(top)});
    std::vector<double> bound(rows * n, kOut);
    detail::parallel_for(rows, workers, [&](std::size_t id, std::size_t row) {
        Worker<K>& me = w[id];
        if constexpr (kTwo) me.assessor.outer(values[row]);
        for (std::size_t col = 0; col < n; ++col) {
            const double b = me.assessor.screen(values[col]);
            bound[row * n + col] = b;
            if (b != kOut) me.lowest.offer(b, row * n + col);
        }
    });
    Lowest lowest(top == 0 ? 0 : top + 8);
    for (const Worker<K>& me : w) {
        for (const auto& [b, i] : me.lowest.items()) lowest.offer(b, i);
    }
    TopList seeds(top);
    Assessor<K>& a = w[0].assessor;
    for (const auto& entry : lowest.items()) {
        const std::size_t i = entry.second;
        if constexpr (kTwo) a.outer(values[i / n]);
        const Score s = a.score(values[i % n], TopList::kAnyClass);
        seeds.offer({a.values(), s.objective, s.span});
    }
    const std::uint64_t seed_class = seeds.stop_class();
    detail::parallel_for(rows, workers, [&](std::size_t id, std::size_t row) {
        Worker<K>& me = w[id];
        bool outer_set = false;
        for (std::size_t col = 0; col < n; ++col) {
            const double b = bound[row * n + col];
            const std::uint64_t stop = std::min(seed_class, me.top.stop_class());
            if (b == kOut || tie_class(b) > stop) continue;
            if (kTwo && !outer_set) {
                me.assessor.outer(values[row]);
                outer_set = true;
            }
            const Score s = me.assessor.score(values[col], stop);
            if (s.complete) me.top.offer({me.assessor.values(), s.objective, s.span});
        }
    });
    // Each worker's list holds every combination of the best N it saw, and the order is total: the
    // merge is the best N whatever the number of workers.
    std::vector<Ranked> all;
    StandardSearch result;
    result.examined = rows * n;
    for (const Input c : kConstraints) result.removed.emplace_back(c, 0);
    for (const Worker<K>& me : w) {
        all.insert(all.end(), me.top.items().begin(), me.top.items().end());
        for (std::size_t f = 0; f < kConstraints.size(); ++f) result.removed[f].second += me.assessor.removed()[f];
    }
    std::sort(all.begin(), all.end(), better);
    if (all.size() > top) all.resize(top);
    for (const Ranked& r : all) {
        const Circuit c =
            sized_circuit(ctx.spec, ctx.model, std::vector<double>(r.values.begin(), r.values.begin() + K::kFree));
        result.best.push_back(evaluate(ctx.spec, ctx.grid, ctx.model, c));
    }
    return result;
}

}  // namespace

StandardSearch search_standard(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    const std::vector<double> values = series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm);
    const Context ctx(spec, grid, model);
    StandardSearch result;
    for (const Input c : kConstraints) result.removed.emplace_back(c, 0);  // bare: nothing to search
    kernel::with_kernel(spec.base, ctx.r_null(), ctx.scan, [&](const auto& k) { result = run_search(ctx, values, k); });
    return result;
}

std::vector<Candidate> tradeoff(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    const std::vector<double> values = series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm);
    const Context ctx(spec, grid, model);
    std::vector<Ranked> all;
    kernel::with_kernel(spec.base, ctx.r_null(), ctx.scan, [&](const auto& k) {
        using K = std::decay_t<decltype(k)>;
        if constexpr (K::kFree == 1) {
            Assessor<K> a(ctx, k);
            for (const double v : values) {
                if (a.screen(v) == kOut) continue;
                const Score s = a.score(v, TopList::kAnyClass);
                all.push_back({a.values(), s.objective, s.span});
            }
        }
    });
    std::sort(all.begin(), all.end(), [](const Ranked& a, const Ranked& b) {
        return a.span != b.span ? a.span > b.span : a.objective < b.objective;
    });
    std::vector<Candidate> front;
    double best = INFINITY;
    for (const Ranked& r : all) {
        if (r.objective < best * (1.0 - 1e-9)) {  // strictly better, beyond rounding (see tie_class())
            best = r.objective;
            front.push_back(evaluate(spec, grid, model, sized_circuit(spec, model, {r.values[0]})));
        }
    }
    return front;
}

}  // namespace rtline
