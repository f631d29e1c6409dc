import { catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { customLoss } from "./customLoss.js";
import { eliteCount, eliteFraction } from "./eliteFraction.js";
import { expectedCost } from "./expectedCost.js";
import { exponentialUtility } from "./exponentialUtility.js";

// Laws of the weights (MATH.md §3.2, §8.1): weights are a probability vector, invariant to a
// common shift of the costs, and the temperature limits are argmin (λ → 0) and uniform (λ → ∞).
// Limits and invariance are properties of the softmin map itself (Williams et al., ICRA 2017,
// weights w ∝ exp(−(C − ρ)/λ)); checked here on random cost vectors.

const costVec = (min = 1, max = 40) =>
  fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true }), {
    minLength: min,
    maxLength: max,
  });
const hugeVec = fc.array(
  fc.double({ min: -1e300, max: 1e300, noNaN: true, noDefaultInfinity: true }),
  {
    minLength: 1,
    maxLength: 40,
  },
);
const temperature = fc.double({ min: 1e-3, max: 1e3, noNaN: true });
const runs = { numRuns: 150 };

function sum(w: Float64Array): number {
  let s = 0;
  for (const x of w) s += x;
  return s;
}

describe("exponentialUtility weights", () => {
  it("are non-negative, finite and sum to 1", () => {
    fc.assert(
      fc.property(costVec(), temperature, (c, lambda) => {
        const costs = Float64Array.from(c);
        const w = new Float64Array(c.length);
        const value = exponentialUtility({ temperature: lambda }).weigh(costs, c.length, w);
        expect(Number.isFinite(value)).toBe(true);
        for (const x of w) expect(x >= 0 && Number.isFinite(x)).toBe(true);
        expect(Math.abs(sum(w) - 1)).toBeLessThan(1e-12);
      }),
      runs,
    );
  });

  it("are invariant to adding a constant to every cost", () => {
    fc.assert(
      fc.property(
        costVec(),
        temperature,
        fc.double({ min: -1e3, max: 1e3, noNaN: true }),
        (c, lambda, shift) => {
          const loss = exponentialUtility({ temperature: lambda });
          const w1 = new Float64Array(c.length);
          const w2 = new Float64Array(c.length);
          loss.weigh(Float64Array.from(c), c.length, w1);
          loss.weigh(
            Float64Array.from(c, (x) => x + shift),
            c.length,
            w2,
          );
          // Shifting rounds C_i − ρ by at most ulp(|C| + |shift|); the weights move by a relative
          // amount of that order divided by λ.
          const tol = 1e-9 * (1 + (1e6 + 1e3) / lambda) * 1e-3;
          for (let i = 0; i < c.length; i++)
            expect(Math.abs(w1[i] - w2[i])).toBeLessThanOrEqual(tol + 1e-12);
        },
      ),
      runs,
    );
  });

  it("λ → 0 picks the argmin (shared equally among exact ties)", () => {
    // Costs on a grid of spacing 1 and λ = 1e-3: every non-minimal weight is ≤ e^{-1000} = 0.
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -1e6, max: 1e6 }), { minLength: 2, maxLength: 40 }),
        (c) => {
          const costs = Float64Array.from(c);
          const w = new Float64Array(c.length);
          exponentialUtility({ temperature: 1e-3 }).weigh(costs, c.length, w);
          const min = Math.min(...c);
          const ties = c.filter((x) => x === min).length;
          for (let i = 0; i < c.length; i++) {
            expect(w[i]).toBeCloseTo(c[i] === min ? 1 / ties : 0, 12);
          }
        },
      ),
      runs,
    );
  });

  it("λ → ∞ gives uniform weights", () => {
    fc.assert(
      fc.property(costVec(), (c) => {
        const w = new Float64Array(c.length);
        exponentialUtility({ temperature: 1e300 }).weigh(Float64Array.from(c), c.length, w);
        for (const x of w) expect(Math.abs(x - 1 / c.length)).toBeLessThan(1e-12);
      }),
      runs,
    );
  });

  it("never produces NaN for costs up to ±1e300 or with some +∞ / NaN", () => {
    fc.assert(
      fc.property(
        hugeVec,
        fc.array(fc.boolean(), { minLength: 40, maxLength: 40 }),
        temperature,
        (c, bad, lambda) => {
          const costs = Float64Array.from(c, (x, i) =>
            bad[i] && i > 0 ? (i % 2 ? Number.POSITIVE_INFINITY : Number.NaN) : x,
          );
          const w = new Float64Array(c.length);
          const value = exponentialUtility({ temperature: lambda }).weigh(costs, c.length, w);
          expect(Number.isNaN(value)).toBe(false);
          for (let i = 0; i < c.length; i++) {
            expect(Number.isNaN(w[i])).toBe(false);
            if (!Number.isFinite(costs[i])) expect(w[i]).toBe(0);
          }
          expect(Math.abs(sum(w) - 1)).toBeLessThan(1e-12);
        },
      ),
      runs,
    );
  });

  it("returns NaN (no usable sample) when every cost is non-finite", () => {
    const w = new Float64Array(3);
    const v = exponentialUtility({ temperature: 1 }).weigh(
      new Float64Array([Number.POSITIVE_INFINITY, Number.NaN, Number.POSITIVE_INFINITY]),
      3,
      w,
    );
    expect(v).toBeNaN();
  });

  it("estimates the free energy −λ ln mean exp(−C/λ) (direct formula on moderate costs)", () => {
    const c = new Float64Array([0.5, 1.5, 3, 0.25]);
    const lambda = 0.7;
    const direct = -lambda * Math.log(c.reduce((s, x) => s + Math.exp(-x / lambda), 0) / c.length);
    const v = exponentialUtility({ temperature: lambda }).weigh(c, 4, new Float64Array(4));
    expect(v).toBeCloseTo(direct, 13);
  });

  it("rejects λ ≤ 0 with a typed error", () => {
    catchRecedeError(() => exponentialUtility({ temperature: 0 }), {
      fn: "exponentialUtility",
      arg: "temperature",
      code: "range",
    });
    catchRecedeError(() => exponentialUtility({ temperature: -0.5 }), {
      fn: "exponentialUtility",
      arg: "temperature",
      message: "-0.5",
    });
  });
});

describe("eliteFraction weights", () => {
  it("put 1/K_e on exactly the K_e lowest costs (ties by index) and sum to 1", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 6 }), { minLength: 1, maxLength: 60 }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
        (ci, rho) => {
          const c = Float64Array.from(ci); // small integers: many ties
          const w = new Float64Array(c.length);
          const value = eliteFraction({ fraction: rho }).weigh(c, c.length, w);
          const ke = eliteCount(rho, c.length);
          const order = Array.from(c.keys()).sort((a, b) => c[a] - c[b] || a - b);
          const elites = new Set(order.slice(0, ke));
          let s = 0;
          for (let i = 0; i < c.length; i++) {
            expect(w[i]).toBe(elites.has(i) ? 1 / ke : 0);
            s += elites.has(i) ? c[i] : 0;
          }
          expect(Math.abs(sum(w) - 1)).toBeLessThan(1e-12);
          expect(value).toBeCloseTo(s / ke, 12);
        },
      ),
      runs,
    );
  });

  it("ignore failed samples and never produce NaN", () => {
    fc.assert(
      fc.property(hugeVec, fc.array(fc.boolean(), { minLength: 40, maxLength: 40 }), (c, bad) => {
        const costs = Float64Array.from(c, (x, i) =>
          bad[i] && i > 0 ? Number.POSITIVE_INFINITY : x,
        );
        const w = new Float64Array(c.length);
        eliteFraction({ fraction: 0.3 }).weigh(costs, c.length, w);
        for (let i = 0; i < c.length; i++) {
          expect(Number.isNaN(w[i])).toBe(false);
          if (!Number.isFinite(costs[i])) expect(w[i]).toBe(0);
        }
        expect(Math.abs(sum(w) - 1)).toBeLessThan(1e-12);
      }),
      runs,
    );
  });

  it("ρ = 1 gives the plain average (MATH.md §10 (d))", () => {
    const w = new Float64Array(5);
    eliteFraction({ fraction: 1 }).weigh(new Float64Array([5, 1, 4, 2, 3]), 5, w);
    expect(Array.from(w)).toEqual([0.2, 0.2, 0.2, 0.2, 0.2]);
  });

  it("rejects ρ ∉ (0, 1] with a typed error", () => {
    catchRecedeError(() => eliteFraction({ fraction: 0 }), {
      fn: "eliteFraction",
      arg: "fraction",
      code: "range",
    });
    catchRecedeError(() => eliteFraction({ fraction: 1.5 }), {
      fn: "eliteFraction",
      arg: "fraction",
      code: "range",
    });
  });
});

describe("expectedCost weights", () => {
  it("are signed, sum to 0, favour low costs, and are invariant to a shift of the costs", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -1e6, max: 1e6 }), { minLength: 2, maxLength: 40 }),
        fc.integer({ min: -1e3, max: 1e3 }),
        (c, shift) => {
          const loss = expectedCost();
          const w1 = new Float64Array(c.length);
          const w2 = new Float64Array(c.length);
          const b = loss.weigh(Float64Array.from(c), c.length, w1);
          loss.weigh(
            Float64Array.from(c, (x) => x + shift),
            c.length,
            w2,
          );
          expect(Math.abs(sum(w1))).toBeLessThan(1e-9);
          expect(b).toBeCloseTo(c.reduce((s, x) => s + x, 0) / c.length, 6);
          for (let i = 0; i < c.length; i++) {
            expect(Number.isFinite(w1[i])).toBe(true);
            if (c[i] < b - 1e-6 * Math.abs(b)) expect(w1[i]).toBeGreaterThanOrEqual(0);
            expect(Math.abs(w1[i] - w2[i])).toBeLessThan(1e-9);
          }
        },
      ),
      runs,
    );
  });
});

describe("customLoss", () => {
  it("with score −C/λ equals the exponential utility (up to the reported value's λ factor)", () => {
    fc.assert(
      fc.property(costVec(), temperature, (c, lambda) => {
        const costs = Float64Array.from(c);
        const w1 = new Float64Array(c.length);
        const w2 = new Float64Array(c.length);
        exponentialUtility({ temperature: lambda }).weigh(costs, c.length, w1);
        customLoss({
          score: (x, n, a) => {
            let min = Number.POSITIVE_INFINITY;
            for (let i = 0; i < n; i++) min = Math.min(min, x[i]);
            const inv = 1 / lambda;
            for (let i = 0; i < n; i++) a[i] = -(x[i] - min) * inv;
          },
        }).weigh(costs, c.length, w2);
        for (let i = 0; i < c.length; i++) expect(w2[i]).toBe(w1[i]);
      }),
      runs,
    );
  });
});
