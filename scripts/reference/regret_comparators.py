#!/usr/bin/env python3
"""Reference best-in-hindsight comparators for @recede/regret.

Writes packages/regret/fixtures/comparators.json. Every case lists T per-round losses, the decisions
x_t that were "played" (random points of the domain), and the reference minimum of the summed loss
over the domain together with its minimizer, computed by a general-purpose solver from SciPy (never
by the closed forms the library implements):

- linear over the simplex: brute force over the N vertices, cross-checked with
  scipy.optimize.linprog (method="highs") on {u >= 0, sum u = 1};
- linear over a box: scipy.optimize.linprog (method="highs") with the box as bounds;
- linear over a Euclidean ball: scipy.optimize.minimize (method="SLSQP") with the inequality
  constraint r^2 - ||u - c||^2 >= 0;
- summed quadratics, unconstrained: scipy.optimize.minimize (method="L-BFGS-B", no bounds,
  gtol 1e-13), cross-checked against numpy.linalg.solve;
- summed quadratics on a box: scipy.optimize.lsq_linear (method="bvls") on the equivalent
  least-squares problem ||L^T u + L^{-1} b||^2 with A = L L^T (BVLS is an exact active-set method),
  cross-checked with scipy.optimize.minimize (method="L-BFGS-B", bounds).

Per-round losses: linear  l_t(u) = <g_t, u> + c_t;
                  quadratic l_t(u) = 1/2 u^T A_t u + b_t^T u + c_t  (A_t symmetric PSD).
Run: python3 scripts/reference/regret_comparators.py
"""

import json
import os

import numpy as np
from scipy.linalg import solve_triangular
from scipy.optimize import linprog, lsq_linear, minimize

rng = np.random.default_rng(20261202)
cases = []


def rand_simplex(n):
    return rng.dirichlet(np.ones(n))


def linear_case(name, domain, d, T):
    G = rng.normal(size=(T, d)) * rng.uniform(0.2, 3.0)
    c = rng.normal(size=T)
    gamma = G.sum(axis=0)
    C = c.sum()
    if domain["kind"] == "simplex":
        X = np.array([rand_simplex(d) for _ in range(T)])
        vals = gamma  # value at vertex i
        i = int(np.argmin(vals))
        best_u = np.eye(d)[i]
        lp = linprog(gamma, A_eq=np.ones((1, d)), b_eq=[1.0], bounds=[(0, None)] * d, method="highs")
        assert lp.status == 0 and abs(lp.fun - vals[i]) < 1e-9
        solver = "brute force over vertices; scipy.optimize.linprog(method='highs')"
        best = float(vals[i]) + C
    elif domain["kind"] == "box":
        lo = np.array(domain["lower"])
        hi = np.array(domain["upper"])
        X = lo + (hi - lo) * rng.uniform(size=(T, d))
        lp = linprog(gamma, bounds=list(zip(lo, hi)), method="highs")
        assert lp.status == 0
        best_u = lp.x
        best = float(lp.fun) + C
        solver = "scipy.optimize.linprog(method='highs')"
    else:
        cen = np.array(domain["center"])
        r = domain["radius"]
        X = []
        for _ in range(T):
            v = rng.normal(size=d)
            X.append(cen + r * rng.uniform() ** (1 / d) * v / np.linalg.norm(v))
        X = np.array(X)
        res = minimize(
            lambda u: gamma @ u,
            cen,
            jac=lambda u: gamma,
            method="SLSQP",
            constraints=[
                {
                    "type": "ineq",
                    "fun": lambda u: r * r - (u - cen) @ (u - cen),
                    "jac": lambda u: -2 * (u - cen),
                }
            ],
            options={"ftol": 1e-12, "maxiter": 1000},
        )
        # SLSQP may stop with "Positive directional derivative for linesearch" once it is at
        # machine precision; accept the point only if it is feasible and first-order optimal
        # (the gradient is anti-parallel to u - c on the sphere).
        gap = r * r - (res.x - cen) @ (res.x - cen)
        cosine = -(gamma @ (res.x - cen)) / (np.linalg.norm(gamma) * np.linalg.norm(res.x - cen))
        assert gap > -1e-9 and abs(gap) < 1e-7 and cosine > 1 - 1e-12, (res.message, gap, cosine)
        best_u = res.x
        best = float(res.fun) + C
        solver = "scipy.optimize.minimize(method='SLSQP')"
    played = float(np.sum(np.einsum("ij,ij->i", G, X)) + C)
    cases.append(
        {
            "name": name,
            "loss": "linear",
            "domain": domain,
            "dimension": d,
            "rounds": T,
            "gradients": G.tolist(),
            "constants": c.tolist(),
            "decisions": X.tolist(),
            "bestValue": best,
            "argmin": np.asarray(best_u).tolist(),
            "regret": played - best,
            "solver": solver,
        }
    )


def rand_psd(d, rank):
    M = rng.normal(size=(d, rank))
    return M @ M.T / rank


def quad_case(name, domain, d, T):
    A_list = [rand_psd(d, int(rng.integers(1, d + 1))) for _ in range(T)]
    b_list = [rng.normal(size=d) * 2 for _ in range(T)]
    c_list = rng.normal(size=T)
    A = sum(A_list)
    A = 0.5 * (A + A.T)
    b = sum(b_list)
    C = float(c_list.sum())

    def f(u):
        return 0.5 * u @ A @ u + b @ u + C

    def grad(u):
        return A @ u + b

    if domain is None:
        X = rng.normal(size=(T, d))
        res = minimize(f, np.zeros(d), jac=grad, method="L-BFGS-B", options={"gtol": 1e-13, "ftol": 1e-16, "maxiter": 10000})
        exact = np.linalg.solve(A, -b)
        assert np.max(np.abs(res.x - exact)) < 1e-6, (res.x, exact)
        best_u = res.x
        solver = "scipy.optimize.minimize(method='L-BFGS-B'); numpy.linalg.solve cross-check"
    else:
        lo = np.array(domain["lower"])
        hi = np.array(domain["upper"])
        X = lo + (hi - lo) * rng.uniform(size=(T, d))
        L = np.linalg.cholesky(A)
        rhs = -solve_triangular(L, b, lower=True)
        res = lsq_linear(L.T, rhs, bounds=(lo, hi), method="bvls", tol=1e-15)
        assert res.status >= 0
        best_u = res.x
        chk = minimize(f, np.clip(np.zeros(d), lo, hi), jac=grad, method="L-BFGS-B", bounds=list(zip(lo, hi)), options={"gtol": 1e-12, "ftol": 1e-16, "maxiter": 10000})
        assert abs(chk.fun - f(best_u)) < 1e-7 * (1 + abs(f(best_u))), (chk.fun, f(best_u))
        solver = "scipy.optimize.lsq_linear(method='bvls'); scipy.optimize.minimize(method='L-BFGS-B', bounds) cross-check"
    played = 0.0
    for t in range(T):
        x = X[t]
        played += 0.5 * x @ A_list[t] @ x + b_list[t] @ x + c_list[t]
    best = float(f(best_u))
    cases.append(
        {
            "name": name,
            "loss": "quadratic",
            "domain": domain if domain is not None else {"kind": "unconstrained"},
            "dimension": d,
            "rounds": T,
            "hessians": [a.flatten().tolist() for a in A_list],
            "linear": [bb.tolist() for bb in b_list],
            "constants": c_list.tolist(),
            "decisions": X.tolist(),
            "bestValue": best,
            "argmin": np.asarray(best_u).tolist(),
            "regret": float(played - best),
            "solver": solver,
        }
    )


for k, (d, T) in enumerate([(2, 5), (5, 40), (12, 120)]):
    linear_case(f"linear-simplex-{k}", {"kind": "simplex"}, d, T)
for k, (d, T) in enumerate([(1, 7), (4, 30), (9, 80)]):
    lo = rng.uniform(-2, 0, size=d)
    hi = lo + rng.uniform(0.1, 3, size=d)
    linear_case(f"linear-box-{k}", {"kind": "box", "lower": lo.tolist(), "upper": hi.tolist()}, d, T)
for k, (d, T) in enumerate([(2, 6), (5, 50), (10, 80)]):
    cen = rng.normal(size=d)
    linear_case(f"linear-ball-{k}", {"kind": "ball", "center": cen.tolist(), "radius": float(rng.uniform(0.3, 3))}, d, T)
for k, (d, T) in enumerate([(1, 3), (3, 10), (6, 40)]):
    quad_case(f"quadratic-free-{k}", None, d, T)
for k, (d, T) in enumerate([(2, 5), (4, 12), (8, 40), (8, 25), (5, 8)]):
    # Small boxes around the origin, so that several bounds are active at the minimizer.
    lo = rng.uniform(-0.4, -0.02, size=d)
    hi = rng.uniform(0.02, 0.4, size=d)
    quad_case(f"quadratic-box-{k}", {"kind": "box", "lower": lo.tolist(), "upper": hi.tolist()}, d, T)

out = os.path.join(os.path.dirname(__file__), "..", "..", "packages", "regret", "fixtures", "comparators.json")
os.makedirs(os.path.dirname(out), exist_ok=True)
with open(out, "w") as fh:
    json.dump(
        {
            "generator": "scripts/reference/regret_comparators.py",
            "numpy": np.__version__,
            "scipy": __import__("scipy").__version__,
            "cases": cases,
        },
        fh,
    )
print(f"wrote {len(cases)} cases to {os.path.normpath(out)}")
for c in cases:
    active = ""
    if c["loss"] == "quadratic" and c["domain"]["kind"] == "box":
        u = np.array(c["argmin"])
        lo = np.array(c["domain"]["lower"])
        hi = np.array(c["domain"]["upper"])
        active = f" active bounds: {int(np.sum((np.abs(u - lo) < 1e-12) | (np.abs(u - hi) < 1e-12)))}"
    print(f"  {c['name']}: best {c['bestValue']:.6f} regret {c['regret']:.6f}{active}")
