"""Reference values for bench's Student-t confidence intervals.

Writes bench/fixtures/student_t.json: two-sided 95% quantiles t_{0.975, df} from
scipy.stats.t.ppf, and mean ± half-width intervals of a few fixed samples computed with
scipy.stats.t.interval (SciPy: Virtanen et al., "SciPy 1.0: fundamental algorithms for scientific
computing in Python", Nature Methods, 2020).
"""
import json
import pathlib

import numpy as np
from scipy import stats

root = pathlib.Path(__file__).resolve().parents[2]
dfs = [1, 2, 3, 4, 5, 6, 7, 9, 12, 19, 29, 49, 99, 999]
quantiles = [{"df": df, "p": 0.975, "t": float(stats.t.ppf(0.975, df))} for df in dfs]
quantiles += [{"df": df, "p": 0.9, "t": float(stats.t.ppf(0.9, df))} for df in [1, 4, 30]]
samples = [
    [1.0, 2.0],
    [3.1, 2.7, 3.4, 2.9, 3.3],
    [10.0, 12.5, 9.5, 11.0, 10.5, 13.0, 9.0, 12.0],
    [0.001, 0.002, 0.0015, 0.0012, 0.0018, 0.0011, 0.0016, 0.0014, 0.0013, 0.0017, 0.0019, 0.001],
]
intervals = []
for s in samples:
    a = np.asarray(s)
    mean = float(a.mean())
    sem = float(stats.sem(a))
    lo, hi = stats.t.interval(0.95, len(a) - 1, loc=mean, scale=sem)
    intervals.append({"sample": s, "mean": mean, "low": float(lo), "high": float(hi)})
out = root / "bench" / "fixtures" / "student_t.json"
out.write_text(json.dumps({"source": "scipy.stats.t (SciPy 1.17)", "quantiles": quantiles, "intervals": intervals}, indent=1) + "\n")
print("wrote", out)
