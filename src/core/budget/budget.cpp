#include "rtline/budget.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <thread>

#include "budget/budget_channel.hpp"
#include "rtline/error.hpp"

namespace rtline {

using namespace budget_detail;

std::string_view distribution_name(Distribution d) { return d == Distribution::normal ? "normal" : "uniform"; }

Distribution parse_distribution(std::string_view text, std::string_view field) {
    if (text == "normal") return Distribution::normal;
    if (text == "uniform") return Distribution::uniform;
    throw InputError(std::string(field), std::string(text), "unknown distribution; choose normal or uniform");
}

std::string_view reading_name(Reading r) { return r == Reading::model ? "model" : "line"; }

Reading parse_reading(std::string_view text, std::string_view field) {
    if (text == "model") return Reading::model;
    if (text == "line") return Reading::line;
    throw InputError(std::string(field), std::string(text), "unknown reading; choose model or line");
}

double Converter::lsb() const { return bits > 0 ? full_scale / std::ldexp(1.0, bits) : 0.0; }

double tolerance_reference_k(const Thermistor& model) {
    if (const auto* b = std::get_if<BetaModel>(&model.model())) return b->t0_k;
    return k25CelsiusK;
}

double perturbed_resistance(const Thermistor& model, double t_k, double dr, double db) {
    const double r = model.resistance(t_k);
    const double r0 = model.resistance(tolerance_reference_k(model));
    return r * (1.0 + dr) * std::exp(db * std::log(r / r0));
}

namespace {

std::string pct(double fraction) { return describe(100.0 * fraction); }

void check_tolerance(double t, const char* flag) {
    if (!std::isfinite(t) || t < 0.0 || t >= 1.0) {
        throw InputError(flag, pct(t), "a tolerance must be at least 0 and below 100 (percent)");
    }
}

}  // namespace

std::string reading_unit(const Circuit& circuit, const BudgetSpec& spec) {
    if (circuit.excitation.drive == Drive::ratiometric) return gives_resistance(circuit.topology) ? "ohm" : "V/V";
    return spec.ratiometric ? "V/V" : "V";
}

void validate(const BudgetSpec& s, const Circuit& c) {
    check_tolerance(s.tolerance.r25, "--r25-tol");
    check_tolerance(s.tolerance.beta, "--beta-tol");
    check_tolerance(s.tolerance.resistors, "--resistor-tol");
    check_tolerance(s.tolerance.excitation, "--excitation-tol");
    const Drive drive = c.excitation.drive;
    if (drive == Drive::ratiometric && !s.ratiometric) {
        throw InputError("--adc-ref", describe(s.adc.full_scale) + " V",
                         "a fixed reference needs a drive; give --excitation V or --current A");
    }
    if (drive == Drive::current && s.ratiometric) {
        throw InputError("--adc-ref", "excitation",
                         "a current drive has no excitation voltage to be ratiometric to; give the reference in volts");
    }
    if (s.tolerance.excitation > 0.0 && !reads_volts(c, s)) {
        throw InputError("--excitation-tol", pct(s.tolerance.excitation),
                         "applies only to a reading in volts (a drive read against a fixed --adc-ref); "
                         "a ratiometric reading cancels the excitation");
    }
    const std::string unit = reading_unit(c, s);
    if (s.adc.bits < 0 || s.adc.bits > 24) {
        throw InputError("--adc-bits", std::to_string(s.adc.bits), "a converter has 1 to 24 bits");
    }
    if (!std::isfinite(s.adc.error_lsb) || s.adc.error_lsb < 0.0) {
        throw InputError("--adc-error", describe(s.adc.error_lsb), "the converter error must be at least 0 LSB");
    }
    if (s.adc.error_lsb > 0.0 && s.adc.bits == 0) {
        throw InputError("--adc-error", describe(s.adc.error_lsb), "needs --adc-bits (an LSB needs a resolution)");
    }
    if (!std::isfinite(s.adc.full_scale) || s.adc.full_scale <= 0.0) {
        throw InputError("--adc-ref", describe(s.adc.full_scale) + " V", "the reference must be a positive voltage");
    }
    if (s.ratiometric && s.adc.full_scale != 1.0) {
        throw InputError("--adc-ref", describe(s.adc.full_scale), "a ratiometric reading has a full scale of 1 V/V");
    }
    if (s.adc.bits > 0 && unit == "ohm") {
        throw InputError("--adc-bits", std::to_string(s.adc.bits),
                         "the " + std::string(topology_name(c.topology)) +
                             " circuit's output is a resistance; drive it with --current to read it in volts");
    }
    if (!std::isfinite(s.dissipation_w_per_k) || s.dissipation_w_per_k < 0.0) {
        throw InputError("--dissipation", describe(1e3 * s.dissipation_w_per_k),
                         "the dissipation constant must be positive (mW/K)");
    }
    if (s.dissipation_w_per_k > 0.0 && drive == Drive::ratiometric) {
        throw InputError("--dissipation", describe(1e3 * s.dissipation_w_per_k),
                         "self-heating needs the real drive; give --excitation V (with --adc-ref excitation for a "
                         "ratiometric reading) or --current A");
    }
    if (s.trials > kMaxTrials) {
        throw InputError("--trials", std::to_string(s.trials), "at most " + std::to_string(kMaxTrials) + " trials");
    }
    if (s.threads > kMaxThreads) {
        throw InputError("--threads", std::to_string(s.threads), "at most " + std::to_string(kMaxThreads) + " threads");
    }
}

namespace budget_detail {

void out_of_range(double t_k) {
    throw InputError("--span", format_number(kelvin_to_celsius(t_k)) + " C",
                     "the tolerances carry the reading past the end of the output's range here, so the firmware "
                     "reads no temperature; narrow the span or the tolerances");
}

}  // namespace budget_detail

namespace {

// One varied parameter of the worst case: its slot and the half-width of its range.
struct Dim {
    std::size_t slot;
    double half_width;
};

struct Extremes {
    double lo;
    double hi;
};

// The smallest and largest error at point i over the box of `dims` (every other slot nominal).
// Every corner first; then, from the best corner, a scan of each parameter alone over its range
// (nine points, then golden-section search when the best is inside), repeated while it improves:
// this finds the interior extremes of an error that is not monotonic in a parameter.
class BoxSearch {
public:
    BoxSearch(const Channel& ch, std::size_t i, std::vector<Dim> dims, Adc mode, bool heat)
        : ch_(ch), i_(i), dims_(std::move(dims)), mode_(mode), heat_(heat) {
        std::erase_if(dims_, [](const Dim& d) { return !(d.half_width > 0.0); });
    }

    [[nodiscard]] Extremes run() const {
        Slots s{};
        if (dims_.empty()) {
            const double e = eval(s);
            return {e, e};
        }
        Slots s_hi{};
        Slots s_lo{};
        double hi = -INFINITY;
        double lo = INFINITY;
        const std::size_t corners = std::size_t{1} << dims_.size();
        for (std::size_t mask = 0; mask < corners; ++mask) {
            for (std::size_t j = 0; j < dims_.size(); ++j) {
                s[dims_[j].slot] = ((mask >> j) & 1U) ? dims_[j].half_width : -dims_[j].half_width;
            }
            const double e = eval(s);
            if (e > hi) {
                hi = e;
                s_hi = s;
            }
            if (e < lo) {
                lo = e;
                s_lo = s;
            }
        }
        return {-refine(-1.0, s_lo, -lo), refine(1.0, s_hi, hi)};
    }

private:
    [[nodiscard]] double eval(const Slots& s) const {
        const double e = ch_.error(ch_.trial(s), i_, mode_, s[kAdc], heat_);
        if (!std::isfinite(e)) out_of_range(ch_.t(i_));
        return e;
    }

    // Improves best = sign·error from the parts `s` by coordinate scans; returns the best found.
    [[nodiscard]] double refine(double sign, Slots s, double best) const {
        constexpr int kScan = 8;
        constexpr int kGolden = 48;
        for (int sweep = 0; sweep < 4; ++sweep) {
            bool improved = false;
            for (const Dim& d : dims_) {
                std::array<double, kScan + 1> u{};
                std::array<double, kScan + 1> v{};
                int k_best = 0;
                for (int k = 0; k <= kScan; ++k) {
                    u[k] = d.half_width * (2.0 * k / kScan - 1.0);
                    Slots t = s;
                    t[d.slot] = u[k];
                    v[k] = sign * eval(t);
                    if (v[k] > v[k_best]) k_best = k;
                }
                double u_best = u[k_best];
                double v_best = v[k_best];
                if (k_best > 0 && k_best < kScan) {
                    // Golden-section search for the interior maximum bracketed by the scan.
                    const double r = 0.5 * (std::sqrt(5.0) - 1.0);
                    double a = u[k_best - 1];
                    double b = u[k_best + 1];
                    for (int it = 0; it < kGolden; ++it) {
                        const double c = b - r * (b - a);
                        const double e = a + r * (b - a);
                        Slots tc = s;
                        Slots te = s;
                        tc[d.slot] = c;
                        te[d.slot] = e;
                        const double vc = sign * eval(tc);
                        const double ve = sign * eval(te);
                        if (vc > v_best) {
                            v_best = vc;
                            u_best = c;
                        }
                        if (ve > v_best) {
                            v_best = ve;
                            u_best = e;
                        }
                        if (vc > ve) {
                            b = e;
                        } else {
                            a = c;
                        }
                    }
                }
                if (v_best > best + 1e-13) {
                    best = v_best;
                    s[d.slot] = u_best;
                    improved = true;
                }
            }
            if (!improved) break;
        }
        return best;
    }

    const Channel& ch_;
    std::size_t i_;
    std::vector<Dim> dims_;
    Adc mode_;
    bool heat_;
};

// Rounding leaves about 1e−13 K where an error is zero in exact arithmetic (the model reading with
// nominal parts, the line reading at the span's ends).
double clean(double e_k) { return std::abs(e_k) < 1e-12 ? 0.0 : e_k; }

// Worst case, nominal error, the split by cause and the resolution at point i.
BudgetPoint point_bounds(const Channel& ch, const BudgetSpec& spec, std::size_t i) {
    const Tolerances& tol = spec.tolerance;
    const bool adc = ch.lsb() > 0.0;
    const double q = (0.5 + spec.adc.error_lsb) * ch.lsb();  // the converter's bound, reading units
    std::vector<Dim> resistors;
    for (std::size_t k = 0; k < ch.resistors(); ++k) resistors.push_back({kResistor0 + k, tol.resistors});
    const Dim r25{kR25, tol.r25};
    const Dim beta{kBeta, tol.beta};
    const Dim excitation{kExcitation, ch.volts() ? tol.excitation : 0.0};
    const Dim converter{kAdc, q};

    std::vector<Dim> all = resistors;
    all.insert(all.end(), {r25, beta, excitation, converter});

    BudgetPoint p;
    p.t_k = ch.t(i);
    const Extremes whole = BoxSearch(ch, i, all, adc ? Adc::offset : Adc::none, ch.heats()).run();
    p.worst_case_k = clean(std::max(std::abs(whole.lo), std::abs(whole.hi)));
    p.nominal_error_k = clean(ch.error(ch.nominal(), i, Adc::none, 0.0, ch.heats()));

    // Each cause alone against the baseline: nominal parts, no converter, no self-heating.
    const double e0 = clean(ch.error(ch.nominal(), i, Adc::none, 0.0, false));
    auto alone = [&](std::vector<Dim> dims, Adc mode) {
        const Extremes x = BoxSearch(ch, i, std::move(dims), mode, false).run();
        return clean(std::max({0.0, x.hi - e0, e0 - x.lo}));
    };
    BudgetComponents& c = p.components;
    c.nonlinearity_k = spec.reading == Reading::line ? std::abs(e0) : NAN;
    c.r25_k = alone({r25}, Adc::none);
    c.beta_k = alone({beta}, Adc::none);
    c.resistors_k = resistors.empty() ? NAN : alone(resistors, Adc::none);
    c.excitation_k = ch.volts() ? alone({excitation}, Adc::none) : NAN;
    c.adc_k = adc ? alone({converter}, Adc::offset) : NAN;
    c.self_heating_k = ch.heats() ? clean(std::abs(ch.error(ch.nominal(), i, Adc::none, 0.0, true) - e0)) : NAN;
    p.resolution_k_per_lsb = adc ? ch.lsb() / ch.sensitivity(i) : NAN;
    return p;
}

}  // namespace

Budget compute_budget(const Grid& grid, const Thermistor& model, const Circuit& circuit, const BudgetSpec& spec) {
    validate(spec, circuit);
    if (grid.size() > kMaxBudgetPoints) {
        throw InputError("--step", std::to_string(grid.size()) + " points",
                         "a budget takes at most " + std::to_string(kMaxBudgetPoints) + " temperatures");
    }
    if (spec.trials * grid.size() > kMaxSamples) {
        throw InputError("--trials", std::to_string(spec.trials),
                         "with " + std::to_string(grid.size()) + " temperatures that is more than " +
                             std::to_string(kMaxSamples) + " samples; use fewer trials or a larger --step");
    }
    const Channel ch(grid, model, circuit, spec);
    if (spec.adc.bits > 0 && ch.largest_reading() > spec.adc.full_scale) {
        throw InputError("--adc-ref", describe(spec.adc.full_scale) + (spec.ratiometric ? "" : " V"),
                         "the output reaches " + describe(ch.largest_reading()) + " " + reading_unit(circuit, spec) +
                             ", beyond the converter's full scale");
    }
    if (ch.heats()) {
        for (std::size_t i = 0; i < grid.size(); ++i) {
            const double rise_k = operate(circuit, grid.r_ohm[i]).power_w / spec.dissipation_w_per_k;
            if (rise_k > kMaxSelfHeatingK) {
                throw InputError("--dissipation", describe(1e3 * spec.dissipation_w_per_k),
                                 "the thermistor self-heats by " + format_number(rise_k, 3) + " K at " +
                                     format_number(kelvin_to_celsius(grid.t_k[i])) +
                                     " C; a budget takes a rise up to " + format_number(kMaxSelfHeatingK) +
                                     " K (lower the drive)");
            }
        }
    }
    const unsigned threads = spec.threads > 0 ? spec.threads : std::max(1U, std::thread::hardware_concurrency());

    Budget b;
    b.line = ch.line();
    b.lsb = ch.lsb();
    b.points.resize(ch.size());
    parallel_for(ch.size(), threads, [&](std::size_t i, unsigned) { b.points[i] = point_bounds(ch, spec, i); });
    if (spec.trials > 0) {
        const std::vector<McStats> mc = monte_carlo(ch, spec, threads);
        for (std::size_t i = 0; i < ch.size(); ++i) b.points[i].mc = mc[i];
    } else {
        for (BudgetPoint& p : b.points) p.mc = {NAN, NAN, NAN, NAN, NAN};
    }

    BudgetSummary& s = b.summary;
    s.p99_7_k = NAN;
    s.p99_7_at_t_k = NAN;
    for (std::size_t i = 0; i < b.points.size(); ++i) {
        const BudgetPoint& p = b.points[i];
        if (i == 0 || p.worst_case_k > s.worst_case_k) {
            s.worst_case_k = p.worst_case_k;
            s.at_t_k = p.t_k;
        }
        if (spec.trials > 0 && (i == 0 || p.mc.p99_7_k > s.p99_7_k)) {
            s.p99_7_k = p.mc.p99_7_k;
            s.p99_7_at_t_k = p.t_k;
        }
    }
    return b;
}

}  // namespace rtline
