#!/usr/bin/env python3
"""Reference values for the seeded streams of @recede/core (packages/core/src/rng.ts).

Writes packages/core/fixtures/rng.json with values computed by SciPy, never by the library:

- ziggurat constants: for N layers under f(x) = exp(-x^2/2), the base-layer edge r and the common
  layer area v = r f(r) + int_r^inf f, found with scipy.optimize.brentq so that the recursion
  x_i = sqrt(-2 ln(v / x_{i+1} + f(x_{i+1}))) (Marsaglia & Tsang, "The Ziggurat Method for
  Generating Random Variables", J. Statistical Software 5(8), 2000) closes the top layer:
  x_1 (1 - f(x_1)) = v. For N = 128 this must reproduce the paper's r = 3.442619855899,
  v = 9.91256303526217e-3; the library uses N = 256.
- Kolmogorov-Smirnov critical values: scipy.stats.kstwo.ppf(1 - alpha, n) (exact distribution of
  the two-sided one-sample statistic D_n).
- chi-square critical values: scipy.stats.chi2.ppf(1 - alpha, df).
- a grid of standard-normal quantiles scipy.stats.norm.ppf(p) and normal tail probabilities
  2 * scipy.stats.norm.sf(t).

Run: python3 scripts/reference/core_rng.py
"""

import json
import math
import os

import numpy as np
import scipy
from scipy import optimize, special, stats


def f(x):
    return math.exp(-0.5 * x * x)


def tail_area(r):
    # int_r^inf exp(-x^2/2) dx = sqrt(pi/2) erfc(r / sqrt(2))
    return math.sqrt(math.pi / 2) * special.erfc(r / math.sqrt(2))


def closure(r, layers):
    v = r * f(r) + tail_area(r)
    x = r
    for _ in range(layers - 2):
        arg = v / x + f(x)
        if arg >= 1:
            return 1.0  # r too small: the stack reached the top early
        x = math.sqrt(-2 * math.log(arg))
    return v / x + f(x) - 1


def solve(layers):
    r = optimize.brentq(lambda t: closure(t, layers), 2.5, 4.5, xtol=1e-15, rtol=1e-15, maxiter=500)
    return r, r * f(r) + tail_area(r)


def main():
    r128, v128 = solve(128)
    r256, v256 = solve(256)
    alpha = 0.001
    ks_sizes = [1000, 20000, 100000]
    grid_size = 2000
    probs = np.arange(1, grid_size + 1) / (grid_size + 1)
    bins = 100
    edges = stats.norm.ppf(np.arange(1, bins) / bins)
    out = {
        "source": "scipy " + scipy.__version__ + " via scripts/reference/core_rng.py",
        "ziggurat": {
            "layers128": {"r": r128, "v": v128},
            "layers256": {"r": r256, "v": v256},
            "published128": {"r": 3.442619855899, "v": 9.91256303526217e-3},
        },
        "alpha": alpha,
        "ks_critical": {str(n): float(stats.kstwo.ppf(1 - alpha, n)) for n in ks_sizes},
        "chi2_critical": {str(df): float(stats.chi2.ppf(1 - alpha, df)) for df in [bins - 1]},
        "normal_grid": {"p": probs.tolist(), "x": stats.norm.ppf(probs).tolist()},
        "normal_bin_edges": edges.tolist(),
        "normal_two_sided_tail": [
            {"t": float(t), "p": float(2 * stats.norm.sf(t))} for t in [r256, 3.0, 4.0]
        ],
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "..", "packages", "core", "fixtures", "rng.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")
    print("wrote", os.path.normpath(path))
    print("r128", repr(r128), "v128", repr(v128))
    print("r256", repr(r256), "v256", repr(v256))


if __name__ == "__main__":
    main()
