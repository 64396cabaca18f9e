#include "rtline/circuit.hpp"

#include <cmath>

#include "rtline/error.hpp"

namespace rtline {

namespace {

struct Named {
    Topology topology;
    std::string_view name;
};

constexpr Named kNames[] = {
    {Topology::bare, "bare"},
    {Topology::divider_high, "divider-high"},
    {Topology::divider_low, "divider-low"},
    {Topology::shunt, "shunt"},
    {Topology::shunt_divider, "shunt-divider"},
    {Topology::bridge, "bridge"},
    {Topology::shunt_bridge, "shunt-bridge"},
};

// a/(a + b), the share of a divider's voltage across a, exact for an open arm: 1 when a is infinite,
// 0 when b is (the limits R → ∞ of a/(a + b) and of b/(a + b)).
double share(double a, double b) {
    if (std::isinf(a)) return 1.0;
    if (std::isinf(b)) return 0.0;
    return a / (a + b);
}

// The network driven by 1 V: output, thermistor voltage, and the resistance the source sees. Exact
// for r_t = 0 (a short) and r_t = +infinity (an open) too.
struct PerVolt {
    double out;
    double vt;
    double rin;
};

PerVolt per_volt(const Circuit& c, double r_t) {
    switch (c.topology) {
        case Topology::bare: {
            const double r = parallel(r_t, c.load_ohm);
            return {1.0, 1.0, r};
        }
        case Topology::shunt: {
            const double r = parallel(parallel(r_t, c.rp), c.load_ohm);
            return {1.0, 1.0, r};
        }
        case Topology::divider_high: {
            const double bottom = parallel(c.rs, c.load_ohm);
            return {share(bottom, r_t), share(r_t, bottom), r_t + bottom};
        }
        case Topology::divider_low: {
            const double bottom = parallel(r_t, c.load_ohm);
            const double v = share(bottom, c.rs);
            return {v, v, c.rs + bottom};
        }
        case Topology::shunt_divider: {
            const double top = parallel(r_t, c.rp);
            const double bottom = parallel(c.rs, c.load_ohm);
            const double total = top + bottom;
            return {bottom / total, top / total, total};
        }
        case Topology::bridge:
        case Topology::shunt_bridge: {
            const double rx = c.topology == Topology::shunt_bridge ? parallel(r_t, c.rp) : r_t;
            // Each side as a Thevenin source; the load closes the loop between them.
            const double va0 = share(rx, c.r1);
            const double vb0 = c.r3 / (c.r2 + c.r3);
            double va = va0;
            double vb = vb0;
            if (std::isfinite(c.load_ohm)) {
                const double ra = parallel(c.r1, rx);
                const double rb = parallel(c.r2, c.r3);
                const double il = (va0 - vb0) / (ra + rb + c.load_ohm);
                va = va0 - il * ra;
                vb = vb0 + il * rb;
            }
            const double drawn = (1.0 - va) / c.r1 + (1.0 - vb) / c.r2;
            return {va - vb, va, 1.0 / drawn};
        }
    }
    return {0.0, 0.0, 0.0};
}

// The network with its drive set to zero, seen from the output. A divider is an upper part (drive to
// output) over a lower part (output to ground, the load across it); a shorted voltage source puts the
// upper part in parallel, an open current source leaves it hanging. A bridge's sides are r1 over Rx
// (node A) and r2 over r3 (node B), the load between A and B.
SourceImpedance zeroed_drive(const Circuit& c, double r_t) {
    const bool current = c.excitation.drive == Drive::current;
    auto divider = [&](double upper, double lower) {
        const double z = current ? lower : parallel(upper, lower);
        return SourceImpedance{z, z, 0.0};
    };
    switch (c.topology) {
        case Topology::bare:
        case Topology::shunt: {
            // The output is the top node itself: the network's resistance (a current drive is open).
            const double z = per_volt(c, r_t).rin;
            return {z, z, 0.0};
        }
        case Topology::divider_high: return divider(r_t, parallel(c.rs, c.load_ohm));
        case Topology::divider_low: return divider(c.rs, parallel(r_t, c.load_ohm));
        case Topology::shunt_divider: return divider(parallel(r_t, c.rp), parallel(c.rs, c.load_ohm));
        case Topology::bridge:
        case Topology::shunt_bridge: {
            const double rx = c.topology == Topology::shunt_bridge ? parallel(r_t, c.rp) : r_t;
            const double rl = c.load_ohm;
            if (!current) {
                // The top node is ground: A sees r1 ∥ Rx, B sees r2 ∥ r3, the load between them.
                const double ra = parallel(c.r1, rx);
                const double rb = parallel(c.r2, c.r3);
                return {parallel(ra + rb, rl), parallel(ra, rl + rb), parallel(rb, rl + ra)};
            }
            // The top node floats: the delta r1, r2, load (top, A, B) becomes a star whose top leg
            // dangles, leaving legs sa (A) and sb (B) in series between A and B.
            double sa = c.r1;
            double sb = c.r2;
            if (std::isfinite(rl)) {
                const double sum = c.r1 + c.r2 + rl;
                sa = c.r1 * rl / sum;
                sb = c.r2 * rl / sum;
            }
            return {parallel(sa + sb, rx + c.r3), parallel(rx, sa + sb + c.r3), parallel(c.r3, sa + sb + rx)};
        }
    }
    return {};
}

}  // namespace

// The thermistor's arm includes its lead wires, as in operate().
SourceImpedance source_impedance(const Circuit& c, double r_t) { return zeroed_drive(c, r_t + c.lead_ohm); }

std::string_view topology_name(Topology t) {
    for (const Named& n : kNames) {
        if (n.topology == t) return n.name;
    }
    return "?";
}

Topology parse_topology(std::string_view text, std::string_view field) {
    for (const Named& n : kNames) {
        if (n.name == text) return n.topology;
    }
    throw InputError(std::string(field), std::string(text),
                     "unknown circuit; choose bare, divider-high, divider-low, shunt, shunt-divider, bridge "
                     "or shunt-bridge");
}

const std::vector<Topology>& all_topologies() {
    static const std::vector<Topology> all = {Topology::bare,        Topology::divider_high,  Topology::divider_low,
                                              Topology::shunt,       Topology::shunt_divider, Topology::bridge,
                                              Topology::shunt_bridge};
    return all;
}

std::vector<std::string> resistor_names(Topology t) {
    switch (t) {
        case Topology::bare: return {};
        case Topology::divider_high:
        case Topology::divider_low: return {"rs"};
        case Topology::shunt: return {"rp"};
        case Topology::shunt_divider: return {"rs", "rp"};
        case Topology::bridge: return {"r1", "r2", "r3"};
        case Topology::shunt_bridge: return {"rp", "r1", "r2", "r3"};
    }
    return {};
}

double resistor_value(const Circuit& c, std::string_view name) {
    if (name == "rs") return c.rs;
    if (name == "rp") return c.rp;
    if (name == "r1") return c.r1;
    if (name == "r2") return c.r2;
    if (name == "r3") return c.r3;
    return 0.0;
}

void set_resistor(Circuit& c, std::string_view name, double ohm) {
    if (name == "rs") c.rs = ohm;
    if (name == "rp") c.rp = ohm;
    if (name == "r1") c.r1 = ohm;
    if (name == "r2") c.r2 = ohm;
    if (name == "r3") c.r3 = ohm;
}

namespace {

// The input a fixed resistor's name (resistor_names) stands for.
Input resistor_input(std::string_view name) {
    if (name == "rp") return Input::rp;
    if (name == "r1") return Input::r1;
    if (name == "r2") return Input::r2;
    if (name == "r3") return Input::r3;
    return Input::rs;
}

}  // namespace

void validate(const Circuit& c) {
    const std::string topo(topology_name(c.topology));
    for (const std::string& name : resistor_names(c.topology)) {
        const double v = resistor_value(c, name);
        if (v == 0.0) {
            throw InputError(resistor_input(name), "", "the " + topo + " circuit needs this resistor; give its value");
        }
        if (!std::isfinite(v) || v < 0.0) {
            throw InputError(resistor_input(name), describe(v), "a resistance must be positive");
        }
    }
    if (!std::isfinite(c.lead_ohm) || c.lead_ohm < 0.0) {
        throw InputError(Input::lead, describe(c.lead_ohm), "a lead resistance must be 0 or positive");
    }
    if (!(c.load_ohm > 0.0)) {
        throw InputError(Input::load, describe(c.load_ohm), "a load resistance must be positive");
    }
    const Excitation& e = c.excitation;
    if (e.drive != Drive::ratiometric && (!std::isfinite(e.value) || e.value <= 0.0)) {
        const Input flag = e.drive == Drive::current ? Input::current : Input::excitation;
        throw InputError(flag, describe(e.value), "must be a positive value");
    }
    if (gives_resistance(c.topology) && e.drive == Drive::voltage) {
        throw InputError(Input::excitation, describe(e.value),
                         "the " + topo + " circuit's output is a resistance; drive it with {current} to get volts");
    }
}

std::string output_unit(const Circuit& c) {
    switch (c.excitation.drive) {
        case Drive::ratiometric: return gives_resistance(c.topology) ? "ohm" : "V/V";
        case Drive::voltage:
        case Drive::current: return "V";
    }
    return "";
}

double parallel(double a, double b) {
    if (std::isinf(a)) return b;
    if (std::isinf(b)) return a;
    const double p = a * b / (a + b);
    // a·b overflows (or underflows) for very large (small) resistances; the reciprocal form does not.
    return std::isnormal(p) ? p : 1.0 / (1.0 / a + 1.0 / b);
}

OperatingPoint operate(const Circuit& c, double r_t) {
    // The thermistor and its wires are one arm of the network; the thermistor takes its share
    // r_t/(r_t + lead) of the arm's voltage.
    const double arm = r_t + c.lead_ohm;
    PerVolt pv = per_volt(c, arm);
    if (c.lead_ohm > 0.0) pv.vt *= r_t / arm;
    const Excitation& e = c.excitation;
    OperatingPoint op;
    double top_v = 1.0;
    switch (e.drive) {
        case Drive::ratiometric: top_v = 1.0; break;
        case Drive::voltage: top_v = e.value; break;
        case Drive::current: top_v = e.value * pv.rin; break;
    }
    if (gives_resistance(c.topology) && e.drive == Drive::ratiometric) {
        op.output = pv.rin;
        op.thermistor_v = 0.0;
        op.power_w = std::nan("");
        return op;
    }
    op.output = top_v * pv.out;
    op.thermistor_v = top_v * pv.vt;
    op.power_w = op.thermistor_v * op.thermistor_v / r_t;
    return op;
}

double lead_shift_k(const Circuit& c, const Thermistor& model, double t_k) {
    if (!(c.lead_ohm > 0.0)) return 0.0;
    return model.temperature(model.resistance(t_k) + c.lead_ohm) - t_k;
}

double output(const Circuit& c, double r_t) { return operate(c, r_t).output; }

void complete_bridge(Circuit& c, const Thermistor& model, double null_t_k) {
    if (!is_bridge(c.topology)) return;
    if (c.r2 == 0.0) c.r2 = c.r1;
    if (c.r3 == 0.0) {
        // Balance r1/Rx = r2/r3 at the null, Rx the thermistor arm's lower part (R_T, or R_T ∥ rp).
        const double r_t = model.resistance(null_t_k);
        const double rx = c.topology == Topology::shunt_bridge && c.rp > 0.0 ? parallel(r_t, c.rp) : r_t;
        c.r3 = c.r2 == c.r1 ? rx : c.r2 * rx / c.r1;
    }
}

}  // namespace rtline
