"""Reference values for the Riccati solvers and the discrete Lyapunov equation.

Writes
  packages/mpc/fixtures/riccati.json          DARE cases (scipy.linalg.solve_discrete_are) and
                                              finite-horizon cases (dense least squares / normal
                                              equations in numpy, independent of any recursion);
  packages/mpc/fixtures/riccati_lyapunov.json discrete Lyapunov cases
                                              (scipy.linalg.solve_discrete_lyapunov).

Conventions match packages/mpc/src/riccati.ts (MATH.md section 4.1): cost
sum x'Qx + 2x'Su + u'Ru + x_N'Qf x_N, no factor 1/2; gain K with u = -Kx.
scipy's solve_discrete_lyapunov(a, q) solves X = a X a^H + q; recede's discreteLyapunov(A, Q)
solves X = A' X A + Q, so the script passes a = A'.
"""
import json
import pathlib

import numpy as np
from scipy.linalg import expm, solve_discrete_are, solve_discrete_lyapunov

ROOT = pathlib.Path(__file__).resolve().parents[2]
rng = np.random.default_rng(19710401)


def dare_case(name, a, b, q, r, s=None):
    p = solve_discrete_are(a, b, q, r, s=s)
    ss = np.zeros_like(b) if s is None else s
    k = np.linalg.solve(r + b.T @ p @ b, b.T @ p @ a + ss.T)
    rho = max(abs(np.linalg.eigvals(a - b @ k)))
    case = {"name": name, "a": a.tolist(), "b": b.tolist(), "q": q.tolist(), "r": r.tolist(),
            "p": p.tolist(), "k": k.tolist(), "rho": float(rho)}
    if s is not None:
        case["s"] = s.tolist()
    return case


def zoh(ac, bc, dt):
    n, m = bc.shape
    big = np.zeros((n + m, n + m))
    big[:n, :n] = ac
    big[:n, n:] = bc
    e = expm(big * dt)
    return e[:n, :n], e[:n, n:]


def random_spd(n, eps=0.1):
    g = rng.normal(size=(n, n))
    return g @ g.T + eps * np.eye(n)


def dense_finite_horizon(a_seq, b_seq, q_seq, r_seq, s_seq, qf, x0):
    """Minimize the stacked quadratic J(U) directly: states X = Abar x0 + Bbar U."""
    N = len(a_seq)
    n, m = b_seq[0].shape
    abar = np.zeros(((N + 1) * n, n))
    bbar = np.zeros(((N + 1) * n, N * m))
    abar[:n] = np.eye(n)
    for k in range(N):
        abar[(k + 1) * n:(k + 2) * n] = a_seq[k] @ abar[k * n:(k + 1) * n]
        bbar[(k + 1) * n:(k + 2) * n] = a_seq[k] @ bbar[k * n:(k + 1) * n]
        bbar[(k + 1) * n:(k + 2) * n, k * m:(k + 1) * m] += b_seq[k]
    qbar = np.zeros(((N + 1) * n, (N + 1) * n))
    rbar = np.zeros((N * m, N * m))
    sbar = np.zeros(((N + 1) * n, N * m))
    for k in range(N):
        qbar[k * n:(k + 1) * n, k * n:(k + 1) * n] = q_seq[k]
        rbar[k * m:(k + 1) * m, k * m:(k + 1) * m] = r_seq[k]
        sbar[k * n:(k + 1) * n, k * m:(k + 1) * m] = s_seq[k]
    qbar[N * n:, N * n:] = qf
    if not np.any(sbar):
        # least squares: min || [Qbar^1/2 (Abar x0 + Bbar U)] ; [Rbar^1/2 U] ||^2 (Qbar, Rbar > 0)
        lq = np.linalg.cholesky(qbar)
        lr = np.linalg.cholesky(rbar)
        mat = np.vstack([lq.T @ bbar, lr.T])
        rhs = -np.concatenate([lq.T @ abar @ x0, np.zeros(N * m)])
        u = np.linalg.lstsq(mat, rhs, rcond=None)[0]
        method = "numpy.linalg.lstsq on the stacked least-squares system"
    else:
        h = bbar.T @ qbar @ bbar + bbar.T @ sbar + sbar.T @ bbar + rbar
        g = (bbar.T @ qbar + sbar.T) @ abar @ x0
        u = -np.linalg.solve(h, g)
        method = "numpy.linalg.solve on the dense normal equations (MATH.md 4.3)"
    xs = abar @ x0 + bbar @ u
    j = xs @ qbar @ xs + 2 * xs @ sbar @ u + u @ rbar @ u
    return u, xs, float(j), method


def main():
    cases = []
    # scipy's documented example of solve_discrete_are (SciPy reference guide), value computed here
    cases.append(dare_case("scipy-doc-example", np.array([[0., 1], [0, -1]]),
                           np.array([[1., 0], [2, 1]]), np.array([[-4., -4], [-4, 7]]),
                           np.array([[9., 3], [3, 1]])))
    # double integrator, exact ZOH (MATH.md 7.3)
    for dt, d in ((0.1, 1), (0.05, 2)):
        n = 2 * d
        a = np.eye(n)
        a[:d, d:] = dt * np.eye(d)
        b = np.vstack([0.5 * dt * dt * np.eye(d), dt * np.eye(d)])
        cases.append(dare_case(f"double-integrator-d{d}-dt{dt}", a, b, np.eye(n), 0.1 * np.eye(d)))
    # cart-pole upright linearization (MATH.md 7.1), ZOH with tau = 0.02 s
    mc, mp, l, g = 1.0, 0.1, 0.5, 9.8
    M = mc + mp
    d0 = l * (4 / 3 - mp / M)
    ac = np.array([[0, 1, 0, 0], [0, 0, -mp * l * g / (M * d0), 0], [0, 0, 0, 1], [0, 0, g / d0, 0]])
    bc = np.array([[0], [1 / M + mp * l / (M * M * d0)], [0], [-1 / (M * d0)]])
    ad, bd = zoh(ac, bc, 0.02)
    cases.append(dare_case("cart-pole-upright-zoh", ad, bd, np.diag([1, 0.1, 10, 0.1]), np.array([[0.001]])))
    # random stabilizable systems (generic random (A, B) is controllable), some open-loop unstable
    for n, m, cross in ((3, 1, False), (5, 2, False), (6, 3, False), (4, 2, True), (15, 4, False)):
        a = rng.normal(size=(n, n)) * (1.3 / np.sqrt(n))
        b = rng.normal(size=(n, m))
        q = random_spd(n)
        r = random_spd(m, 0.5)
        s = None
        if cross:
            s = 0.1 * rng.normal(size=(n, m))
            # keep [[Q, S], [S', R]] > 0
            assert np.all(np.linalg.eigvalsh(np.block([[q, s], [s.T, r]])) > 0)
        name = f"random-n{n}-m{m}" + ("-cross" if cross else "")
        cases.append(dare_case(name, a, b, q, r, s))

    # finite horizon: a time-varying case (least squares) and a time-invariant case with S
    finite = []
    N, n, m = 8, 3, 2
    a_seq = [np.eye(n) + 0.3 * rng.normal(size=(n, n)) for _ in range(N)]
    b_seq = [rng.normal(size=(n, m)) for _ in range(N)]
    q_seq = [random_spd(n) for _ in range(N)]
    r_seq = [random_spd(m, 0.5) for _ in range(N)]
    s_seq = [np.zeros((n, m)) for _ in range(N)]
    qf = random_spd(n)
    x0 = rng.normal(size=n)
    u, xs, j, method = dense_finite_horizon(a_seq, b_seq, q_seq, r_seq, s_seq, qf, x0)
    finite.append({"name": "time-varying-n3-m2-N8", "method": method,
                   "a": [x.tolist() for x in a_seq], "b": [x.tolist() for x in b_seq],
                   "q": [x.tolist() for x in q_seq], "r": [x.tolist() for x in r_seq],
                   "qf": qf.tolist(), "x0": x0.tolist(), "u": u.tolist(), "x": xs.tolist(), "j": j})
    N, n, m = 12, 4, 2
    a = rng.normal(size=(n, n)) * 0.6
    b = rng.normal(size=(n, m))
    q = random_spd(n)
    r = random_spd(m, 0.5)
    s = 0.2 * rng.normal(size=(n, m))
    assert np.all(np.linalg.eigvalsh(np.block([[q, s], [s.T, r]])) > 0)
    qf = random_spd(n)
    x0 = rng.normal(size=n)
    u, xs, j, method = dense_finite_horizon([a] * N, [b] * N, [q] * N, [r] * N, [s] * N, qf, x0)
    finite.append({"name": "cross-term-n4-m2-N12", "method": method, "a": a.tolist(), "b": b.tolist(),
                   "q": q.tolist(), "r": r.tolist(), "s": s.tolist(), "qf": qf.tolist(),
                   "x0": x0.tolist(), "u": u.tolist(), "x": xs.tolist(), "j": j})

    out = {"source": "scipy.linalg.solve_discrete_are (SciPy 1.17) and numpy dense solves; "
                     "scripts/reference/mpc_riccati.py",
           "dare": cases, "finite": finite}
    (ROOT / "packages/mpc/fixtures/riccati.json").write_text(json.dumps(out, indent=1))

    lyap = []
    for n, rho in ((1, 0.5), (2, 0.9), (3, 0.99), (5, 0.7), (8, 0.95), (15, 0.8)):
        a = rng.normal(size=(n, n))
        a *= rho / max(abs(np.linalg.eigvals(a)))
        q = random_spd(n)
        x = solve_discrete_lyapunov(a.T, q)  # X = A' X A + Q
        lyap.append({"n": n, "rho": rho, "a": a.tolist(), "q": q.tolist(), "x": x.tolist()})
    # a non-symmetric right-hand side
    a = rng.normal(size=(3, 3))
    a *= 0.8 / max(abs(np.linalg.eigvals(a)))
    q = rng.normal(size=(3, 3))
    lyap.append({"n": 3, "rho": 0.8, "a": a.tolist(), "q": q.tolist(),
                 "x": solve_discrete_lyapunov(a.T, q).tolist()})
    (ROOT / "packages/mpc/fixtures/riccati_lyapunov.json").write_text(json.dumps(
        {"source": "scipy.linalg.solve_discrete_lyapunov(A.T, Q) (SciPy 1.17)", "cases": lyap}, indent=1))
    for c in cases:
        print(c["name"], "rho", round(c["rho"], 4), "P00", c["p"][0][0])
    for f in finite:
        print(f["name"], f["method"], "J", f["j"])


if __name__ == "__main__":
    main()
