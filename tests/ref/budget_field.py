"""The budget of a remote-probe divider with every field cause on, computed independently with numpy.

Design (JSON on stdin): a beta thermistor (r25_ohm at 25 degC, b_k) on lead wires (loop lead_ohm at
20 degC, +-lead_tol, copper 0.00393/K from 20 degC after IEC 60028, the cable anywhere in cable_c),
read as divider-low (rs_ohm from the excitation to the output, the thermistor arm to ground) with
the converter's reference as the excitation (v_exc volts, +-ref_tol and +-ref_tc per K from 25 degC:
ratiometric). rs has +-res_tol and +-res_tc per K from 25 degC, the board anywhere in board_c. The
part has +-r25_tol, +-beta_tol (R' = R0 g exp(B (1 + db) (1/T - 1/T0))) and +-drift (g = (1 + dr)
(1 + drift)). A converter of `bits` with gain error +-gain, offset +-offset_lsb and INL +-inl_lsb
rounds y (1 + gain) 2^N + offset + inl to the nearest code (ties to even). The firmware inverts the
nominal divider, subtracts the nominal lead and inverts the beta model. The body runs warm by P/delta,
P = (V_exc R'/(rs' + R' + L))^2 / R' (the divider's current through the thermistor).

mode "corners": at each t_c every corner of the box (the board and cable temperatures at the ends of
their ranges, the quantization as a continuous offset of +-(0.5 + offset + inl) LSB), the body
temperature found by scipy.optimize.brentq: the smallest and largest error.
mode "mc": `trials` draws with numpy's own generator (seed): the tolerances normal with sigma =
tolerance/3, not truncated; the board and cable temperatures, gain, offset and INL uniform. The body
temperature by fixed-point iteration to convergence. Returns per t_c the mean, the standard deviation
with its standard error from the sample's fourth moment, and the signed 0.135/2.5/97.5/99.865 %
and |error| 99.7 % points (nearest rank) each with its standard error sqrt(p (1 - p)/n)/f, the
density f estimated from the sample over +-0.5 standard deviations of the error around the point.
"""
import itertools
import json
import math
import sys

import numpy as np
from scipy.optimize import brentq

from sample_stats import summary

T0 = 298.15
CU = 0.00393


def error(d, t, dr, db, drift, drs, ctc, tb, dl, tc_cable, dref, ctref, gain, q, adc_round):
    r25, b, rs0, l0 = d["r25_ohm"], d["b_k"], d["rs_ohm"], d["lead_ohm"]
    g = (1 + dr) * (1 + drift)
    rs = rs0 * (1 + drs) * (1 + ctc * (tb - T0))
    lead = l0 * (1 + dl) * (1 + CU * (tc_cable - 293.15))
    v = d["v_exc"] * (1 + dref) * (1 + ctref * (tb - T0))

    def res(tk):
        return r25 * g * np.exp(b * (1 + db) * (1 / tk - 1 / T0))

    def power(tk):
        r = res(tk)
        return (v * r / (rs + r + lead)) ** 2 / r

    if adc_round:  # vectorized: fixed point, |dP/dT|/delta is far below 1
        tbody = t + 0 * dr
        for _ in range(200):
            tbody = t + power(tbody) / d["delta_w_per_k"]
    else:
        tbody = brentq(lambda x: x - t - power(x) / d["delta_w_per_k"], t, t + 10, xtol=1e-13, rtol=1e-15)
    r = res(tbody)
    arm = r + lead
    y = arm / (rs + arm)
    n = 2.0 ** d["bits"]
    if adc_round:
        u = np.rint(y * (1 + gain) * n + q) / n
    else:
        u = y * (1 + gain) + q / n
    r_hat = rs0 * u / (1 - u) - l0
    return 1 / (1 / T0 + np.log(r_hat / r25) / b) - t


def corners(d, t):
    e = d
    board = [c + 273.15 for c in e["board_c"]]
    cable = [c + 273.15 for c in e["cable_c"]]
    qmax = 0.5 + e["offset_lsb"] + e["inl_lsb"]
    axes = [(-e["r25_tol"], e["r25_tol"]), (-e["beta_tol"], e["beta_tol"]), (-e["drift"], e["drift"]),
            (-e["res_tol"], e["res_tol"]), (-e["res_tc"], e["res_tc"]), tuple(board),
            (-e["lead_tol"], e["lead_tol"]), tuple(cable), (-e["ref_tol"], e["ref_tol"]),
            (-e["ref_tc"], e["ref_tc"]), (-e["gain"], e["gain"]), (-qmax, qmax)]
    lo, hi = math.inf, -math.inf
    for c in itertools.product(*axes):
        x = float(error(e, t, *c, False))
        lo, hi = min(lo, x), max(hi, x)
    return lo, hi


def mc(d, t, rng):
    n = d["trials"]
    s = lambda tol: rng.normal(0.0, tol / 3.0, n)  # noqa: E731
    u = lambda lo, hi: rng.uniform(lo, hi, n)  # noqa: E731
    dr, db, drift = s(d["r25_tol"]), s(d["beta_tol"]), s(d["drift"])
    drs, ctc = s(d["res_tol"]), s(d["res_tc"])
    tb = u(d["board_c"][0] + 273.15, d["board_c"][1] + 273.15)
    dl = s(d["lead_tol"])
    tc = u(d["cable_c"][0] + 273.15, d["cable_c"][1] + 273.15)
    dref, ctref = s(d["ref_tol"]), s(d["ref_tc"])
    gain = u(-d["gain"], d["gain"])
    q = u(-d["offset_lsb"], d["offset_lsb"]) + u(-d["inl_lsb"], d["inl_lsb"])
    e = error(d, t, dr, db, drift, drs, ctc, tb, dl, tc, dref, ctref, gain, q, True)
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
        else:
            r = mc(d, t, rng)
            r["t_c"] = tc
            res.append(r)
    json.dump({"points": res}, sys.stdout)


main()
