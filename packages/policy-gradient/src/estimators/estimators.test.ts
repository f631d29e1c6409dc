import { createStream } from "@recede/core";
import {
  EpisodeBatch,
  environmentFromProblem,
  gae,
  linearGaussianPolicy,
  linearValueFunction,
  reinforce,
  returnsToGo,
  softmaxPolicy,
  type ValueModel,
} from "@recede/policy-gradient";
import { doubleIntegrator } from "@recede/problems";
import { catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

/** A hand-made batch: E episodes of T steps, 1-d states s_t = e + t/10, costs given. */
function handBatch(costs: number[][], terminal: number[]): EpisodeBatch {
  const E = costs.length;
  const T = costs[0].length;
  const b = new EpisodeBatch(E, T, 1, 1, 1);
  for (let e = 0; e < E; e++) {
    for (let t = 0; t < T; t++) {
      b.costs[e * T + t] = costs[e][t];
      b.states[e * T + t] = e + t / 10;
    }
    b.terminalCosts[e] = terminal[e];
    b.finalStates[e] = e + T / 10;
  }
  return b;
}

/** V(s, t) = s (never refitted), to check the estimator algebra exactly. */
const identityValue: ValueModel = {
  stateSize: 1,
  predict: (s, so) => s[so],
  fit: () => {},
  reset: () => {},
};

describe("returns and advantages (MATH.md §5.1–5.2)", () => {
  it("returns-to-go by hand: c = (1, 2, 3), c_H = 4, γ = ½ → G = (3.25, 4.5, 5)", () => {
    const g = returnsToGo(handBatch([[1, 2, 3]], [4]), 0.5, new Float64Array(3));
    expect(Array.from(g)).toEqual([3.25, 4.5, 5]);
  });

  it("GAE(λ = 1) = G_t − V(s_t) and GAE(λ = 0) = δ_t, for any V", () => {
    fc.assert(
      fc.property(
        fc.array(
          fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 4, maxLength: 4 }),
          { minLength: 1, maxLength: 3 },
        ),
        fc.double({ min: 0.5, max: 1, noNaN: true }),
        (costs, gamma) => {
          const term = costs.map((_, e) => e - 1);
          const b = handBatch(costs, term);
          const T = 4;
          const G = returnsToGo(b, gamma, new Float64Array(b.sampleCount));
          const a1 = gae({
            discount: gamma,
            lambda: 1,
            value: identityValue,
            discountWeighting: false,
          }).score(b).weights;
          const a0 = gae({
            discount: gamma,
            lambda: 0,
            value: identityValue,
            discountWeighting: false,
          }).score(b).weights;
          for (let i = 0; i < b.sampleCount; i++) {
            const t = i % T;
            const e = (i - t) / T;
            expect(a1[i]).toBeCloseTo(G[i] - b.states[i], 10);
            const vNext = t === T - 1 ? b.terminalCosts[e] : b.states[i + 1];
            expect(a0[i]).toBeCloseTo(b.costs[i] + gamma * vNext - b.states[i], 10);
          }
        },
      ),
      { numRuns: 100 },
    );
  });

  it("REINFORCE weights: γ^t (G_t − b_t) with the leave-one-out mean baseline", () => {
    const b = handBatch(
      [
        [1, 2],
        [3, 5],
        [0, 1],
      ],
      [0, 0, 0],
    );
    const w = reinforce({ discount: 0.5, baseline: "mean" }).score(b).weights;
    const G = returnsToGo(b, 0.5, new Float64Array(6));
    for (let t = 0; t < 2; t++) {
      for (let e = 0; e < 3; e++) {
        const others = [0, 1, 2].filter((k) => k !== e).map((k) => G[k * 2 + t]);
        const base = (others[0] + others[1]) / 2;
        expect(w[e * 2 + t]).toBeCloseTo(0.5 ** t * (G[e * 2 + t] - base), 12);
      }
    }
  });

  it("the linear value function fits a quadratic-in-state, polynomial-in-time target exactly", () => {
    const v = linearValueFunction({ stateSize: 2, horizon: 10, ridge: 0 });
    const N = 200;
    const st = createStream(1);
    const s = new Float64Array(2 * N);
    st.fillNormal(s, 0, 2 * N);
    const times = new Int32Array(N);
    const y = new Float64Array(N);
    const f = (x0: number, x1: number, t: number) =>
      3 + x0 - 2 * x1 + 0.5 * x0 * x0 + x0 * x1 + 2 * x1 * x1 + 4 * (t / 10) - (t / 10) ** 3;
    for (let i = 0; i < N; i++) {
      times[i] = i % 10;
      y[i] = f(s[2 * i], s[2 * i + 1], times[i]);
    }
    v.fit(s, times, y, N);
    const q = new Float64Array([0.3, -1.2]);
    expect(v.predict(q, 0, 7)).toBeCloseTo(f(0.3, -1.2, 7), 8);
    v.reset();
    expect(v.predict(q, 0, 7)).toBe(0);
  });
});

describe("rollout environment", () => {
  const p = doubleIntegrator({ dt: 0.1, controlLimit: 0.5 });
  const env = environmentFromProblem(p, {
    horizon: 20,
    initialStateStd: 0.3,
    disturbanceStd: 0.01,
  });
  const pi = linearGaussianPolicy({
    stateSize: 2,
    actionSize: 1,
    initialGain: [[3, 3]],
    initialStd: 1,
  });

  it("applies controls clipped to the bounds and scores them with the problem's cost", () => {
    const b = env.collect(pi, pi.initialParameters(), createStream(2), env.createBatch(5));
    let clipped = 0;
    const c = new Float64Array(1);
    for (let i = 0; i < b.sampleCount; i++) {
      const u = b.controls[i];
      expect(Math.abs(u)).toBeLessThanOrEqual(0.5);
      if (u !== b.actions[i]) clipped++;
      c[0] = 0;
      p.cost.running(b.states, i * 2, b.controls, i, 1, i % 20, c, 0);
      expect(b.costs[i]).toBe(c[0]);
      expect(b.logProbs[i]).toBeCloseTo(
        pi.logProb(pi.initialParameters(), b.states, i * 2, b.actions, i),
        12,
      );
    }
    expect(clipped).toBeGreaterThan(0);
  });

  it("same seed → bit-identical episodes", () => {
    const a = env.collect(pi, pi.initialParameters(), createStream(3), env.createBatch(4));
    const b = env.collect(pi, pi.initialParameters(), createStream(3), env.createBatch(4));
    expect(Array.from(a.states)).toEqual(Array.from(b.states));
    expect(Array.from(a.costs)).toEqual(Array.from(b.costs));
  });

  it("typed errors for mismatched policies, batches and options", () => {
    catchRecedeError(
      () =>
        env.collect(
          linearGaussianPolicy({ stateSize: 3, actionSize: 1 }),
          new Float64Array(5),
          createStream(1),
          env.createBatch(1),
        ),
      {
        fn: "RolloutEnvironment.collect",
        arg: "policy.stateSize",
      },
    );
    catchRecedeError(
      () =>
        env.collect(
          softmaxPolicy({ stateSize: 2, actionCount: 3 }),
          new Float64Array(9),
          createStream(1),
          env.createBatch(1, 1),
        ),
      {
        arg: "policy.actionCount",
      },
    );
    catchRecedeError(
      () =>
        env.collect(
          pi,
          new Float64Array([1, 2, Number.NaN, 0]),
          createStream(1),
          env.createBatch(1),
        ),
      { code: "non-finite" },
    );
    catchRecedeError(() => environmentFromProblem(p, { horizon: 0 }), {
      fn: "rolloutEnvironment",
      arg: "horizon",
    });
    catchRecedeError(() => environmentFromProblem(p, { disturbanceStd: -1 }), {
      arg: "disturbanceStd",
    });
    catchRecedeError(() => gae({ lambda: 2 }), { fn: "gae", arg: "lambda" });
    catchRecedeError(() => reinforce({ discount: 0 }), { fn: "reinforce", arg: "discount" });
  });
});

describe("early termination", () => {
  // Double integrator starting at p = 0.5 with velocity 1 and no control: the episode ends the
  // first time |p| > 1.05 (after the step that takes it there).
  const p = doubleIntegrator({ dt: 0.1 });
  const env = environmentFromProblem(p, {
    horizon: 20,
    initialState: new Float64Array([0.5, 1]),
    terminate: (x, o) => Math.abs(x[o]) > 1.05,
  });
  const idle = linearGaussianPolicy({ stateSize: 2, actionSize: 1, bias: false, initialStd: 1e-9 });

  it("records the length, pads with zero cost and charges the terminal cost at the terminating state", () => {
    const b = env.collect(idle, idle.initialParameters(), createStream(1), env.createBatch(2));
    // p_t = 0.5 + 0.1 t (u ≈ 0): |p| > 1.05 first at t = 6 (after the 6th step) → length 6.
    expect(Array.from(b.lengths)).toEqual([6, 6]);
    expect(Array.from(b.terminated)).toEqual([1, 1]);
    for (let t = 6; t < 20; t++) expect(b.costs[t]).toBe(0);
    expect(b.finalStates[0]).toBeCloseTo(1.1, 6);
    const c = new Float64Array(1);
    p.cost.terminal(b.finalStates, 0, 1, c, 0);
    expect(b.terminalCosts[0]).toBe(c[0]);
    expect(b.complete).toBe(false);
  });

  it("estimators score only the active steps (compacted) and use no value beyond a termination", () => {
    const b = env.collect(idle, idle.initialParameters(), createStream(1), env.createBatch(3));
    const G = returnsToGo(b, 0.9, new Float64Array(b.sampleCount));
    const s = reinforce({ discount: 0.9, baseline: "none", discountWeighting: false }).score(b);
    expect(s.count).toBe(18);
    expect(s.normalizer).toBe(3);
    for (let t = 0; t < 6; t++) expect(s.weights[t]).toBeCloseTo(G[t], 12);
    const zero: ValueModel = { stateSize: 2, predict: () => 0, fit: () => {}, reset: () => {} };
    const a = gae({
      discount: 0.9,
      lambda: 1,
      value: zero,
      bootstrapAtHorizon: true,
      discountWeighting: false,
    }).score(b);
    expect(a.count).toBe(18);
    for (let t = 0; t < 6; t++) expect(a.weights[t]).toBeCloseTo(G[t], 12);
  });
});
