"""Reference accelerations and upright linearization of the frictionless cart-pole.

Independent of the closed form used in packages/problems/src/cartPole.ts: the accelerations come
from a Newton-Euler model solved as a 4x4 linear system (unknowns: cart acceleration, pole angular
acceleration, and the two pivot force components), with numpy.linalg.solve. Parameters of
Barto, Sutton & Anderson (1983); uniform rod (I = m_p l^2 / 3 about its centre); theta from upright,
positive towards +x. The upright linearization is by central finite differences of the same model.

Writes packages/problems/fixtures/cartpole.json.
"""
import json
import pathlib

import numpy as np

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
    # central finite differences at the upright equilibrium
    h = 1e-6
    x0 = np.zeros(4)
    A = np.zeros((4, 4))
    for j in range(4):
        e = np.zeros(4)
        e[j] = h
        A[:, j] = (field(x0 + e, 0.0) - field(x0 - e, 0.0)) / (2 * h)
    B = (field(x0, h) - field(x0, -h)) / (2 * h)
    out = {
        "source": "numpy Newton-Euler 4x4 solve (scripts/reference/problems_cartpole.py)",
        "parameters": {"cartMass": MC, "poleMass": MP, "halfLength": L, "gravity": G},
        "samples": samples,
        "uprightA": A.tolist(),
        "uprightB": B.tolist(),
    }
    path = pathlib.Path(__file__).resolve().parents[2] / "packages/problems/fixtures/cartpole.json"
    path.write_text(json.dumps(out, indent=1))
    print("wrote", path)
    print("A", A)
    print("B", B)


if __name__ == "__main__":
    main()
