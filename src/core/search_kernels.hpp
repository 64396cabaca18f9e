// Search kernels (internal to the core): one per topology, each giving the output and the thermistor's
// power over the grid for many values of the free resistors, with all that does not depend on the inner
// resistor computed once per outer value. Each does exactly the floating-point operations operate()
// does, in the same order, so its results are bit for bit operate()'s (tests/kernel_test.cpp holds them
// to that): a search built on them ranks and reports exactly as one built on operate() would.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <span>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/grid.hpp"

namespace rtline::kernel {

inline constexpr std::size_t kBlock = 16;  // points between the checks of a scan that may stop early

// The grid in scan order: the two ends first (they fix the endpoint line), then the interior coarse to
// fine (the middle, the quarters, the eighths, …), so a poor candidate shows a deviation larger than the
// best so far within the first few points and its scan can stop there. Padded to whole blocks with
// copies of the first point: a repeated point repeats a deviation, which leaves every maximum unchanged.
struct ScanGrid {
    std::vector<double> t_k;                                       // padded
    std::vector<double> r_ohm;                                     // padded
    std::vector<std::size_t> index;                                // the grid index of each scan position, not padded
    [[nodiscard]] std::size_t size() const { return t_k.size(); }  // a whole number of blocks
};
[[nodiscard]] ScanGrid scan_grid(const Grid& grid);

// parallel() as circuit.cpp defines it (an infinite resistance is an open circuit), written as selects
// so that loops over points stay branch-free and vectorize.
inline double par(double a, double b) {
    const double p = a * b / (a + b);
    return std::isinf(a) ? b : (std::isinf(b) ? a : p);
}

// The network per volt of excitation at one point: output, thermistor voltage, input resistance.
struct PerVolt {
    double out;
    double vt;
    double rin;
};

// What every network knows: the thermistor resistance at each scan position and the load.
struct NetBase {
    std::span<const double> r;  // scan order, ohm
    double load = kNoLoad;
};

// ---- One network per topology. outer(a) takes the first free resistor (two-resistor topologies),
// inner(b) the last; at(i) is per_volt() at scan position i. kResistance: the output is a resistance.

struct DividerHigh : NetBase {  // free: rs
    static constexpr int kFree = 1;
    static constexpr bool kResistance = false;
    double bottom = 0.0;
    void outer(double) {}
    void inner(double rs) { bottom = par(rs, load); }
    [[nodiscard]] PerVolt at(std::size_t i) const {
        const double total = r[i] + bottom;
        return {bottom / total, r[i] / total, total};
    }
};

struct DividerLow : NetBase {  // free: rs; the thermistor ∥ load does not depend on rs
    static constexpr int kFree = 1;
    static constexpr bool kResistance = false;
    std::vector<double> bottom;
    double rs = 0.0;
    void prepare() {
        bottom.resize(r.size());
        for (std::size_t i = 0; i < r.size(); ++i) bottom[i] = par(r[i], load);
    }
    void outer(double) {}
    void inner(double v) { rs = v; }
    [[nodiscard]] PerVolt at(std::size_t i) const {
        const double total = rs + bottom[i];
        return {bottom[i] / total, bottom[i] / total, total};
    }
};

struct Shunt : NetBase {  // free: rp; the output is the network resistance
    static constexpr int kFree = 1;
    static constexpr bool kResistance = true;
    double rp = 0.0;
    void outer(double) {}
    void inner(double v) { rp = v; }
    [[nodiscard]] PerVolt at(std::size_t i) const { return {1.0, 1.0, par(par(r[i], rp), load)}; }
};

struct ShuntDivider : NetBase {  // free: rp (outer), rs (inner); R_T ∥ rp depends on rp alone
    static constexpr int kFree = 2;
    static constexpr bool kResistance = false;
    std::vector<double> top;
    double bottom = 0.0;
    void prepare() { top.resize(r.size()); }
    void outer(double rp) {
        for (std::size_t i = 0; i < r.size(); ++i) top[i] = par(r[i], rp);
    }
    void inner(double rs) { bottom = par(rs, load); }
    [[nodiscard]] PerVolt at(std::size_t i) const {
        const double total = top[i] + bottom;
        return {bottom / total, top[i] / total, total};
    }
};

// The Wheatstone bridge with r2 = r1 and r3 = Rx at the null (complete_bridge), Rx = R_T or R_T ∥ rp:
// node A is r1 over Rx, node B r2 over r3; with a load (Loaded) the load closes the loop between them.
// Loaded is a template argument so that the unloaded loop carries none of the loaded arithmetic.
template <bool Loaded>
struct BridgeArms : NetBase {
    double r1 = 0.0;
    double r2 = 0.0;
    double r3 = 0.0;
    double vb0 = 0.0;
    double rb = 0.0;
    void set_r1(double v) {
        r1 = v;
        r2 = r1;
        vb0 = r3 / (r2 + r3);
        rb = par(r2, r3);
    }
    [[nodiscard]] PerVolt with_rx(double rx) const {
        const double va0 = rx / (r1 + rx);
        double va = va0;
        double vb = vb0;
        if constexpr (Loaded) {
            const double ra = par(r1, rx);
            const double il = (va0 - vb0) / (ra + rb + load);
            va = va0 - il * ra;
            vb = vb0 + il * rb;
        }
        const double drawn = (1.0 - va) / r1 + (1.0 - vb) / r2;
        return {va - vb, va, 1.0 / drawn};
    }
};

template <bool Loaded>
struct Bridge : BridgeArms<Loaded> {  // free: r1
    static constexpr int kFree = 1;
    static constexpr bool kResistance = false;
    void outer(double) {}
    void inner(double v) { this->set_r1(v); }
    [[nodiscard]] PerVolt at(std::size_t i) const { return this->with_rx(this->r[i]); }
};

// free: rp (outer), r1 (inner); Rx = R_T ∥ rp and r3 depend on rp alone. outer() before inner().
template <bool Loaded>
struct ShuntBridge : BridgeArms<Loaded> {
    static constexpr int kFree = 2;
    static constexpr bool kResistance = false;
    double r_null = 0.0;  // R_T at the null temperature
    std::vector<double> rx;
    void prepare() { rx.resize(this->r.size()); }
    void outer(double rp) {
        for (std::size_t i = 0; i < this->r.size(); ++i) rx[i] = par(this->r[i], rp);
        this->r3 = par(r_null, rp);
    }
    void inner(double v) { this->set_r1(v); }
    [[nodiscard]] PerVolt at(std::size_t i) const { return this->with_rx(rx[i]); }
};

// ---- The drive on top of a network, as operate() applies it.

template <class Net, Drive D>
struct Kernel {
    Net net;
    double drive = 1.0;  // V or A; 1 for ratiometric

    static constexpr int kFree = Net::kFree;

    void outer(double a) { net.outer(a); }
    void inner(double b) { net.inner(b); }
    [[nodiscard]] std::size_t size() const { return net.r.size(); }

    // operate(c, R_T).output at scan position i.
    [[nodiscard]] double output(std::size_t i) const {
        const PerVolt pv = net.at(i);
        if constexpr (Net::kResistance && D == Drive::ratiometric) return pv.rin;
        return top_v(pv) * pv.out;
    }
    // operate(c, R_T).power_w at scan position i (NaN without a drive on a resistance output).
    [[nodiscard]] double power(std::size_t i) const {
        const PerVolt pv = net.at(i);
        if constexpr (Net::kResistance && D == Drive::ratiometric) return NAN;
        const double vt = top_v(pv) * pv.vt;
        return vt * vt / net.r[i];
    }

private:
    [[nodiscard]] double top_v(const PerVolt& pv) const {
        if constexpr (D == Drive::ratiometric) return 1.0;
        if constexpr (D == Drive::voltage) return drive;
        return drive * pv.rin;
    }
};

// Calls f(kernel) with the kernel for the spec's topology and drive, set up on `scan`; r_null_ohm is
// R_T at a bridge's null temperature. Requires a topology with one or two free resistors.
template <class F>
void with_kernel(const Circuit& base, double r_null_ohm, const ScanGrid& scan, F&& f) {
    auto drive = [&]<class Net>(Net net) {
        net.r = scan.r_ohm;
        net.load = base.load_ohm;
        if constexpr (requires { net.prepare(); }) net.prepare();
        const double v = base.excitation.value;
        switch (base.excitation.drive) {
            case Drive::ratiometric: f(Kernel<Net, Drive::ratiometric>{net, 1.0}); return;
            case Drive::voltage: f(Kernel<Net, Drive::voltage>{net, v}); return;
            case Drive::current: f(Kernel<Net, Drive::current>{net, v}); return;
        }
    };
    auto bridge = [&]<class Net>(Net net) {
        net.r3 = r_null_ohm;  // the plain bridge: r3 = R_T at the null; the shunt-bridge sets it per rp
        if constexpr (requires { net.r_null; }) net.r_null = r_null_ohm;
        drive(net);
    };
    const bool loaded = std::isfinite(base.load_ohm);
    switch (base.topology) {
        case Topology::divider_high: drive(DividerHigh{}); return;
        case Topology::divider_low: drive(DividerLow{}); return;
        case Topology::shunt: drive(Shunt{}); return;
        case Topology::shunt_divider: drive(ShuntDivider{}); return;
        case Topology::bridge: loaded ? bridge(Bridge<true>{}) : bridge(Bridge<false>{}); return;
        case Topology::shunt_bridge: loaded ? bridge(ShuntBridge<true>{}) : bridge(ShuntBridge<false>{}); return;
        case Topology::bare: return;
    }
}

// ---- What the searches ask of a kernel, set to one combination (outer() then inner()).

// The two end outputs (scan positions 0 and 1) and whether the output changes over the span: a full
// scale of zero, or one at rounding level next to the output itself (as sizing's unchanging()).
struct Ends {
    double lo = 0.0;
    double hi = 0.0;
    double full_scale = 0.0;
    bool unchanging = true;
};

template <class K>
[[nodiscard]] Ends ends(const K& k) {
    Ends e{k.output(0), k.output(1)};
    e.full_scale = std::abs(e.hi - e.lo);
    const double level = std::max(std::abs(e.lo), std::abs(e.hi));
    e.unchanging = !(e.full_scale > 1e-12 * level) || !std::isfinite(e.full_scale);
    return e;
}

// A scan against the endpoint line that may stop early: the objective when complete; when stopped, a
// value no greater than the objective that already exceeds the limit.
struct Scan {
    double pct_fsd = 0.0;
    bool complete = true;
};

// The largest of a block of values (a tree of pairwise maxima, which vectorizes; max is exact, so the
// order does not change the result).
inline double block_max(const double (&v)[kBlock]) {
    double m[kBlock];
    for (std::size_t j = 0; j < kBlock; ++j) m[j] = v[j];
    for (std::size_t w = kBlock / 2; w >= 1; w /= 2) {
        for (std::size_t j = 0; j < w; ++j) m[j] = std::max(m[j], m[j + w]);
    }
    return m[0];
}

// max_nonlinearity_pct_fsd against the endpoint line, in scan order, with the same operations (so the same
// value); stops after a block whose partial maximum gives a %FSD for which stop(pct) is true. stop must be
// monotone (true for x, true for anything larger): the objective is never below the partial maximum.
template <class K, class Stop>
[[nodiscard]] Scan endpoint_scan(const K& k, std::span<const double> t, const Ends& e, Stop&& stop) {
    const std::size_t n = k.size();
    const double slope = (e.hi - e.lo) / (t[1] - t[0]);
    const double intercept = e.lo - slope * t[0];
    double worst[kBlock] = {};  // the largest deviation so far in each lane
    for (std::size_t s = 0; s < n; s += kBlock) {
        for (std::size_t j = 0; j < kBlock; ++j) {
            worst[j] = std::max(worst[j], std::abs(k.output(s + j) - (slope * t[s + j] + intercept)));
        }
        if (s + kBlock < n) {
            const double pct = block_max(worst) / e.full_scale * 100.0;
            if (stop(pct)) return {pct, false};
        }
    }
    return {block_max(worst) / e.full_scale * 100.0, true};
}

// The outputs in grid order (for the best-fit and minimax lines, which need every point at once).
template <class K>
void outputs_in_grid_order(const K& k, const ScanGrid& scan, std::vector<double>& y) {
    y.resize(scan.index.size());
    for (std::size_t i = 0; i < scan.index.size(); ++i) y[scan.index[i]] = k.output(i);
}

}  // namespace rtline::kernel
