"""Reference for the Steinhart-Hart and beta least-squares fits, from the published model
(Steinhart & Hart 1968: 1/T = A + B ln R + C ln^3 R; the beta model as 1/T = a + (1/B) ln R) and the
weighting stated in include/rtline/fit.hpp: every row multiplied by T^2, so that a residual in 1/T
counts as a residual in temperature (d(1/T) = -dT/T^2). Solved by numpy.linalg.lstsq (SVD). Each
column is divided by its norm before the solve (plain column equilibration) and the solution
multiplied back.

stdin:  {"model": "sh" | "beta", "points": [{"t_k": ..., "r_ohm": ...}, ...], "t0_k": (beta only)}
stdout: sh:   {"a", "b", "c", "rank"}
        beta: {"a", "inv_b", "b_k", "r0_ohm", "rank"}   (R0 at t0_k: ln R0 = B (1/t0 - a))
"""
import json
import sys

import numpy as np

doc = json.load(sys.stdin)
t = np.array([p["t_k"] for p in doc["points"]], dtype=float)
lnr = np.log(np.array([p["r_ohm"] for p in doc["points"]], dtype=float))
w = t * t
if doc["model"] == "sh":
    cols = [np.ones_like(lnr), lnr, lnr ** 3]
else:
    cols = [np.ones_like(lnr), lnr]
design = np.column_stack(cols) * w[:, None]
target = w / t
scale = np.linalg.norm(design, axis=0)
sol, _, rank, _ = np.linalg.lstsq(design / scale, target, rcond=None)
sol = sol / scale
if doc["model"] == "sh":
    out = {"a": sol[0], "b": sol[1], "c": sol[2], "rank": int(rank)}
else:
    b_k = 1.0 / sol[1]
    r0 = float(np.exp(b_k * (1.0 / doc["t0_k"] - sol[0])))
    out = {"a": sol[0], "inv_b": sol[1], "b_k": b_k, "r0_ohm": r0, "rank": int(rank)}
json.dump({k: float(v) if not isinstance(v, int) else v for k, v in out.items()}, sys.stdout)
