"""Exact temperature at every code of an ADC reading a thermistor circuit.

Written from the published equations, independently of rtline's C++:
  - beta model (docs/sources.md): R(T) = R0 * exp(B * (1/T - 1/T0)), T in kelvin, so
    T(R) = 1 / (1/T0 + ln(R/R0) / B);
  - the network's output by Ohm's law (loads in parallel with the lower leg), per volt of excitation:
      divider-high:  v = B / (R_T + B),  B = rs || load
      divider-low:   v = P / (rs + P),   P = R_T || load
      shunt-divider: v = B / (Q + B),    Q = R_T || rp;
    a bridge (r1 over R_x at node A, r2 over r3 at node B, R_x = R_T or R_T || rp, the load between
    A and B) by Kirchhoff's current law at A and B, solved with numpy.linalg.solve: v = V_A - V_B;
    a bare or shunt thermistor driven by a current I: V = I * (R_T [|| rp] || load), in volts;
  - an amplifier out = gain * v + offset (ideal), and the converter's reference ("reference", 1 for
    a ratiometric reading, volts otherwise): the converter reads out / reference;
  - a ratiometric N-bit ADC whose code k stands for a ratio by its transfer (common practice, no
    formal source): rounding k / 2^N, truncating (k + 1/2) / 2^N, full-scale k / (2^N - 1).
The ratio is inverted numerically (scipy.optimize.brentq on ln R_T), not by rtline's closed form.

stdin:  {"r25_ohm", "b_k", "t0_c", "topology", "rs_ohm"?, "rp_ohm"?, "r1_ohm"?, "r2_ohm"?, "r3_ohm"?,
         "load_ohm"?, "current_a"?, "gain"?, "offset"?, "reference"?, "adc_bits", "lo_c", "hi_c",
         "transfer"?, "table"?: [{"code", "t_c"}]}
stdout: {"code_lo", "code_hi", "t_c": [T at code_lo .. code_hi, degC], "ratio_lo", "ratio_hi"
         (the converter's input ratio at the span's ends), "open_code", "short_code",
         "table_max_error_c"?, "table_at_code"?}  (table error: numpy.interp between the breakpoints)
"""
import json
import math
import sys

import numpy as np
from scipy.optimize import brentq


def par(a, b):
    if b is None or math.isinf(b):
        return a
    return a * b / (a + b)


def main():
    d = json.load(sys.stdin)
    r0, b, t0 = d["r25_ohm"], d["b_k"], d["t0_c"] + 273.15
    topo, rs = d["topology"], d.get("rs_ohm")
    rp, load = d.get("rp_ohm"), d.get("load_ohm")
    gain, amp_offset, reference = d.get("gain", 1.0), d.get("offset", 0.0), d.get("reference", 1.0)

    def bridge(r_t):
        rx = par(r_t, rp) if topo == "shunt-bridge" else r_t
        r1, r2, r3 = d["r1_ohm"], d["r2_ohm"], d["r3_ohm"]
        g_l = 0.0 if load is None else 1.0 / load
        # KCL at A and B with the excitation node at 1 V: G·[V_A, V_B] = [1/r1, 1/r2].
        g = np.array([[1.0 / r1 + 1.0 / rx + g_l, -g_l], [-g_l, 1.0 / r2 + 1.0 / r3 + g_l]])
        va, vb = np.linalg.solve(g, np.array([1.0 / r1, 1.0 / r2]))
        return va - vb

    def network(r_t):
        if topo in ("bridge", "shunt-bridge"):
            return bridge(r_t)
        if topo == "bare":
            return d["current_a"] * par(r_t, load)
        if topo == "shunt":
            return d["current_a"] * par(par(r_t, rp), load)
        if topo == "divider-high":
            bottom = par(rs, load)
            return bottom / (r_t + bottom)
        if topo == "divider-low":
            p = par(r_t, load)
            return p / (rs + p)
        if topo == "shunt-divider":
            bottom = par(rs, load)
            q = par(r_t, rp)
            return bottom / (q + bottom)
        raise SystemExit("unknown topology " + topo)

    def ratio(r_t):
        return (gain * network(r_t) + amp_offset) / reference

    def resistance(t_k):
        return r0 * math.exp(b * (1.0 / t_k - 1.0 / t0))

    def temperature(r):
        return 1.0 / (1.0 / t0 + math.log(r / r0) / b)

    lo_k, hi_k = d["lo_c"] + 273.15, d["hi_c"] + 273.15
    transfer = d.get("transfer", "rounding")
    n = 2 ** d["adc_bits"]
    steps = n - 1 if transfer == "full-scale" else n
    offset = 0.5 if transfer == "truncating" else 0.0
    v_lo, v_hi = ratio(resistance(lo_k)), ratio(resistance(hi_k))
    # The rail codes 0 and 2^N - 1 are never readings.
    code_lo = max(1, math.ceil(min(v_lo, v_hi) * steps - offset - 1e-9))
    code_hi = min(n - 2, math.floor(max(v_lo, v_hi) * steps - offset + 1e-9))
    ln_a, ln_b = math.log(resistance(hi_k)) - 1.0, math.log(resistance(lo_k)) + 1.0
    temps = []
    for k in range(code_lo, code_hi + 1):
        v = (k + offset) / steps
        ln_r = brentq(lambda x: ratio(math.exp(x)) - v, ln_a, ln_b, xtol=1e-15, rtol=1e-15, maxiter=500)
        t = min(max(temperature(math.exp(ln_r)), lo_k), hi_k)
        temps.append(t - 273.15)
    def quantize(v):
        x = v * steps
        k = math.floor(x) if transfer == "truncating" else math.floor(x + 0.5)
        return min(max(k, 0), n - 1)

    # A broken sensor through the same circuit equations: R_T -> infinity (open), R_T -> 0 (short).
    out = {"code_lo": code_lo, "code_hi": code_hi, "t_c": temps, "ratio_lo": v_lo, "ratio_hi": v_hi,
           "open_code": quantize(ratio(1e18)), "short_code": quantize(ratio(1e-12))}
    if "table" in d:
        codes = np.array([e["code"] for e in d["table"]], dtype=float)
        t_tab = np.array([e["t_c"] for e in d["table"]])
        ks = np.arange(code_lo, code_hi + 1, dtype=float)
        err = np.abs(np.interp(ks, codes, t_tab) - np.array(temps))
        out["table_max_error_c"] = float(err.max())
        out["table_at_code"] = int(ks[int(err.argmax())])
    print(json.dumps(out))


main()
