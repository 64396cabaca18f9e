#!/usr/bin/python3
"""Brute force over a small design space: every candidate thermistor with every series value in a
divider-low (rs from the excitation to the output, the thermistor to ground), read ratiometrically by
an N-bit converter, judged by the worst-case |error| of the temperature the firmware reads.

Written from the published equations, independently of rtline's C++:
  - beta model (docs/sources.md): R(T) = R0 * exp(B * (1/T - 1/T0)); a part at its tolerance corners
    R0 * (1 + dr) * exp(B * (1 + db) * (1/T - 1/T0));
  - the divider by Ohm's law: v = R_T / (rs + R_T), per volt of excitation, rs at rs * (1 + ds);
  - the converter's quantization as +-1/2 LSB of its 2^N steps on v (rounding transfer);
  - the firmware inverts the nominal divider and model exactly: R = rs * v / (1 - v),
    T = 1 / (1/T0 + ln(R/R0) / B).
The worst case at each temperature is the largest |read - true| over the 16 corners (dr, db, ds and the
half LSB each at either end): the reading is monotone in each, so the corners hold the extremes.
Nonlinearity: the largest deviation of v from its endpoint line over the span, % of full scale.

stdin:  {"parts": [{"label", "r25_ohm", "b_k", "r25_tol", "b_tol"}], "values": [ohm, ...],
         "lo_c", "hi_c", "step_c", "resistor_tol", "adc_bits"}
stdout: {"results": [{"label", "rs_ohm", "worst_case_k", "at_t_c", "nonlinearity_pct_fsd"}],
         "best_by_error": {...}, "best_by_nonlinearity": {...}}
"""
import itertools
import json
import sys

import numpy as np


def main():
    d = json.load(sys.stdin)
    t = np.arange(d["lo_c"], d["hi_c"] + 1e-9, d["step_c"]) + 273.15
    t0 = 298.15
    half_lsb = 0.5 / 2 ** d["adc_bits"]
    results = []
    for p in d["parts"]:
        r0, b = p["r25_ohm"], p["b_k"]
        for rs in d["values"]:
            worst = np.zeros_like(t)
            for sr, sb, ss, sq in itertools.product((-1, 1), repeat=4):
                r_t = r0 * (1 + sr * p["r25_tol"]) * np.exp(b * (1 + sb * p["b_tol"]) * (1 / t - 1 / t0))
                v = r_t / (rs * (1 + ss * d["resistor_tol"]) + r_t) + sq * half_lsb
                r_read = rs * v / (1 - v)
                t_read = 1 / (1 / t0 + np.log(r_read / r0) / b)
                worst = np.maximum(worst, np.abs(t_read - t))
            v0 = r0 * np.exp(b * (1 / t - 1 / t0))
            v0 = v0 / (rs + v0)
            line = v0[0] + (v0[-1] - v0[0]) * (t - t[0]) / (t[-1] - t[0])
            nl = 100 * np.max(np.abs(v0 - line)) / abs(v0[-1] - v0[0])
            i = int(np.argmax(worst))
            results.append({"label": p["label"], "rs_ohm": rs, "worst_case_k": float(worst[i]),
                            "at_t_c": float(t[i] - 273.15), "nonlinearity_pct_fsd": float(nl)})
    json.dump({"results": results,
               "best_by_error": min(results, key=lambda r: r["worst_case_k"]),
               "best_by_nonlinearity": min(results, key=lambda r: r["nonlinearity_pct_fsd"])}, sys.stdout)


if __name__ == "__main__":
    main()
