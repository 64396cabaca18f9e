#include "rtline/budget.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <thread>

#include "budget/budget_channel.hpp"
#include "golden.hpp"
#include "parallel.hpp"
#include "rtline/error.hpp"

namespace rtline {

using namespace budget_detail;

std::string_view distribution_name(Distribution d) {
    switch (d) {
        case Distribution::normal: return "normal";
        case Distribution::normal_truncated: return "normal-truncated";
        case Distribution::uniform: break;
    }
    return "uniform";
}

Distribution parse_distribution(std::string_view text, std::string_view field) {
    if (text == "normal") return Distribution::normal;
    if (text == "normal-truncated") return Distribution::normal_truncated;
    if (text == "uniform") return Distribution::uniform;
    throw InputError(std::string(field), std::string(text),
                     "unknown distribution; choose normal, normal-truncated or uniform");
}

namespace {

struct CauseName {
    std::string_view key;
    std::string_view label;
};

constexpr std::array<CauseName, kCauses> kCauseNames = {{{"nonlinearity", "nonlinearity"},
                                                         {"model_error", "model error"},
                                                         {"r25", "R25"},
                                                         {"beta", "B-value"},
                                                         {"thermistor_dt", "thermistor dT"},
                                                         {"drift", "thermistor drift"},
                                                         {"resistors", "resistors"},
                                                         {"resistor_drift", "resistor TC"},
                                                         {"lead", "leads"},
                                                         {"excitation", "excitation"},
                                                         {"amp_gain", "amp gain"},
                                                         {"amp_offset", "amp offset"},
                                                         {"amp_offset_drift", "amp offset drift"},
                                                         {"amp_bias", "amp bias"},
                                                         {"amp_offset_current", "amp offset current"},
                                                         {"reference", "reference"},
                                                         {"adc_offset", "ADC offset"},
                                                         {"adc_gain", "ADC gain"},
                                                         {"adc_inl", "ADC INL"},
                                                         {"quantization", "quantization"},
                                                         {"self_heating", "self-heating"}}};

}  // namespace

std::string_view cause_key(Cause c) { return kCauseNames[static_cast<std::size_t>(c)].key; }
std::string_view cause_label(Cause c) { return kCauseNames[static_cast<std::size_t>(c)].label; }

std::string_view reading_name(Reading r) { return r == Reading::model ? "model" : "line"; }

Reading parse_reading(std::string_view text, std::string_view field) {
    if (text == "model") return Reading::model;
    if (text == "line") return Reading::line;
    throw InputError(std::string(field), std::string(text), "unknown reading; choose model or line");
}

double Converter::lsb() const { return bits > 0 ? full_scale / adc_steps(bits, transfer) : 0.0; }

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

void check_tolerance(double t, Input flag) {
    if (!std::isfinite(t) || t < 0.0 || t >= 1.0) {
        throw InputError(flag, pct(t), "a tolerance must be at least 0 and below 100 (percent)");
    }
}

// A coefficient in 1/K, given in ppm/K; at most 0.1 %/K (1000 ppm/K) keeps every factor positive
// over any board span a budget takes.
void check_coefficient(double c, Input flag) {
    if (!std::isfinite(c) || c < 0.0 || c > 1e-3) {
        throw InputError(flag, describe(1e6 * c), "a temperature coefficient must be 0 to 1000 ppm/K");
    }
}

// A bound of at least 0 in `unit`, finite.
void check_bound(double v, Input flag, const char* unit) {
    if (!std::isfinite(v) || v < 0.0) throw InputError(flag, describe(v), std::string("give 0 or more ") + unit);
}

void validate_amplifier(const BudgetSpec& s, const Circuit& c) {
    const AmplifierErrors& e = s.amplifier_errors;
    check_tolerance(e.gain_error, Input::amp_gain_tol);
    check_bound(e.offset_v, Input::amp_offset, "V");
    check_bound(e.offset_drift_v_per_k, Input::amp_offset_drift, "V/K");
    check_bound(e.bias_current_a, Input::amp_bias, "A");
    check_bound(e.offset_current_a, Input::amp_offset_current, "A");
    const std::array<std::pair<double, Input>, 5> terms = {{{e.gain_error, Input::amp_gain_tol},
                                                            {e.offset_v, Input::amp_offset},
                                                            {e.offset_drift_v_per_k, Input::amp_offset_drift},
                                                            {e.bias_current_a, Input::amp_bias},
                                                            {e.offset_current_a, Input::amp_offset_current}}};
    for (const auto& term : terms) {
        if (term.first > 0.0 && !s.amplifier) {
            throw InputError(term.second, describe(term.first), "needs an amplifier: give {gain} or {output_range}");
        }
    }
    if (s.amplifier) validate_front_end(c, s.amplifier);
    // The voltage terms become a fraction of the reference only against a voltage that is known.
    if (c.excitation.drive == Drive::ratiometric) {
        for (std::size_t k = 1; k < terms.size(); ++k) {
            if (terms[k].first > 0.0) {
                throw InputError(terms[k].second, describe(terms[k].first),
                                 "is in volts, and a ratiometric reading is a fraction of the excitation; give the "
                                 "excitation in volts with {excitation}");
            }
        }
    }
}

void check_range(double lo_k, double hi_k, Input flag) {
    if (!std::isfinite(lo_k) || !std::isfinite(hi_k) || lo_k > hi_k || lo_k < 173.15 || hi_k > 473.15) {
        throw InputError(flag, format_span(Span{lo_k, hi_k}), "give LO:HI in degC with LO <= HI, within -100:200");
    }
}

}  // namespace

std::string reading_unit(const Circuit& circuit, const BudgetSpec& spec) {
    if (circuit.excitation.drive == Drive::ratiometric) return gives_resistance(circuit.topology) ? "ohm" : "V/V";
    return spec.ratiometric ? "V/V" : "V";
}

void validate(const BudgetSpec& s, const Circuit& c) {
    check_tolerance(s.tolerance.r25, Input::tol_r0);
    check_tolerance(s.tolerance.beta, Input::tol_b);
    check_tolerance(s.tolerance.resistors, Input::tol_resistors);
    check_tolerance(s.tolerance.excitation, Input::tol_excitation);
    check_tolerance(s.tolerance.thermistor_drift, Input::drift);
    check_tolerance(s.tolerance.lead, Input::tol_lead);
    check_tolerance(s.tolerance.reference, Input::tol_reference);
    check_coefficient(s.tolerance.resistor_tc_per_k, Input::resistor_tc);
    check_coefficient(s.tolerance.reference_tc_per_k, Input::reference_tc);
    if (!s.board.sensed) check_range(s.board.lo_k, s.board.hi_k, Input::board_temperature);
    check_range(s.cable_lo_k, s.cable_hi_k, Input::cable_temperature);
    if (!std::isfinite(s.tolerance.thermistor_dt_k) || s.tolerance.thermistor_dt_k < 0.0 ||
        s.tolerance.thermistor_dt_k > 5.0) {
        throw InputError(Input::tol_dt, describe(s.tolerance.thermistor_dt_k), "give 0 to 5 K");
    }
    if ((s.tolerance.lead > 0.0 || s.cable_lo_k != kCopperReferenceK || s.cable_hi_k != kCopperReferenceK) &&
        !(c.lead_ohm > 0.0)) {
        throw InputError(s.tolerance.lead > 0.0 ? Input::tol_lead : Input::cable_temperature,
                         s.tolerance.lead > 0.0 ? pct(s.tolerance.lead) : format_span(Span{s.cable_lo_k, s.cable_hi_k}),
                         "applies to lead wires; give their loop resistance with {lead}");
    }
    if (!s.lead_compensated && !(c.lead_ohm > 0.0)) {
        throw InputError(Input::lead_compensation, "no", "applies to lead wires; give their loop resistance with {lead}");
    }
    const bool converter_terms = s.adc.offset_lsb != 0.0 || s.adc.gain != 0.0 || s.adc.inl_lsb != 0.0;
    if (converter_terms && s.adc.bits == 0) {
        throw InputError(s.adc.offset_lsb != 0.0 ? Input::adc_offset
                         : s.adc.gain != 0.0     ? Input::adc_gain
                                                 : Input::adc_inl,
                         "", "needs {adc_bits} (a converter)");
    }
    for (const auto& [v, flag] : {std::pair{s.adc.offset_lsb, Input::adc_offset}, std::pair{s.adc.inl_lsb, Input::adc_inl}}) {
        if (!std::isfinite(v) || v < 0.0 || v > 1e6) throw InputError(flag, describe(v), "give 0 or more LSB");
    }
    check_tolerance(s.adc.gain, Input::adc_gain);
    const Drive drive = c.excitation.drive;
    if (drive == Drive::ratiometric && !s.ratiometric) {
        throw InputError(Input::reference, describe(s.adc.full_scale) + " V",
                         "a fixed reference needs a drive; give {excitation} V or {current} A");
    }
    if (drive == Drive::current && s.ratiometric) {
        throw InputError(Input::reference, "excitation",
                         "a current drive has no excitation voltage to be ratiometric to; give the reference in volts");
    }
    if (s.tolerance.excitation > 0.0 && !reads_volts(c, s)) {
        throw InputError(Input::tol_excitation, pct(s.tolerance.excitation),
                         "applies only to a reading in volts (a drive read against a fixed {reference}); "
                         "a ratiometric reading cancels the excitation");
    }
    const std::string unit = reading_unit(c, s);
    if (s.adc.bits < 0 || s.adc.bits > 24) {
        throw InputError(Input::adc_bits, std::to_string(s.adc.bits), "a converter has 1 to 24 bits");
    }
    if (!std::isfinite(s.adc.error_lsb) || s.adc.error_lsb < 0.0) {
        throw InputError(Input::adc_error, describe(s.adc.error_lsb), "the converter error must be at least 0 LSB");
    }
    if (s.adc.error_lsb > 0.0 && s.adc.bits == 0) {
        throw InputError(Input::adc_error, describe(s.adc.error_lsb), "needs {adc_bits} (an LSB needs a resolution)");
    }
    if (!std::isfinite(s.adc.full_scale) || s.adc.full_scale <= 0.0) {
        throw InputError(Input::reference, describe(s.adc.full_scale) + " V", "the reference must be a positive voltage");
    }
    if (s.ratiometric && s.adc.full_scale != 1.0) {
        throw InputError(Input::reference, describe(s.adc.full_scale), "a ratiometric reading has a full scale of 1 V/V");
    }
    if (s.adc.bits > 0 && unit == "ohm") {
        throw InputError(Input::adc_bits, std::to_string(s.adc.bits),
                         "the " + std::string(topology_name(c.topology)) +
                             " circuit's output is a resistance; drive it with {current} to read it in volts");
    }
    if (!std::isfinite(s.dissipation_w_per_k) || s.dissipation_w_per_k < 0.0) {
        throw InputError(Input::dissipation, describe(1e3 * s.dissipation_w_per_k),
                         "the dissipation constant must be positive (mW/K)");
    }
    if (s.dissipation_w_per_k > 0.0 && drive == Drive::ratiometric) {
        throw InputError(Input::dissipation, describe(1e3 * s.dissipation_w_per_k),
                         "self-heating needs the real drive; give {excitation} V (with {reference} excitation for a "
                         "ratiometric reading) or {current} A");
    }
    validate_amplifier(s, c);
    if (s.trials > kMaxTrials) {
        throw InputError(Input::trials, std::to_string(s.trials), "at most " + std::to_string(kMaxTrials) + " trials");
    }
    if (s.threads > kMaxThreads) {
        throw InputError(Input::threads, std::to_string(s.threads), "at most " + std::to_string(kMaxThreads) + " threads");
    }
}

namespace budget_detail {

void out_of_range(double t_k) {
    throw InputError(Input::span, format_number(kelvin_to_celsius(t_k)) + " C",
                     "the tolerances carry the reading past the end of the output's range here, so the firmware "
                     "reads no temperature; narrow the span or the tolerances");
}

}  // namespace budget_detail

namespace {

// One varied parameter of the worst case: its slot and its range.
struct Dim {
    std::size_t slot;
    double lo;
    double hi;
};

// The symmetric range ±half.
Dim sym(std::size_t slot, double half) { return {slot, -half, half}; }

// The range of the factor (1 ± a)(1 ± b) − 1 over both signs (both factors positive).
Dim product(std::size_t slot, double a, double b) {
    return {slot, (1.0 - a) * (1.0 - b) - 1.0, (1.0 + a) * (1.0 + b) - 1.0};
}

struct Extremes {
    double lo;
    double hi;
};

// The smallest and largest error at point i over the box of `dims` (every other slot nominal, or as
// in `base`). Every corner first; then, from the best corner, a scan of each parameter alone over its
// range (nine points, then golden-section search when the best is inside), repeated while it
// improves: this finds the interior extremes of an error that is not monotonic in a parameter.
class BoxSearch {
public:
    BoxSearch(const budget_detail::Channel& ch, std::size_t i, std::vector<Dim> dims, Adc mode, bool solve,
              Slots base = Slots{})
        : ch_(ch), i_(i), dims_(std::move(dims)), mode_(mode), solve_(solve), base_(base) {
        // A range of one value (a cable at one temperature other than copper's 20 °C) is fixed there.
        for (const Dim& d : dims_) {
            if (d.hi == d.lo) base_[d.slot] = d.lo;
        }
        std::erase_if(dims_, [](const Dim& d) { return !(d.hi > d.lo); });
    }

    [[nodiscard]] Extremes run() const {
        Slots s = base_;
        if (dims_.empty()) {
            const double e = eval(s);
            return {e, e};
        }
        Slots s_hi = s;
        Slots s_lo = s;
        double hi = -INFINITY;
        double lo = INFINITY;
        const std::size_t corners = std::size_t{1} << dims_.size();
        for (std::size_t mask = 0; mask < corners; ++mask) {
            for (std::size_t j = 0; j < dims_.size(); ++j) {
                s[dims_[j].slot] = ((mask >> j) & 1U) ? dims_[j].hi : dims_[j].lo;
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
        const double e = ch_.error(ch_.trial(s), i_, mode_, s[kAdc], solve_);
        if (!std::isfinite(e)) out_of_range(ch_.t(i_));
        return e;
    }

    // Improves best = sign·error from the parts `s` by coordinate scans; returns the best found.
    [[nodiscard]] double refine(double sign, Slots s, double best) const {
        constexpr int kScan = 8;
        constexpr double kGoldenTolerance = 1e-10;
        for (int sweep = 0; sweep < 4; ++sweep) {
            bool improved = false;
            for (const Dim& d : dims_) {
                std::array<double, kScan + 1> u{};
                std::array<double, kScan + 1> v{};
                int k_best = 0;
                for (int k = 0; k <= kScan; ++k) {
                    u[k] = d.lo + (d.hi - d.lo) * k / kScan;
                    Slots t = s;
                    t[d.slot] = u[k];
                    v[k] = sign * eval(t);
                    if (v[k] > v[k_best]) k_best = k;
                }
                double u_best = u[k_best];
                double v_best = v[k_best];
                if (k_best > 0 && k_best < kScan) {
                    // The interior maximum bracketed by the scan, to 1e-10 of the bracket.
                    const double a = u[k_best - 1];
                    const double b = u[k_best + 1];
                    double f_min = 0.0;
                    const double u_golden = detail::golden_section_min(
                        [&](double x) {
                            Slots t = s;
                            t[d.slot] = x;
                            return -sign * eval(t);
                        },
                        a, b, kGoldenTolerance * (b - a), f_min);
                    if (-f_min > v_best) {
                        v_best = -f_min;
                        u_best = u_golden;
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

    const budget_detail::Channel& ch_;
    std::size_t i_;
    std::vector<Dim> dims_;
    Adc mode_;
    bool solve_;
    Slots base_;
};

// Rounding leaves about 1e−13 K where an error is zero in exact arithmetic (the model reading with
// nominal parts, the line reading at the span's ends).
double clean(double e_k) { return std::abs(e_k) < 1e-12 ? 0.0 : e_k; }

// The largest |board temperature − from_k| at sensed temperature t_k.
double board_excursion_k(const BoardTemperature& b, double t_k, double from_k = kCoefficientReferenceK) {
    if (b.sensed) return std::abs(t_k - from_k);
    return std::max(std::abs(b.lo_k - from_k), std::abs(b.hi_k - from_k));
}

// Worst case, nominal error, the split by cause and the resolution at point i. `plain` is the channel
// with the part following the model (the same as `ch` without a model error).
BudgetPoint point_bounds(const budget_detail::Channel& ch, const budget_detail::Channel& plain, const BudgetSpec& spec,
                         std::size_t i) {
    const Tolerances& tol = spec.tolerance;
    const bool adc = ch.lsb() > 0.0;
    const double lsb = ch.lsb();
    const double board = board_excursion_k(spec.board, ch.t(i));
    // The board's range enters through its largest excursion: for each board temperature the
    // coefficients' box is symmetric, so the box at the largest excursion holds all the others.
    const double tc = tol.resistor_tc_per_k * board;
    const double ref_tc = tol.reference_tc_per_k * board;
    const Dim lead_dim{kLead, (1.0 - tol.lead) * (1.0 + kCopperAlphaPerK * (spec.cable_lo_k - kCopperReferenceK)) - 1.0,
                       (1.0 + tol.lead) * (1.0 + kCopperAlphaPerK * (spec.cable_hi_k - kCopperReferenceK)) - 1.0};
    std::vector<Dim> resistors;
    std::vector<Dim> resistor_tol;
    std::vector<Dim> resistor_tc;
    for (std::size_t k = 0; k < ch.resistors(); ++k) {
        resistors.push_back(product(kResistor0 + k, tol.resistors, tc));
        resistor_tol.push_back(sym(kResistor0 + k, tol.resistors));
        resistor_tc.push_back(sym(kResistor0 + k, tc));
    }
    const double converter_lsb = 0.5 + spec.adc.error_lsb + spec.adc.offset_lsb + spec.adc.inl_lsb;

    std::vector<Dim> all = resistors;
    all.insert(all.end(), {sym(kR25, tol.r25), sym(kBeta, tol.beta), sym(kDrift, tol.thermistor_drift),
                           sym(kShift, tol.thermistor_dt_k), sym(kExcitation, ch.volts() ? tol.excitation : 0.0),
                           product(kReference, tol.reference, ref_tc)});
    if (ch.has_lead()) all.push_back(lead_dim);
    // The amplifier's input offset and its drift both add to the input: one dimension of their summed
    // bound (as a resistor's tolerance and coefficient make one factor).
    const AmplifierErrors& amp = spec.amplifier_errors;
    const double amp_drift_v = amp.offset_drift_v_per_k * board_excursion_k(spec.board, ch.t(i), amp.reference_t_k);
    if (ch.amplified()) {
        all.insert(all.end(), {sym(kAmpGain, amp.gain_error), sym(kAmpOffset, amp.offset_v + amp_drift_v),
                               sym(kAmpBias, amp.bias_current_a), sym(kAmpOffsetCurrent, amp.offset_current_a)});
    }
    if (adc) all.insert(all.end(), {sym(kGain, spec.adc.gain), sym(kAdc, converter_lsb * lsb)});

    BudgetPoint p;
    p.t_k = ch.t(i);
    const Extremes whole = BoxSearch(ch, i, all, adc ? Adc::offset : Adc::none, ch.solves()).run();
    p.worst_low_k = clean(whole.lo);
    p.worst_high_k = clean(whole.hi);
    p.worst_case_k = std::max(std::abs(p.worst_low_k), std::abs(p.worst_high_k));
    p.nominal_error_k = clean(ch.error(ch.nominal(), i, Adc::none, 0.0, ch.heats()));

    // Each cause alone against the baseline: nominal parts, no converter, no self-heating.
    const double e0 = clean(ch.error(ch.nominal(), i, Adc::none, 0.0, false));
    auto alone = [&](std::vector<Dim> dims, Adc mode, bool solve = false, double from = NAN) {
        const double ref = std::isnan(from) ? e0 : from;
        const Extremes x = BoxSearch(ch, i, std::move(dims), mode, solve).run();
        return clean(std::max({0.0, x.hi - ref, ref - x.lo}));
    };
    BudgetComponents& c = p.components;
    c.k.fill(NAN);
    const double plain_e0 = clean(plain.error(plain.nominal(), i, Adc::none, 0.0, false));
    if (spec.reading == Reading::line) c[Cause::nonlinearity] = std::abs(plain_e0);
    if (spec.part) c[Cause::model_error] = clean(std::abs(e0 - plain_e0));
    c[Cause::r25] = alone({sym(kR25, tol.r25)}, Adc::none);
    c[Cause::beta] = alone({sym(kBeta, tol.beta)}, Adc::none);
    if (tol.thermistor_dt_k > 0.0) c[Cause::thermistor_dt] = alone({sym(kShift, tol.thermistor_dt_k)}, Adc::none, true);
    if (tol.thermistor_drift > 0.0) c[Cause::drift] = alone({sym(kDrift, tol.thermistor_drift)}, Adc::none);
    if (!resistors.empty()) c[Cause::resistors] = alone(resistor_tol, Adc::none);
    if (!resistors.empty() && tol.resistor_tc_per_k > 0.0) c[Cause::resistor_drift] = alone(resistor_tc, Adc::none);
    if (ch.has_lead()) {
        // Uncompensated, the whole lead counts: its error against the circuit without wires.
        Slots none{};
        none[kLead] = -1.0;
        const double from = spec.lead_compensated ? e0 : clean(ch.error(ch.trial(none), i, Adc::none, 0.0, false));
        c[Cause::lead] = alone({lead_dim}, Adc::none, false, from);
    }
    if (ch.volts()) c[Cause::excitation] = alone({sym(kExcitation, tol.excitation)}, Adc::none);
    if (ch.amplified()) {
        if (amp.gain_error > 0.0) c[Cause::amp_gain] = alone({sym(kAmpGain, amp.gain_error)}, Adc::none);
        if (amp.offset_v > 0.0) c[Cause::amp_offset] = alone({sym(kAmpOffset, amp.offset_v)}, Adc::none);
        if (amp.offset_drift_v_per_k > 0.0)
            c[Cause::amp_offset_drift] = alone({sym(kAmpOffset, amp_drift_v)}, Adc::none);
        if (amp.bias_current_a > 0.0) c[Cause::amp_bias] = alone({sym(kAmpBias, amp.bias_current_a)}, Adc::none);
        if (amp.offset_current_a > 0.0) {
            c[Cause::amp_offset_current] = alone({sym(kAmpOffsetCurrent, amp.offset_current_a)}, Adc::none);
        }
    }
    if (tol.reference > 0.0 || tol.reference_tc_per_k > 0.0) {
        // With self-heating on: the ratiometric reading's cancellation leaves only the power's change.
        const double from = clean(ch.error(ch.nominal(), i, Adc::none, 0.0, ch.heats()));
        c[Cause::reference] = alone({product(kReference, tol.reference, ref_tc)}, Adc::none, ch.heats(), from);
    }
    if (adc) {
        if (spec.adc.offset_lsb > 0.0)
            c[Cause::adc_offset] = alone({sym(kAdc, spec.adc.offset_lsb * lsb)}, Adc::offset);
        if (spec.adc.gain > 0.0) c[Cause::adc_gain] = alone({sym(kGain, spec.adc.gain)}, Adc::offset);
        if (spec.adc.inl_lsb > 0.0) c[Cause::adc_inl] = alone({sym(kAdc, spec.adc.inl_lsb * lsb)}, Adc::offset);
        c[Cause::quantization] = alone({sym(kAdc, (0.5 + spec.adc.error_lsb) * lsb)}, Adc::offset);
    }
    if (ch.heats()) c[Cause::self_heating] = clean(std::abs(ch.error(ch.nominal(), i, Adc::none, 0.0, true) - e0));
    p.resolution_k_per_lsb = adc ? lsb / ch.sensitivity(i) : NAN;
    return p;
}

}  // namespace

Budget compute_budget(const Grid& grid, const Thermistor& model, const Circuit& circuit, const BudgetSpec& spec) {
    validate(spec, circuit);
    if (grid.size() > kMaxBudgetPoints) {
        throw InputError(Input::step, std::to_string(grid.size()) + " points",
                         "a budget takes at most " + std::to_string(kMaxBudgetPoints) + " temperatures");
    }
    if (spec.trials * grid.size() > kMaxSamples) {
        throw InputError(Input::trials, std::to_string(spec.trials),
                         "with " + std::to_string(grid.size()) + " temperatures that is more than " +
                             std::to_string(kMaxSamples) + " samples; use fewer trials or a larger {step}");
    }
    const Span span{grid.t_k.front(), grid.t_k.back()};
    if (spec.tolerance.thermistor_dt_k > 0.0 && (span.lo_k < spec.dt_lo_k - 1e-9 || span.hi_k > spec.dt_hi_k + 1e-9)) {
        throw InputError(Input::dt_range, format_span(Span{spec.dt_lo_k, spec.dt_hi_k}),
                         "the thermistor's +-dT holds over this range only, and the span " + format_span(span) +
                             " reaches beyond it; give the range the part is specified over");
    }
    if (spec.part) spec.part->check_span(span, Input::part);
    const budget_detail::Channel ch(grid, model, circuit, spec);
    BudgetSpec plain_spec = spec;
    plain_spec.part.reset();
    plain_spec.trials = 0;  // no Monte Carlo runs on it
    const budget_detail::Channel plain(grid, model, circuit, plain_spec);
    if (spec.adc.bits > 0 && spec.amplifier && ch.smallest_reading() < 0.0) {
        throw InputError(Input::gain, describe(spec.amplifier->gain),
                         "through the amplifier the converter input reaches " + describe(ch.smallest_reading()) + " " +
                             reading_unit(circuit, spec) +
                             ", below the converter's range; change {gain} and {offset} or use {output_range}");
    }
    if (spec.adc.bits > 0 && ch.largest_reading() > spec.adc.full_scale) {
        throw InputError(Input::reference, describe(spec.adc.full_scale) + (spec.ratiometric ? "" : " V"),
                         "the output reaches " + describe(ch.largest_reading()) + " " + reading_unit(circuit, spec) +
                             ", beyond the converter's full scale");
    }
    if (ch.heats()) {
        for (std::size_t i = 0; i < grid.size(); ++i) {
            const double rise_k = operate(circuit, grid.r_ohm[i]).power_w / spec.dissipation_w_per_k;
            if (rise_k > kMaxSelfHeatingK) {
                throw InputError(Input::dissipation, describe(1e3 * spec.dissipation_w_per_k),
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
    detail::parallel_for(ch.size(), std::min<std::size_t>(threads, ch.size()),
                         [&](std::size_t, std::size_t i) { b.points[i] = point_bounds(ch, plain, spec, i); });
    if (spec.trials > 0) {
        const std::vector<McStats> mc = monte_carlo(ch, spec, threads);
        for (std::size_t i = 0; i < ch.size(); ++i) b.points[i].mc = mc[i];
    } else {
        for (BudgetPoint& p : b.points) p.mc = {NAN, NAN, NAN, NAN, NAN, NAN, NAN, NAN, NAN};
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
        if (i == 0 || p.worst_low_k < s.worst_low_k) s.worst_low_k = p.worst_low_k;
        if (i == 0 || p.worst_high_k > s.worst_high_k) s.worst_high_k = p.worst_high_k;
        if (spec.trials > 0 && (i == 0 || p.mc.p99_7_k > s.p99_7_k)) {
            s.p99_7_k = p.mc.p99_7_k;
            s.p99_7_at_t_k = p.t_k;
        }
    }
    return b;
}

}  // namespace rtline
