#!/usr/bin/env python3
"""Reference values for @recede/core kernels from numpy / scipy.

numpy.linalg.cholesky, scipy.linalg.solve_triangular, numpy.linalg.solve, numpy.linalg.slogdet,
matrix products with numpy, scipy.special.logsumexp and scipy.special.softmax on inputs with large
magnitudes. Writes packages/core/fixtures/kernels.json.
Run: python3 scripts/reference/core_kernels.py
"""
import json
import os

import numpy as np
from scipy import linalg, special

rng = np.random.default_rng(7)
n = 6
a = rng.uniform(-1, 1, size=(n, n))
spd = a @ a.T + 0.5 * np.eye(n)
b = rng.normal(size=n)
L = np.linalg.cholesky(spd)
r, c, k = 3, 4, 5
A = rng.normal(size=(r, k))
B = rng.normal(size=(k, c))
x = rng.normal(size=k)
scores = np.concatenate([rng.normal(size=5) * 300 - 800, [-np.inf]])

out = {
    "source": "scripts/reference/core_kernels.py (numpy.linalg, scipy.linalg, scipy.special)",
    "numpy": np.__version__,
    "n": n,
    "spd": spd.ravel().tolist(),
    "b": b.tolist(),
    "cholesky": L.ravel().tolist(),
    "forward": linalg.solve_triangular(L, b, lower=True).tolist(),
    "backTransposed": linalg.solve_triangular(L.T, b, lower=False).tolist(),
    "solve": np.linalg.solve(spd, b).tolist(),
    "logdet": float(np.linalg.slogdet(spd)[1]),
    "symv": (spd @ b).tolist(),
    "gemm": {"r": r, "k": k, "c": c, "a": A.ravel().tolist(), "b": B.ravel().tolist(),
             "ab": (A @ B).ravel().tolist(), "x": x.tolist(), "ax": (A @ x).tolist()},
    "scores": [s if np.isfinite(s) else None for s in scores.tolist()],
    "logsumexp": float(special.logsumexp(scores)),
    "softmax": special.softmax(scores).tolist(),
}
path = os.path.join(os.path.dirname(__file__), "..", "..", "packages", "core", "fixtures", "kernels.json")
with open(path, "w") as fh:
    json.dump(out, fh, indent=1)
print(f"wrote {os.path.normpath(path)}")
