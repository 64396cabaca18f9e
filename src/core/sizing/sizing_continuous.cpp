// The continuous optimum: a scan in log-resistance finds the local minima (the objective can have
// several), golden section refines the best three; two resistors are nested (for each outer value the
// best inner value, then the best outer value). Every evaluation runs on the topology's kernel, so the
// outer resistor's share of the circuit is computed once per outer value, and the scan points and the
// refinements, being independent, are spread over threads: the result is exactly that of one thread.
#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "circuit/search_kernels.hpp"
#include "golden.hpp"
#include "parallel.hpp"
#include "rtline/error.hpp"
#include "rtline/sizing.hpp"

namespace rtline {

namespace {

// The scan of minimize_1d: n points evenly spaced over [lo, hi] and f at each.
struct Scan1d {
    std::vector<double> x;
    std::vector<double> fx;
};

[[nodiscard]] std::vector<double> scan_points(double lo, double hi, int n) {
    std::vector<double> x(static_cast<std::size_t>(n));
    for (int i = 0; i < n; ++i) x[static_cast<std::size_t>(i)] = lo + (hi - lo) * i / (n - 1);
    return x;
}

// The minimum from a scan: its local minima found, the best three refined by golden section between
// their neighbours. f(worker, x) is called from `workers` threads at once, each with its own index.
template <class F>
double refine_1d(F&& f, const Scan1d& scan, double tol, double& fbest, std::size_t workers) {
    const std::vector<double>& x = scan.x;
    const std::vector<double>& fx = scan.fx;
    std::vector<std::size_t> minima;
    for (std::size_t i = 0; i < x.size(); ++i) {
        const bool left = i == 0 || fx[i] <= fx[i - 1];
        const bool right = i + 1 == x.size() || fx[i] <= fx[i + 1];
        if (left && right && std::isfinite(fx[i])) minima.push_back(i);
    }
    std::sort(minima.begin(), minima.end(), [&](std::size_t a, std::size_t b) { return fx[a] < fx[b]; });
    if (minima.size() > 3) minima.resize(3);
    double best_x = x[0];
    fbest = INFINITY;
    for (std::size_t i = 0; i < x.size(); ++i) {
        if (fx[i] < fbest) {
            fbest = fx[i];
            best_x = x[i];
        }
    }
    std::vector<double> xv(minima.size());
    std::vector<double> fv(minima.size(), INFINITY);
    detail::parallel_for(minima.size(), workers, [&](std::size_t w, std::size_t j) {
        const std::size_t i = minima[j];
        const double a = x[i == 0 ? 0 : i - 1];
        const double b = x[std::min(i + 1, x.size() - 1)];
        xv[j] = detail::golden_section_min([&](double v) { return f(w, v); }, a, b, tol, fv[j]);
    });
    for (std::size_t j = 0; j < minima.size(); ++j) {
        if (fv[j] < fbest) {
            fbest = fv[j];
            best_x = xv[j];
        }
    }
    return best_x;
}

// Minimum of f over [lo, hi]: a scan of `n` points, then refine_1d.
template <class F>
double minimize_1d(F&& f, double lo, double hi, int n, double tol, double& fbest, std::size_t workers) {
    Scan1d scan{scan_points(lo, hi, n), std::vector<double>(static_cast<std::size_t>(n))};
    detail::parallel_for(scan.x.size(), workers, [&](std::size_t w, std::size_t i) { scan.fx[i] = f(w, scan.x[i]); });
    return refine_1d(f, scan, tol, fbest, workers);
}

// objective() for the kernel's circuit: +infinity when the output does not change. One per thread, on
// a cache line of its own (the kernel's values are written at every evaluation).
template <class K>
class alignas(64) Objective {
public:
    Objective(const K& k, const kernel::ScanGrid& scan, const Grid& grid, LineKind line)
        : k_(k), scan_(scan), grid_(grid), line_(line) {}

    void outer(double a) { k_.outer(a); }
    double operator()(double b) {
        k_.inner(b);
        const kernel::Ends e = kernel::ends(k_);
        if (e.unchanging) return INFINITY;
        if (line_ == LineKind::endpoint) return kernel::endpoint_pct_fsd(k_, scan_.t_k, e);
        kernel::outputs_in_grid_order(k_, scan_, y_);
        return max_nonlinearity_pct_fsd(grid_.t_k, y_, line_);
    }

private:
    K k_;
    const kernel::ScanGrid& scan_;
    const Grid& grid_;
    LineKind line_;
    std::vector<double> y_;
};

// Evaluations of a 1-D minimize_1d: the scan and about three golden sections of 45 steps.
double evaluations(int n) { return n + 3.0 * 45.0; }

// The free resistor values of the continuous optimum on kernel K, and its objective in fbest.
template <class K>
std::vector<double> continuous_optimum(const SizingSpec& spec, const Grid& grid, const kernel::ScanGrid& scan,
                                       const K& k, double& fbest, std::vector<std::vector<double>>& ridge) {
    const double lo = std::log(spec.range_lo_ohm);
    const double hi = std::log(spec.range_hi_ohm);
    const double tol = 1e-9;  // in ln R: 1e-9 relative in the resistor value
    const auto points = static_cast<double>(scan.size());
    if constexpr (K::kFree == 1) {
        const std::size_t workers = detail::worker_count(spec.threads, 141, evaluations(141) * points);
        std::vector<Objective<K>> f(workers, Objective<K>(k, scan, grid, spec.line));
        const double u =
            minimize_1d([&](std::size_t w, double x) { return f[w](std::exp(x)); }, lo, hi, 141, tol, fbest, workers);
        return {std::exp(u)};
    } else {
        const double work = evaluations(57) * evaluations(57) * points;
        const std::size_t workers = detail::worker_count(spec.threads, 57, work);
        std::vector<Objective<K>> f(workers, Objective<K>(k, scan, grid, spec.line));
        // For an outer value u, the best inner value, on worker w's kernel (the inner scan stays on it).
        auto inner = [&](std::size_t w, double u, double& fv) {
            f[w].outer(std::exp(u));
            return minimize_1d([&](std::size_t, double v) { return f[w](std::exp(v)); }, lo, hi, 57, tol, fv, 1);
        };
        auto outer = [&](std::size_t w, double u) {
            double fv = INFINITY;
            (void)inner(w, u, fv);
            return fv;
        };
        // The outer scan, keeping each point's best inner value as well (the ridge scan reuses them).
        constexpr int kOuterScan = 57;
        Scan1d outer_scan{scan_points(lo, hi, kOuterScan), std::vector<double>(kOuterScan)};
        std::vector<double> scan_v(kOuterScan);
        detail::parallel_for(outer_scan.x.size(), workers, [&](std::size_t w, std::size_t i) {
            scan_v[i] = inner(w, outer_scan.x[i], outer_scan.fx[i]);
        });
        const double u = refine_1d(outer, outer_scan, tol, fbest, workers);
        double fv = INFINITY;
        const double v = inner(0, u, fv);
        // A single thermistor in any of these networks gives an output (a + b·R_T)/(c + d·R_T), whose
        // linearity depends on one equivalent resistance (rp∥rs for the shunt-divider): the optimum is a
        // ridge of pairs, not a point. The pairs of an outer scan that lie on it go to `ridge`, so the
        // caller can report the one with the largest output span. The ridge scan's 29 points are every
        // other point of the outer scan: lo + (hi − lo)·2i/56 is lo + (hi − lo)·i/28 to the last bit
        // (doubling and halving are exact), so their inner optima are those already found.
        constexpr int kRidgeScan = 29;
        static_assert(kOuterScan == 2 * kRidgeScan - 1);
        for (std::size_t k = 0; k < outer_scan.x.size(); k += 2) {
            if (outer_scan.fx[k] <= fbest * (1.0 + 1e-6))
                ridge.push_back({std::exp(outer_scan.x[k]), std::exp(scan_v[k])});
        }
        return {std::exp(u), std::exp(v)};
    }
}

}  // namespace

Candidate optimize_continuous(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    const kernel::ScanGrid scan = kernel::scan_grid(grid);
    const double r_null = is_bridge(spec.base.topology) ? model.resistance(spec.null_at_k) : 0.0;
    std::vector<double> best;
    double fbest = INFINITY;
    std::vector<std::vector<double>> ridge;
    kernel::with_kernel(spec.base, r_null, scan,
                        [&](const auto& k) { best = continuous_optimum(spec, grid, scan, k, fbest, ridge); });
    if (!std::isfinite(fbest)) {
        throw InputError(Input::topology, std::string(topology_name(spec.base.topology)),
                         "the output does not change over the span with this drive, whatever the resistor values");
    }
    // Of the ridge, the pair with the largest output span.
    auto span_of = [&](const std::vector<double>& vals) {
        const Circuit c = sized_circuit(spec, model, vals);
        return std::abs(output(c, grid.r_ohm.back()) - output(c, grid.r_ohm.front()));
    };
    double best_span = span_of(best);
    for (const std::vector<double>& pair : ridge) {
        if (const double s = span_of(pair); s > best_span) {
            best_span = s;
            best = pair;
        }
    }
    Candidate c = evaluate(spec, grid, model, sized_circuit(spec, model, best));
    c.ridge = ridge.size() > 1;
    return c;
}

InnerBest best_second(const SizingSpec& spec, const Grid& grid, const Thermistor& model, double first_ohm) {
    if (free_resistors(spec.base.topology).size() != 2) {
        throw std::logic_error("best_second needs a topology with two free resistors");
    }
    const double lo = std::log(spec.range_lo_ohm);
    const double hi = std::log(spec.range_hi_ohm);
    double fv = INFINITY;
    const double v = minimize_1d(
        [&](std::size_t, double x) {
            return objective(spec, grid, sized_circuit(spec, model, {first_ohm, std::exp(x)}));
        },
        lo, hi, 57, 1e-9, fv, 1);
    return {std::exp(v), fv};
}

ObjectiveCurve objective_curve(const SizingSpec& spec, const Grid& grid, const Thermistor& model, double lo_ohm,
                               double hi_ohm, int n, double optimum_ohm) {
    const bool two = free_resistors(spec.base.topology).size() == 2;
    const Constraints& k = spec.constraints;
    const bool constrained = std::isfinite(k.max_power_w) || std::isfinite(k.max_self_heating_k) || k.min_span > 0.0 ||
                             k.min_sensitivity > 0.0;
    n = std::max(2, n);
    ObjectiveCurve curve;
    std::vector<double>& xs = curve.first_ohm;
    xs.reserve(static_cast<std::size_t>(n) + 1);
    for (int i = 0; i < n; ++i) xs.push_back(lo_ohm * std::pow(hi_ohm / lo_ohm, static_cast<double>(i) / (n - 1)));
    // The optimum itself is a point of the curve, so the curve reaches the marker at its minimum.
    if (optimum_ohm > lo_ohm && optimum_ohm < hi_ohm) xs.insert(std::upper_bound(xs.begin(), xs.end(), optimum_ohm), optimum_ohm);
    for (const double x : xs) {
        double v = 0.0;
        bool ok = true;
        if (two) {
            v = best_second(spec, grid, model, x).objective_pct_fsd;
        } else {
            const Circuit c = sized_circuit(spec, model, {x});
            v = objective(spec, grid, c);
            if (constrained) ok = !failed_constraint(spec, evaluate(spec, grid, model, c)).has_value();
        }
        curve.objective_pct_fsd.push_back(std::isfinite(v) ? v : NAN);
        curve.meets.push_back(ok);
    }
    return curve;
}

}  // namespace rtline
