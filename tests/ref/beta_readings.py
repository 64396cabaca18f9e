"""The beta model fitted to R-T points with the temperature column read three ways, by numpy.

The fit is the one include/rtline/fit.hpp states: least squares on 1/T = a + (1/B)·ln R, each row
weighted by T² (so that it minimizes temperature residuals to first order); R25 = exp((1/298.15 - a)·B);
the residual at a point is T(model at R) - T.

stdin:  {"t": [...typed temperature numbers...], "r_ohm": [...]}
stdout: {"celsius"|"kelvin"|"fahrenheit": {"b_k", "r25_ohm", "max_residual_k"}}
"""
import json
import sys

import numpy as np

d = json.load(sys.stdin)
t = np.array(d["t"], dtype=float)
r = np.array(d["r_ohm"], dtype=float)


def fit(t_k):
    w = t_k**2
    a = np.column_stack([w, w * np.log(r)])
    (x0, x1), *_ = np.linalg.lstsq(a, w / t_k, rcond=None)
    t_model = 1.0 / (x0 + x1 * np.log(r))
    return {
        "b_k": float(1.0 / x1),
        "r25_ohm": float(np.exp((1.0 / 298.15 - x0) / x1)),
        "max_residual_k": float(np.max(np.abs(t_model - t_k))),
    }


print(json.dumps({
    "celsius": fit(t + 273.15),
    "kelvin": fit(t),
    "fahrenheit": fit((t - 32.0) / 1.8 + 273.15),
}))
