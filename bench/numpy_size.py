#!/usr/bin/python3
"""A straightforward vectorized numpy search over standard resistor pairs, the yardstick for rtline size.

Written from the published equations, not from rtline's code:
  beta model      R_T = R25 * exp(B * (1/T - 1/T25))                        (docs/sources.md)
  E-series        IEC 60063: E48..E192 mantissas 10**(i/n) rounded to three figures, E192 i = 185 is 9.20
  shunt-divider   v = rs / (rs + R_T || rp)                                 (Pallas-Areny & Webster eq. 2.32)
  shunt-bridge    v = Rx/(r1 + Rx) - r3/(r2 + r3), Rx = R_T || rp, r2 = r1 and r3 = Rx at the span's
                  low end (the bridge nulls there: r1/Rx = r2/r3)
  objective       largest |v - endpoint line| over the span as %FSD of |v(T_hi) - v(T_lo)| (Bentley, 2.1)
The best pair has the least objective; objectives equal to 1e-9 relative are a tie, won by the larger span.

One outer resistor at a time, the inner resistor and the temperatures as a 2-D array: no pruning, no
threads, the whole space. Run: numpy_size.py shunt-divider E96 [--json]; prints the best pair and the time
of the search alone (interpreter start-up and imports not counted).
"""
import json
import sys
import time

import numpy as np

T0 = 273.15


def series(n, lo, hi):
    """The E-n values in [lo, hi] (IEC 60063 rounding rule; E192's one exception)."""
    i = np.arange(n)
    mant = np.round(10.0 ** (i / n), 2)
    if n == 192:
        mant[185] = 9.20
    vals = []
    for dec in range(-1, 8):
        for m in mant:
            v = round(m * 10.0**dec, 6)
            if lo * (1 - 1e-12) <= v <= hi * (1 + 1e-12):
                vals.append(v)
    return np.array(sorted(set(vals)))


def temperatures(lo_c, hi_c, step):
    k = int(np.floor((hi_c - lo_c) / step + 1e-9))
    t = lo_c + step * np.arange(k + 1)
    if hi_c - t[-1] > 1e-9 * step:
        t = np.append(t, hi_c)
    else:
        t[-1] = hi_c
    return t + T0


def search(circuit, n, r25=10e3, beta=3950.0, lo_c=0.0, hi_c=100.0, step=0.25, lo=100.0, hi=1e6):
    """The best pair (outer, inner) = (rp, rs) or (rp, r1), its objective and span, and the search time."""
    t = temperatures(lo_c, hi_c, step)
    values = series(n, lo, hi)
    start = time.perf_counter()
    rt = r25 * np.exp(beta * (1.0 / t - 1.0 / (25.0 + T0)))
    inner = values[:, None]  # rows: the inner resistor; columns: the temperatures
    objs = []
    for rp in values:
        top = rt * rp / (rt + rp)
        if circuit == "shunt-divider":
            v = inner / (inner + top[None, :])
        else:  # shunt-bridge, r2 = r1, r3 = top at the low end
            v = top[None, :] / (inner + top[None, :]) - top[0] / (inner + top[0])
        fs = v[:, -1] - v[:, 0]
        line = v[:, :1] + (fs / (t[-1] - t[0]))[:, None] * (t - t[0])[None, :]
        obj = np.max(np.abs(v - line), axis=1) / np.abs(fs) * 100.0
        objs.append((obj, np.abs(fs)))
    # The least objective, then among the pairs within 1e-9 of it the largest span.
    m = min(o.min() for o, _ in objs)
    win = None
    for k, (o, s) in enumerate(objs):
        tied = np.nonzero(o <= m * (1 + 1e-9))[0]
        for j in tied:
            if win is None or s[j] > win[3]:
                win = (values[k], values[j], o[j], s[j])
    elapsed = time.perf_counter() - start
    return {"outer_ohm": float(win[0]), "inner_ohm": float(win[1]), "max_nonlinearity_pct_fsd": float(win[2]),
            "output_span": float(win[3]), "pairs": int(values.size**2), "points": int(t.size),
            "search_s": elapsed}


def main():
    circuit = sys.argv[1] if len(sys.argv) > 1 else "shunt-divider"
    n = int(sys.argv[2].lstrip("Ee")) if len(sys.argv) > 2 else 96
    r = search(circuit, n)
    if "--json" in sys.argv:
        print(json.dumps(r))
    else:
        print(f"{circuit} E{n}: {r['pairs']} pairs x {r['points']} points: best ({r['outer_ohm']:g}, "
              f"{r['inner_ohm']:g}) ohm, {r['max_nonlinearity_pct_fsd']:.6f} %FSD, span {r['output_span']:.6g}; "
              f"search {r['search_s'] * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
