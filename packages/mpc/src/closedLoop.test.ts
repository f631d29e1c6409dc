import type { Dynamics } from "@recede/core";
import { cartPole, doubleIntegrator, pendulum } from "@recede/problems";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";
import { closedLoop } from "./closedLoop.js";
import { cem } from "./presets/cem.js";
import { lqr } from "./presets/lqr.js";
import { mppi } from "./presets/mppi.js";
import { dare } from "./riccati.js";

describe("double integrator: sampling MPC within 5% of LQR's optimal cost", () => {
  // Reference: the infinite-horizon LQ optimum J* = x₀ᵀPx₀ with P the DARE solution (B. D. O.
  // Anderson, J. B. Moore, "Optimal Control: Linear Quadratic Methods", 1990). With terminal
  // weight P, the closed-loop cost over N steps plus x_NᵀPx_N is ≥ J* for every controller and
  // equals J* for the LQR gain.
  const lq = doubleIntegrator().linearQuadratic!;
  const sys = {
    a: { data: lq.a, rows: 2, cols: 2 },
    b: { data: lq.b, rows: 2, cols: 1 },
    q: { data: lq.q, rows: 2, cols: 2 },
    r: { data: lq.r, rows: 1, cols: 1 },
  };
  const riccati = dare(sys);
  const prob = doubleIntegrator({ qf: riccati.value });
  const x0 = prob.initialState();
  const p = riccati.value.data;
  const jStar = x0[0] * (p[0] * x0[0] + p[1] * x0[1]) + x0[1] * (p[2] * x0[0] + p[3] * x0[1]);
  const run = (controller: Parameters<typeof closedLoop>[0]["controller"]) =>
    closedLoop({ controller, plant: prob.dynamics, cost: prob.cost, initialState: x0, steps: 100 })
      .meanCost;

  it("LQR (DARE gain) attains J* in closed loop (sanity of the runner)", () => {
    expect(Math.abs(run(lqr(sys)) / jStar - 1)).toBeLessThan(1e-9);
  });

  it("MPPI (K = 256, H = 20, 3 iterations, correlated noise)", () => {
    const c = run(
      mppi({
        dynamics: prob.dynamics,
        cost: prob.cost,
        horizon: 20,
        samples: 256,
        noise: 0.3,
        temperature: 0.01,
        iterations: 3,
        correlation: 0.9,
        keepMeanSample: true,
        seed: 1,
      }),
    );
    expect(c).toBeGreaterThanOrEqual(jStar * (1 - 1e-12));
    expect(c / jStar - 1).toBeLessThan(0.05);
  });

  it("CEM (K = 256, H = 20, 6 iterations)", () => {
    const c = run(
      cem({
        dynamics: prob.dynamics,
        cost: prob.cost,
        horizon: 20,
        samples: 256,
        std: 1,
        iterations: 6,
        keepMeanSample: true,
        seed: 1,
      }),
    );
    expect(c).toBeGreaterThanOrEqual(jStar * (1 - 1e-12));
    expect(c / jStar - 1).toBeLessThan(0.05);
  });
});

describe("swing-up from hanging (success test defined in @recede/problems)", () => {
  const pend = pendulum();
  const cp = cartPole();
  const swing = (
    prob: typeof pend | typeof cp,
    controller: Parameters<typeof closedLoop>[0]["controller"],
  ) => {
    const r = closedLoop({
      controller,
      plant: prob.dynamics,
      cost: prob.cost,
      initialState: prob.initialState(),
      steps: prob.episodeLength,
    });
    return prob.assess(r.episodes[0].states);
  };

  it("pendulum with MPPI", () => {
    const rep = swing(
      pend,
      mppi({
        dynamics: pend.dynamics,
        cost: pend.cost,
        horizon: pend.horizon,
        samples: 192,
        noise: 2.5,
        temperature: 1,
        keepMeanSample: true,
        bounds: pend.bounds,
        seed: 1,
      }),
    );
    expect(rep.reason).toBe("ok");
    expect(rep.success).toBe(true);
  });

  it("pendulum with CEM", () => {
    const rep = swing(
      pend,
      cem({
        dynamics: pend.dynamics,
        cost: pend.cost,
        horizon: pend.horizon,
        samples: 128,
        std: 5,
        iterations: 2,
        bounds: pend.bounds,
        seed: 1,
      }),
    );
    expect(rep.reason).toBe("ok");
    expect(rep.success).toBe(true);
  });

  it("cart-pole with MPPI", () => {
    const rep = swing(
      cp,
      mppi({
        dynamics: cp.dynamics,
        cost: cp.cost,
        horizon: cp.horizon,
        samples: 128,
        noise: 5,
        temperature: 1,
        keepMeanSample: true,
        bounds: cp.bounds,
        seed: 1,
      }),
    );
    expect(rep.reason).toBe("ok");
    expect(rep.success).toBe(true);
  });

  it("cart-pole with CEM", () => {
    const rep = swing(
      cp,
      cem({
        dynamics: cp.dynamics,
        cost: cp.cost,
        horizon: cp.horizon,
        samples: 128,
        std: 5,
        iterations: 2,
        bounds: cp.bounds,
        seed: 1,
      }),
    );
    expect(rep.reason).toBe("ok");
    expect(rep.success).toBe(true);
  });
});

describe("closedLoop runner", () => {
  const prob = doubleIntegrator();
  const lq = prob.linearQuadratic!;
  const ctrl = lqr({
    a: { data: lq.a, rows: 2, cols: 2 },
    b: { data: lq.b, rows: 2, cols: 1 },
    q: { data: lq.q, rows: 2, cols: 2 },
    r: { data: lq.r, rows: 1, cols: 1 },
  });

  it("records states, controls, costs and reports; applies disturbances; plant may differ", () => {
    // Plant with an actuator gain mismatch (0.8) and a constant push.
    const plant: Dynamics = {
      stateSize: 2,
      controlSize: 1,
      step(x, xo, u, uo, count, t) {
        const scaled = Float64Array.from([0.8 * u[uo]]);
        prob.dynamics.step(x, xo, scaled, 0, count, t);
      },
    };
    const r = closedLoop({
      controller: ctrl,
      plant,
      cost: prob.cost,
      initialState: (e) => Float64Array.from([1 + e, 0]),
      steps: 30,
      episodes: 2,
      disturbance: (_t, _x, w) => {
        w[1] = 0.01;
      },
    });
    expect(r.episodes.length).toBe(2);
    const ep = r.episodes[1];
    expect(ep.states.length).toBe(31 * 2);
    expect(ep.states[0]).toBe(2);
    expect(ep.reports.length).toBe(30);
    expect(ep.reports[29].round).toBe(30);
    // Replay the recorded controls through the same plant and disturbance.
    const x = Float64Array.from([2, 0]);
    let running = 0;
    const c = new Float64Array(1);
    for (let t = 0; t < 30; t++) {
      c[0] = 0;
      prob.cost.running(x, 0, ep.controls, t, 1, 0, c, 0);
      running += c[0];
      plant.step(x, 0, ep.controls, t, 1, t);
      x[1] += 0.01;
    }
    expect(x[0]).toBe(ep.states[60]);
    expect(ep.runningCost).toBeCloseTo(running, 12);
    expect(ep.totalCost).toBe(ep.runningCost + ep.terminalCost);
    expect(r.meanCost).toBe((r.episodes[0].totalCost + ep.totalCost) / 2);
  });

  it("stops an episode whose plant diverges and validates its options", () => {
    const exploding: Dynamics = {
      stateSize: 2,
      controlSize: 1,
      step(x, xo, _u, _uo, _c, t) {
        if (t === 4) x[xo] = Number.POSITIVE_INFINITY;
      },
    };
    const r = closedLoop({
      controller: ctrl,
      plant: exploding,
      cost: prob.cost,
      initialState: Float64Array.from([1, 0]),
      steps: 10,
    });
    expect(r.episodes[0].diverged).toBe(true);
    expect(r.episodes[0].steps).toBe(5);
    expect(r.meanCost).toBe(Number.POSITIVE_INFINITY);
    catchRecedeError(
      () =>
        closedLoop({
          controller: ctrl,
          plant: prob.dynamics,
          cost: prob.cost,
          initialState: new Float64Array(3),
          steps: 5,
        }),
      {
        fn: "closedLoop",
        arg: "initialState",
      },
    );
    catchRecedeError(
      () =>
        closedLoop({
          controller: ctrl,
          plant: prob.dynamics,
          cost: prob.cost,
          initialState: new Float64Array(2),
          steps: 0,
        }),
      {
        fn: "closedLoop",
        arg: "steps",
      },
    );
  });
});
