#include "rtline/frontend.hpp"

#include <algorithm>
#include <cmath>
#include <string>

#include "rtline/error.hpp"

namespace rtline {

void validate_front_end(const Circuit& c, const std::optional<Amplifier>& amp) {
    const std::string topo(topology_name(c.topology));
    if (gives_resistance(c.topology) && c.excitation.drive != Drive::current) {
        throw InputError(Input::current, "",
                         "the " + topo +
                             " circuit's output is a resistance; a converter reads it through a current "
                             "drive (give {current})");
    }
    if (is_bridge(c.topology) && !amp) {
        throw InputError(Input::gain, "",
                         "the " + topo +
                             " circuit's output is the difference V_A - V_B; a converter reads it "
                             "through an amplifier (give {gain} or {output_range})");
    }
    if (!amp) return;
    if (!std::isfinite(amp->gain) || amp->gain == 0.0) {
        throw InputError(Input::gain, describe(amp->gain), "the gain must be a finite number other than 0");
    }
    if (!std::isfinite(amp->offset)) throw InputError(Input::offset, describe(amp->offset), "must be a finite number");
    if (!std::isfinite(amp->output_ohm) || amp->output_ohm < 0.0) {
        throw InputError(Input::amp_output, describe(amp->output_ohm), "the output resistance must be 0 or more");
    }
}

double converter_input(const Circuit& c, const std::optional<Amplifier>& amp, double r_t) {
    const double v = output(c, r_t);
    return amp ? amp->gain * v + amp->offset : v;
}

RangeFit fit_range(const Circuit& c, const Grid& grid, double full_scale, double headroom) {
    if (!(headroom >= 0.0 && headroom < 0.5)) {
        throw InputError(Input::headroom, describe(100.0 * headroom), "the headroom at each end must be 0 to under 50 %");
    }
    if (!(full_scale > 0.0) || !std::isfinite(full_scale)) {
        throw InputError(Input::reference, describe(full_scale), "the converter's full scale must be positive");
    }
    double lo = INFINITY;
    double hi = -INFINITY;
    for (const double r : grid.r_ohm) {
        const double v = output(c, r);
        lo = std::min(lo, v);
        hi = std::max(hi, v);
    }
    if (!(hi > lo)) throw InputError(Input::output_range, "", "the network's output does not change over the span");
    RangeFit fit;
    fit.amplifier.gain = (1.0 - 2.0 * headroom) * full_scale / (hi - lo);
    fit.amplifier.offset = headroom * full_scale - fit.amplifier.gain * lo;
    const std::optional<Amplifier> amp = fit.amplifier;
    fit.at_lo = converter_input(c, amp, grid.r_ohm.front());
    fit.at_hi = converter_input(c, amp, grid.r_ohm.back());
    return fit;
}

// ------------------------------------------------------------------------------- the channel

void validate(const Channel& ch) {
    const Circuit& c = ch.circuit;
    const std::string topo(topology_name(c.topology));
    const Drive drive = c.excitation.drive;
    if (gives_resistance(c.topology)) {
        if (drive != Drive::current) {
            throw InputError(Input::topology, topo,
                             "the output is a resistance, not a voltage; a converter reads it through a current "
                             "drive, against a reference in volts (give {current} and {reference})");
        }
        if (!(ch.reference > 0.0) || !std::isfinite(ch.reference)) {
            throw InputError(Input::reference, describe(ch.reference),
                             "a current drive is not ratiometric: the converter's reference must be given in volts "
                             "(give {reference} V)");
        }
    } else {
        if (drive == Drive::voltage) {
            if (!(c.excitation.value > 0.0) || !std::isfinite(c.excitation.value)) {
                throw InputError(Input::excitation, describe(c.excitation.value), "the supply must be positive volts");
            }
            if (!(ch.reference > 0.0) || !std::isfinite(ch.reference)) {
                throw InputError(Input::reference, describe(ch.reference),
                                 "a supply in volts is read against a converter reference in volts (give "
                                 "{reference} V), or leave the supply out for a ratiometric reading");
            }
        }
        if (drive == Drive::current) {
            throw InputError(Input::current, describe(c.excitation.value),
                             "a current drive is read only across a bare or shunt thermistor; a divider or "
                             "bridge is read ratiometrically, against its own excitation");
        }
        if (drive == Drive::ratiometric && ch.reference != 1.0) {
            throw InputError(Input::reference, describe(ch.reference),
                             "a ratiometric reading's reference is the excitation itself (1 V/V)");
        }
        if (is_bridge(c.topology) && !ch.amplifier) {
            throw InputError(Input::gain, "",
                             "a bridge's output is the difference V_A - V_B; a converter reads it through an "
                             "amplifier (its gain and output offset) (give {gain} and {offset}, or {output_range})");
        }
    }
    validate_front_end(c, ch.amplifier);
}

double channel_ratio(const Channel& ch, double r_t) {
    return converter_input(ch.circuit, ch.amplifier, r_t) / ch.reference;
}

namespace {

// R such that a ∥ R = p (R = 1/(1/p − 1/a)); +infinity when p = a, negative when p > a.
double unparallel(double p, double a) {
    if (std::isinf(a)) return p;
    return 1.0 / (1.0 / p - 1.0 / a);
}

// The thermistor arm's resistance (R_T + lead) at which the network's output is y (output_unit).
double arm_at_output(const Circuit& c, double y) {
    // A divider or bridge under a supply in volts: its algebra below is in fractions of the supply.
    if (!gives_resistance(c.topology) && c.excitation.drive == Drive::voltage) y /= c.excitation.value;
    switch (c.topology) {
        case Topology::bare: return unparallel(y / c.excitation.value, c.load_ohm);
        case Topology::shunt: return unparallel(unparallel(y / c.excitation.value, c.load_ohm), c.rp);
        case Topology::divider_high: return parallel(c.rs, c.load_ohm) * (1.0 - y) / y;
        case Topology::divider_low: return unparallel(c.rs * y / (1.0 - y), c.load_ohm);
        case Topology::shunt_divider: return unparallel(parallel(c.rs, c.load_ohm) * (1.0 - y) / y, c.rp);
        case Topology::bridge:
        case Topology::shunt_bridge: {
            // y = (V_A0 − V_B0)·RL/(R_A + R_B + RL) with R_A = r1 ∥ R_x = r1·V_A0 (each side a Thevenin
            // source, the load between them), solved for V_A0.
            const double vb0 = c.r3 / (c.r2 + c.r3);
            const double rb = parallel(c.r2, c.r3);
            const double rl = c.load_ohm;
            const double va0 = std::isinf(rl) ? vb0 + y : (vb0 * rl + y * (rb + rl)) / (rl - y * c.r1);
            const double rx = c.r1 * va0 / (1.0 - va0);
            return c.topology == Topology::shunt_bridge ? unparallel(rx, c.rp) : rx;
        }
    }
    return std::nan("");
}

}  // namespace

double channel_resistance(const Channel& ch, double ratio) {
    const double u = ratio * ch.reference;
    const double y = ch.amplifier ? (u - ch.amplifier->offset) / ch.amplifier->gain : u;
    return arm_at_output(ch.circuit, y) - ch.circuit.lead_ohm;
}

AmplifierShift amplifier_shift(const Amplifier& amp, const AmplifierErrors& e, double in_v, const SourceImpedance& z,
                               double board_t_k) {
    AmplifierShift s;
    s.gain_v = e.gain_error * amp.gain * in_v;
    s.offset_v = amp.gain * e.offset_v;
    s.drift_v = amp.gain * e.offset_drift_v_per_k * (board_t_k - e.reference_t_k);
    // Currents I_b ± I_os/2 into the two inputs: each input drops its own current through its node's
    // impedance and the other's through the shared part; what remains across the pair is
    // I_b·(Z_A − Z_B) + I_os/2·(Z_A + Z_B − 2·Z_AB) with Z_A + Z_B − 2·Z_AB the differential impedance.
    s.bias_v = -amp.gain * (e.bias_current_a * (z.a_ohm - z.b_ohm) + 0.5 * e.offset_current_a * z.out_ohm);
    return s;
}

void validate(const Sampling& s) {
    if (s.bits < 1 || s.bits > 24) {
        throw InputError(Input::adc_bits, std::to_string(s.bits), "a converter has 1 to 24 bits");
    }
    if (!(s.capacitance_f > 0.0) || !std::isfinite(s.capacitance_f)) {
        throw InputError(Input::sample_cap, describe(s.capacitance_f), "the sampling capacitance must be positive");
    }
    if (!(s.acquisition_s > 0.0) || !std::isfinite(s.acquisition_s)) {
        throw InputError(Input::acquisition, describe(s.acquisition_s), "the acquisition time must be positive");
    }
}

double settling_error_lsb(const Sampling& s, double source_ohm) {
    const double tau = source_ohm * s.capacitance_f;
    if (!(tau > 0.0)) return 0.0;  // an ideal source settles at once
    return adc_steps(s.bits, s.transfer) * std::exp(-s.acquisition_s / tau);
}

double settling_time_s(const Sampling& s, double source_ohm) {
    return source_ohm * s.capacitance_f * std::log(2.0 * adc_steps(s.bits, s.transfer));
}

double filter_capacitance_f(const Sampling& s) { return s.capacitance_f * (2.0 * adc_steps(s.bits, s.transfer) - 1.0); }

}  // namespace rtline
