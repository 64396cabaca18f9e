// The front end against ngspice: a bridge through an amplifier (an ideal voltage-controlled voltage
// source with gain and an output offset source, then with an input offset source and bias currents),
// the network's Thevenin source impedance by a 1 A test current with the drive zeroed, and the
// sampling capacitor's charge by a transient of the RC.
#include <doctest/doctest.h>

#include <cmath>
#include <map>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/frontend.hpp"
#include "rtline/thermistor.hpp"
#include "support.hpp"

namespace {

using rtline::Circuit;
using rtline::Drive;
using rtline::Topology;

using rtline::test::close;
using rtline::test::num;
using rtline::test::thermistor_resistances;

// Runs ngspice on `netlist` (its .control block prints `let` vectors) and returns every "name = value".
std::map<std::string, double> ngspice(const std::string& netlist) {
    REQUIRE_MESSAGE(rtline::test::have_program("ngspice"), "ngspice is missing: run scripts/setup.sh");
    const rtline::test::TempPath path(".cir");
    rtline::test::write_file(path.str(), netlist);
    const auto run = rtline::test::run_shell("ngspice -b '" + path.str() + "'");
    INFO("netlist:\n" << netlist << "ngspice stdout:\n" << run.out << "stderr:\n" << run.err);
    REQUIRE(run.code == 0);
    std::map<std::string, double> v;
    const std::regex line(R"(^\s*(\w+)\s*=\s*([-+0-9.eE]+)\s*$)");
    std::istringstream lines(run.out);
    for (std::string l; std::getline(lines, l);) {
        std::smatch m;
        if (std::regex_match(l, m, line)) v[m[1]] = std::stod(m[2]);
    }
    return v;
}

// One copy of the network (suffix s on every node and element), its drive `drive_value` (0 zeroes it:
// a shorted voltage source, an open current source). Nodes: top, out (dividers and bare/shunt: the
// output node), a and b (bridges). The load sits across the output (between a and b for bridges).
std::string network(const Circuit& c, double r_t, const std::string& s, double drive_value) {
    const std::string top = "top" + s, out = "out" + s, a = "a" + s, b = "b" + s;
    std::ostringstream n;
    if (c.excitation.drive == Drive::current) {
        n << "I" << s << " 0 " << top << " DC " << num(drive_value) << "\n";  // pushes into top
    } else {
        n << "V" << s << " " << top << " 0 DC " << num(drive_value) << "\n";
    }
    auto r = [&](const std::string& name, const std::string& p, const std::string& q, double ohm) {
        n << name << s << " " << p << " " << q << " " << num(ohm) << "\n";
    };
    std::string lp = out, lq = "0";
    switch (c.topology) {
        case Topology::bare:
        case Topology::shunt:
            // The output is the top node: a 0 V source joins it to `out` so that both names exist.
            n << "Vj" << s << " " << top << " " << out << " DC 0\n";
            r("Rt", out, "0", r_t);
            if (c.topology == Topology::shunt) r("Rp", out, "0", c.rp);
            break;
        case Topology::divider_high:
            r("Rt", top, out, r_t);
            r("Rs", out, "0", c.rs);
            break;
        case Topology::divider_low:
            r("Rs", top, out, c.rs);
            r("Rt", out, "0", r_t);
            break;
        case Topology::shunt_divider:
            r("Rt", top, out, r_t);
            r("Rp", top, out, c.rp);
            r("Rs", out, "0", c.rs);
            break;
        case Topology::bridge:
        case Topology::shunt_bridge:
            r("R1", top, a, c.r1);
            r("Rt", a, "0", r_t);
            if (c.topology == Topology::shunt_bridge) r("Rp", a, "0", c.rp);
            r("R2", top, b, c.r2);
            r("R3", b, "0", c.r3);
            lp = a;
            lq = b;
            break;
    }
    if (std::isfinite(c.load_ohm)) r("RL", lp, lq, c.load_ohm);
    return n.str();
}



Circuit test_bridge() {
    Circuit c;
    c.topology = Topology::bridge;
    c.excitation = {Drive::voltage, 3.3};
    c.r1 = 10e3;
    c.r2 = 12e3;
    c.r3 = 27e3;
    c.load_ohm = 220e3;  // the amplifier's differential input resistance
    return c;
}

// The amplifier in ngspice: E (gain) from the bridge's A, B (A through an input offset source Vos, each
// input drawing a bias current), its output through the output offset source to node `y`.
std::string amplifier(const std::string& s, const rtline::Amplifier& amp, const rtline::AmplifierErrors& e) {
    std::ostringstream n;
    n << "Vos" << s << " ap" << s << " a" << s << " DC " << num(e.offset_v) << "\n";
    n << "E" << s << " x" << s << " 0 ap" << s << " b" << s << " " << num(amp.gain) << "\n";
    n << "Voff" << s << " y" << s << " x" << s << " DC " << num(amp.offset) << "\n";
    // SPICE: "I n+ n- v" carries v from n+ through the source to n-: out of the node into the input.
    n << "Iba" << s << " a" << s << " 0 DC " << num(e.bias_current_a + 0.5 * e.offset_current_a) << "\n";
    n << "Ibb" << s << " b" << s << " 0 DC " << num(e.bias_current_a - 0.5 * e.offset_current_a) << "\n";
    return n.str();
}

void check_amplified_bridge(const rtline::Amplifier& amp, const rtline::AmplifierErrors& e) {
    const Circuit c = test_bridge();
    rtline::validate(c);
    const std::vector<double> r_t = thermistor_resistances();
    std::ostringstream net, ctl;
    net << "* bridge through an amplifier\n";
    ctl << ".control\nop\nset numdgt=17\n";
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const std::string s = std::to_string(k);
        net << network(c, r_t[k], s, c.excitation.value) << amplifier(s, amp, e);
        ctl << "let y" << s << " = v(y" << s << ")\nprint y" << s << "\n";
    }
    ctl << "quit 0\n.endc\n.end\n";
    auto v = ngspice(net.str() + ctl.str());
    const std::optional<rtline::Amplifier> a = amp;
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const std::string s = std::to_string(k);
        REQUIRE(v.count("y" + s) == 1);
        const double in = rtline::output(c, r_t[k]);
        const double want =
            rtline::converter_input(c, a, r_t[k]) +
            rtline::amplifier_shift(amp, e, in, rtline::source_impedance(c, r_t[k]), e.reference_t_k).total();
        CAPTURE(r_t[k]);
        CAPTURE(want);
        CAPTURE(v["y" + s]);
        CHECK(close(want, v["y" + s], std::abs(amp.gain) * c.excitation.value));
    }
}

}  // namespace

TEST_CASE("a bridge through an amplifier with gain and output offset matches ngspice at every point") {
    check_amplified_bridge({25.0, 1.65, 0.0}, {});
}

TEST_CASE("the amplifier's input offset and bias currents shift the output as ngspice has it") {
    rtline::AmplifierErrors e;
    e.offset_v = 250e-6;
    e.bias_current_a = 2e-6;  // large on purpose, so the bias term is far above the comparison's scale
    e.offset_current_a = 0.5e-6;
    check_amplified_bridge({-40.0, 2.0, 0.0}, e);
}

namespace {

struct Impedances {
    double out, a, b;
};

// Source impedances by ngspice: the drive zeroed, a 1 A test current into the node (or from B into A
// for the differential), the node voltage is the impedance.
std::vector<Impedances> ngspice_impedances(const Circuit& c, const std::vector<double>& r_t) {
    const bool bridge = rtline::is_bridge(c.topology);
    std::ostringstream net, ctl;
    net << "* source impedance: " << rtline::topology_name(c.topology) << "\n";
    ctl << ".control\nop\nset numdgt=17\n";
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const std::string s = std::to_string(k);
        if (bridge) {
            for (const char* probe : {"d", "a", "b"}) {
                const std::string t = s + probe;
                net << network(c, r_t[k], t, 0.0);
                if (probe[0] == 'd') net << "Ix" << t << " b" << t << " a" << t << " DC 1\n";
                if (probe[0] == 'a') net << "Ix" << t << " 0 a" << t << " DC 1\n";
                if (probe[0] == 'b') net << "Ix" << t << " 0 b" << t << " DC 1\n";
            }
            ctl << "let zd" << s << " = v(a" << s << "d)-v(b" << s << "d)\nlet za" << s << " = v(a" << s << "a)\nlet zb"
                << s << " = v(b" << s << "b)\nprint zd" << s << " za" << s << " zb" << s << "\n";
        } else {
            net << network(c, r_t[k], s, 0.0) << "Ix" << s << " 0 out" << s << " DC 1\n";
            ctl << "let zd" << s << " = v(out" << s << ")\nprint zd" << s << "\n";
        }
    }
    ctl << "quit 0\n.endc\n.end\n";
    auto v = ngspice(net.str() + ctl.str());
    std::vector<Impedances> z;
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const std::string s = std::to_string(k);
        REQUIRE(v.count("zd" + s) == 1);
        if (bridge) {
            REQUIRE(v.count("za" + s) == 1);
            REQUIRE(v.count("zb" + s) == 1);
            z.push_back({v["zd" + s], v["za" + s], v["zb" + s]});
        } else {
            z.push_back({v["zd" + s], v["zd" + s], 0.0});
        }
    }
    return z;
}

void check_impedance(Circuit c) {
    rtline::validate(c);
    const std::vector<double> r_t = thermistor_resistances();
    const std::vector<Impedances> spice = ngspice_impedances(c, r_t);
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const rtline::SourceImpedance z = rtline::source_impedance(c, r_t[k]);
        CAPTURE(rtline::topology_name(c.topology));
        CAPTURE(r_t[k]);
        CAPTURE(z.out_ohm);
        CAPTURE(spice[k].out);
        CHECK(close(z.out_ohm, spice[k].out, 0.0));
        CHECK(close(z.a_ohm, spice[k].a, 0.0));
        CHECK(close(z.b_ohm, spice[k].b, 0.0));
    }
}

Circuit make(Topology t, Drive d, double value, double load = rtline::kNoLoad) {
    Circuit c;
    c.topology = t;
    c.excitation = {d, value};
    c.rs = t == Topology::divider_high || t == Topology::divider_low || t == Topology::shunt_divider ? 8.2e3 : 0.0;
    c.rp = t == Topology::shunt || t == Topology::shunt_divider || t == Topology::shunt_bridge ? 33e3 : 0.0;
    if (rtline::is_bridge(t)) {
        c.r1 = 10e3;
        c.r2 = 12e3;
        c.r3 = 27e3;
    }
    c.load_ohm = load;
    return c;
}

}  // namespace

TEST_CASE("each divider's source impedance matches ngspice, voltage and current drive, with and without a load") {
    for (const Topology t : {Topology::divider_high, Topology::divider_low, Topology::shunt_divider}) {
        check_impedance(make(t, Drive::voltage, 3.3));
        check_impedance(make(t, Drive::voltage, 3.3, 47e3));
        check_impedance(make(t, Drive::current, 100e-6));
        check_impedance(make(t, Drive::current, 100e-6, 47e3));
    }
}

TEST_CASE("a current-driven bare thermistor's and shunt's source impedance matches ngspice") {
    check_impedance(make(Topology::bare, Drive::current, 50e-6));
    check_impedance(make(Topology::bare, Drive::current, 50e-6, 1e6));
    check_impedance(make(Topology::shunt, Drive::current, 100e-6, 1e6));
}

TEST_CASE("each side of a bridge and its differential source impedance match ngspice, loads and drives") {
    for (const Topology t : {Topology::bridge, Topology::shunt_bridge}) {
        check_impedance(make(t, Drive::voltage, 3.3));
        check_impedance(make(t, Drive::voltage, 3.3, 100e3));
        check_impedance(make(t, Drive::current, 200e-6));
        check_impedance(make(t, Drive::current, 200e-6, 100e3));
    }
}

TEST_CASE("the sampling capacitor's charge through the source matches an ngspice transient of the RC") {
    // 100 kΩ into 10 pF (τ = 1 µs) for 8 µs: a 1 V step falls short by exp(-8) V, 1.374 LSB of 12 bits.
    rtline::Sampling s;
    s.bits = 12;
    s.capacitance_f = 10e-12;
    s.acquisition_s = 8e-6;
    const double r = 100e3;
    const std::string net =
        "* sampling capacitor charged through the source\n"
        "V1 in 0 DC 1\nR1 in c 100k\nC1 c 0 10p IC=0\n"
        ".options reltol=1e-9 abstol=1e-15 vntol=1e-12\n"
        ".control\ntran 1n 8u 0 1n uic\nset numdgt=17\nlet n = length(time)\n"
        "let shortfall = 1 - v(c)[n - 1]\nlet tend = time[n - 1]\nprint shortfall tend\nquit 0\n.endc\n.end\n";
    auto v = ngspice(net);
    REQUIRE(v.count("shortfall") == 1);
    REQUIRE(v.count("tend") == 1);
    CHECK(v["tend"] == doctest::Approx(8e-6).epsilon(1e-9));
    const double spice_lsb = 4096.0 * v["shortfall"];
    // 1e-5 relative: the trapezoidal integration at 1 ns steps (τ/1000) agrees to 7e-7 (measured).
    CHECK(rtline::settling_error_lsb(s, r) == doctest::Approx(spice_lsb).epsilon(1e-5));
}
