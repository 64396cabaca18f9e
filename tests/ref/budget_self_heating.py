"""Self-heating of a thermistor in a voltage divider, solved exactly with scipy.

Input (JSON on stdin): r25_ohm, b_k (beta model at 25 degC), rs_ohm (series resistor, divider-low:
rs from the supply to the output, thermistor to ground), supply_v, dissipation_w_per_k, t_c (list).
Output: for each temperature, the body temperature rise and the error of two readings:
  model: the firmware inverts the nominal divider and beta model exactly, so it reads the body
         temperature: error = T_body - T.
  line:  the firmware reads the ratiometric output through the endpoint line over the span
         t_c[0]..t_c[-1] (unheated outputs at the ends): error = (v - intercept)/slope - T.
The body temperature solves T_b = T + P(R(T_b))/delta with P = V^2 R/(R + rs)^2 (divider power,
docs/sources.md), found by scipy.optimize.brentq to full precision.
"""
import json
import math
import sys

from scipy.optimize import brentq

T0 = 298.15


def main():
    d = json.load(sys.stdin)
    r25, b, rs, v, delta = d["r25_ohm"], d["b_k"], d["rs_ohm"], d["supply_v"], d["dissipation_w_per_k"]

    def resistance(t_k):
        return r25 * math.exp(b * (1.0 / t_k - 1.0 / T0))

    def ratio(r):  # divider-low: output over supply
        return r / (r + rs)

    temps = [t + 273.15 for t in d["t_c"]]
    lo, hi = temps[0], temps[-1]
    slope = (ratio(resistance(hi)) - ratio(resistance(lo))) / (hi - lo)
    intercept = ratio(resistance(lo)) - slope * lo
    out = []
    for t in temps:
        def balance(tb):
            r = resistance(tb)
            p = v * v * r / (r + rs) ** 2
            return tb - t - p / delta

        tb = brentq(balance, t, t + 50.0, xtol=1e-14, rtol=1e-15, maxiter=200)
        y = ratio(resistance(tb))
        out.append({"t_c": t - 273.15, "rise_k": tb - t, "model_error_k": tb - t,
                    "line_error_k": (y - intercept) / slope - t})
    json.dump({"points": out}, sys.stdout)


main()
