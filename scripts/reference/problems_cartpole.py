"""Reference accelerations and upright linearization of the frictionless cart-pole.

Independent of the closed form used in packages/problems/src/cartPole.ts: the accelerations come
from a Newton-Euler model solved as a 4x4 linear system (unknowns: cart acceleration, pole angular
acceleration, and the two pivot force components), with numpy.linalg.solve. Parameters of
Barto, Sutton & Anderson (1983); uniform rod (I = m_p l^2 / 3 about its centre); theta from upright,
positive towards +x. The upright linearization is by central finite differences of the same model,
and its exact zero-order-hold discretization at tau = 0.02 s by scipy.linalg.expm. Samples with
friction (Coulomb on the cart with the normal-force sign handled as in Florian 2007, viscous at the
joint) use the Barto et al. coefficients and a much larger pair.

Writes packages/problems/fixtures/cartpole.json.
"""
import json
import pathlib

import numpy as np
from scipy.linalg import expm

MC, MP, L, G = 1.0, 0.1, 0.5, 9.8
I_POLE = MP * L * L / 3.0


def accelerations(x, xd, th, thd, force):
    s, c = np.sin(th), np.cos(th)
    # unknowns z = [xdd, thdd, Hx, Hy]; (Hx, Hy) = force of the cart on the pole at the pivot
    a = np.zeros((4, 4))
    b = np.zeros(4)
    # pole COM: m_p (xdd + l c thdd - l s thd^2) = Hx
    a[0] = [MP, MP * L * c, -1.0, 0.0]
    b[0] = MP * L * s * thd**2
    # pole COM: m_p (-l s thdd - l c thd^2) = Hy - m_p g
    a[1] = [0.0, -MP * L * s, 0.0, -1.0]
    b[1] = MP * L * c * thd**2 - MP * G
    # pole rotation about its COM (theta clockwise): I thdd = l s Hy - l c Hx
    a[2] = [0.0, I_POLE, L * c, -L * s]
    b[2] = 0.0
    # cart: m_c xdd = F - Hx
    a[3] = [MC, 0.0, 1.0, 0.0]
    b[3] = force
    z = np.linalg.solve(a, b)
    return z[0], z[1]


def accelerations_friction(x, xd, th, thd, force, mu_c, mu_p):
    """Newton-Euler with Coulomb cart friction -mu_c |N_c| sgn(xd) (N_c = track normal force,
    which may be negative) and viscous joint friction -mu_p thd on the pole. The sign of N_c is
    resolved by solving with N_c > 0 assumed, then re-solving if the result has N_c < 0."""
    s, c = np.sin(th), np.cos(th)
    for sign_n in (1.0, -1.0):
        sigma = sign_n * np.sign(xd)  # sgn(N_c * xd)
        a = np.zeros((4, 4))
        b = np.zeros(4)
        a[0] = [MP, MP * L * c, -1.0, 0.0]
        b[0] = MP * L * s * thd**2
        a[1] = [0.0, -MP * L * s, 0.0, -1.0]
        b[1] = MP * L * c * thd**2 - MP * G
        a[2] = [0.0, I_POLE, L * c, -L * s]
        b[2] = -mu_p * thd
        # cart: m_c xdd = F - Hx - mu_c sigma N_c,  N_c = m_c g + Hy
        a[3] = [MC, 0.0, 1.0, mu_c * sigma]
        b[3] = force - mu_c * sigma * MC * G
        z = np.linalg.solve(a, b)
        n_c = MC * G + z[3]
        if n_c * sign_n >= 0:
            return z[0], z[1], n_c
    raise RuntimeError("no consistent normal-force sign")


def field(state, force):
    x, xd, th, thd = state
    xdd, thdd = accelerations(x, xd, th, thd, force)
    return np.array([xd, xdd, thd, thdd])


def main():
    rng = np.random.default_rng(20070101)
    samples = []
    for _ in range(40):
        st = [rng.uniform(-2.4, 2.4), rng.uniform(-3, 3), rng.uniform(-np.pi, np.pi), rng.uniform(-8, 8)]
        f = rng.uniform(-10, 10)
        xdd, thdd = accelerations(*st, f)
        samples.append({"state": st, "force": f, "xdd": xdd, "thdd": thdd})
    friction = []
    negative = 0
    for mu_c, mu_p in ((0.0005, 0.000002), (0.3, 0.01)):
        for _ in range(40):
            st = [rng.uniform(-2.4, 2.4), rng.uniform(-3, 3), rng.uniform(-np.pi, np.pi), rng.uniform(-20, 20)]
            if abs(st[1]) < 0.05:
                st[1] = 0.05
            f = rng.uniform(-10, 10)
            xdd, thdd, n_c = accelerations_friction(*st, f, mu_c, mu_p)
            negative += n_c < 0
            friction.append({"state": st, "force": f, "cartFriction": mu_c, "poleFriction": mu_p,
                             "xdd": xdd, "thdd": thdd, "normalForce": n_c})
    print("friction samples with negative normal force:", negative)
    # central finite differences at the upright equilibrium
    h = 1e-6
    x0 = np.zeros(4)
    A = np.zeros((4, 4))
    for j in range(4):
        e = np.zeros(4)
        e[j] = h
        A[:, j] = (field(x0 + e, 0.0) - field(x0 - e, 0.0)) / (2 * h)
    B = (field(x0, h) - field(x0, -h)) / (2 * h)
    # exact zero-order-hold discretization of the linearization at tau = 0.02 s (scipy.linalg.expm
    # of the augmented matrix [[A, B], [0, 0]])
    big = np.zeros((5, 5))
    big[:4, :4] = A
    big[:4, 4] = B
    e = expm(big * 0.02)
    out = {
        "source": "numpy Newton-Euler 4x4 solve (scripts/reference/problems_cartpole.py)",
        "parameters": {"cartMass": MC, "poleMass": MP, "halfLength": L, "gravity": G},
        "samples": samples,
        "frictionSamples": friction,
        "uprightA": A.tolist(),
        "uprightB": B.tolist(),
        "zohDt": 0.02,
        "zohA": e[:4, :4].tolist(),
        "zohB": e[:4, 4].tolist(),
    }
    path = pathlib.Path(__file__).resolve().parents[2] / "packages/problems/fixtures/cartpole.json"
    path.write_text(json.dumps(out, indent=1))
    print("wrote", path)
    print("A", A)
    print("B", B)


if __name__ == "__main__":
    main()
