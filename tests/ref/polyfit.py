"""Least-squares polynomials by numpy.polyfit (python3-numpy), on the points given.

stdin:  {"x": [...], "t_c": [...], "degrees": [D, ...]}
stdout: {"fits": [{"degree": D, "coefficients": [c0, ..., cD] (constant first),
                   "max_error_k": max |polyval - t_c|}, ...]}
"""
import json
import sys

import numpy as np

d = json.load(sys.stdin)
x = np.array(d["x"])
t = np.array(d["t_c"])
fits = []
for deg in d["degrees"]:
    c = np.polyfit(x, t, deg)  # highest power first
    err = np.abs(np.polyval(c, x) - t)
    fits.append({"degree": deg, "coefficients": [float(v) for v in c[::-1]], "max_error_k": float(err.max())})
print(json.dumps({"fits": fits}))
