"""Reference trajectories of the nonlinear problems by scipy.integrate.solve_ivp.

Each model is written here again from its source equations (independently of the TypeScript
code), driven by a fixed piecewise-constant control sequence (held over each control period, as a
zero-order hold), and integrated period by period with solve_ivp (DOP853, rtol = atol = 1e-12).
The TypeScript tests compare their one-RK4-step-per-period trajectories against these states.

Writes packages/problems/fixtures/trajectories.json.
"""
import json
import pathlib

import numpy as np
from scipy.integrate import solve_ivp

ROOT = pathlib.Path(__file__).resolve().parents[2]


def pendulum(m=1.0, l=1.0, b=0.1, g=9.81):
    # m l^2 thdd + b thd + m g l sin th = u  (Tedrake, "The Simple Pendulum")
    def f(_t, s, u):
        th, thd = s
        return [thd, (u[0] - b * thd - m * g * l * np.sin(th)) / (m * l * l)]
    return f


def cart_pole(mc=1.0, mp=0.1, l=0.5, g=9.8):
    # Newton-Euler with pivot forces as unknowns (uniform rod, theta from upright)
    inertia = mp * l * l / 3

    def f(_t, s, u):
        _, xd, th, thd = s
        sn, cs = np.sin(th), np.cos(th)
        a = np.array([[mp, mp * l * cs, -1, 0], [0, -mp * l * sn, 0, -1],
                      [0, inertia, l * cs, -l * sn], [mc, 0, 1, 0]])
        rhs = np.array([mp * l * sn * thd**2, mp * l * cs * thd**2 - mp * g, 0, u[0]])
        z = np.linalg.solve(a, rhs)
        return [xd, z[0], thd, z[1]]
    return f


def planar_quadrotor(m=1.0, r=0.2, inertia=0.02, g=9.81, drag=0.0):
    # m xdd = -(u1+u2) sin th - c vx; m ydd = (u1+u2) cos th - m g - c vy; I thdd = r (u1 - u2)
    def f(_t, s, u):
        _, _, th, vx, vy, w = s
        thrust = u[0] + u[1]
        return [vx, vy, w, (-thrust * np.sin(th) - drag * vx) / m,
                (thrust * np.cos(th) - m * g - drag * vy) / m, r * (u[0] - u[1]) / inertia]
    return f


def bicycle(lf=0.3, lr=0.3):
    # kinematic bicycle (Rajamani 2006; Kong et al. 2015): psi_dot = v sin(beta) / l_r
    def f(_t, s, u):
        _, _, psi, v = s
        beta = np.arctan(lr / (lf + lr) * np.tan(u[1]))
        return [v * np.cos(psi + beta), v * np.sin(psi + beta), v * np.sin(beta) / lr, u[0]]
    return f


def simulate(f, x0, controls, dt):
    states = [list(x0)]
    x = np.array(x0, dtype=float)
    for u in controls:
        sol = solve_ivp(f, (0.0, dt), x, method="DOP853", rtol=1e-12, atol=1e-12, args=(u,))
        x = sol.y[:, -1]
        states.append(x.tolist())
    return states


def main():
    steps = 60
    k = np.arange(steps)
    cases = []
    u = [[4.5 * np.sin(0.3 * i)] for i in k]
    cases.append({"problem": "pendulum", "options": {}, "dt": 0.05, "x0": [0.3, 0.0], "controls": u,
                  "states": simulate(pendulum(), [0.3, 0.0], u, 0.05)})
    u = [[9.0 * np.sin(0.2 * i) * np.cos(0.05 * i)] for i in k]
    x0 = [0.1, 0.0, np.pi - 0.2, 0.5]
    cases.append({"problem": "cart-pole", "options": {}, "dt": 0.02, "x0": x0, "controls": u,
                  "states": simulate(cart_pole(), x0, u, 0.02)})
    hover = 9.81 / 2
    u = [[hover + 1.5 * np.sin(0.25 * i), hover + 1.5 * np.cos(0.2 * i)] for i in k]
    x0 = [-1.0, 2.0, 0.1, 0.2, -0.1, 0.0]
    cases.append({"problem": "planar-quadrotor", "options": {"drag": 0.3}, "dt": 0.02, "x0": x0,
                  "controls": u, "states": simulate(planar_quadrotor(drag=0.3), x0, u, 0.02)})
    u = [[1.0 * np.sin(0.1 * i), 0.5 * np.sin(0.15 * i)] for i in k]
    x0 = [0.0, 0.0, 0.3, 0.5]
    cases.append({"problem": "bicycle", "options": {"frontLength": 0.35, "rearLength": 0.25}, "dt": 0.1,
                  "x0": x0, "controls": u, "states": simulate(bicycle(0.35, 0.25), x0, u, 0.1)})
    out = {"source": "scipy.integrate.solve_ivp(DOP853, rtol=atol=1e-12), per control period",
           "cases": cases}
    path = ROOT / "packages/problems/fixtures/trajectories.json"
    path.write_text(json.dumps(out, indent=1))
    print("wrote", path)


if __name__ == "__main__":
    main()
