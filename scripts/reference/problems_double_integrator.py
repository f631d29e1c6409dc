"""Exact zero-order-hold discretization of the double integrator by scipy.signal.cont2discrete.

Writes packages/problems/fixtures/double_integrator.json: for d in {1, 2, 3} axes (state = all
positions, then all velocities) and several sample times, the continuous (A, B) and scipy's ZOH
(Ad, Bd).
"""
import json
import pathlib

import numpy as np
from scipy.signal import cont2discrete


def main():
    cases = []
    for d in (1, 2, 3):
        n = 2 * d
        a = np.zeros((n, n))
        a[:d, d:] = np.eye(d)
        b = np.zeros((n, d))
        b[d:, :] = np.eye(d)
        for dt in (0.01, 0.1, 0.37):
            ad, bd, _, _, _ = cont2discrete((a, b, np.eye(n), np.zeros((n, d))), dt, method="zoh")
            cases.append({"axes": d, "dt": dt, "A": ad.tolist(), "B": bd.tolist()})
    out = {"source": "scipy.signal.cont2discrete(method='zoh')", "cases": cases}
    path = pathlib.Path(__file__).resolve().parents[2] / "packages/problems/fixtures/double_integrator.json"
    path.write_text(json.dumps(out, indent=1))
    print("wrote", path, len(cases), "cases")


if __name__ == "__main__":
    main()
