import type { Dynamics } from "@recede/core";
import { createStream } from "@recede/core";
import { cartPole } from "@recede/problems";
import { bitEqual, catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";
import { linearQuadraticCost } from "./model.js";
import { createRollout } from "./rollout.js";

describe("createRollout", () => {
  const cp = cartPole();
  const k = 37;
  const h = 9;
  const samples = () => {
    const s = new Float64Array(k * h);
    createStream(4).fillNormal(s, 0, k * h);
    for (let i = 0; i < s.length; i++) s[i] *= 15;
    return s;
  };

  it("matches a per-sample rollout (count = 1 calls) exactly, slice by slice", () => {
    const x0 = cp.initialState();
    const eng = createRollout({
      dynamics: cp.dynamics,
      cost: cp.cost,
      samples: k,
      horizon: h,
      lower: cp.bounds.lower,
      upper: cp.bounds.upper,
    });
    const u = samples();
    eng.clip(u, 0, 20);
    eng.clip(u, 20, k - 20);
    for (const v of u) expect(Math.abs(v)).toBeLessThanOrEqual(10);
    eng.run(x0, u, 20, k - 20);
    eng.run(x0, u, 0, 20);
    const x = new Float64Array(4);
    const c = new Float64Array(1);
    for (let i = 0; i < k; i++) {
      x.set(x0);
      c[0] = 0;
      for (let t = 0; t < h; t++) {
        cp.cost.running(x, 0, u, i * h + t, 1, t, c, 0);
        cp.dynamics.step(x, 0, u, i * h + t, 1, t);
      }
      cp.cost.terminal(x, 0, 1, c, 0);
      expect(eng.costs[i]).toBe(c[0]);
      expect(eng.failed[i]).toBe(0);
    }
  });

  it("isolates samples whose model call throws or whose state turns non-finite", () => {
    const picky: Dynamics = {
      stateSize: 1,
      controlSize: 1,
      step(x, xo, u, uo, count) {
        for (let i = 0; i < count; i++) if (u[uo + i] > 2) throw new Error("no");
        for (let i = 0; i < count; i++)
          x[xo + i] = u[uo + i] < -2 ? Number.NaN : x[xo + i] + u[uo + i];
      },
    };
    const cost = linearQuadraticCost({ stateSize: 1, controlSize: 1, q: [[1]], r: [[1]] });
    const eng = createRollout({ dynamics: picky, cost, samples: 4, horizon: 2 });
    const u = Float64Array.from([1, 1, 3, 0, 0, -3, 0.5, 0.5]);
    const failures = eng.run(Float64Array.of(0), u, 0, 4);
    expect(failures).toBe(2);
    expect(Array.from(eng.failed)).toEqual([0, 1, 1, 0]);
    expect(eng.costs[1]).toBe(Number.POSITIVE_INFINITY);
    expect(eng.costs[2]).toBe(Number.POSITIVE_INFINITY);
    // Sample 0: x: 0 → 1 → 2; cost 0 + 1 + (1 + 1) + terminal 4 = 7.
    expect(eng.costs[0]).toBe(7);
    expect(eng.costs[3]).toBe(0.25 + (0.25 + 0.25) + 1);
    // Deterministic: a second run gives the same bits.
    const first = new Float64Array(eng.costs);
    eng.run(Float64Array.of(0), u, 0, 4);
    expect(bitEqual(first, eng.costs)).toBe(true);
  });

  it("with checkEveryStep, fails a sample whose inner state is non-finite even if it turns finite again", () => {
    // x⁺ = +∞ when u > 5, and a non-finite x maps back to 0, with a cost that never reads x: only
    // the per-step check sees it.
    const laundering: Dynamics = {
      stateSize: 1,
      controlSize: 1,
      step(x, xo, u, uo, count) {
        for (let i = 0; i < count; i++) {
          const v = x[xo + i];
          x[xo + i] =
            u[uo + i] > 5 ? Number.POSITIVE_INFINITY : Number.isFinite(v) ? v + u[uo + i] : 0;
        }
      },
    };
    const cost = {
      stateSize: 1,
      controlSize: 1,
      running(
        _x: Float64Array,
        _xo: number,
        u: Float64Array,
        uo: number,
        n: number,
        _t: number,
        out: Float64Array,
        oo: number,
      ) {
        for (let i = 0; i < n; i++) out[oo + i] += u[uo + i] * u[uo + i];
      },
      terminal() {},
    };
    const eng = createRollout({
      dynamics: laundering,
      cost,
      samples: 3,
      horizon: 2,
      checkEveryStep: true,
    });
    const u = Float64Array.from([1, 1, 9, 1, 0, 2]);
    expect(eng.run(Float64Array.of(0), u, 0, 3)).toBe(1);
    expect(Array.from(eng.failed)).toEqual([0, 1, 0]);
    expect(eng.costs[0]).toBe(2);
    expect(eng.costs[2]).toBe(4);
    // The default (final state and total cost only) cannot see a laundered state: the documented
    // reason for the option.
    const plain = createRollout({ dynamics: laundering, cost, samples: 3, horizon: 2 });
    expect(plain.run(Float64Array.of(0), u, 0, 3)).toBe(0);
    expect(plain.costs[1]).toBe(82);
    catchRecedeError(
      () =>
        createRollout({
          dynamics: laundering,
          cost,
          samples: 3,
          horizon: 2,
          checkEveryStep: 1 as unknown as boolean,
        }),
      { fn: "createRollout", arg: "checkEveryStep" },
    );
  });

  it("flags a NaN that appears mid-horizon exactly as the per-step check does", () => {
    // The cart-pole with a fault: the step at t = 4 writes NaN into the cart velocity of every
    // third sample; later steps and the cost carry it to x_H and C_k.
    const kk = 12;
    const hh = 9;
    const faulty: Dynamics = {
      stateSize: 4,
      controlSize: 1,
      step(x, xo, u, uo, count, t) {
        cp.dynamics.step(x, xo, u, uo, count, t);
        if (t !== 4) return;
        for (let i = 0; i < count; i++) {
          const sample = xo / 4 + i;
          if (sample % 3 === 1) x[xo + 4 * i + 1] = Number.NaN;
        }
      },
    };
    const u = samples().subarray(0, kk * hh);
    const make = (checkEveryStep: boolean) =>
      createRollout({
        dynamics: faulty,
        cost: cp.cost,
        samples: kk,
        horizon: hh,
        lower: cp.bounds.lower,
        upper: cp.bounds.upper,
        checkEveryStep,
      });
    const perStep = make(true);
    const atEnd = make(false);
    const ua = u.slice();
    perStep.clip(ua, 0, kk);
    const x0 = cp.initialState();
    expect(perStep.run(x0, ua, 0, 5) + perStep.run(x0, ua, 5, 7)).toBe(4);
    expect(atEnd.run(x0, ua, 0, 5) + atEnd.run(x0, ua, 5, 7)).toBe(4);
    expect(Array.from(atEnd.failed)).toEqual(Array.from(perStep.failed));
    expect(Array.from(atEnd.failed)).toEqual([0, 1, 0, 0, 1, 0, 0, 1, 0, 0, 1, 0]);
    expect(bitEqual(atEnd.costs, perStep.costs)).toBe(true);
    expect(bitEqual(atEnd.states, perStep.states)).toBe(true);
    expect(atEnd.costs[1]).toBe(Number.POSITIVE_INFINITY);
  });

  it("clips every component to its bounds, in place, only within the slice", () => {
    const cost = linearQuadraticCost({
      stateSize: 1,
      controlSize: 2,
      q: [[1]],
      r: [
        [1, 0],
        [0, 1],
      ],
    });
    const dyn: Dynamics = { stateSize: 1, controlSize: 2, step() {} };
    const eng = createRollout({
      dynamics: dyn,
      cost,
      samples: 3,
      horizon: 1,
      lower: Float64Array.of(-1, 0),
      upper: Float64Array.of(1, 2),
    });
    const u = Float64Array.from([-5, 5, 0.5, -0.5, Number.NaN, 7]);
    eng.clip(u, 0, 2);
    expect(Array.from(u.subarray(0, 4))).toEqual([-1, 2, 0.5, 0]);
    expect(Number.isNaN(u[4])).toBe(true); // outside the slice: untouched
    expect(u[5]).toBe(7);
    eng.clip(u, 2, 1);
    expect(Number.isNaN(u[4])).toBe(true); // NaN stays NaN (the rollout then fails the sample)
    expect(u[5]).toBe(2);
  });

  it("validates sizes with typed errors", () => {
    catchRecedeError(
      () => createRollout({ dynamics: cp.dynamics, cost: cp.cost, samples: 0, horizon: 3 }),
      { fn: "createRollout", arg: "samples" },
    );
    const wrong = linearQuadraticCost({
      stateSize: 2,
      controlSize: 1,
      q: [
        [1, 0],
        [0, 1],
      ],
      r: [[1]],
    });
    catchRecedeError(
      () => createRollout({ dynamics: cp.dynamics, cost: wrong, samples: 1, horizon: 3 }),
      { fn: "createRollout", arg: "cost.stateSize" },
    );
  });
});
