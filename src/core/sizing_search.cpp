// The standard-value searches: every combination of series values, assessed by the topology's kernel
// (search_kernels.hpp), constraints counted for every combination, the best N kept under a total order.
#include <algorithm>
#include <array>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>

#include "rtline/sizing.hpp"
#include "search_kernels.hpp"

namespace rtline {

namespace {

// The constraint flags, in the order StandardSearch::removed lists them.
constexpr std::array<const char*, 4> kFlags = {"--min-span", "--min-sensitivity", "--max-power", "--max-self-heating"};

// What every assessment reads: the spec, the grid in scan order and the model's alpha at each point.
struct Context {
    const SizingSpec& spec;
    const Grid& grid;
    const Thermistor& model;
    kernel::ScanGrid scan;
    std::vector<double> alpha;  // 1/K at each scan position, for --min-sensitivity
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
std::uint64_t tie_class(double objective) {
    return std::bit_cast<std::uint64_t>(objective) >> 22;
}

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

    void offer(const Ranked& r) {
        if (k_ == 0 || (items_.size() >= k_ && !better(r, items_.back()))) return;
        items_.insert(std::upper_bound(items_.begin(), items_.end(), r, better), r);
        if (items_.size() > k_) items_.pop_back();
    }
    [[nodiscard]] const std::vector<Ranked>& items() const { return items_; }

private:
    std::size_t k_;
    std::vector<Ranked> items_;
};

// What assessing one combination gives.
struct Quick {
    double objective = INFINITY;
    double span = 0.0;
    bool feasible = true;
};

// One combination at a time on kernel K: the constraints first, each failure counted, then the objective.
template <class K>
class Assessor {
public:
    Assessor(const Context& ctx, const K& k) : ctx_(ctx), k_(k) {}

    void outer(double a) {
        values_[0] = a;
        k_.outer(a);
    }

    // Assesses the combination (outer, b) for a two-resistor topology, (b) for one resistor.
    Quick assess(double b) {
        values_[K::kFree - 1] = b;
        k_.inner(b);
        Quick q;
        const kernel::Ends e = kernel::ends(k_);
        q.span = e.full_scale;
        if (e.unchanging) {
            q.feasible = false;
            return q;
        }
        check_constraints(q);
        if (!q.feasible) return q;
        if (ctx_.spec.line == LineKind::endpoint) {
            q.objective = kernel::endpoint_scan(k_, ctx_.scan.t_k, e, [](double) { return false; }).pct_fsd;
        } else {
            kernel::outputs_in_grid_order(k_, ctx_.scan, y_);
            q.objective = max_nonlinearity_pct_fsd(ctx_.grid.t_k, y_, ctx_.spec.line);
        }
        return q;
    }

    [[nodiscard]] const std::array<double, 2>& values() const { return values_; }
    [[nodiscard]] const std::array<std::size_t, 4>& removed() const { return removed_; }

private:
    void check_constraints(Quick& q) {
        const Constraints& k = ctx_.spec.constraints;
        auto fail = [&](std::size_t which) {
            ++removed_[which];
            q.feasible = false;
        };
        if (q.span < k.min_span) fail(0);
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

// One thread's share of a search: its assessor, its best N, its counts.
template <class K>
struct Worker {
    Assessor<K> assessor;
    TopList top;
    std::size_t examined = 0;

    void consider(double b) {
        ++examined;
        const Quick q = assessor.assess(b);
        if (q.feasible) top.offer({assessor.values(), q.objective, q.span});
    }
};

// Every combination over kernel K.
template <class K>
StandardSearch run_search(const Context& ctx, const std::vector<double>& values, const K& k) {
    std::vector<Worker<K>> w(1, Worker<K>{Assessor<K>(ctx, k), TopList(ctx.spec.top)});
    Worker<K>& me = w[0];
    if constexpr (K::kFree == 2) {
        for (const double a : values) {
            me.assessor.outer(a);
            for (const double b : values) me.consider(b);
        }
    } else {
        for (const double b : values) me.consider(b);
    }
    std::vector<Ranked> all;
    StandardSearch result;
    for (const auto& flag : kFlags) result.removed.emplace_back(flag, 0);
    for (const Worker<K>& me : w) {
        all.insert(all.end(), me.top.items().begin(), me.top.items().end());
        result.examined += me.examined;
        for (std::size_t f = 0; f < kFlags.size(); ++f) result.removed[f].second += me.assessor.removed()[f];
    }
    std::sort(all.begin(), all.end(), better);
    if (all.size() > ctx.spec.top) all.resize(ctx.spec.top);
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
    for (const auto& flag : kFlags) result.removed.emplace_back(flag, 0);  // bare: nothing to search
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
                const Quick q = a.assess(v);
                if (q.feasible) all.push_back({a.values(), q.objective, q.span});
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
