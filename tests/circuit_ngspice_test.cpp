// rtline::operate() against ngspice's DC operating point. Each case writes one netlist holding a copy of
// the network per temperature, the thermistor at that temperature a plain resistor, runs `ngspice -b`
// and compares the output, the thermistor's voltage and its power (ngspice's own @R[p]) with rtline's.
#include <doctest/doctest.h>

#include <cmath>
#include <map>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/thermistor.hpp"
#include "support.hpp"

namespace {

using rtline::Circuit;
using rtline::Drive;
using rtline::Topology;

using rtline::test::close;
using rtline::test::num;
using rtline::test::thermistor_resistances;

// One copy of the network, suffix k on every node and element. Nodes: top (the drive), out (divider
// output), a and b (bridge arms); ground is 0. Returns the copy's elements and fills the ngspice
// expressions of its output and thermistor voltage.
std::string network(const Circuit& c, double r_t, int k, std::string& out_expr, std::string& vt_expr) {
    const std::string s = std::to_string(k);
    const std::string top = "top" + s, out = "out" + s, a = "a" + s, b = "b" + s;
    std::ostringstream n;
    switch (c.excitation.drive) {
        case Drive::ratiometric: n << "V" << s << " " << top << " 0 DC 1\n"; break;
        case Drive::voltage: n << "V" << s << " " << top << " 0 DC " << num(c.excitation.value) << "\n"; break;
        // SPICE: a current source pushes its current from n+ through itself into n-.
        case Drive::current: n << "I" << s << " 0 " << top << " DC " << num(c.excitation.value) << "\n"; break;
    }
    auto r = [&](const std::string& name, const std::string& p, const std::string& q, double ohm) {
        n << name << s << " " << p << " " << q << " " << num(ohm) << "\n";
    };
    std::string load_p = out, load_q = "0";
    switch (c.topology) {
        case Topology::bare:
        case Topology::shunt:
            r("Rt", top, "0", r_t);
            if (c.topology == Topology::shunt) r("Rp", top, "0", c.rp);
            load_p = top;
            out_expr = "v(" + top + ")";
            vt_expr = "v(" + top + ")";
            break;
        case Topology::divider_high:
            r("Rt", top, out, r_t);
            r("Rs", out, "0", c.rs);
            out_expr = "v(" + out + ")";
            vt_expr = "v(" + top + ")-v(" + out + ")";
            break;
        case Topology::divider_low:
            r("Rs", top, out, c.rs);
            r("Rt", out, "0", r_t);
            out_expr = "v(" + out + ")";
            vt_expr = "v(" + out + ")";
            break;
        case Topology::shunt_divider:
            r("Rt", top, out, r_t);
            r("Rp", top, out, c.rp);
            r("Rs", out, "0", c.rs);
            out_expr = "v(" + out + ")";
            vt_expr = "v(" + top + ")-v(" + out + ")";
            break;
        case Topology::bridge:
        case Topology::shunt_bridge:
            r("R1", top, a, c.r1);
            r("Rt", a, "0", r_t);
            if (c.topology == Topology::shunt_bridge) r("Rp", a, "0", c.rp);
            r("R2", top, b, c.r2);
            r("R3", b, "0", c.r3);
            load_p = a;
            load_q = b;
            out_expr = "v(" + a + ")-v(" + b + ")";
            vt_expr = "v(" + a + ")";
            break;
    }
    if (std::isfinite(c.load_ohm)) r("RL", load_p, load_q, c.load_ohm);
    return n.str();
}

struct Spice {
    double output, thermistor_v, power_w;
};

// Runs ngspice in batch mode on one netlist with a copy of `c` per thermistor resistance.
std::vector<Spice> ngspice_op(const Circuit& c, const std::vector<double>& r_t) {
    std::ostringstream net, ctl;
    net << "* rtline test network: " << rtline::topology_name(c.topology) << "\n";
    // numdgt=17: print 18 significant figures, far beyond the 1e-12 compared.
    ctl << ".control\nop\nset numdgt=17\n";
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        std::string out_expr, vt_expr;
        net << network(c, r_t[k], static_cast<int>(k), out_expr, vt_expr);
        ctl << "let o" << k << " = " << out_expr << "\nlet vt" << k << " = " << vt_expr << "\n"
            << "let p" << k << " = @rt" << k << "[p]\nprint o" << k << " vt" << k << " p" << k << "\n";
    }
    ctl << "quit 0\n.endc\n.end\n";
    const rtline::test::TempPath path(".cir");
    rtline::test::write_file(path.str(), net.str() + ctl.str());
    const auto run = rtline::test::run_shell("ngspice -b '" + path.str() + "'");
    INFO("netlist:\n" << net.str() << ctl.str() << "ngspice stdout:\n" << run.out << "stderr:\n" << run.err);
    REQUIRE(run.code == 0);
    std::map<std::string, double> v;
    const std::regex line(R"(^\s*(\w+)\s*=\s*([-+0-9.eE]+)\s*$)");
    std::istringstream lines(run.out);
    for (std::string l; std::getline(lines, l);) {
        std::smatch m;
        if (std::regex_match(l, m, line)) v[m[1]] = std::stod(m[2]);
    }
    std::vector<Spice> result;
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const std::string s = std::to_string(k);
        REQUIRE(v.count("o" + s) == 1);
        REQUIRE(v.count("vt" + s) == 1);
        REQUIRE(v.count("p" + s) == 1);
        result.push_back({v["o" + s], v["vt" + s], v["p" + s]});
    }
    return result;
}



void check_against_ngspice(const Circuit& c) {
    REQUIRE_MESSAGE(rtline::test::have_program("ngspice"), "ngspice is missing: run scripts/setup.sh");
    rtline::validate(c);
    const std::vector<double> r_t = thermistor_resistances();
    const std::vector<Spice> spice = ngspice_op(c, r_t);
    for (std::size_t k = 0; k < r_t.size(); ++k) {
        const rtline::OperatingPoint op = rtline::operate(c, r_t[k]);
        const double v_scale =
            c.excitation.drive == Drive::current ? std::abs(spice[k].thermistor_v) : c.excitation.value;
        const double p_scale = v_scale * v_scale / r_t[k];
        CAPTURE(r_t[k]);
        CAPTURE(op.output);
        CAPTURE(spice[k].output);
        CHECK(close(op.output, spice[k].output, v_scale));
        CHECK(close(op.thermistor_v, spice[k].thermistor_v, v_scale));
        CHECK(close(op.power_w, spice[k].power_w, p_scale));
    }
}

Circuit make(Topology t, Drive d, double drive_value) {
    Circuit c;
    c.topology = t;
    c.excitation = {d, drive_value};
    return c;
}

}  // namespace

TEST_CASE("a divider-high's output, thermistor voltage and power match ngspice at 3.3 V") {
    Circuit c = make(Topology::divider_high, Drive::voltage, 3.3);
    c.rs = 10e3;
    check_against_ngspice(c);
}

TEST_CASE("a ratiometric divider-low matches ngspice driven by 1 V, with and without a load") {
    Circuit c = make(Topology::divider_low, Drive::ratiometric, 1.0);
    c.rs = 5.6e3;
    check_against_ngspice(c);
    c.load_ohm = 22e3;  // a low ADC input resistance, so the load matters
    check_against_ngspice(c);
}

TEST_CASE("a shunt-divider matches ngspice at 5 V") {
    Circuit c = make(Topology::shunt_divider, Drive::voltage, 5.0);
    c.rs = 8.2e3;
    c.rp = 22e3;
    check_against_ngspice(c);
}

TEST_CASE("a bridge with a load between A and B matches ngspice, the load solved exactly") {
    Circuit c = make(Topology::bridge, Drive::voltage, 3.3);
    c.r1 = 10e3;
    c.r2 = 12e3;
    c.r3 = 27e3;
    c.load_ohm = 47e3;
    check_against_ngspice(c);
}

TEST_CASE("a shunt-bridge with a load between A and B matches ngspice") {
    Circuit c = make(Topology::shunt_bridge, Drive::voltage, 2.5);
    c.rp = 33e3;
    c.r1 = 10e3;
    c.r2 = 10e3;
    c.r3 = 6.8e3;
    c.load_ohm = 100e3;
    check_against_ngspice(c);
}

TEST_CASE("a current-driven loaded bridge matches ngspice with a current source") {
    Circuit c = make(Topology::bridge, Drive::current, 200e-6);
    c.r1 = 4.7e3;
    c.r2 = 4.7e3;
    c.r3 = 15e3;
    c.load_ohm = 220e3;
    check_against_ngspice(c);
}

TEST_CASE("a current-driven shunt and a current-driven bare thermistor match ngspice") {
    Circuit shunt = make(Topology::shunt, Drive::current, 100e-6);
    shunt.rp = 10e3;
    check_against_ngspice(shunt);
    shunt.load_ohm = 1e6;
    check_against_ngspice(shunt);
    const Circuit bare = make(Topology::bare, Drive::current, 50e-6);
    check_against_ngspice(bare);
}
