#!/usr/bin/env python3
"""Reference values of KL(N0 || N1) between Gaussians, computed WITHOUT the closed form.

- k = 1 and k = 2: numerical quadrature of  integral p0(z) [ln p0(z) - ln p1(z)] dz  with
  scipy.integrate.quad / scipy.integrate.dblquad, densities from scipy.stats (the integrand is
  smooth and decays like a Gaussian; the 2-D box is mu0 +- 14 standard deviations per axis, outside
  of which p0 < 1e-40).
- k >= 3: Monte Carlo,  mean of ln p0(Z) - ln p1(Z)  over N = 2000000 draws Z ~ N0 (numpy
  default_rng, fixed seed), with its standard error s / sqrt(N).

Writes packages/core/fixtures/gaussian_kl.json. Run:  python3 scripts/reference/core_gaussian_kl.py
"""
import json
import os

import numpy as np
from scipy import integrate, stats

rng = np.random.default_rng(20261202)
cases = []


def spd(k, scale):
    a = rng.uniform(-1, 1, size=(k, k))
    return scale * (a @ a.T / k + 0.3 * np.eye(k))


def add(name, mu0, cov0, mu1, cov1, diagonal, method, value, error):
    cases.append(
        {
            "name": name,
            "k": len(mu0),
            "diagonal": diagonal,
            "mean0": list(map(float, mu0)),
            "cov0": [list(map(float, r)) for r in np.atleast_2d(cov0)],
            "mean1": list(map(float, mu1)),
            "cov1": [list(map(float, r)) for r in np.atleast_2d(cov1)],
            "method": method,
            "value": float(value),
            "error": float(error),
        }
    )


# --- k = 1: quad -----------------------------------------------------------------------------
for (m0, v0, m1, v1) in [
    (0.0, 1.0, 0.0, 1.0),
    (0.0, 1.0, 1.0, 1.0),
    (0.3, 0.5, -1.2, 2.0),
    (2.0, 4.0, 0.0, 0.25),
    (-1.0, 1e-2, 1.0, 3.0),
    (5.0, 9.0, 4.0, 8.0),
]:
    p0 = stats.norm(m0, np.sqrt(v0))
    p1 = stats.norm(m1, np.sqrt(v1))
    s = np.sqrt(v0)
    f = lambda z: p0.pdf(z) * (p0.logpdf(z) - p1.logpdf(z))
    val, err = integrate.quad(f, m0 - 40 * s, m0 + 40 * s, epsabs=1e-13, epsrel=1e-12, limit=500,
                              points=[m0])
    add(f"1-D quad m0={m0} v0={v0} m1={m1} v1={v1}", [m0], [[v0]], [m1], [[v1]], True, "quad", val,
        max(err, 1e-12))

# --- k = 2: dblquad ----------------------------------------------------------------------------
two_d = [
    ("2-D full, correlated", np.array([0.2, -0.4]), np.array([[1.0, 0.6], [0.6, 2.0]]),
     np.array([-0.5, 0.3]), np.array([[1.5, -0.4], [-0.4, 0.8]]), False),
    ("2-D diagonal", np.array([1.0, 0.0]), np.diag([0.5, 2.0]), np.array([0.0, -1.0]),
     np.diag([1.0, 1.0]), True),
    ("2-D full, random", rng.normal(size=2), spd(2, 1.0), rng.normal(size=2), spd(2, 2.0), False),
]
for name, mu0, c0, mu1, c1, diag in two_d:
    p0 = stats.multivariate_normal(mu0, c0)
    p1 = stats.multivariate_normal(mu1, c1)
    s = np.sqrt(np.diag(c0))
    f = lambda y, x: (lambda z: p0.pdf(z) * (p0.logpdf(z) - p1.logpdf(z)))(np.array([x, y]))
    val, err = integrate.dblquad(f, mu0[0] - 14 * s[0], mu0[0] + 14 * s[0],
                                 mu0[1] - 14 * s[1], mu0[1] + 14 * s[1],
                                 epsabs=1e-11, epsrel=1e-10)
    add(name, mu0, c0, mu1, c1, diag, "dblquad", val, max(err, 1e-10))

# --- k >= 3: Monte Carlo ---------------------------------------------------------------------
N = 2_000_000
mc = []
for k in (3, 5, 8):
    mu0 = rng.normal(size=k)
    mu1 = mu0 + 0.5 * rng.normal(size=k)
    mc.append((f"{k}-D full, Monte Carlo", mu0, spd(k, 1.0), mu1, spd(k, 1.5), False))
for k in (4, 6):
    mu0 = rng.normal(size=k)
    mu1 = mu0 + 0.5 * rng.normal(size=k)
    mc.append((f"{k}-D diagonal, Monte Carlo", mu0, np.diag(rng.uniform(0.3, 2.0, size=k)), mu1,
               np.diag(rng.uniform(0.3, 2.0, size=k)), True))
for name, mu0, c0, mu1, c1, diag in mc:
    z = rng.multivariate_normal(mu0, c0, size=N)
    d = stats.multivariate_normal(mu0, c0).logpdf(z) - stats.multivariate_normal(mu1, c1).logpdf(z)
    add(name, mu0, c0, mu1, c1, diag, "monte-carlo", d.mean(), d.std(ddof=1) / np.sqrt(N))

out = os.path.join(os.path.dirname(__file__), "..", "..", "packages", "core", "fixtures",
                   "gaussian_kl.json")
with open(out, "w") as fh:
    json.dump(
        {
            "source": "scripts/reference/core_gaussian_kl.py (scipy.integrate quad/dblquad; "
                      "numpy Monte Carlo with scipy.stats densities)",
            "numpy": np.__version__,
            "cases": cases,
        },
        fh,
        indent=1,
    )
print(f"wrote {len(cases)} cases to {os.path.normpath(out)}")
