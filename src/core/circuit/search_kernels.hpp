// Search kernels (internal to the core): one per topology, each giving the output and the thermistor's
// power over the grid for many values of the free resistors, with all that does not depend on the inner
// resistor computed once per outer value. Each does exactly the floating-point operations operate()
// does, in the same order, so its results are bit for bit operate()'s (tests/kernel_test.cpp holds them
// to that): a search built on them ranks and reports exactly as one built on operate() would.
#pragma once

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <span>
#include <vector>

#include "rtline/circuit.hpp"
#include "rtline/grid.hpp"

namespace rtline::kernel {

inline constexpr std::size_t kBlock = 8;  // points a scan takes at a time: four pairs

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

// ---- Two points at once. A Pair is two doubles in one SSE2 register (a GCC vector extension); its
// arithmetic is IEEE per lane, so a pair of results has the bits of two scalar ones. The network code
// below is written once for double and Pair.

using Pair = double __attribute__((vector_size(16)));
using PairBits = std::int64_t __attribute__((vector_size(16)));

template <class T>
T fetch(const double* p) {
    T v;
    std::memcpy(&v, p, sizeof v);
    return v;
}

inline double abs_of(double x) { return std::abs(x); }
inline Pair abs_of(Pair x) {
    return std::bit_cast<Pair>(std::bit_cast<PairBits>(x) & INT64_MAX);
}  // the sign bit cleared, as fabs

// std::max(a, b) by value: a < b ? b : a, NaN included.
inline double max_of(double a, double b) { return a < b ? b : a; }
inline Pair max_of(Pair a, Pair b) { return a < b ? b : a; }

// parallel() as circuit.cpp defines it (an infinite resistance is an open circuit).
inline double par(double a, double b) {
    if (std::isinf(a)) return b;
    if (std::isinf(b)) return a;
    return a * b / (a + b);
}
// a ∥ load for a finite a: what par(a, load) gives, with the test on the load alone (the same for every
// point, so the loop keeps no data-dependent branch).
template <class T>
T par_load(T a, double load) {
    if (std::isinf(load)) return a;
    return a * load / (a + load);
}
// a ∥ b for finite a and b (the grid's R_T and every resistor value a search tries are finite).
template <class T>
T par_finite(T a, double b) {
    return a * b / (a + b);
}

// The network per volt of excitation at one point: output, thermistor voltage, input resistance.
template <class T>
struct PerVolt {
    T out;
    T vt;
    T rin;
};

// What every network knows: the thermistor resistance at each scan position and the load.
struct NetBase {
    std::span<const double> r;  // scan order, ohm
    double load = kNoLoad;
};

// ---- One network per topology. outer(a) takes the first free resistor (two-resistor topologies) and
// must come before inner(b), which takes the last; at<T>(i) is per_volt() at scan position i (and
// i + 1 for a Pair). kResistance: the output is a resistance.

struct DividerHigh : NetBase {  // free: rs
    static constexpr int kFree = 1;
    static constexpr bool kResistance = false;
    double bottom = 0.0;
    void outer(double) {}
    void inner(double rs) { bottom = par(rs, load); }
    template <class T>
    [[nodiscard]] PerVolt<T> at(std::size_t i) const {
        const T rt = fetch<T>(&r[i]);
        const T total = rt + bottom;
        return {bottom / total, rt / total, total};
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
    template <class T>
    [[nodiscard]] PerVolt<T> at(std::size_t i) const {
        const T b = fetch<T>(&bottom[i]);
        const T total = rs + b;
        return {b / total, b / total, total};
    }
};

struct Shunt : NetBase {  // free: rp; the output is the network resistance
    static constexpr int kFree = 1;
    static constexpr bool kResistance = true;
    double rp = 0.0;
    void outer(double) {}
    void inner(double v) { rp = v; }
    template <class T>
    [[nodiscard]] PerVolt<T> at(std::size_t i) const {
        const T x = par_load(par_finite(fetch<T>(&r[i]), rp), load);
        return {T{} + 1.0, T{} + 1.0, x};
    }
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
    template <class T>
    [[nodiscard]] PerVolt<T> at(std::size_t i) const {
        const T t = fetch<T>(&top[i]);
        const T total = t + bottom;
        return {bottom / total, t / total, total};
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
        if constexpr (Loaded) rb = par(r2, r3);
    }
    template <class T>
    [[nodiscard]] PerVolt<T> with_rx(T rx) const {
        const T va0 = rx / (r1 + rx);
        T va = va0;
        T vb = T{} + vb0;
        if constexpr (Loaded) {
            const T ra = par_finite(rx, r1);  // parallel(r1, rx): a·b/(a + b) is symmetric
            const T il = (va0 - vb0) / (ra + rb + load);
            va = va0 - il * ra;
            vb = vb0 + il * rb;
        }
        const T drawn = (1.0 - va) / r1 + (1.0 - vb) / r2;
        return {va - vb, va, 1.0 / drawn};
    }
};

template <bool Loaded>
struct Bridge : BridgeArms<Loaded> {  // free: r1
    static constexpr int kFree = 1;
    static constexpr bool kResistance = false;
    void outer(double) {}
    void inner(double v) { this->set_r1(v); }
    template <class T>
    [[nodiscard]] PerVolt<T> at(std::size_t i) const {
        return this->with_rx(fetch<T>(&this->r[i]));
    }
};

template <bool Loaded>
struct ShuntBridge : BridgeArms<Loaded> {  // free: rp (outer), r1 (inner); Rx and r3 depend on rp alone
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
    template <class T>
    [[nodiscard]] PerVolt<T> at(std::size_t i) const {
        return this->with_rx(fetch<T>(&rx[i]));
    }
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

    // operate(c, R_T).output at scan position i (i and i + 1 for a Pair).
    template <class T = double>
    [[nodiscard]] T output(std::size_t i) const {
        const PerVolt<T> pv = net.template at<T>(i);
        if constexpr (Net::kResistance && D == Drive::ratiometric) return pv.rin;
        return top_v(pv) * pv.out;
    }
    // operate(c, R_T).power_w at scan position i (NaN without a drive on a resistance output).
    [[nodiscard]] double power(std::size_t i) const {
        if constexpr (Net::kResistance && D == Drive::ratiometric) return NAN;
        const PerVolt<double> pv = net.template at<double>(i);
        const double vt = top_v(pv) * pv.vt;
        return vt * vt / net.r[i];
    }

private:
    template <class T>
    [[nodiscard]] T top_v(const PerVolt<T>& pv) const {
        if constexpr (D == Drive::ratiometric) return T{} + 1.0;
        if constexpr (D == Drive::voltage) return T{} + drive;
        return drive * pv.rin;
    }
};

// Calls f(kernel) with the kernel for the base circuit's topology, drive and load, set up on `scan`;
// r_null_ohm is R_T at a bridge's null temperature. Does nothing for the bare thermistor.
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

// The endpoint line's largest deviation as it builds up block by block: the operations of
// max_nonlinearity_pct_fsd (line from the ends, |y − line|, the maximum), so the same value.
template <class K>
class EndpointMax {
public:
    EndpointMax(const K& k, std::span<const double> t, const Ends& e)
        : k_(k), t_(t), slope_((e.hi - e.lo) / (t[1] - t[0])), intercept_(e.lo - slope_ * t[0]) {}

    // Takes the block at scan position s.
    void add_block(std::size_t s) {
        for (std::size_t j = 0; j < kBlock / 2; ++j) {
            const std::size_t i = s + 2 * j;
            const Pair line = slope_ * fetch<Pair>(&t_[i]) + intercept_;
            worst_[j] = max_of(worst_[j], abs_of(k_.template output<Pair>(i) - line));
        }
    }
    // The largest deviation so far (max is exact: the lane order does not change it).
    [[nodiscard]] double worst() const {
        const Pair m = max_of(max_of(worst_[0], worst_[1]), max_of(worst_[2], worst_[3]));
        return max_of(m[0], m[1]);
    }

private:
    static_assert(kBlock == 8, "add_block() and worst() take four pairs");
    const K& k_;
    std::span<const double> t_;
    double slope_;
    double intercept_;
    Pair worst_[kBlock / 2] = {};
};

// max_nonlinearity_pct_fsd against the endpoint line, in scan order, with the same value. It checks
// stop(pct) for the partial maximum after the first block, then after 2, 4, 8, … blocks (a poor
// combination shows within the first block; one that does not is usually scanned to the end, where
// fewer checks cost less) and stops when it is true. stop must be monotone (true for x, true for
// anything larger): the objective is never below a partial maximum.
template <class K, class Stop>
[[nodiscard]] Scan endpoint_scan(const K& k, std::span<const double> t, const Ends& e, Stop&& stop) {
    const std::size_t n = k.size();
    EndpointMax<K> m(k, t, e);
    std::size_t check = kBlock;
    for (std::size_t s = 0; s < n; s += kBlock) {
        m.add_block(s);
        if (s + kBlock == check && check < n) {
            const double pct = m.worst() / e.full_scale * 100.0;
            if (stop(pct)) return {pct, false};
            check *= 2;
        }
    }
    return {m.worst() / e.full_scale * 100.0, true};
}

// The same scan to the end, for values that are wanted exactly.
template <class K>
[[nodiscard]] double endpoint_pct_fsd(const K& k, std::span<const double> t, const Ends& e) {
    EndpointMax<K> m(k, t, e);
    for (std::size_t s = 0; s < k.size(); s += kBlock) m.add_block(s);
    return m.worst() / e.full_scale * 100.0;
}

// The outputs in grid order (for the best-fit and minimax lines, which need every point at once).
template <class K>
void outputs_in_grid_order(const K& k, const ScanGrid& scan, std::vector<double>& y) {
    y.resize(scan.index.size());
    for (std::size_t i = 0; i < scan.index.size(); ++i) y[scan.index[i]] = k.output(i);
}

}  // namespace rtline::kernel
