"""The discrete minimax polynomial as a linear program, solved by scipy.optimize.linprog (HiGHS).

minimize E over (c_0..c_D, E) subject to  -E <= sum_i c_i T_i(x_j) - t_j <= E  for every point j,
with Chebyshev polynomials T_i (numpy.polynomial.chebyshev) as the basis for conditioning.

stdin:  {"x": [...], "t_c": [...], "degrees": [D, ...]}
stdout: {"max_error_k": [E for each degree]}
"""
import json
import sys

import numpy as np
from numpy.polynomial import chebyshev
from scipy.optimize import linprog

d = json.load(sys.stdin)
x = np.array(d["x"])
t = np.array(d["t_c"])
n = len(x)
ones = np.ones((n, 1))
errors = []
for deg in d["degrees"]:
    v = chebyshev.chebvander(x, deg)
    a_ub = np.vstack([np.hstack([v, -ones]), np.hstack([-v, -ones])])
    b_ub = np.concatenate([t, -t])
    cost = np.zeros(deg + 2)
    cost[-1] = 1.0
    res = linprog(cost, A_ub=a_ub, b_ub=b_ub, bounds=[(None, None)] * (deg + 1) + [(0, None)], method="highs")
    if not res.success:
        raise SystemExit("linprog failed: " + res.message)
    errors.append(float(np.abs(chebyshev.chebval(x, res.x[: deg + 1]) - t).max()))
print(json.dumps({"max_error_k": errors}))
