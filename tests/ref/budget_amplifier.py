"""The budget of a bridge read through an amplifier, computed independently with numpy.

Design (JSON on stdin): a beta thermistor (r25_ohm at 25 degC, b_k, +-r25_tol, +-beta_tol:
R' = R0 (1 + dr) exp(B (1 + db) (1/T - 1/T0))) in a bridge excited by v_exc volts: r1 from the
excitation to node A, the thermistor from A to ground; r2 from the excitation to node B, r3 from B to
ground; each fixed resistor +-res_tol, independently. No load, no leads, no self-heating.
By Ohm's law V_A = E R/(r1 + R), V_B = E r3/(r2 + r3), and with the excitation shorted the source
impedance of A is r1 || R, of B r2 || r3.
An amplifier of gain G (+-gain_tol), output offset O (a fraction of the excitation) reads A - B with
an input offset V_os (+-vos_v) drifting by +-drift_v_per_k per K from 25 degC to the board (anywhere
in board_c), bias currents I_b +- I_os/2 into its + (A) and - (B) inputs (+-ib_a, +-ios_a). Each input
current drawn from its node drops it by I Z there, so the amplifier sees
    V_A - V_B + shift,  shift = -(I_b + I_os/2) Z_A + (I_b - I_os/2) Z_B + V_os(T_board)
and its output is out = G ((1 + dg) (V_A - V_B) + shift) + O E: the gain error scales the bridge's
signal, as the budget states each shift at the nominal gain (their product with the gain error, of
second order, is left out on both sides). The converter's reference is the excitation:
u = out / E (ratiometric). A converter of `bits` rounds u 2^N to the nearest code (ties to even).
The firmware inverts the nominal channel (nominal parts, G, O, no amplifier errors): the temperature
it reads is the T at which the nominal channel gives u.

mode "corners": at each t_c every corner of the raw box (the board at the ends of its range, the
quantization as a continuous offset of +-0.5 LSB), the reading by scipy.optimize.brentq on the nominal
channel: the smallest and largest error.
mode "alone": each amplifier term alone at +- its bound (the others nominal, no converter, the board
at the end of its range that is farther from 25 degC for the drift): the largest |error|, brentq.
mode "mc": `trials` draws with numpy's own generator (seed): the tolerances and the amplifier's terms
normal with sigma = bound/3, not truncated; the board uniform. The reading by vectorized bisection on
the nominal channel. Returns per t_c the mean, the standard deviation with its standard error from the
sample's fourth moment, and the signed 0.135/2.5/97.5/99.865 % and |error| 99.7 % points (nearest
rank) each with its standard error sqrt(p (1 - p)/n)/f, the density f from the sample over +-0.5
standard deviations around the point.
"""
import itertools
import json
import math
import sys

import numpy as np
from scipy.optimize import brentq

from sample_stats import summary

T0 = 298.15


def resistance(d, t, dr=0.0, db=0.0):
    return d["r25_ohm"] * (1 + dr) * np.exp(d["b_k"] * (1 + db) * (1 / t - 1 / T0))


def channel(d, r, r1, r2, r3, dg=0.0, vos=0.0, ib=0.0, ios=0.0):
    """The converter input, V/V of the excitation, for thermistor resistance r."""
    e = d["v_exc"]
    va = e * r / (r1 + r)
    vb = e * r3 / (r2 + r3)
    za = r1 * r / (r1 + r)
    zb = r2 * r3 / (r2 + r3)
    shift = -(ib + ios / 2) * za + (ib - ios / 2) * zb + vos
    return (d["gain"] * ((1 + dg) * (va - vb) + shift) + d["offset"] * e) / e


def nominal(d, t):
    return channel(d, resistance(d, t), d["r1_ohm"], d["r2_ohm"], d["r3_ohm"])


def read_brentq(d, u, t):
    return brentq(lambda x: nominal(d, x) - u, t - 40.0, t + 40.0, xtol=1e-13, rtol=1e-15)


def read_bisect(d, u, t):
    lo = np.full_like(u, t - 40.0)
    hi = np.full_like(u, t + 40.0)
    rising = nominal(d, t + 1.0) > nominal(d, t)
    for _ in range(64):
        mid = 0.5 * (lo + hi)
        above = nominal(d, mid) > u
        go_down = above == rising
        hi = np.where(go_down, mid, hi)
        lo = np.where(go_down, lo, mid)
    return 0.5 * (lo + hi)


def measured(d, t, dr, db, d1, d2, d3, dg, vos, drift, tb, ib, ios):
    r = resistance(d, t, dr, db)
    return channel(d, r, d["r1_ohm"] * (1 + d1), d["r2_ohm"] * (1 + d2), d["r3_ohm"] * (1 + d3), dg,
                   vos + drift * (tb - T0), ib, ios)


def corners(d, t):
    board = [c + 273.15 for c in d["board_c"]]
    q = 0.5 / 2.0 ** d["bits"]
    pm = lambda x: (-x, x)  # noqa: E731
    axes = [pm(d["r25_tol"]), pm(d["beta_tol"]), pm(d["res_tol"]), pm(d["res_tol"]), pm(d["res_tol"]),
            pm(d["gain_tol"]), pm(d["vos_v"]), pm(d["drift_v_per_k"]), tuple(board), pm(d["ib_a"]),
            pm(d["ios_a"]), pm(q)]
    lo, hi = math.inf, -math.inf
    for c in itertools.product(*axes):
        u = float(measured(d, t, *c[:-1])) + c[-1]
        x = read_brentq(d, u, t) - t
        lo, hi = min(lo, x), max(hi, x)
    return lo, hi


def alone(d, t):
    board = [c + 273.15 for c in d["board_c"]]
    far = max(board, key=lambda b: abs(b - T0))
    out = {}
    for key, bound, at in [("amp_gain", d["gain_tol"], 5), ("amp_offset", d["vos_v"], 6),
                           ("amp_offset_drift", d["drift_v_per_k"], 7), ("amp_bias", d["ib_a"], 9),
                           ("amp_offset_current", d["ios_a"], 10)]:
        worst = 0.0
        for sign in (-1.0, 1.0):
            args = [0.0] * 11
            args[8] = T0
            args[at] = sign * bound
            if key == "amp_offset_drift":
                args[8] = far
            u = float(measured(d, t, *args))
            worst = max(worst, abs(read_brentq(d, u, t) - t))
        out[key] = worst
    return out


def mc(d, t, rng):
    n = d["trials"]
    s = lambda tol: rng.normal(0.0, tol / 3.0, n)  # noqa: E731
    dr, db = s(d["r25_tol"]), s(d["beta_tol"])
    d1, d2, d3 = s(d["res_tol"]), s(d["res_tol"]), s(d["res_tol"])
    dg, vos, drift = s(d["gain_tol"]), s(d["vos_v"]), s(d["drift_v_per_k"])
    ib, ios = s(d["ib_a"]), s(d["ios_a"])
    tb = rng.uniform(d["board_c"][0] + 273.15, d["board_c"][1] + 273.15, n)
    codes = 2.0 ** d["bits"]
    u = np.rint(measured(d, t, dr, db, d1, d2, d3, dg, vos, drift, tb, ib, ios) * codes) / codes
    e = read_bisect(d, u, t) - t
    return summary(e)


def main():
    d = json.load(sys.stdin)
    res = []
    rng = np.random.default_rng(d.get("seed", 1))
    for tc in d["t_c"]:
        t = tc + 273.15
        if d["mode"] == "corners":
            lo, hi = corners(d, t)
            res.append({"t_c": tc, "low_k": lo, "high_k": hi})
        elif d["mode"] == "alone":
            r = alone(d, t)
            r["t_c"] = tc
            res.append(r)
        else:
            r = mc(d, t, rng)
            r["t_c"] = tc
            res.append(r)
    json.dump({"points": res}, sys.stdout)


main()
