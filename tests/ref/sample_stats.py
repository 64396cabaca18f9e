"""Sample statistics of a Monte Carlo error sample and their standard errors, shared by the budget
references (budget_field.py, budget_amplifier.py): mean, standard deviation, signed percentiles and the
99.7 % bound of |error|, each with the standard error its own sample gives (the mean σ/√n; the standard
deviation from the fourth moment; a percentile √(p(1 − p)/n)/f, f the density near it)."""
import math

import numpy as np


def nearest_rank(sorted_x, p):
    """The nearest-rank p-quantile of a sorted sample: its ⌈p·n⌉-th smallest value."""
    n = len(sorted_x)
    return sorted_x[max(1, math.ceil(p * n - 1e-9)) - 1]


def summary(e):
    """The statistics of error sample e (numpy array) as the budget's Monte Carlo reports them."""
    n = len(e)
    mean, sd = float(np.mean(e)), float(np.std(e, ddof=1))
    m4 = float(np.mean((e - mean) ** 4))
    out = {"mean": mean, "mean_se": sd / math.sqrt(n), "std": sd,
           "std_se": math.sqrt(max(m4 - sd ** 4, 0.0) / n) / (2 * sd)}
    es = np.sort(e)
    ab = np.sort(np.abs(e))
    for key, x, p in [("p0_135", es, 0.00135), ("p2_5", es, 0.025), ("p97_5", es, 0.975),
                      ("p99_865", es, 0.99865), ("p99_7", ab, 0.997)]:
        v = float(nearest_rank(x, p))
        h = 0.5 * sd
        f = float(np.count_nonzero(np.abs(x - v) <= h)) / (n * 2 * h)
        out[key] = v
        out[key + "_se"] = math.sqrt(p * (1 - p) / n) / f
    return out
