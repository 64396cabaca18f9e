"""Self-heating of a thermistor in a voltage divider, solved exactly with scipy.

Input (JSON on stdin): r25_ohm, b_k (beta model at 25 degC), rs_ohm (series resistor, divider-low:
rs from the supply to the output, thermistor to ground), supply_v, dissipation_w_per_k, t_c (list);
optional r25_factor (default 1): the part's R25 is r25_ohm times it while the firmware inverts the
nominal model, which adds the model reading's "off_model_error_k": the temperature the nominal divider and
beta model give for the output, minus T.
Output: for each temperature, the body temperature rise and the error of two readings:
  model: the firmware inverts the nominal divider and beta model exactly, so it reads the body
         temperature: error = T_body - T.
  line:  the firmware reads the ratiometric output through the endpoint line over the span
         t_c[0]..t_c[-1] (unheated outputs at the ends): error = (v - intercept)/slope - T.
The body temperature solves T_b = T + P(R(T_b))/delta with P = V^2 R/(R + rs)^2 (the divider's
power), found by scipy.optimize.brentq to full precision.
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

    factor = d.get("r25_factor", 1.0)

    def part_resistance(t_k):
        return factor * resistance(t_k)

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
        def part_balance(tb):
            r = part_resistance(tb)
            return tb - t - v * v * r / (r + rs) ** 2 / delta

        tb_part = brentq(part_balance, t, t + 50.0, xtol=1e-14, rtol=1e-15, maxiter=200)
        y_part = ratio(part_resistance(tb_part))
        r_read = rs * y_part / (1.0 - y_part)  # the nominal divider inverted
        t_read = 1.0 / (1.0 / T0 + math.log(r_read / r25) / b)  # the nominal beta model inverted
        out.append({"t_c": t - 273.15, "rise_k": tb - t, "model_error_k": tb - t,
                    "line_error_k": (y - intercept) / slope - t, "off_model_error_k": t_read - t})
    json.dump({"points": out}, sys.stdout)


main()
