#!/usr/bin/env python3
"""Independent numpy implementations of the published mirror-descent updates, run on seeded
gradient sequences; the TypeScript learners must reproduce the traces.

- online projected gradient descent (Zinkevich 2003) on a ball and on a box;
- exponentiated gradient / Hedge on the simplex (Kivinen & Warmuth 1997; Cesa-Bianchi & Lugosi 2006);
- the Mahalanobis (M^-1-preconditioned) step with an AdaGrad-norm step size, solved with
  numpy.linalg.solve (not Cholesky);
- the unnormalized multiplicative update on the positive orthant (EGU, Kivinen & Warmuth 1997);
- dynamic mirror descent (Hall & Willett 2013/2015) with a rotate-and-shrink dynamic;
- the diagonal-Gaussian KL step in natural parameters (exponential tilt).

Writes packages/core/fixtures/learner_traces.json. Run: python3 scripts/reference/core_learner_traces.py
"""
import json
import os

import numpy as np

rng = np.random.default_rng(314159)
traces = []


def record(name, spec, initial, grads, decisions):
    traces.append({
        "name": name,
        **spec,
        "initial": list(map(float, initial)),
        "gradients": [list(map(float, g)) for g in grads],
        "decisions": [list(map(float, x)) for x in decisions],
    })


def proj_ball(x, c, r):
    d = x - c
    n = np.linalg.norm(d)
    return c + d * (r / n) if n > r else x


# 1. OGD on a ball, eta_t = eta0 / sqrt(t)
c = np.array([0.2, -0.1, 0.3]); r = 1.5; eta0 = 0.8
x = np.array([0.0, 0.0, 0.1]); x0 = x.copy()
grads, xs = [], []
for t in range(1, 41):
    g = 3 * rng.normal(size=3)
    x = proj_ball(x - eta0 / np.sqrt(t) * g, c, r)
    grads.append(g); xs.append(x)
record("ogd-ball-inverse-sqrt", {"geometry": {"kind": "euclidean-ball", "center": c.tolist(), "radius": r},
                                 "stepSize": {"kind": "inverse-sqrt", "eta0": eta0}}, x0, grads, xs)

# 2. OGD on a box, constant eta
lo = np.array([-1.0, 0.0]); hi = np.array([1.0, 2.0]); eta = 0.3
x = np.array([0.5, 1.0]); x0 = x.copy()
grads, xs = [], []
for t in range(30):
    g = 4 * rng.normal(size=2)
    x = np.clip(x - eta * g, lo, hi)
    grads.append(g); xs.append(x)
record("ogd-box-constant", {"geometry": {"kind": "euclidean-box", "lower": lo.tolist(), "upper": hi.tolist()},
                            "stepSize": {"kind": "constant", "eta": eta}}, x0, grads, xs)

# 3. Exponentiated gradient on the simplex, constant eta
n = 5; eta = 0.7
p = rng.uniform(0.1, 1, size=n); p /= p.sum(); p0 = p.copy()
grads, xs = [], []
for t in range(40):
    g = rng.uniform(-2, 2, size=n)
    w = p * np.exp(-eta * g)
    p = w / w.sum()
    grads.append(g); xs.append(p)
record("eg-simplex-constant", {"geometry": {"kind": "entropy", "dimension": n},
                               "stepSize": {"kind": "constant", "eta": eta}}, p0, grads, xs)

# 4. Mahalanobis step, AdaGrad-norm step size eta_t = eta0 / sqrt(delta + sum ||g_s||^2)
a = rng.uniform(-1, 1, size=(3, 3)); M = a @ a.T + 0.5 * np.eye(3)
eta0 = 0.5; delta = 1e-8; S = 0.0
x = rng.normal(size=3); x0 = x.copy()
grads, xs = [], []
for t in range(30):
    g = rng.normal(size=3)
    S += float(g @ g)
    x = x - eta0 / np.sqrt(delta + S) * np.linalg.solve(M, g)
    grads.append(g); xs.append(x)
record("mahalanobis-adagrad", {"geometry": {"kind": "mahalanobis", "metric": M.tolist()},
                               "stepSize": {"kind": "adagrad", "eta0": eta0, "delta": delta}}, x0, grads, xs)

# 5. Unnormalized EG on the positive orthant
eta = 0.2
x = rng.uniform(0.5, 2, size=3); x0 = x.copy()
grads, xs = [], []
for t in range(30):
    g = rng.normal(size=3)
    x = x * np.exp(-eta * g)
    grads.append(g); xs.append(x)
record("egu-orthant-constant", {"geometry": {"kind": "positive-entropy", "dimension": 3},
                                "stepSize": {"kind": "constant", "eta": eta}}, x0, grads, xs)

# 6. Dynamic mirror descent: OGD on a ball then Phi(x) = 0.95 * Rot(0.3) x
r = 2.0; eta = 0.4; om = 0.3
R = 0.95 * np.array([[np.cos(om), -np.sin(om)], [np.sin(om), np.cos(om)]])
x = np.array([1.0, -0.5]); x0 = x.copy()
grads, xs = [], []
for t in range(30):
    g = 2 * rng.normal(size=2)
    x = R @ proj_ball(x - eta * g, np.zeros(2), r)
    grads.append(g); xs.append(x)
record("dmd-ball-rotate-shrink", {"geometry": {"kind": "euclidean-ball", "center": [0.0, 0.0], "radius": r},
                                  "stepSize": {"kind": "constant", "eta": eta},
                                  "dynamic": {"kind": "rotate-shrink", "omega": om, "factor": 0.95}},
       x0, grads, xs)

# 7. Diagonal Gaussian in expectation parameters: natural-parameter step (exponential tilt)
k = 2; eta = 0.3
mu = rng.normal(size=k); var = rng.uniform(0.5, 2, size=k)
x = np.concatenate([mu, mu ** 2 + var]); x0 = x.copy()
grads, xs = [], []
for t in range(20):
    g = np.concatenate([rng.normal(size=k), rng.uniform(0, 1, size=k)])
    m, s = x[:k], x[k:]
    v = s - m ** 2
    t1 = m / v - eta * g[:k]
    t2 = -0.5 / v - eta * g[k:]
    vn = -0.5 / t2
    mn = t1 * vn
    x = np.concatenate([mn, mn ** 2 + vn])
    grads.append(g); xs.append(x)
record("diagonal-gaussian-tilt", {"geometry": {"kind": "diagonal-gaussian", "dimension": k},
                                  "stepSize": {"kind": "constant", "eta": eta}}, x0, grads, xs)

path = os.path.join(os.path.dirname(__file__), "..", "..", "packages", "core", "fixtures",
                    "learner_traces.json")
with open(path, "w") as fh:
    json.dump({"source": "scripts/reference/core_learner_traces.py (numpy)", "numpy": np.__version__,
               "traces": traces}, fh, indent=1)
print(f"wrote {len(traces)} traces to {os.path.normpath(path)}")
