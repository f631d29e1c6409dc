import type { CostModel } from "@recede/core";
import { bitEqual } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { wrapAngle } from "../problem.js";
import { circleObstacles, hypot2 } from "./circleObstacles.js";
import { quadraticCost } from "./quadraticCost.js";
import { stateLimitPenalty } from "./stateLimitPenalty.js";
import { sumCosts } from "./sumCosts.js";

/** Any double, with the specials a rollout can produce (NaN, ±∞, −0, huge and tiny values). */
/** Values in [−8, 8] with full mantissas (fast-check's doubles favour short ones, which add exactly). */
const fraction = fc
  .integer({ min: -(2 ** 30), max: 2 ** 30 })
  .map((i) => (i / 2 ** 30) * 8.0000001);
const anyValue = fc.oneof(
  { weight: 20, arbitrary: fraction },
  { weight: 4, arbitrary: fc.double({ min: -8, max: 8, noNaN: true }) },
  {
    weight: 2,
    arbitrary: fc.constantFrom(
      Number.NaN,
      Number.POSITIVE_INFINITY,
      Number.NEGATIVE_INFINITY,
      -0,
      1e300,
      -1e300,
      5e-324,
    ),
  },
  { weight: 2, arbitrary: fc.double({ noNaN: false }) },
);
const weight = fc.oneof(
  fc.constant(0),
  fc.double({ min: 0, max: 50, noNaN: true }),
  fraction.map((v) => Math.abs(v) * 6),
);
const bound = fc.oneof(
  fc.double({ min: -4, max: 4, noNaN: true }),
  fraction.map((v) => v / 2),
  fc.constant(null),
);

const caseOf = (nArb: fc.Arbitrary<number>, limitsArb: fc.Arbitrary<number>) =>
  fc
    .record({
      n: nArb,
      m: fc.integer({ min: 0, max: 3 }),
      count: fc.integer({ min: 1, max: 7 }),
      rows: fc.integer({ min: 1, max: 3 }),
      limits: limitsArb,
    })
    .chain(({ n, m, count, rows, limits }) =>
      fc.record({
        n: fc.constant(n),
        m: fc.constant(m),
        count: fc.constant(count),
        q: fc.array(weight, { minLength: n, maxLength: n }),
        r: fc.array(weight, { minLength: m, maxLength: m }),
        qf: fc.array(weight, { minLength: n, maxLength: n }),
        reference: fc.array(fc.double({ min: -5, max: 5, noNaN: true }), {
          minLength: rows * n,
          maxLength: rows * n,
        }),
        controlReference: fc.array(fc.double({ min: -2, max: 2, noNaN: true }), {
          minLength: rows * m,
          maxLength: rows * m,
        }),
        angles: fc.subarray(Array.from({ length: n }, (_, i) => i)),
        limits: fc.array(
          fc
            .record({
              index: fc.integer({ min: 0, max: n - 1 }),
              a: bound,
              b: bound,
              weight,
              violationCost: weight,
            })
            .map(({ index, a, b, weight: w, violationCost }) => {
              const lo = a === null ? undefined : b === null ? a : Math.min(a, b);
              const hi = b === null ? undefined : a === null ? b : Math.max(a, b);
              return { index, lower: lo, upper: hi, weight: w, violationCost };
            }),
          { minLength: limits, maxLength: limits },
        ),
        limitTerminal: fc.boolean(),
        x: fc.array(anyValue, { minLength: (count + 2) * n, maxLength: (count + 2) * n }),
        u: fc.array(anyValue, { minLength: (count + 2) * m, maxLength: (count + 2) * m }),
        out: fc.array(anyValue, { minLength: count + 2, maxLength: count + 2 }),
        t: fc.integer({ min: 0, max: 4 }),
        start: fc.integer({ min: 0, max: 2 }),
        offset: fc.integer({ min: 0, max: 2 }),
        fullQ: fc.boolean(),
      }),
    );

const caseArb = caseOf(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 3 }));
/** The unrolled path (n = 4, one limit: the bicycle's and the cart-pole's costs). */
const case4Arb = caseOf(fc.constant(4), fc.constant(1));

type Case = typeof caseArb extends fc.Arbitrary<infer T> ? T : never;

function terms(c: Case): { quad: ReturnType<typeof quadraticCost>; lim: CostModel } {
  const { n, m } = c;
  // A full (non-diagonal) Q, when asked: Q = D + ε(e_0 e_1ᵀ + e_1 e_0ᵀ) stays PSD for ε small.
  let q: number[] | number[][] = c.q;
  if (c.fullQ && n >= 2) {
    const d = c.q.map((v) => v + 1);
    q = d.map((v, i) =>
      d.map((_, j) => (i === j ? v : (i === 0 && j === 1) || (i === 1 && j === 0) ? 0.25 : 0)),
    );
  }
  const quad = quadraticCost({
    stateSize: n,
    controlSize: m,
    q,
    r: m === 0 ? 0 : c.r,
    qf: c.qf,
    reference: c.reference,
    controlReference: m === 0 ? undefined : c.controlReference,
    angleIndices: c.angles,
    horizon: 3,
  });
  quad.setStart(c.start);
  const lim = stateLimitPenalty({
    stateSize: n,
    controlSize: m,
    limits: c.limits,
    terminal: c.limitTerminal,
  });
  return { quad, lim };
}

describe("quadraticCost (diagonal weights)", () => {
  it.each([
    ["n = 1…6", caseArb],
    ["the unrolled n = 2, 4, 6", caseOf(fc.constantFrom(2, 4, 6), fc.constant(1))],
  ])(
    "equals the textbook sum Σ q_i d_i² + Σ r_j e_j², in that order, bit for bit: %s",
    (_name, arb) => {
      fc.assert(
        fc.property(arb, (c) => {
          const { n, m, count, offset } = c;
          const { quad } = terms({ ...c, fullQ: false });
          const x = Float64Array.from(c.x);
          const u = Float64Array.from(c.u);
          const a = Float64Array.from(c.out);
          const b = Float64Array.from(c.out);
          quad.running(x, offset * n, u, offset * m, count, c.t, a, offset);
          const rows = c.reference.length / n;
          const row = Math.min(c.start + c.t, rows - 1);
          for (let k = 0; k < count; k++) {
            let s = 0;
            for (let i = 0; i < n; i++) {
              let d = x[(offset + k) * n + i] - c.reference[row * n + i];
              if (c.angles.includes(i)) d = wrapAngle(d);
              s += c.q[i] * d * d;
            }
            for (let j = 0; j < m; j++) {
              const e = u[(offset + k) * m + j] - c.controlReference[row * m + j];
              s += c.r[j] * e * e;
            }
            b[offset + k] += s;
          }
          expect(bitEqual(a, b)).toBe(true);
        }),
        { numRuns: 400 },
      );
    },
  );
});

describe("circleObstacles", () => {
  /** Doubles of every magnitude: random bit patterns (incl. subnormals, NaN, ±∞) and small values. */
  const bits = fc
    .tuple(fc.integer({ min: 0, max: 2 ** 32 - 1 }), fc.integer({ min: 0, max: 2 ** 32 - 1 }))
    .map(([lo, hi]) => new Float64Array(new Uint32Array([lo, hi]).buffer)[0]);
  const coord = fc.oneof(bits, fraction, anyValue);

  it("hypot2(x, y) is Math.hypot(x, y) bit for bit (V8's algorithm; any doubles)", () => {
    fc.assert(
      fc.property(coord, coord, (x, y) => {
        expect(Object.is(hypot2(x, y), Math.hypot(x, y))).toBe(true);
        expect(Object.is(hypot2(y, x), Math.hypot(y, x))).toBe(true);
      }),
      { numRuns: 2000 },
    );
    // Near-ties and the special values, exhaustively.
    const specials = [0, -0, 1, -1, 5e-324, 1e-160, 1e160, Number.MAX_VALUE, Number.NaN];
    for (const inf of [Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) specials.push(inf);
    for (const x of specials) {
      for (const y of specials) expect(Object.is(hypot2(x, y), Math.hypot(x, y))).toBe(true);
    }
    for (let i = 1; i < 200; i++) {
      const x = i / 7;
      expect(hypot2(x, x * (1 + i * 2 ** -52))).toBe(Math.hypot(x, x * (1 + i * 2 ** -52)));
    }
  });

  it("equals the textbook form Σ w·[ρ + c − d]₊² + hit·1{d < ρ} with Math.hypot, bit for bit", () => {
    const obstacle = fc.record({
      x: fc.double({ min: -5, max: 5, noNaN: true }),
      y: fraction,
      radius: fc.double({ min: 0.05, max: 3, noNaN: true }),
      vx: fc.oneof(fc.constant(0), fraction),
      vy: fc.oneof(fc.constant(0), fraction),
    });
    fc.assert(
      fc.property(
        fc.array(obstacle, { minLength: 1, maxLength: 4 }),
        fc.array(coord, { minLength: 12, maxLength: 12 }),
        fc.array(anyValue, { minLength: 4, maxLength: 4 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 2000, noNaN: true }),
        fc.integer({ min: 0, max: 30 }),
        (obstacles, xs, outs, clearance, weight, collisionCost, t) => {
          const c = circleObstacles({
            stateSize: 3,
            controlSize: 1,
            obstacles,
            positionIndices: [2, 0],
            clearance,
            weight,
            collisionCost,
            dt: 0.1,
            horizon: 20,
          });
          c.setTime(0.7);
          const x = Float64Array.from(xs);
          const reference = (tau: number, out: Float64Array): void => {
            for (let k = 0; k < 4; k++) {
              let s = 0;
              for (const o of obstacles) {
                const d = Math.hypot(x[3 * k + 2] - o.x - o.vx * tau, x[3 * k] - o.y - o.vy * tau);
                const e = o.radius + clearance - d;
                if (e > 0) s += weight * e * e;
                if (d < o.radius) s += collisionCost;
              }
              out[k] += s;
            }
          };
          const a = Float64Array.from(outs);
          const b = Float64Array.from(outs);
          c.running(x, 0, new Float64Array(4), 0, 4, t, a, 0);
          reference(0.7 + t * 0.1, b);
          expect(bitEqual(a, b)).toBe(true);
          c.terminal(x, 0, 4, a, 0);
          reference(0.7 + 20 * 0.1, b);
          expect(bitEqual(a, b)).toBe(true);
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe("stateLimitPenalty", () => {
  it("equals the branchy textbook form Σ w·e² + violationCost, bit for bit (incl. NaN/±∞/−0)", () => {
    fc.assert(
      fc.property(caseArb, (c) => {
        const { n, m, count } = c;
        const { lim } = terms(c);
        const x = Float64Array.from(c.x);
        const a = Float64Array.from(c.out);
        const b = Float64Array.from(c.out);
        lim.running(x, 0, new Float64Array(Math.max(1, count * m)), 0, count, 0, a, 0);
        for (let k = 0; k < count; k++) {
          let s = 0;
          for (const l of c.limits) {
            const v = x[k * n + l.index];
            const hi = l.upper ?? Number.POSITIVE_INFINITY;
            const lo = l.lower ?? Number.NEGATIVE_INFINITY;
            if (v > hi) s += l.weight * (v - hi) * (v - hi) + l.violationCost;
            else if (v < lo) s += l.weight * (lo - v) * (lo - v) + l.violationCost;
          }
          b[k] += s;
        }
        expect(bitEqual(a, b)).toBe(true);
      }),
      { numRuns: 300 },
    );
  });
});

describe("sumCosts: the fused quadratic + state-limit pass", () => {
  it.each([
    ["any n, 1–3 limits", caseArb],
    ["n = 4, one limit (unrolled)", case4Arb],
  ])(
    "equals the separate terms, bit for bit (running and terminal, any input incl. NaN/±∞): %s",
    (_name, arb) => {
      fc.assert(
        fc.property(arb, (c) => {
          const { n, m, count, offset } = c;
          const { quad, lim } = terms(c);
          const fused = sumCosts(quad, lim);
          const x = Float64Array.from(c.x);
          const u = Float64Array.from(c.u);
          const a = Float64Array.from(c.out);
          const b = Float64Array.from(c.out);
          // separate passes, in the order of the terms
          quad.running(x, offset * n, u, offset * m, count, c.t, a, offset);
          lim.running(x, offset * n, u, offset * m, count, c.t, a, offset);
          fused.running(x, offset * n, u, offset * m, count, c.t, b, offset);
          expect(bitEqual(a, b)).toBe(true);
          quad.terminal(x, offset * n, count, a, offset);
          lim.terminal(x, offset * n, count, a, offset);
          fused.terminal(x, offset * n, count, b, offset);
          expect(bitEqual(a, b)).toBe(true);
        }),
        { numRuns: 300 },
      );
    },
  );

  it("keeps the order of the terms: limits first, or a third term after, give the separate sums", () => {
    fc.assert(
      fc.property(caseArb, (c) => {
        const { n, m, count } = c;
        const { quad, lim } = terms(c);
        const obstacles =
          n >= 2
            ? circleObstacles({
                stateSize: n,
                controlSize: m,
                obstacles: [{ x: 0.5, y: -0.5, radius: 1 }],
              })
            : lim;
        const x = Float64Array.from(c.x);
        const u = Float64Array.from(c.u);
        for (const list of [
          [lim, quad],
          [quad, lim, obstacles],
          [obstacles, quad, lim, quad],
        ]) {
          const a = Float64Array.from(c.out);
          const b = Float64Array.from(c.out);
          for (const term of list) term.running(x, 0, u, 0, count, c.t, a, 0);
          sumCosts(...list).running(x, 0, u, 0, count, c.t, b, 0);
          expect(bitEqual(a, b)).toBe(true);
          for (const term of list) term.terminal(x, 0, count, a, 0);
          sumCosts(...list).terminal(x, 0, count, b, 0);
          expect(bitEqual(a, b)).toBe(true);
        }
      }),
      { numRuns: 150 },
    );
  });

  it("follows the quadratic cost's live reference (setReference / setStart after fusing)", () => {
    const quad = quadraticCost({
      stateSize: 4,
      controlSize: 2,
      q: [1, 2, 0.5, 0.1],
      r: [0.1, 0.2],
      reference: [1, 2, 0, 0, 3, 1, 0, 0],
      angleIndices: [2],
    });
    const lim = stateLimitPenalty({
      stateSize: 4,
      controlSize: 2,
      limits: [{ index: 3, lower: -0.5, upper: 1.5, weight: 100, violationCost: 2 }],
    });
    const fused = sumCosts(quad, lim);
    const x = Float64Array.of(0.2, -1, 4, 2, 1, 1, -3, -1);
    const u = Float64Array.of(0.3, -0.2, 1, 1);
    const check = () => {
      const a = new Float64Array(2);
      const b = new Float64Array(2);
      quad.running(x, 0, u, 0, 2, 0, a, 0);
      lim.running(x, 0, u, 0, 2, 0, a, 0);
      fused.running(x, 0, u, 0, 2, 0, b, 0);
      expect(bitEqual(a, b)).toBe(true);
      return b[0];
    };
    const before = check();
    quad.setReference([0, 0, 1, 0, 5, 5, 1, 0]);
    const after = check();
    expect(after).not.toBe(before);
    quad.setStart(1);
    expect(check()).not.toBe(after);
  });
});
