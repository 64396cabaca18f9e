#include "rtline/sizing.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <stdexcept>

#include "rtline/error.hpp"

namespace rtline {

std::vector<std::string> free_resistors(Topology t) {
    switch (t) {
        case Topology::bare: return {};
        case Topology::divider_high:
        case Topology::divider_low: return {"rs"};
        case Topology::shunt: return {"rp"};
        case Topology::shunt_divider: return {"rp", "rs"};
        case Topology::bridge: return {"r1"};
        case Topology::shunt_bridge: return {"rp", "r1"};
    }
    return {};
}

Circuit sized_circuit(const SizingSpec& spec, const Thermistor& model, const std::vector<double>& values) {
    Circuit c = spec.base;
    c.rs = c.rp = c.r1 = c.r2 = c.r3 = 0.0;
    const std::vector<std::string> names = free_resistors(c.topology);
    for (std::size_t i = 0; i < names.size(); ++i) set_resistor(c, names[i], values[i]);
    complete_bridge(c, model, spec.null_at_k);
    return c;
}

namespace {

// True when the output does not change over the span: a full scale of zero, or one at rounding level
// next to the output itself (a current into a divider-high gives I·rs at every temperature, and the
// ends then differ by ~1e-16 of it).
bool unchanging(const std::vector<double>& y) {
    const double fs = full_scale(y);
    const double level = std::max(std::abs(y.front()), std::abs(y.back()));
    return !(fs > 1e-12 * level) || !std::isfinite(fs);
}

}  // namespace

double objective(const SizingSpec& spec, const Grid& grid, const Circuit& c) {
    std::vector<double> y(grid.size());
    for (std::size_t i = 0; i < grid.size(); ++i) y[i] = output(c, grid.r_ohm[i]);
    if (unchanging(y)) return INFINITY;
    return max_nonlinearity_pct_fsd(grid.t_k, y, spec.line);
}

Candidate evaluate(const SizingSpec& spec, const Grid& grid, const Thermistor& model, const Circuit& c) {
    const Analysis a = analyze(grid, model, c, spec.line, spec.dissipation_w_per_k);
    const AnalysisSummary& s = a.summary;
    return {c,
            s.max_nonlinearity_pct_fsd,
            s.max_error_k,
            s.output_span,
            s.sensitivity_min_per_k,
            s.sensitivity_max_per_k,
            s.max_power_w,
            s.max_self_heating_k};
}

// ------------------------------------------------------------------------------- continuous search

namespace {

constexpr double kGolden = 0.38196601125010515;  // 2 − φ

// Golden-section search for a minimum of f on [a, b] to an interval of `tol`.
double golden(const std::function<double(double)>& f, double a, double b, double tol, double& fbest) {
    double x1 = a + kGolden * (b - a);
    double x2 = b - kGolden * (b - a);
    double f1 = f(x1);
    double f2 = f(x2);
    while (b - a > tol) {
        if (f1 <= f2) {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = a + kGolden * (b - a);
            f1 = f(x1);
        } else {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = b - kGolden * (b - a);
            f2 = f(x2);
        }
    }
    if (f1 <= f2) {
        fbest = f1;
        return x1;
    }
    fbest = f2;
    return x2;
}

// Minimum of f over [lo, hi]: a scan of `n` points finds the local minima (the objective can have
// several), the best few are refined by golden section between their neighbours.
double minimize_1d(const std::function<double(double)>& f, double lo, double hi, int n, double tol, double& fbest) {
    std::vector<double> x(static_cast<std::size_t>(n));
    std::vector<double> fx(static_cast<std::size_t>(n));
    for (int i = 0; i < n; ++i) {
        x[static_cast<std::size_t>(i)] = lo + (hi - lo) * i / (n - 1);
        fx[static_cast<std::size_t>(i)] = f(x[static_cast<std::size_t>(i)]);
    }
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
    for (const std::size_t i : minima) {
        const double a = x[i == 0 ? 0 : i - 1];
        const double b = x[std::min(i + 1, x.size() - 1)];
        double fv = INFINITY;
        const double xv = golden(f, a, b, tol, fv);
        if (fv < fbest) {
            fbest = fv;
            best_x = xv;
        }
    }
    return best_x;
}

}  // namespace

namespace {
constexpr double kSearchTol = 1e-9;  // in ln R: 1e-9 relative in the resistor value
}  // namespace

InnerBest best_second(const SizingSpec& spec, const Grid& grid, const Thermistor& model, double first_ohm) {
    if (free_resistors(spec.base.topology).size() != 2) {
        throw std::logic_error("best_second needs a topology with two free resistors");
    }
    const double lo = std::log(spec.range_lo_ohm);
    const double hi = std::log(spec.range_hi_ohm);
    double fv = INFINITY;
    const double v = minimize_1d(
        [&](double x) { return objective(spec, grid, sized_circuit(spec, model, {first_ohm, std::exp(x)})); }, lo, hi,
        57, kSearchTol, fv);
    return {std::exp(v), fv};
}

Candidate optimize_continuous(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    const std::vector<std::string> names = free_resistors(spec.base.topology);
    const double lo = std::log(spec.range_lo_ohm);
    const double hi = std::log(spec.range_hi_ohm);
    const double tol = kSearchTol;
    auto f = [&](const std::vector<double>& v) { return objective(spec, grid, sized_circuit(spec, model, v)); };
    std::vector<double> best;
    double fbest = INFINITY;
    int ridge_points = 0;
    if (names.size() == 1) {
        const double u = minimize_1d([&](double x) { return f({std::exp(x)}); }, lo, hi, 141, tol, fbest);
        best = {std::exp(u)};
    } else if (names.size() == 2) {
        // Nested: for each outer value the best inner value (best_second), then the best outer value.
        auto outer = [&](double u) { return best_second(spec, grid, model, std::exp(u)).objective_pct_fsd; };
        const double u = minimize_1d(outer, lo, hi, 57, tol, fbest);
        best = {std::exp(u), best_second(spec, grid, model, std::exp(u)).second_ohm};
        // A single thermistor in any of these networks gives an output (a + b·R_T)/(c + d·R_T), whose
        // linearity depends on one equivalent resistance (rp∥rs for the shunt-divider): the optimum is a
        // ridge of pairs, not a point. Of the ridge, report the pair with the largest output span.
        auto span_of = [&](const std::vector<double>& vals) {
            const Circuit c = sized_circuit(spec, model, vals);
            return std::abs(output(c, grid.r_ohm.back()) - output(c, grid.r_ohm.front()));
        };
        double best_span = span_of(best);
        constexpr int kRidgeScan = 29;
        for (int i = 0; i < kRidgeScan; ++i) {
            const double first = std::exp(lo + (hi - lo) * i / (kRidgeScan - 1));
            const InnerBest inner = best_second(spec, grid, model, first);
            if (!(inner.objective_pct_fsd <= fbest * (1.0 + 1e-6))) continue;
            ridge_points += 1;
            const std::vector<double> cand = {first, inner.second_ohm};
            if (const double si = span_of(cand); si > best_span) {
                best_span = si;
                best = cand;
            }
        }
    }
    if (!std::isfinite(fbest)) {
        throw InputError("--circuit", std::string(topology_name(spec.base.topology)),
                         "the output does not change over the span with this drive, whatever the resistor values");
    }
    Candidate c = evaluate(spec, grid, model, sized_circuit(spec, model, best));
    c.ridge = ridge_points > 1;
    return c;
}

// ------------------------------------------------------------------------------------ closed forms

ClosedForms closed_forms(const Thermistor& model, const Span& span) {
    ClosedForms cf;
    cf.centre_k = span.centre_k();
    cf.local_b_k = model.local_beta(cf.centre_k);
    cf.local_b = model.kind() != "beta";
    const double r_c = model.resistance(cf.centre_k);
    if (cf.local_b_k > 2.0 * cf.centre_k) {
        cf.inflection_ohm = r_c * (cf.local_b_k - 2.0 * cf.centre_k) / (cf.local_b_k + 2.0 * cf.centre_k);
    }
    const double r1 = model.resistance(span.lo_k);
    const double r2 = r_c;
    const double r3 = model.resistance(span.hi_k);
    const double den = r1 + r3 - 2.0 * r2;
    if (den != 0.0) {
        const double r = (r2 * (r1 + r3) - 2.0 * r1 * r3) / den;
        if (r > 0.0 && std::isfinite(r)) cf.three_point_ohm = r;
    }
    return cf;
}

ClosedForms closed_forms(const Thermistor& model, const Span& span, const Circuit& base) {
    ClosedForms cf = closed_forms(model, span);
    if (!std::isfinite(base.load_ohm)) return cf;
    if (is_bridge(base.topology)) {
        cf.load_ignored = true;
        return cf;
    }
    // Dividers and the shunt: the load makes the network act as the unloaded one with R∥load in the
    // sized resistor's place (divider-low: v = [L/(rs+L)]·R_T/(R_T + rs∥L)), so the value to fit is
    // R = R*·L/(L − R*), and there is none when the load is not above R*.
    const double l = base.load_ohm;
    auto loaded = [l](std::optional<double> r) -> std::optional<double> {
        if (!r || !(l > *r)) return std::nullopt;
        return *r * l / (l - *r);
    };
    cf.inflection_ohm = loaded(cf.inflection_ohm);
    cf.three_point_ohm = loaded(cf.three_point_ohm);
    cf.load_included = true;
    return cf;
}

// ------------------------------------------------------------------------------ standard values

std::string failed_constraint(const SizingSpec& spec, const Candidate& c) {
    const Constraints& k = spec.constraints;
    if (c.output_span < k.min_span) return "--min-span";
    if (c.sensitivity_min_per_k < k.min_sensitivity) return "--min-sensitivity";
    if (std::isfinite(k.max_power_w) && !(c.max_power_w <= k.max_power_w)) return "--max-power";
    if (std::isfinite(k.max_self_heating_k) && !(c.max_self_heating_k <= k.max_self_heating_k)) {
        return "--max-self-heating";
    }
    return "";
}

namespace {

// What the search needs of one combination, computed in one pass without the per-point records.
struct Quick {
    double objective = INFINITY;
    double span = 0.0;
    bool feasible = true;
};

class Searcher {
public:
    Searcher(const SizingSpec& spec, const Grid& grid, const Thermistor& model)
        : spec_(spec), grid_(grid), model_(model), y_(grid.size()) {
        const Constraints& k = spec.constraints;
        need_power_ = std::isfinite(k.max_power_w) || std::isfinite(k.max_self_heating_k);
        need_sensitivity_ = k.min_sensitivity > 0.0;
        for (const char* flag : {"--min-span", "--min-sensitivity", "--max-power", "--max-self-heating"}) {
            removed_.emplace_back(flag, 0);
        }
    }

    Quick assess(const Circuit& c) {
        Quick q;
        double max_power = 0.0;
        for (std::size_t i = 0; i < grid_.size(); ++i) {
            if (need_power_) {
                const OperatingPoint op = operate(c, grid_.r_ohm[i]);
                y_[i] = op.output;
                max_power = std::max(max_power, op.power_w);
            } else {
                y_[i] = output(c, grid_.r_ohm[i]);
            }
        }
        q.span = full_scale(y_);
        if (unchanging(y_)) {
            q.feasible = false;
            return q;
        }
        q.objective = max_nonlinearity_pct_fsd(grid_.t_k, y_, spec_.line);
        const Constraints& k = spec_.constraints;
        auto fail = [&](std::size_t which) {
            ++removed_[which].second;
            q.feasible = false;
        };
        if (q.span < k.min_span) fail(0);
        if (need_sensitivity_) {
            double smin = INFINITY;
            for (std::size_t i = 0; i < grid_.size(); ++i) {
                smin = std::min(smin, sensitivity(c, model_, grid_.t_k[i], grid_.r_ohm[i]));
            }
            if (smin < k.min_sensitivity) fail(1);
        }
        if (std::isfinite(k.max_power_w) && !(max_power <= k.max_power_w)) fail(2);
        if (std::isfinite(k.max_self_heating_k) && !(max_power / spec_.dissipation_w_per_k <= k.max_self_heating_k)) {
            fail(3);
        }
        return q;
    }

    [[nodiscard]] std::vector<std::pair<std::string, std::size_t>> removed() const { return removed_; }

private:
    const SizingSpec& spec_;
    const Grid& grid_;
    const Thermistor& model_;
    std::vector<double> y_;
    bool need_power_ = false;
    bool need_sensitivity_ = false;
    std::vector<std::pair<std::string, std::size_t>> removed_;
};

struct Ranked {
    std::vector<double> values;
    double objective;
    double span;
};

// Nonlinearities equal to 1e-9 relative are a tie (mirror-image pairs such as a shunt-divider's
// (rp, rs) = (a, b) and (b, a) are equal in exact arithmetic but differ by rounding); the larger span wins.
bool better(const Ranked& a, const Ranked& b) {
    if (std::abs(a.objective - b.objective) > 1e-9 * std::max(a.objective, b.objective)) {
        return a.objective < b.objective;
    }
    return a.span > b.span;
}

}  // namespace

StandardSearch search_standard(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    const std::vector<std::string> names = free_resistors(spec.base.topology);
    const std::vector<double> values = series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm);
    Searcher searcher(spec, grid, model);
    StandardSearch result;
    std::vector<Ranked> top;
    auto consider = [&](const std::vector<double>& v) {
        ++result.examined;
        const Quick q = searcher.assess(sized_circuit(spec, model, v));
        if (!q.feasible) return;
        const Ranked r{v, q.objective, q.span};
        if (!top.empty() && top.size() >= spec.top && !better(r, top.back())) return;
        top.insert(std::upper_bound(top.begin(), top.end(), r, better), r);
        if (top.size() > spec.top) top.pop_back();
    };
    if (names.size() == 1) {
        for (const double a : values) consider({a});
    } else if (names.size() == 2) {
        for (const double a : values) {
            for (const double b : values) consider({a, b});
        }
    }
    for (const Ranked& r : top) result.best.push_back(evaluate(spec, grid, model, sized_circuit(spec, model, r.values)));
    result.removed = searcher.removed();
    return result;
}

std::vector<Candidate> tradeoff(const SizingSpec& spec, const Grid& grid, const Thermistor& model) {
    const std::vector<double> values = series_values(spec.series, spec.range_lo_ohm, spec.range_hi_ohm);
    Searcher searcher(spec, grid, model);
    std::vector<Ranked> all;
    for (const double v : values) {
        const Quick q = searcher.assess(sized_circuit(spec, model, {v}));
        if (q.feasible) all.push_back({{v}, q.objective, q.span});
    }
    std::sort(all.begin(), all.end(), [](const Ranked& a, const Ranked& b) {
        return a.span != b.span ? a.span > b.span : a.objective < b.objective;
    });
    std::vector<Candidate> front;
    double best = INFINITY;
    for (const Ranked& r : all) {
        if (r.objective < best * (1.0 - 1e-9)) {  // strictly better, beyond rounding (see better())
            best = r.objective;
            front.push_back(evaluate(spec, grid, model, sized_circuit(spec, model, r.values)));
        }
    }
    return front;
}

}  // namespace rtline
