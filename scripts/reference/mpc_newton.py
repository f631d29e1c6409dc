"""Reference fixture for the one-step Newton (Hessian-metric mirror step) LQR test.

For random linear-quadratic problems with a cross term,
    J(U) = sum_k (x_k' Q x_k + 2 x_k' S u_k + u_k' R u_k) + x_N' Qf x_N,  x_{k+1} = A x_k + B u_k,
this script stacks the whole horizon densely (MATH.md §4.3: X = Abar x0 + Bbar U) and solves the
open-loop problem as a linear least-squares problem with numpy.linalg.lstsq, independently of any
Riccati recursion. It also records the Hessian H = 2(Bbar'Qbar Bbar + Bbar'Sbar + Sbar'Bbar + Rbar).

Source of the formulation: B. D. O. Anderson, J. B. Moore, "Optimal Control: Linear Quadratic
Methods", Prentice Hall, 1990 (batch LQ); the solver is numpy's LAPACK least squares.

Writes packages/mpc/fixtures/newton.json.
"""
import json
import pathlib

import numpy as np


def problem(rng, n, m, N, cross, unstable):
    A = rng.normal(size=(n, n)) * 0.6
    if unstable:
        # Open-loop unstable, spectral radius 1.15 (keeps the stacked Hessian well conditioned).
        A *= 1.15 / max(abs(np.linalg.eigvals(A)))
    B = rng.normal(size=(n, m))
    L = rng.normal(size=(n + m, n + m))
    W = L @ L.T + 0.1 * np.eye(n + m)
    Q = W[:n, :n]
    S = W[:n, n:] if cross else np.zeros((n, m))
    R = W[n:, n:]
    if not cross:
        Q = Q
    Lf = rng.normal(size=(n, n))
    Qf = Lf @ Lf.T + 0.05 * np.eye(n)
    x0 = rng.normal(size=n)
    # Dense stacking.
    Abar = np.vstack([np.linalg.matrix_power(A, i) for i in range(N + 1)])
    Bbar = np.zeros(((N + 1) * n, N * m))
    for i in range(1, N + 1):
        for j in range(i):
            Bbar[i * n:(i + 1) * n, j * m:(j + 1) * m] = np.linalg.matrix_power(A, i - 1 - j) @ B
    Qbar = np.zeros(((N + 1) * n, (N + 1) * n))
    for k in range(N):
        Qbar[k * n:(k + 1) * n, k * n:(k + 1) * n] = Q
    Qbar[N * n:, N * n:] = Qf
    Sbar = np.zeros(((N + 1) * n, N * m))
    for k in range(N):
        Sbar[k * n:(k + 1) * n, k * m:(k + 1) * m] = S
    Rbar = np.kron(np.eye(N), R)
    H = 2 * (Bbar.T @ Qbar @ Bbar + Bbar.T @ Sbar + Sbar.T @ Bbar + Rbar)
    g = 2 * (Bbar.T @ Qbar + Sbar.T) @ Abar @ x0
    # Least squares: J(U) = ||M U + c||^2 + const with M'M = H/2, M'c = g/2.
    # Take M = chol(H/2)' and solve M'M U = -g/2 through lstsq on the normal equations' square root.
    C = np.linalg.cholesky(H / 2)  # H/2 = C C'
    c = np.linalg.solve(C, g / 2)  # C c = g/2  ->  M = C', M'c = C c = g/2
    U, *_ = np.linalg.lstsq(C.T, -c, rcond=None)
    X = Abar @ x0 + Bbar @ U
    J = X @ Qbar @ X + 2 * X @ Sbar @ U + U @ Rbar @ U
    return {
        "n": n,
        "m": m,
        "horizon": N,
        "a": A.ravel().tolist(),
        "b": B.ravel().tolist(),
        "q": Q.ravel().tolist(),
        "r": R.ravel().tolist(),
        "s": S.ravel().tolist(),
        "qf": Qf.ravel().tolist(),
        "x0": x0.tolist(),
        "controls": U.tolist(),
        "states": X.tolist(),
        "cost": float(J),
        "hessian": H.ravel().tolist(),
    }


def main():
    rng = np.random.default_rng(20190203)
    cases = [
        problem(rng, 2, 1, 10, False, False),
        problem(rng, 3, 2, 8, True, False),
        problem(rng, 4, 1, 15, True, True),
        problem(rng, 2, 2, 5, True, False),
    ]
    out = {
        "source": "numpy.linalg.lstsq on the dense stacked LQ problem (MATH.md §4.3); Anderson & Moore 1990",
        "script": "scripts/reference/mpc_newton.py",
        "numpy": np.__version__,
        "cases": cases,
    }
    path = pathlib.Path(__file__).resolve().parents[2] / "packages" / "mpc" / "fixtures" / "newton.json"
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path} ({len(cases)} cases)")


if __name__ == "__main__":
    main()
