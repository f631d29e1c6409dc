"""Vectorized NumPy implementation of one MPPI control step on the cart-pole (RK4).

The speed reference of issue 7, target 3 ("a vectorized numpy implementation of the same
cart-pole step"): the same problem as cartPole() of @recede/problems with the throughput suite's
options (frictionless Florian 2007 equations, one classical RK4 step per control period,
quadratic cost with the wrapped pole angle, soft track-limit penalty), the same MPPI step
(Gaussian noise with a per-step standard deviation, clipping to the force bounds, exponential
weights exp(-(S - min S)/lambda), weighted mean of the clipped controls, shift by one step with
the last control repeated). Written the way a NumPy user would: the K samples are the vector
dimension, the horizon is a Python loop, every operation is a whole-array ufunc call.

It does not share the library's random stream (NumPy's PCG64 draws the noise), so plans differ
from the library's; the arithmetic of the rollout is checked instead: mode "costs" takes a control
matrix and returns the per-sample costs, which bench/src/suites/numpy.ts compares with the
library's rollout of the same controls.

Input: one JSON object on stdin. Output: one JSON object on stdout.
  {"mode": "time", "params": {...}, "samples": K, "horizon": H, "noise": sigma, "lower": lo,
   "upper": hi, "temperature": lambda, "state": [4], "warmup": w, "steps": n, "seed": s}
    -> {"ms_per_step": [...], "cpu_ms_per_step": [...], "numpy": version, "plan": [...]}
  {"mode": "costs", "params": {...}, "state": [4], "controls": [[H] * K]}
    -> {"costs": [K]}
"""

import json
import sys
import time

import numpy as np


def wrap_angle(a):
    """Representative of a in (-pi, pi] (same convention as wrapAngle of @recede/problems)."""
    r = a - 2 * np.pi * np.floor((a + np.pi) / (2 * np.pi))
    r = np.where(r <= -np.pi, r + 2 * np.pi, r)
    return np.where(r > np.pi, r - 2 * np.pi, r)


class CartPole:
    def __init__(self, p):
        self.mc = p["cartMass"]
        self.mp = p["poleMass"]
        self.l = p["halfLength"]
        self.g = p["gravity"]
        self.dt = p["dt"]
        self.q = np.asarray(p["q"], dtype=float)
        self.r = float(p["r"])
        self.qf = np.asarray(p["qf"], dtype=float)
        self.track_limit = p["trackLimit"]
        self.track_weight = p["trackWeight"]
        self.track_cost = p["trackViolationCost"]

    def accel(self, th, w, F):
        M = self.mc + self.mp
        mpl = self.mp * self.l
        s = np.sin(th)
        c = np.cos(th)
        thdd = (self.g * s + c * (-F - mpl * w * w * s) / M) / (
            self.l * (4.0 / 3.0 - self.mp * c * c / M)
        )
        xdd = (F + mpl * (w * w * s - thdd * c)) / M
        return xdd, thdd

    def step(self, x, v, th, w, F):
        h = self.dt
        a1, t1 = self.accel(th, w, F)
        a2, t2 = self.accel(th + 0.5 * h * w, w + 0.5 * h * t1, F)
        w2 = w + 0.5 * h * t1
        a3, t3 = self.accel(th + 0.5 * h * w2, w + 0.5 * h * t2, F)
        w3 = w + 0.5 * h * t2
        a4, t4 = self.accel(th + h * w3, w + h * t3, F)
        w4 = w + h * t3
        c = h / 6
        v2 = v + 0.5 * h * a1
        v3 = v + 0.5 * h * a2
        v4 = v + h * a3
        return (
            x + c * (v + 2 * v2 + 2 * v3 + v4),
            v + c * (a1 + 2 * a2 + 2 * a3 + a4),
            th + c * (w + 2 * w2 + 2 * w3 + w4),
            w + c * (t1 + 2 * t2 + 2 * t3 + t4),
        )

    def penalty(self, x):
        excess = np.maximum(np.abs(x) - self.track_limit, 0.0)
        return self.track_weight * excess * excess + np.where(excess > 0, self.track_cost, 0.0)

    def quad(self, wt, x, v, th, w):
        e = wrap_angle(th)
        return wt[0] * x * x + wt[1] * v * v + wt[2] * e * e + wt[3] * w * w

    def rollout_costs(self, state, U):
        """Costs of the K control sequences U (K x H) from one start state."""
        K, H = U.shape
        x = np.full(K, state[0])
        v = np.full(K, state[1])
        th = np.full(K, state[2])
        w = np.full(K, state[3])
        S = np.zeros(K)
        for t in range(H):
            F = U[:, t]
            S += self.quad(self.q, x, v, th, w) + self.r * F * F + self.penalty(x)
            x, v, th, w = self.step(x, v, th, w, F)
        S += self.quad(self.qf, x, v, th, w) + self.penalty(x)
        return S


def mppi_step(model, rng, state, mean, sigma, lo, hi, lam, K):
    H = mean.shape[0]
    U = np.clip(mean + sigma * rng.standard_normal((K, H)), lo, hi)
    S = model.rollout_costs(state, U)
    wts = np.exp(-(S - S.min()) / lam)
    wts /= wts.sum()
    new_mean = wts @ U
    u0 = new_mean[0]
    shifted = np.empty_like(new_mean)
    shifted[:-1] = new_mean[1:]
    shifted[-1] = new_mean[-1]
    return u0, shifted


def main():
    cfg = json.load(sys.stdin)
    model = CartPole(cfg["params"])
    state = np.asarray(cfg["state"], dtype=float)
    if cfg["mode"] == "costs":
        U = np.asarray(cfg["controls"], dtype=float)
        json.dump({"costs": model.rollout_costs(state, U).tolist()}, sys.stdout)
        return
    K, H = cfg["samples"], cfg["horizon"]
    rng = np.random.default_rng(cfg["seed"])
    mean = np.zeros(H)
    wall, cpu = [], []
    for i in range(cfg["warmup"] + cfg["steps"]):
        t0, c0 = time.perf_counter(), time.process_time()
        u0, mean = mppi_step(
            model, rng, state, mean, cfg["noise"], cfg["lower"], cfg["upper"], cfg["temperature"], K
        )
        t1, c1 = time.perf_counter(), time.process_time()
        xs = model.step(*(np.array([s]) for s in state), np.array([u0]))
        state = np.array([s[0] for s in xs])
        if i >= cfg["warmup"]:
            wall.append((t1 - t0) * 1e3)
            cpu.append((c1 - c0) * 1e3)
    json.dump(
        {
            "ms_per_step": wall,
            "cpu_ms_per_step": cpu,
            "numpy": np.__version__,
            "plan": mean.tolist(),
            "state": state.tolist(),
        },
        sys.stdout,
    )


if __name__ == "__main__":
    main()
