"""Reference for the table model: scipy's monotone piecewise-cubic Hermite interpolant (PCHIP,
Fritsch & Carlson 1980 / Fritsch & Butland 1984) through (x, y), evaluated with its first derivative.

stdin:  {"x": [ascending], "y": [...], "xi": [...]}
stdout: {"yi": [...], "dyi": [...]}   (dyi = dy/dx at xi)
"""
import json
import sys

import numpy as np
from scipy.interpolate import PchipInterpolator

doc = json.load(sys.stdin)
x = np.asarray(doc["x"], dtype=float)
y = np.asarray(doc["y"], dtype=float)
xi = np.asarray(doc["xi"], dtype=float)
p = PchipInterpolator(x, y, extrapolate=False)
json.dump({"yi": p(xi).tolist(), "dyi": p.derivative()(xi).tolist()}, sys.stdout)
