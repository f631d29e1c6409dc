import type { CostModel, Dynamics } from "@recede/core";
import { bitEqual } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { linearQuadraticCost } from "./model.js";
import { createRollout } from "./rollout.js";

/**
 * A random linear model x⁺ = A x + B u that writes a fault value (NaN, +∞ or −∞) into component
 * `at.i` of the listed samples after step `at.t`. A linear map does not launder: A_ij·NaN and
 * 0·∞ are NaN, so a non-finite component makes every later state non-finite.
 */
interface Case {
  n: number;
  m: number;
  h: number;
  k: number;
  a: number[];
  b: number[];
  q: number[];
  lower: number[];
  upper: number[];
  samples: number[];
  faults: { sample: number; t: number; i: number; value: number }[];
  cuts: number[];
  /** Use a cost that never reads the state (so only x_H can reveal a fault). */
  blind: boolean;
}

const small = fc.double({ min: -1.2, max: 1.2, noNaN: true });
const caseArb: fc.Arbitrary<Case> = fc
  .record({
    n: fc.integer({ min: 1, max: 4 }),
    m: fc.integer({ min: 1, max: 3 }),
    h: fc.integer({ min: 1, max: 6 }),
    k: fc.integer({ min: 1, max: 9 }),
  })
  .chain(({ n, m, h, k }) =>
    fc.record({
      n: fc.constant(n),
      m: fc.constant(m),
      h: fc.constant(h),
      k: fc.constant(k),
      a: fc.array(small, { minLength: n * n, maxLength: n * n }),
      b: fc.array(small, { minLength: n * m, maxLength: n * m }),
      q: fc.array(fc.double({ min: 0, max: 3, noNaN: true }), { minLength: n, maxLength: n }),
      lower: fc.array(fc.constantFrom(Number.NEGATIVE_INFINITY, -2, -1, -0.5), {
        minLength: m,
        maxLength: m,
      }),
      upper: fc.array(fc.constantFrom(Number.POSITIVE_INFINITY, 2, 1, 0.5), {
        minLength: m,
        maxLength: m,
      }),
      samples: fc.array(
        fc.oneof(
          { weight: 30, arbitrary: fc.double({ min: -4, max: 4, noNaN: true }) },
          { weight: 1, arbitrary: fc.constant(Number.NaN) },
        ),
        { minLength: k * h * m, maxLength: k * h * m },
      ),
      faults: fc.array(
        fc.record({
          sample: fc.integer({ min: 0, max: k - 1 }),
          t: fc.integer({ min: 0, max: h - 1 }),
          i: fc.integer({ min: 0, max: n - 1 }),
          value: fc.constantFrom(Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY),
        }),
        { maxLength: 3 },
      ),
      cuts: fc.array(fc.integer({ min: 1, max: Math.max(1, k - 1) }), { maxLength: 3 }),
      blind: fc.boolean(),
    }),
  );

function modelOf(c: Case): Dynamics {
  const { n, m, a, b, faults } = c;
  const next = new Float64Array(n);
  return {
    stateSize: n,
    controlSize: m,
    step(x, xo, u, uo, count, t): void {
      for (let s = 0; s < count; s++) {
        const xb = xo + s * n;
        const ub = uo + s * m;
        for (let i = 0; i < n; i++) {
          let v = 0;
          for (let j = 0; j < n; j++) v += a[i * n + j] * x[xb + j];
          for (let j = 0; j < m; j++) v += b[i * m + j] * u[ub + j];
          next[i] = v;
        }
        for (let i = 0; i < n; i++) x[xb + i] = next[i];
        const sample = xo / n + s;
        for (const f of faults) if (f.sample === sample && f.t === t) x[xb + f.i] = f.value;
      }
    },
  };
}

function slicesOf(k: number, cuts: number[]): [number, number][] {
  const ends = [...new Set(cuts.filter((c) => c < k))].sort((p, q) => p - q);
  const out: [number, number][] = [];
  let from = 0;
  for (const e of [...ends, k]) {
    out.push([from, e - from]);
    from = e;
  }
  return out;
}

describe("createRollout: end-of-rollout non-finite detection", () => {
  it("flags the same samples, with the same costs and states, as the per-step check (non-laundering models)", () => {
    fc.assert(
      fc.property(caseArb, (c) => {
        const { n, m, h, k } = c;
        const dynamics = modelOf(c);
        const q = c.q.map((v, i) => c.q.map((_, j) => (i === j ? v : 0)));
        const r = Array.from({ length: m }, (_, i) =>
          Array.from({ length: m }, (_, j) => (i === j ? 0.5 : 0)),
        );
        const quadratic = linearQuadraticCost({ stateSize: n, controlSize: m, q, r });
        const blind: CostModel = {
          stateSize: n,
          controlSize: m,
          running(_x, _xo, u, uo, count, _t, out, oo): void {
            for (let s = 0; s < count * m; s++)
              out[oo + Math.floor(s / m)] += u[uo + s] * u[uo + s];
          },
          terminal(): void {},
        };
        const cost = c.blind ? blind : quadratic;
        const opts = {
          dynamics,
          cost,
          samples: k,
          horizon: h,
          lower: Float64Array.from(c.lower),
          upper: Float64Array.from(c.upper),
        };
        const perStep = createRollout({ ...opts, checkEveryStep: true });
        const atEnd = createRollout(opts);
        const x0 = Float64Array.from({ length: n }, (_, i) => 0.3 * (i + 1));
        const u1 = Float64Array.from(c.samples);
        const u2 = Float64Array.from(c.samples);
        let f1 = 0;
        let f2 = 0;
        for (const [from, count] of slicesOf(k, c.cuts)) {
          perStep.clip(u1, from, count);
          f1 += perStep.run(x0, u1, from, count);
          atEnd.clip(u2, from, count);
          f2 += atEnd.run(x0, u2, from, count);
        }
        expect(f2).toBe(f1);
        expect(Array.from(atEnd.failed)).toEqual(Array.from(perStep.failed));
        expect(bitEqual(atEnd.costs, perStep.costs)).toBe(true);
        expect(bitEqual(atEnd.states, perStep.states)).toBe(true);
        expect(bitEqual(u2, u1)).toBe(true);
        // Every injected fault fails its sample (the check cannot miss one).
        for (const f of c.faults) expect(perStep.failed[f.sample]).toBe(1);
        for (let s = 0; s < k; s++) {
          expect(perStep.failed[s] === 1).toBe(perStep.costs[s] === Number.POSITIVE_INFINITY);
        }
      }),
      { numRuns: 200 },
    );
  });
});
