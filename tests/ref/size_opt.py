#!/usr/bin/python3
"""Reference for rtline's continuous sizing: the resistor that minimises the largest |nonlinearity|.

Written from the published equations, not from rtline's code:
  beta equation        R(T) = R0 * exp(B * (1/T - 1/T0))                      (T in kelvin)
  Steinhart-Hart       1/T = A + B ln R + C ln^3 R, solved for ln R by Cardano's formula
                       x = (A - 1/T)/C, y = sqrt((B/(3C))^3 + x^2/4), ln R = cbrt(y - x/2) - cbrt(y + x/2)
  divider-low          v = R_T / (rs + R_T)       (R_T in parallel with the load, if any)
  divider-high         v = rs / (rs + R_T)        (rs in parallel with the load, if any)
  shunt                R = R_T * rp / (R_T + rp)  (Pallas-Areny & Webster, ch. 2, the parallel combination)
  bridge               v = R_T/(r1 + R_T) - r3/(r2 + r3), r2 = r1, r3 = R_T(null), no load
  reference lines      endpoint (Bentley §2.1), least squares (numpy.polyfit), minimax (scipy linprog)
  nonlinearity         max |O - line| / |O(T_hi) - O(T_lo)| * 100   (%FSD, Bentley §2.1)

The objective can have several local minima, so: a coarse scan in log R, then
scipy.optimize.minimize_scalar (bounded) between the neighbours of each local minimum of the scan.

stdin:  {"cases": [{"model": {"kind": "beta", "r0_ohm", "t0_c", "b_k"} | {"kind": "sh", "a", "b", "c"},
                    "span": {"lo_c", "hi_c", "step_k"}, "topology", "null_at_c"?, "load_ohm"?,
                    "line"?, "range_ohm"?: [lo, hi], "scan"?: points}]}
stdout: {"results": [{"r_ohm", "max_nonlinearity_pct_fsd", "scan_minima_ohm": [...]}]}
"""
import json
import math
import sys

import numpy as np
from scipy.optimize import linprog, minimize_scalar

ZERO_C_K = 273.15


def resistance_fn(model):
    if model["kind"] == "beta":
        r0, t0, b = model["r0_ohm"], model["t0_c"] + ZERO_C_K, model["b_k"]
        return lambda t: r0 * np.exp(b * (1.0 / t - 1.0 / t0))
    a, b, c = model["a"], model["b"], model["c"]

    def sh(t):
        x = (a - 1.0 / t) / c
        y = np.sqrt((b / (3.0 * c)) ** 3 + x * x / 4.0)
        return np.exp(np.cbrt(y - x / 2.0) - np.cbrt(y + x / 2.0))

    return sh


def par(a, b):
    return a if b is None else a * b / (a + b)


def output_fn(case, r_of_t):
    topo = case["topology"]
    load = case.get("load_ohm")
    if topo == "divider-low":
        return lambda r, rt: par(rt, load) / (r + par(rt, load))
    if topo == "divider-high":
        return lambda r, rt: par(r, load) / (par(r, load) + rt)
    if topo == "shunt":
        return lambda r, rt: par(par(rt, r), load)
    if topo == "bridge":
        r3 = float(r_of_t(np.array([case["null_at_c"] + ZERO_C_K]))[0])
        return lambda r, rt: rt / (r + rt) - r3 / (r + r3)
    raise ValueError("unknown topology " + topo)


def deviation(x, y, line):
    if line == "endpoint":
        slope = (y[-1] - y[0]) / (x[-1] - x[0])
        return y - (y[0] + slope * (x - x[0]))
    if line == "least-squares":
        m, c = np.polyfit(x, y, 1)
        return y - (m * x + c)
    if line == "minimax":
        # variables m, c, t: minimise t with |y - m x - c| <= t (x centred for conditioning)
        xc = x - x.mean()
        scale = np.max(np.abs(y - y.mean())) or 1.0
        yn = (y - y.mean()) / scale
        ones = np.ones_like(xc)
        a_ub = np.vstack([np.column_stack([-xc, -ones, -ones]), np.column_stack([xc, ones, -ones])])
        b_ub = np.concatenate([-yn, yn])
        res = linprog([0, 0, 1], A_ub=a_ub, b_ub=b_ub, bounds=[(None, None)] * 3, method="highs")
        m, c, _ = res.x
        return (yn - (m * xc + c)) * scale
    raise ValueError("unknown line " + line)


def solve(case):
    r_of_t = resistance_fn(case["model"])
    sp = case["span"]
    n = int(round((sp["hi_c"] - sp["lo_c"]) / sp["step_k"]))
    t = sp["lo_c"] + ZERO_C_K + sp["step_k"] * np.arange(n + 1)
    t[-1] = sp["hi_c"] + ZERO_C_K
    rt = r_of_t(t)
    out = output_fn(case, r_of_t)
    line = case.get("line", "endpoint")

    def objective(u):
        y = out(math.exp(u), rt)
        fs = abs(y[-1] - y[0])
        if not fs > 0.0:
            return math.inf
        return float(np.max(np.abs(deviation(t, y, line))) / fs * 100.0)

    lo, hi = (math.log(v) for v in case.get("range_ohm", [1.0, 10e6]))
    scan = int(case.get("scan", 400))
    u = np.linspace(lo, hi, scan)
    f = np.array([objective(v) for v in u])
    minima = [i for i in range(scan) if (i == 0 or f[i] <= f[i - 1]) and (i == scan - 1 or f[i] <= f[i + 1])]
    best_u, best_f = u[int(np.argmin(f))], float(np.min(f))
    found = []
    for i in minima:
        a, b = u[max(i - 1, 0)], u[min(i + 1, scan - 1)]
        res = minimize_scalar(objective, bounds=(a, b), method="bounded", options={"xatol": 1e-10})
        found.append(math.exp(res.x))
        if res.fun < best_f:
            best_u, best_f = res.x, float(res.fun)
    return {"r_ohm": math.exp(best_u), "max_nonlinearity_pct_fsd": best_f, "scan_minima_ohm": found}


def main():
    doc = json.load(sys.stdin)
    json.dump({"results": [solve(c) for c in doc["cases"]]}, sys.stdout)


if __name__ == "__main__":
    main()
