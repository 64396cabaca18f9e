// The budget's part and converter flags (budget_flags.hpp).
#include "budget_flags.hpp"

#include <charconv>
#include <cmath>
#include <tuple>

#include "common.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

double parse_percent(const std::string& text, const std::string& flag) {
    std::string s = text;
    if (!s.empty() && s.back() == '%') s.pop_back();
    const double v = parse_number(s, flag);
    if (!(v >= 0.0 && v < 100.0))
        throw InputError(flag, text, "a tolerance must be at least 0 and below 100 (percent)");
    return v / 100.0;
}

// A whole number in [lo, hi] (written plainly or as 1e6); throws InputError naming `flag`.
std::uint64_t parse_count(const std::string& text, const std::string& flag, double lo, double hi,
                          const std::string& why) {
    double v = 0.0;
    try {
        v = parse_number(text, flag);
    } catch (const InputError&) {
        throw InputError(flag, text, why);
    }
    if (!(v >= lo && v <= hi) || v != std::floor(v)) throw InputError(flag, text, why);
    return static_cast<std::uint64_t>(v);
}

namespace {

std::uint64_t parse_seed(const std::string& text) {
    std::uint64_t v = 0;
    const char* end = text.data() + text.size();
    const auto [ptr, ec] = std::from_chars(text.data(), end, v);
    if (text.empty() || ec != std::errc() || ptr != end) {
        throw InputError("--seed", text, "the seed must be a whole number from 0 to 18446744073709551615");
    }
    return v;
}

// A number with an optional unit suffix (e.g. "2LSB", "50ppm/K"), at least 0.
double parse_nonnegative(const std::string& text, const std::string& flag, const std::string& suffix) {
    std::string t = text;
    if (t.size() > suffix.size() && t.compare(t.size() - suffix.size(), suffix.size(), suffix) == 0) {
        t.resize(t.size() - suffix.size());
    }
    const double v = parse_number(t, flag);
    if (!(v >= 0.0)) throw InputError(flag, text, "must be 0 or more");
    return v;
}

// A quantity with an SI prefix and an optional unit (e.g. "50u", "50uV"), at least 0.
double parse_bound(const std::string& text, const std::string& flag, const std::string& unit) {
    const double v = parse_quantity(text, flag, unit);
    if (!(v >= 0.0)) throw InputError(flag, text, "must be 0 or more (a bound, +-" + unit + ")");
    return v;
}

// A temperature range LO:HI or a single temperature, °C, as kelvin.
std::pair<double, double> parse_range(const std::string& text, const std::string& flag) {
    if (text.find(':') == std::string::npos) {
        const double t = parse_temperature(text, flag);
        return {t, t};
    }
    const Span sp = parse_span(text, flag);
    return {sp.lo_k, sp.hi_k};
}

}  // namespace

BudgetSpec build_budget_spec(const BudgetFlags& o, const Circuit& circuit) {
    BudgetSpec s;
    const bool dt = !o.dt_tol.empty();
    if (dt && (!o.r25_tol.empty() || !o.beta_tol.empty())) {
        throw InputError(!o.r25_tol.empty() ? "--r25-tol" : "--beta-tol", !o.r25_tol.empty() ? o.r25_tol : o.beta_tol,
                         "--dt-tol already states the thermistor's tolerance; give it one way, not both");
    }
    s.tolerance.r25 = o.r25_tol.empty() ? (dt ? 0.0 : 0.01) : parse_percent(o.r25_tol, "--r25-tol");
    s.tolerance.beta = o.beta_tol.empty() ? (dt ? 0.0 : 0.01) : parse_percent(o.beta_tol, "--beta-tol");
    if (dt) {
        s.tolerance.thermistor_dt_k = parse_nonnegative(o.dt_tol, "--dt-tol", "K");
        if (o.dt_range.empty())
            throw InputError("--dt-range", "", "--dt-tol needs the range it holds over, LO:HI degC");
        std::tie(s.dt_lo_k, s.dt_hi_k) = parse_range(o.dt_range, "--dt-range");
    } else if (!o.dt_range.empty()) {
        throw InputError("--dt-range", o.dt_range, "applies only with --dt-tol");
    }
    if (!o.drift.empty()) s.tolerance.thermistor_drift = parse_percent(o.drift, "--drift");
    if (!o.resistor_tc.empty())
        s.tolerance.resistor_tc_per_k = 1e-6 * parse_nonnegative(o.resistor_tc, "--resistor-tc", "ppm/K");
    if (o.board_temp != "sensed") {
        s.board.sensed = false;
        std::tie(s.board.lo_k, s.board.hi_k) = parse_range(o.board_temp, "--board-temp");
    }
    if (!o.lead_tol.empty()) s.tolerance.lead = parse_percent(o.lead_tol, "--lead-tol");
    if (!o.cable_temp.empty()) std::tie(s.cable_lo_k, s.cable_hi_k) = parse_range(o.cable_temp, "--cable-temp");
    if (o.lead_compensation != "yes" && o.lead_compensation != "no") {
        throw InputError("--lead-compensation", o.lead_compensation,
                         "choose yes (the firmware subtracts --lead) or no");
    }
    s.lead_compensated = o.lead_compensation == "yes";
    if (!o.part_sh.empty() && !o.part_points.empty()) {
        throw InputError("--part-points", o.part_points, "give the part's curve one way: --part-sh or --part-points");
    }
    if (!o.part_sh.empty()) {
        ModelOptions m;
        m.sh = o.part_sh;
        try {
            s.part = build_model(m);
        } catch (const InputError& e) {
            throw InputError("--part-sh", o.part_sh, e.why());
        }
    }
    if (!o.part_points.empty()) {
        ModelOptions m;
        m.points = o.part_points;
        m.model = "table";
        s.part = build_model(m);
    }
    if (!o.adc_offset.empty()) s.adc.offset_lsb = parse_nonnegative(o.adc_offset, "--adc-offset", "LSB");
    if (!o.adc_inl.empty()) s.adc.inl_lsb = parse_nonnegative(o.adc_inl, "--adc-inl", "LSB");
    if (!o.adc_gain.empty()) s.adc.gain = parse_percent(o.adc_gain, "--adc-gain");
    s.adc.transfer = build_adc_transfer(o.adc_transfer);
    if (!o.ref_tol.empty()) s.tolerance.reference = parse_percent(o.ref_tol, "--ref-tol");
    if (!o.ref_tc.empty()) s.tolerance.reference_tc_per_k = 1e-6 * parse_nonnegative(o.ref_tc, "--ref-tc", "ppm/K");
    s.tolerance.resistors = parse_percent(o.resistor_tol, "--resistor-tol");
    s.distribution = parse_distribution(o.distribution, "--distribution");
    s.reading = parse_reading(o.reading, "--reading");

    if (!o.adc_bits.empty()) {
        s.adc.bits = static_cast<int>(parse_count(o.adc_bits, "--adc-bits", 1, 24, "a converter has 1 to 24 bits"));
    }
    ConverterReference ref;
    if (o.adc_ref == "excitation") {
        ref.kind = ConverterReference::Kind::excitation;
    } else if (!o.adc_ref.empty()) {
        ref.kind = ConverterReference::Kind::fixed;
        ref.volts = parse_quantity(o.adc_ref, "--adc-ref", "V");
    }
    try {
        set_converter_reference(s, circuit, ref);
    } catch (const InputError& e) {
        throw e.with_value(o.adc_ref);  // quoted as typed
    }
    s.tolerance.excitation = o.excitation_tol.empty() ? default_excitation_tolerance(s, circuit)
                                                      : parse_percent(o.excitation_tol, "--excitation-tol");
    if (!o.adc_error.empty()) {
        std::string e = o.adc_error;
        if (e.size() > 3 && e.compare(e.size() - 3, 3, "LSB") == 0) e.resize(e.size() - 3);
        s.adc.error_lsb = parse_number(e, "--adc-error");
        if (!(s.adc.error_lsb >= 0.0))
            throw InputError("--adc-error", o.adc_error, "the converter error must be at least 0 LSB");
    }
    if (!o.dissipation.empty()) {
        s.dissipation_w_per_k = 1e-3 * parse_number(o.dissipation, "--dissipation");
        if (!(s.dissipation_w_per_k > 0.0)) {
            throw InputError("--dissipation", o.dissipation, "the dissipation constant must be positive (mW/K)");
        }
    }
    AmplifierErrors& amp = s.amplifier_errors;
    if (!o.amp_gain_tol.empty()) amp.gain_error = parse_percent(o.amp_gain_tol, "--amp-gain-tol");
    if (!o.amp_offset.empty()) amp.offset_v = parse_bound(o.amp_offset, "--amp-offset", "V");
    if (!o.amp_offset_drift.empty())
        amp.offset_drift_v_per_k = parse_bound(o.amp_offset_drift, "--amp-offset-drift", "V/K");
    if (!o.amp_bias.empty()) amp.bias_current_a = parse_bound(o.amp_bias, "--amp-bias", "A");
    if (!o.amp_offset_current.empty()) {
        amp.offset_current_a = parse_bound(o.amp_offset_current, "--amp-offset-current", "A");
    }
    s.trials = parse_count(o.trials, "--trials", 0, static_cast<double>(kMaxTrials),
                           "the number of trials must be a whole number from 0 to " + std::to_string(kMaxTrials));
    s.seed = o.seed.empty() ? kDefaultSeed : parse_seed(o.seed);
    s.threads = build_threads(o.threads);
    return s;
}


void add_budget_flags(CLI::App& sub, BudgetFlags& o, const BudgetFlagSet& which) {
    const char* tol = "Tolerances";
    sub.add_option("--r25-tol", o.r25_tol, "Thermistor resistance at T0, +-% (default 1; 0 with --dt-tol)")
        ->group(tol);
    sub.add_option("--beta-tol", o.beta_tol, "Thermistor B-value, +-% (default 1; 0 with --dt-tol)")->group(tol);
    sub.add_option("--dt-tol", o.dt_tol,
                    "Thermistor interchangeability, +-K over --dt-range (instead of --r25-tol and --beta-tol)")
        ->group(tol);
    sub.add_option("--dt-range", o.dt_range, "The range --dt-tol holds over, LO:HI degC")->group(tol);
    sub.add_option("--drift", o.drift, "Thermistor long-term drift, +-% of R (default 0)")->group(tol);
    if (which.part_curve) {
        sub.add_option("--part-sh", o.part_sh,
                        "The part's real curve, Steinhart-Hart A,B,C, while the firmware inverts the model (model error)")
            ->group(tol);
        sub.add_option("--part-points", o.part_points,
                        "The part's real curve as R-T points (CSV t_c,r_ohm, interpolated) while the firmware inverts the "
                        "model (model error)")
            ->check(non_empty_file_name)
            ->group(tol);
    }
    sub.add_option("--resistor-tol", o.resistor_tol, "Every fixed resistor, +-% (default 1)")->group(tol);
    sub.add_option("--resistor-tc", o.resistor_tc, "Every fixed resistor's temperature coefficient, +-ppm/K")
        ->group(tol);
    sub.add_option("--board-temp", o.board_temp,
                    "Where the resistors and reference sit: sensed (a probe inside the product, default) or LO:HI "
                    "degC (a remote probe)")
        ->group(tol);
    if (which.leads) {
        sub.add_option("--lead-tol", o.lead_tol, "Lead wires' loop resistance (--lead), +-%")->group(tol);
        sub.add_option("--cable-temp", o.cable_temp,
                        "Lead wires' temperature, degC or LO:HI (default 20; copper 0.393 %/K, IEC 60028)")
            ->group(tol);
        sub.add_option("--lead-compensation", o.lead_compensation,
                        "yes: the firmware subtracts --lead (default); no: the whole lead is an error")
            ->group(tol);
    }
    sub.add_option("--excitation-tol", o.excitation_tol,
                    "Drive voltage or current, +-% (default 1; only for a reading in volts)")
        ->group(tol);
    sub.add_option("--distribution", o.distribution,
                    "Monte Carlo spread: normal (tolerance = 3 sigma, default), normal-truncated (screened at the "
                    "tolerance) or uniform")
        ->group(tol);
    const char* rd = "Reading";
    if (which.reading) {
        sub.add_option("--reading", o.reading,
                        "model (firmware inverts the nominal model, default) or line (the endpoint line)")
            ->group(rd);
    }
    sub.add_option("--adc-bits", o.adc_bits, "Converter resolution, 1 to 24 bits (default: no converter)")
        ->group(rd);
    add_adc_transfer_option(sub, o.adc_transfer, rd);
    sub.add_option("--adc-offset", o.adc_offset, "Converter offset, +-LSB")->group(rd);
    sub.add_option("--adc-gain", o.adc_gain, "Converter gain error, +-%")->group(rd);
    sub.add_option("--adc-inl", o.adc_inl, "Converter integral nonlinearity, +-LSB")->group(rd);
    sub.add_option("--adc-error", o.adc_error, "Further converter error bound, +-LSB (needs --adc-bits)")
        ->group(rd);
    sub.add_option("--adc-ref", o.adc_ref,
                    "Converter reference: excitation (ratiometric) or volts (default: the --excitation voltage as "
                    "a fixed reference; ratiometric without a drive)")
        ->group(rd);
    sub.add_option("--ref-tol", o.ref_tol, "Reference voltage, +-%")->group(rd);
    sub.add_option("--ref-tc", o.ref_tc, "Reference temperature coefficient, +-ppm/K")->group(rd);
    if (which.dissipation_and_threads) {
        sub.add_option("--dissipation", o.dissipation, "Thermistor dissipation constant, mW/K (self-heating)")
            ->group(rd);
    }
    if (which.amplifier) {
        const char* amp = "Amplifier errors";
        sub.add_option("--amp-gain-tol", o.amp_gain_tol, "Amplifier gain error, +-% (needs an amplifier)")->group(amp);
        sub.add_option("--amp-offset", o.amp_offset, "Amplifier input offset voltage at 25 degC, +-V (e.g. 50u)")
            ->group(amp);
        sub.add_option("--amp-offset-drift", o.amp_offset_drift,
                       "Amplifier input offset drift, +-V/K from 25 degC to the --board-temp (e.g. 1u)")
            ->group(amp);
        sub.add_option("--amp-bias", o.amp_bias,
                       "Amplifier input bias current, +-A into each input, through the network's source impedance "
                       "(e.g. 10n)")
            ->group(amp);
        sub.add_option("--amp-offset-current", o.amp_offset_current,
                       "Amplifier input offset current (the inputs' bias currents' difference), +-A")
            ->group(amp);
    }
    const char* mc = "Monte Carlo";
    sub.add_option("--trials", o.trials, "Monte Carlo trials (default 100000; 0 = worst case only)")->group(mc);
    sub.add_option("--seed", o.seed, "Random seed (default " + std::to_string(kDefaultSeed) + ")")->group(mc);
    if (which.dissipation_and_threads) {
        sub.add_option("--threads", o.threads, "Threads (default: every core; the result does not depend on it)")
            ->group(mc);
    }
}

}  // namespace rtline::cli
