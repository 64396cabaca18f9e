#include "frontend_report.hpp"

#include <cmath>

#include "common.hpp"
#include "rtline/error.hpp"

namespace rtline::cli {

namespace {

const char* const kDeg =
    "\xC2\xB0"
    "C";

double parse_positive(const std::string& text, const std::string& flag, const std::string& unit) {
    const double v = parse_quantity(text, flag, unit);
    if (!(v > 0.0)) throw InputError(flag, text, "must be positive");
    return v;
}

// The converter's full scale in the circuit's output unit: 1 when ratiometric, the excitation for a
// voltage drive, --adc-ref volts otherwise; NaN when unknown (a current drive without --adc-ref).
double full_scale(const FrontEndOptions& o, const Circuit& c) {
    const Drive d = c.excitation.drive;
    if (o.adc_ref.empty() || o.adc_ref == "excitation") {
        if (d == Drive::current) {
            if (!o.adc_ref.empty()) {
                throw InputError("--adc-ref", o.adc_ref, "a current drive has no excitation voltage; give volts");
            }
            return std::nan("");
        }
        return d == Drive::voltage ? c.excitation.value : 1.0;
    }
    if (d == Drive::ratiometric) {
        throw InputError("--adc-ref", o.adc_ref, "a fixed reference needs a drive; give --excitation V or --current A");
    }
    return parse_positive(o.adc_ref, "--adc-ref", "V");
}

struct Largest {
    double value = -1.0;
    double t_k = 0.0;
};

Largest largest(const FrontEndReport& r, double SourceImpedance::*field) {
    Largest l;
    for (const FrontEndPoint& f : r.points) {
        if (f.source.*field > l.value) l = {f.source.*field, f.t_k};
    }
    return l;
}

// The largest settling error and where (the first such point).
Largest worst_settling(const FrontEndReport& r) {
    Largest l;
    for (const FrontEndPoint& f : r.points) {
        if (f.settling_error_lsb > l.value) l = {f.settling_error_lsb, f.t_k};
    }
    return l;
}

}  // namespace

bool FrontEndOptions::given() const {
    return !gain.empty() || !offset.empty() || auto_range || !headroom.empty() || !amp_output.empty() ||
           !adc_bits.empty() || !adc_ref.empty() || !sample_cap.empty() || !acquisition.empty();
}

void add_amplifier_flags(CLI::App& app, FrontEndOptions& o) {
    const char* amp = "Front end";
    app.add_option("--gain", o.gain, "Amplifier gain, V/V (differential across a bridge's A and B)")->group(amp);
    app.add_option("--offset", o.offset, "Amplifier output offset, V (V/V of the excitation when ratiometric)")
        ->group(amp);
    app.add_flag("--auto-range", o.auto_range, "Choose gain and offset to fill the converter's range less --headroom")
        ->group(amp);
    app.add_option("--headroom", o.headroom, "With --auto-range: % of the range left free at each end (default 5)")
        ->group(amp);
}

void add_amplifier_options(CLI::App& app, FrontEndOptions& o) {
    add_amplifier_flags(app, o);
    app.add_option("--adc-ref", o.adc_ref,
                   "Converter reference: excitation (default; ratiometric) or volts (needed with --current)")
        ->group("Converter");
}

void add_front_end_options(CLI::App& app, FrontEndOptions& o) {
    add_amplifier_options(app, o);
    app.add_option("--amp-output", o.amp_output,
                   "Amplifier output resistance into the converter, ohm, series resistor included (default 0)")
        ->group("Front end");
    const char* adc = "Converter";
    app.add_option("--adc-bits", o.adc_bits, "Converter resolution, 1 to 24 bits (default 12)")->group(adc);
    app.add_option("--sample-cap", o.sample_cap, "Converter sampling capacitance, F (e.g. 10p)")->group(adc);
    app.add_option("--acquisition", o.acquisition, "Converter acquisition time, s (e.g. 1u)")->group(adc);
}

AmplifierChoice choose_amplifier(const FrontEndOptions& o, const Circuit& c, const Grid& grid) {
    return choose_amplifier(o, c, grid, full_scale(o, c));
}

AmplifierRule amplifier_rule(const FrontEndOptions& o) {
    AmplifierRule r;
    if (!o.gain.empty() && o.auto_range) {
        throw InputError("--gain", o.gain, "give either --gain (with --offset) or --auto-range, not both");
    }
    if (!o.offset.empty() && o.gain.empty()) throw InputError("--offset", o.offset, "needs --gain");
    if (!o.headroom.empty() && !o.auto_range)
        throw InputError("--headroom", o.headroom, "applies only with --auto-range");
    if (o.auto_range) {
        std::string h = o.headroom.empty() ? std::string("5") : o.headroom;
        if (h.back() == '%') h.pop_back();
        r.headroom = 0.01 * parse_number(h, "--headroom");
        r.auto_range = true;
    } else if (!o.gain.empty()) {
        Amplifier amp;
        amp.gain = parse_number(o.gain, "--gain");
        if (!o.offset.empty()) amp.offset = parse_quantity(o.offset, "--offset", "V");
        r.fixed = amp;
    }
    return r;
}

AmplifierChoice choose_amplifier(const FrontEndOptions& o, const Circuit& c, const Grid& grid, double fs) {
    AmplifierChoice r;
    r.full_scale = fs;
    const AmplifierRule rule = amplifier_rule(o);
    if (rule.auto_range) {
        if (std::isnan(r.full_scale)) {
            throw InputError("--adc-ref", "",
                             "--auto-range with a current drive needs the converter's reference in volts");
        }
        r.headroom = rule.headroom;
        validate_front_end(c, Amplifier{});
        r.amplifier = fit_range(c, grid, r.full_scale, r.headroom).amplifier;
        r.auto_ranged = true;
    } else {
        r.amplifier = rule.fixed;
    }
    return r;
}

std::string describe_amplifier(const AmplifierChoice& a, const Circuit& c) {
    if (!a.amplifier) return "none";
    const std::string unit = output_unit(c);
    std::string t = "gain " + format_number(a.amplifier->gain, 6) + " V/V, offset " +
                    format_number(a.amplifier->offset, 6) + " " + unit;
    if (a.auto_ranged) {
        t += " (chosen: the span onto " + format_number(100.0 * a.headroom) + " to " +
             format_number(100.0 - 100.0 * a.headroom) + " % of " + format_number(a.full_scale, 5) + " " + unit + ")";
    }
    return t;
}

FrontEndReport front_end_report(const FrontEndOptions& o, const Circuit& c, const Analysis& a, const Grid& grid) {
    if (!o.amp_output.empty() && o.gain.empty() && !o.auto_range) {
        throw InputError("--amp-output", o.amp_output, "needs an amplifier (--gain or --auto-range)");
    }
    FrontEndReport r;
    const AmplifierChoice choice = choose_amplifier(o, c, grid);
    r.full_scale = choice.full_scale;
    r.amplifier = choice.amplifier;
    r.auto_ranged = choice.auto_ranged;
    r.headroom = choice.headroom;
    if (r.amplifier && !o.amp_output.empty()) r.amplifier->output_ohm = parse_resistance(o.amp_output, "--amp-output");
    validate_front_end(c, r.amplifier);
    if (!o.sample_cap.empty() || !o.acquisition.empty()) {
        if (o.sample_cap.empty())
            throw InputError("--sample-cap", "", "the settling needs the sampling capacitance too");
        if (o.acquisition.empty()) throw InputError("--acquisition", "", "the settling needs the acquisition time too");
        Sampling s;
        s.capacitance_f = parse_positive(o.sample_cap, "--sample-cap", "F");
        s.acquisition_s = parse_positive(o.acquisition, "--acquisition", "s");
        if (!o.adc_bits.empty()) {
            const double bits = parse_number(o.adc_bits, "--adc-bits");
            if (bits != std::floor(bits) || bits < 1 || bits > 24) {
                throw InputError("--adc-bits", o.adc_bits, "a converter has 1 to 24 bits");
            }
            s.bits = static_cast<int>(bits);
        }
        validate(s);
        r.sampling = s;
    } else if (!o.adc_bits.empty()) {
        throw InputError("--adc-bits", o.adc_bits, "sets the settling's LSB; give --sample-cap and --acquisition too");
    }
    bool outside = false;
    double outside_t = 0.0;
    for (const PointResult& p : a.points) {
        FrontEndPoint f;
        f.t_k = p.t_k;
        f.source = source_impedance(c, p.r_t_ohm);
        f.converter_input = converter_input(c, r.amplifier, p.r_t_ohm);
        // The converter reads the amplifier's output when there is one, else the network itself.
        const double charging = r.amplifier ? r.amplifier->output_ohm : f.source.out_ohm;
        f.settling_error_lsb = r.sampling ? settling_error_lsb(*r.sampling, charging) : std::nan("");
        if (r.sampling && charging >= r.settling_source_ohm) r.settling_source_ohm = charging;
        if (!outside && std::isfinite(r.full_scale) && (f.converter_input < 0.0 || f.converter_input > r.full_scale)) {
            outside = true;
            outside_t = p.t_k;
        }
        r.points.push_back(f);
    }
    const std::string unit = output_unit(c);
    if (outside) {
        r.warnings.push_back("warning: the converter input leaves the converter's range 0 to " +
                             format_significant(r.full_scale, 5) + " " + unit + " (first at " + celsius(outside_t) + " " +
                             kDeg + ")");
    }
    if (r.sampling) {
        const auto [worst, at] = worst_settling(r);
        if (worst > kSettlingLimitLsb) {
            r.warnings.push_back("warning: the sample does not settle: " + format_significant(worst, 3) + " LSB at " +
                                 celsius(at) + " " + kDeg + " (above 1/2 LSB); lengthen the acquisition to " +
                                 format_si(settling_time_s(*r.sampling, r.settling_source_ohm), "s") +
                                 " or add the filter capacitor");
        }
    }
    return r;
}

std::string front_end_text(const FrontEndReport& r, const Circuit& c) {
    const std::string unit = output_unit(c);
    const bool bridge = is_bridge(c.topology);
    std::string t = "\nfront end: ";
    if (r.amplifier) {
        t += "amplifier " + describe_amplifier({r.amplifier, r.auto_ranged, r.headroom, r.full_scale}, c);
        if (r.amplifier->output_ohm > 0.0) t += ", output " + format_resistance(r.amplifier->output_ohm, 4) + " ohm";
    } else {
        t += "the converter reads the network directly";
    }
    t += "\n";
    if (r.sampling) {
        t += "converter: " + std::to_string(r.sampling->bits) + " bits, sampling capacitor " +
             format_si(r.sampling->capacitance_f, "F") + ", acquisition " + format_si(r.sampling->acquisition_s, "s") + "\n";
    }
    std::vector<Column> cols{{std::string("T (") + kDeg + ")", "t_c", 2}};
    if (bridge) {
        cols.push_back({"source A-B (ohm)", "", -1, 5, true});
        cols.push_back({"source A (ohm)", "", -1, 5, true});
        cols.push_back({"source B (ohm)", "", -1, 5, true});
    } else {
        cols.push_back({"source (ohm)", "", -1, 5, true});
    }
    cols.push_back({"converter input (" + unit + ")", "", -1, 6});
    if (r.sampling) cols.push_back({"settling error (LSB)", "", -1, 3});
    Table table(cols);
    for (const FrontEndPoint& f : r.points) {
        std::vector<Cell> row{kelvin_to_celsius(f.t_k), f.source.out_ohm};
        if (bridge) {
            row.emplace_back(f.source.a_ohm);
            row.emplace_back(f.source.b_ohm);
        }
        row.emplace_back(f.converter_input);
        if (r.sampling) row.emplace_back(f.settling_error_lsb);
        table.add_row(std::move(row));
    }
    t += "\n" + table.text() + "\n";
    const FrontEndPoint& lo = r.points.front();
    const FrontEndPoint& hi = r.points.back();
    t += "converter input         " + format_significant(lo.converter_input, 5) + " " + unit + " at " + celsius(lo.t_k) +
         " " + kDeg + ", " + format_significant(hi.converter_input, 5) + " " + unit + " at " + celsius(hi.t_k) + " " + kDeg +
         "\n";
    const Largest z = largest(r, &SourceImpedance::out_ohm);
    t += "largest source          " + format_resistance(z.value, 4) + " ohm at " + celsius(z.t_k) + " " + kDeg +
         (bridge ? " (between A and B)" : "") + (r.amplifier ? ", at the amplifier's input" : "") + "\n";
    if (r.sampling) {
        const auto [worst, at] = worst_settling(r);
        const Sampling& s = *r.sampling;
        const double rc = r.settling_source_ohm;
        if (rc > 0.0) {
            t += "settling error          " + format_significant(worst, 3) + " LSB at " + celsius(at) + " " + kDeg +
                 " through " + format_resistance(rc, 4) + " ohm (" + (worst > kSettlingLimitLsb ? "above" : "within") +
                 " 1/2 LSB; 1/2 LSB needs " + format_si(settling_time_s(s, rc), "s") + ")\n";
        } else {
            t += "settling error          0 LSB: the amplifier's output (ideal, 0 ohm) drives the converter; give "
                 "--amp-output for its resistance\n";
        }
        const double cf = filter_capacitance_f(s);
        t += "filter capacitor        " + format_si(cf, "F") +
             " or more at the converter input holds the charge-sharing step C_s/(C_s + C_f) of a full-scale step to "
             "1/2 LSB (common practice)";
        if (rc > 0.0) {
            t += "; through " + format_resistance(rc, 4) + " ohm it settles a full-scale change in " +
                 format_si(rc * (cf + s.capacitance_f) * std::log(2.0 * adc_steps(s.bits, s.transfer)), "s");
        }
        t += "\n";
    }
    return t;
}

Json front_end_json(const FrontEndReport& r, const Circuit& c) {
    Json j;
    j["unit"] = output_unit(c);
    if (r.amplifier) {
        j["amplifier"] = {{"gain_v_per_v", r.amplifier->gain},
                          {"offset", r.amplifier->offset},
                          {"output_ohm", r.amplifier->output_ohm},
                          {"auto_range", r.auto_ranged}};
        if (r.auto_ranged) j["amplifier"]["headroom_pct"] = echoed(100.0 * r.headroom);
    } else {
        j["amplifier"] = nullptr;
    }
    j["full_scale"] = number(r.full_scale);
    j["converter_input_at_lo"] = r.points.front().converter_input;
    j["converter_input_at_hi"] = r.points.back().converter_input;
    const Largest z = largest(r, &SourceImpedance::out_ohm);
    j["max_source_ohm"] = z.value;
    j["max_source_at_t_c"] = kelvin_to_celsius(z.t_k);
    if (r.sampling) {
        const Sampling& s = *r.sampling;
        const auto [worst, at] = worst_settling(r);
        j["settling"] = {{"bits", s.bits},
                         {"sample_cap_f", s.capacitance_f},
                         {"acquisition_s", s.acquisition_s},
                         {"source_ohm", r.settling_source_ohm},
                         {"max_error_lsb", worst},
                         {"at_t_c", kelvin_to_celsius(at)},
                         {"settled", worst <= kSettlingLimitLsb},
                         {"acquisition_for_half_lsb_s", settling_time_s(s, r.settling_source_ohm)},
                         {"filter_cap_f", filter_capacitance_f(s)}};
    } else {
        j["settling"] = nullptr;
    }
    Json pts = Json::array();
    const bool bridge = is_bridge(c.topology);
    for (const FrontEndPoint& f : r.points) {
        Json p = {{"t_c", kelvin_to_celsius(f.t_k)}, {"source_ohm", f.source.out_ohm}};
        if (bridge) {
            p["source_a_ohm"] = f.source.a_ohm;
            p["source_b_ohm"] = f.source.b_ohm;
        }
        p["converter_input"] = f.converter_input;
        p["settling_error_lsb"] = number(f.settling_error_lsb);
        pts.push_back(p);
    }
    j["points"] = pts;
    j["warnings"] = r.warnings;
    return j;
}

void add_front_end_columns(std::vector<Column>& columns, const Circuit& c) {
    columns.push_back({"", "source_ohm"});
    if (is_bridge(c.topology)) {
        columns.push_back({"", "source_a_ohm"});
        columns.push_back({"", "source_b_ohm"});
    }
    columns.push_back({"", "converter_input" + unit_suffix(output_unit(c))});
    columns.push_back({"", "settling_error_lsb"});
}

void add_front_end_cells(std::vector<Cell>& row, const FrontEndReport& r, const Circuit& c, std::size_t i) {
    const FrontEndPoint& f = r.points.at(i);
    row.emplace_back(f.source.out_ohm);
    if (is_bridge(c.topology)) {
        row.emplace_back(f.source.a_ohm);
        row.emplace_back(f.source.b_ohm);
    }
    row.emplace_back(f.converter_input);
    row.emplace_back(f.settling_error_lsb);
}

}  // namespace rtline::cli
