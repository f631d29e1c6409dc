#!/usr/bin/env python3
"""Reference values for the exact LQR policy gradient of @recede/policy-gradient.

Writes packages/policy-gradient/fixtures/lqr_gradient.json.

Independent computation with scipy (scipy.linalg.solve_discrete_lyapunov, solve_discrete_are) of:
  C(K)   = tr(P_K Sigma0') + tr(R W)/(1-gamma)          (W = action-noise covariance, 0 for none)
  P_K    = Q + K'RK + gamma (A-BK)' P_K (A-BK)
  Sigma_K = Sigma0' + gamma (A-BK) Sigma_K (A-BK)',    Sigma0' = Sigma0 + gamma/(1-gamma) B W B'
  grad C = 2((R + gamma B'P_K B) K - gamma B'P_K A) Sigma_K
(M. Fazel, R. Ge, S. Kakade, M. Mesbahi, "Global Convergence of Policy Gradient Methods for the
Linear Quadratic Regulator", ICML 2018; with gamma = 1 and W = 0 this is their formula exactly, the
discounted/noisy form follows by the substitution A -> sqrt(gamma) A, B -> sqrt(gamma) B.)
The cost is also cross-checked here by brute-force summation of the closed-loop series.
DARE: P* from scipy.linalg.solve_discrete_are, K* = (R + B'P*B)^-1 B'P*A.
"""
import json
import os

import numpy as np
from scipy.linalg import solve_discrete_are, solve_discrete_lyapunov


def evaluate(A, B, Q, R, S0, K, gamma=1.0, W=None):
    n, m = B.shape
    if W is None:
        W = np.zeros((m, m))
    Ak = A - B @ K
    rho = max(abs(np.linalg.eigvals(np.sqrt(gamma) * Ak)))
    assert rho < 1, rho
    S0e = S0 + (gamma / (1 - gamma) * B @ W @ B.T if gamma < 1 else 0 * S0)
    # solve_discrete_lyapunov(a, q) solves X = a X a^H + q
    P = solve_discrete_lyapunov(np.sqrt(gamma) * Ak.T, Q + K.T @ R @ K)
    S = solve_discrete_lyapunov(np.sqrt(gamma) * Ak, S0e)
    noise = np.trace(R @ W) / (1 - gamma) if gamma < 1 else 0.0
    C = np.trace(P @ S0e) + noise
    E = (R + gamma * B.T @ P @ B) @ K - gamma * B.T @ P @ A
    G = 2 * E @ S
    # brute-force check of the cost: sum_t gamma^t tr((Q + K'RK) X_t) + noise term
    X = S0.copy()
    acc = 0.0
    for t in range(20000):
        acc += gamma**t * np.trace((Q + K.T @ R @ K) @ X)
        X = Ak @ X @ Ak.T + B @ W @ B.T
    assert abs(acc + noise - C) <= 1e-8 * abs(C), (acc + noise, C)
    return dict(cost=float(C), gradient=G.tolist(), P=P.tolist(), SigmaK=S.tolist(), E=E.tolist(), rho=float(rho))


def case(name, A, B, Q, R, S0, K, gamma=1.0, W=None):
    r = evaluate(A, B, Q, R, S0, K, gamma, W)
    m = B.shape[1]
    return dict(
        name=name,
        A=A.tolist(), B=B.tolist(), Q=Q.tolist(), R=R.tolist(), Sigma0=S0.tolist(),
        discount=gamma, noiseCovariance=(W if W is not None else np.zeros((m, m))).tolist(),
        K=K.tolist(), **r,
    )


def dare(A, B, Q, R):
    P = solve_discrete_are(A, B, Q, R)
    K = np.linalg.solve(R + B.T @ P @ B, B.T @ P @ A)
    return P, K


rng = np.random.default_rng(20180710)
cases = []

# 1. a random 3-state, 2-input system (undiscounted, noise-free: Fazel et al. exactly)
A1 = rng.normal(size=(3, 3)) * 0.5 + np.eye(3) * 0.3
B1 = rng.normal(size=(3, 2))
Q1 = np.diag([1.0, 2.0, 0.5])
R1 = np.array([[1.0, 0.2], [0.2, 0.5]])
M = rng.normal(size=(3, 3))
S01 = M @ M.T + np.eye(3)
_, K1s = dare(A1, B1, Q1, R1)
K1 = K1s + 0.1 * rng.normal(size=(2, 3))
cases.append(case("random-3x2", A1, B1, Q1, R1, S01, K1))

# 2. double integrator (dt = 0.1, exact ZOH), discounted, with Gaussian action noise sigma = 0.5:
#    the setting of the sampled (REINFORCE) estimator test
dt = 0.1
A2 = np.array([[1.0, dt], [0.0, 1.0]])
B2 = np.array([[0.5 * dt * dt], [dt]])
Q2 = np.eye(2)
R2 = np.array([[0.1]])
S02 = np.eye(2)
K2 = np.array([[1.0, 1.5]])
cases.append(case("double-integrator-discounted-noisy", A2, B2, Q2, R2, S02, K2, gamma=0.9, W=np.array([[0.25]])))

# 3. the same double integrator, undiscounted, noise-free
cases.append(case("double-integrator", A2, B2, Q2, R2, S02, K2))

# DARE references
dares = []
for name, A, B, Q, R, S0 in [
    ("random-3x2", A1, B1, Q1, R1, S01),
    ("double-integrator", A2, B2, Q2, R2, S02),
]:
    P, K = dare(A, B, Q, R)
    dares.append(dict(name=name, A=A.tolist(), B=B.tolist(), Q=Q.tolist(), R=R.tolist(), Sigma0=S0.tolist(),
                      P=P.tolist(), K=K.tolist(), cost=float(np.trace(P @ S0))))

# discounted DARE gain of the noisy double-integrator case: the optimum of C over K for gamma = 0.9
# (action noise only adds a K-independent constant), from the DARE of (sqrt(gamma) A, sqrt(gamma) B)
g = 0.9
P, K = dare(np.sqrt(g) * A2, np.sqrt(g) * B2, Q2, R2)
dares.append(dict(name="double-integrator-discounted", discount=g, A=A2.tolist(), B=B2.tolist(), Q=Q2.tolist(),
                  R=R2.tolist(), Sigma0=S02.tolist(), P=P.tolist(), K=K.tolist(), cost=float(np.trace(P @ S02))))

out = dict(
    source="scipy.linalg.solve_discrete_lyapunov / solve_discrete_are (scipy %s, numpy %s); formulas of Fazel, Ge, Kakade & Mesbahi, ICML 2018"
    % (__import__("scipy").__version__, np.__version__),
    cases=cases,
    dare=dares,
)
path = os.path.join(os.path.dirname(__file__), "..", "..", "packages", "policy-gradient", "fixtures", "lqr_gradient.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
print("wrote", os.path.normpath(path))
