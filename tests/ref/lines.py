#!/usr/bin/python3
"""Reference straight lines through (x, y) data, independent of rtline's C++.

stdin:  {"sets": [{"x": [...], "y": [...]}, ...]}   (x ascending)
stdout: {"sets": [{"endpoint": L, "best_fit": L, "minimax": L}, ...]}
        with L = {"slope", "intercept", "max_abs_dev", "pct_fsd"}

- endpoint: Bentley, Principles of Measurement Systems, 4th ed., s. 2.1: the line through
  (Imin, Omin) and (Imax, Omax), K = (Omax - Omin)/(Imax - Imin), a = Omin - K*Imin.
- best_fit: numpy.polyfit(x, y, 1), the least-squares line.
- minimax: the Chebyshev (L-infinity) line as a linear program solved by scipy.optimize.linprog
  (HiGHS dual simplex): minimise t subject to -t <= y_i - (m*x_i + c) <= t for every i.
- pct_fsd: Bentley's maximum nonlinearity, max|N(I)| / (Omax - Omin) * 100, where N(I) is the
  output minus the line and Omax, Omin are the outputs at the two ends of the input range.
"""
import json
import sys

import numpy as np
from scipy.optimize import linprog


def summarise(x, y, slope, intercept):
    n = y - (slope * x + intercept)
    full_scale = abs(y[-1] - y[0])
    max_abs = float(np.max(np.abs(n)))
    return {"slope": float(slope), "intercept": float(intercept), "max_abs_dev": max_abs,
            "pct_fsd": max_abs / full_scale * 100.0}


def endpoint(x, y):
    k = (y[-1] - y[0]) / (x[-1] - x[0])
    return k, y[0] - k * x[0]


def best_fit(x, y):
    slope, intercept = np.polyfit(x, y, 1)
    return slope, intercept


def minimax(x, y):
    # Centre x for a well-scaled LP; variables (m, c0, t) with c = c0 - m*mean(x).
    xm = float(np.mean(x))
    xc = x - xm
    ones = np.ones_like(x)
    # y - m*xc - c0 <= t  ->  -m*xc - c0 - t <= -y ;  m*xc + c0 - y <= t  ->  m*xc + c0 - t <= y
    a_ub = np.vstack([np.column_stack([-xc, -ones, -ones]), np.column_stack([xc, ones, -ones])])
    b_ub = np.concatenate([-y, y])
    res = linprog(c=[0.0, 0.0, 1.0], A_ub=a_ub, b_ub=b_ub,
                  bounds=[(None, None), (None, None), (0.0, None)], method="highs-ds")
    if res.status != 0:
        raise SystemExit("linprog failed: " + res.message)
    m, c0, _ = res.x
    return m, c0 - m * xm


def main():
    data = json.load(sys.stdin)
    out = []
    for s in data["sets"]:
        x = np.asarray(s["x"], dtype=float)
        y = np.asarray(s["y"], dtype=float)
        out.append({name: summarise(x, y, *fn(x, y))
                    for name, fn in (("endpoint", endpoint), ("best_fit", best_fit), ("minimax", minimax))})
    json.dump({"sets": out}, sys.stdout)


if __name__ == "__main__":
    main()
