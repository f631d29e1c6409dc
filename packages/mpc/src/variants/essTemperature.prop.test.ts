import { catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { exponentialUtility } from "../losses/exponentialUtility.js";
import { essTemperature } from "./essTemperature.js";

/**
 * Kish's effective sample size of normalized weights, 1/Σw² (L. Kish, "Survey Sampling", 1965;
 * A. Kong, "A Note on Importance Sampling using Standardized Weights", 1992), computed here
 * independently of the code under test.
 */
function kish(w: Float64Array): number {
  let s1 = 0;
  let s2 = 0;
  for (const x of w) {
    s1 += x;
    s2 += x * x;
  }
  return (s1 * s1) / s2;
}

/** The documented floor of the bisection bracket, max(10⁻⁹·D, 10⁻³⁰⁰), D = max_i (C_i − min C). */
function lambdaFloor(finite: number[], min: number): number {
  let d = 0;
  for (const c of finite) d = Math.max(d, c - min);
  return Math.max(1e-9 * d, 1e-300);
}

/** Kish ESS of the exponential weights at temperature λ, computed independently. */
function essAt(finite: number[], min: number, lambda: number): number {
  return kish(Float64Array.from(finite, (c) => Math.exp(-(c - min) / lambda)));
}

/**
 * Costs with a few failures (+∞), on a 10⁻⁶ grid (so differences are 0 or ≥ 10⁻⁶: spreads below
 * the λ floor 10⁻³⁰⁰·… cannot reach every ESS and are an edge case documented in the code).
 */
const costArb = fc
  .array(
    fc
      .double({ min: -1e4, max: 1e4, noNaN: true, noDefaultInfinity: true })
      .map((x) => Math.round(x * 1e6) / 1e6),
    {
      minLength: 2,
      maxLength: 300,
    },
  )
  .chain((xs) =>
    fc
      .array(fc.boolean(), { minLength: xs.length, maxLength: xs.length })
      .map((fails) =>
        Float64Array.from(xs, (x, i) => (fails[i] && i % 5 === 0 ? Number.POSITIVE_INFINITY : x)),
      ),
  );

describe("essTemperature", () => {
  it("hits the target ESS f·K_ok within the tolerance (law), or the nearest reachable value", () => {
    fc.assert(
      fc.property(costArb, fc.double({ min: 0.01, max: 1, noNaN: true }), (costs, f) => {
        const finite = Array.from(costs).filter(Number.isFinite);
        fc.pre(finite.length >= 1);
        const min = Math.min(...finite);
        const ties = finite.filter((c) => c === min).length;
        const allEqual = finite.every((c) => c === min);
        const loss = essTemperature({ targetFraction: f, tolerance: 0.01 });
        const w = new Float64Array(costs.length);
        const v = loss.weigh(costs, costs.length, w);
        expect(Number.isNaN(v)).toBe(false);
        const ess = kish(w);
        const target = Math.max(1, f * finite.length);
        if (allEqual) {
          expect(ess).toBeCloseTo(finite.length, 9);
          expect(loss.temperature).toBe(Number.POSITIVE_INFINITY);
        } else if (ties > target * 1.01) {
          // The minimum is tied more often than the target: the ESS cannot go below #ties.
          expect(ess).toBeGreaterThanOrEqual(ties * (1 - 1e-9));
        } else if (target < essAt(finite, min, lambdaFloor(finite, min)) * (1 - 0.01)) {
          // The documented bracket's floor λ = max(10⁻⁹·D, 10⁻³⁰⁰) cannot separate near-ties
          // (gaps below about 10⁻⁹ of the spread D): the nearest reachable ESS is the floor's.
          const reachable = essAt(finite, min, lambdaFloor(finite, min));
          expect(Math.abs(ess - reachable)).toBeLessThanOrEqual(0.01 * reachable * (1 + 1e-9));
        } else {
          expect(Math.abs(ess - target)).toBeLessThanOrEqual(0.01 * target * (1 + 1e-9) + 1e-9);
        }
        expect(Math.abs(loss.effectiveSampleSize - ess)).toBeLessThanOrEqual(1e-9 * ess);
        for (let i = 0; i < costs.length; i++) {
          if (!Number.isFinite(costs[i])) expect(w[i]).toBe(0);
        }
      }),
      { numRuns: 150 },
    );
  });

  it("equals exponentialUtility at the chosen temperature, bit for bit (weights and loss)", () => {
    fc.assert(
      fc.property(costArb, fc.double({ min: 0.02, max: 0.9, noNaN: true }), (costs, f) => {
        const finite = Array.from(costs).filter(Number.isFinite);
        fc.pre(finite.length >= 2 && new Set(finite).size > 1);
        const loss = essTemperature({ targetFraction: f });
        const w = new Float64Array(costs.length);
        const v = loss.weigh(costs, costs.length, w);
        const ref = exponentialUtility({ temperature: loss.temperature });
        const wr = new Float64Array(costs.length);
        const vr = ref.weigh(costs, costs.length, wr);
        expect(Object.is(v, vr)).toBe(true);
        for (let i = 0; i < w.length; i++) expect(Object.is(w[i], wr[i])).toBe(true);
      }),
      { numRuns: 150 },
    );
  });

  it("ESS of the exponential weights is non-decreasing in λ (MATH.md §8.1), which the bisection relies on", () => {
    fc.assert(
      fc.property(costArb, (costs) => {
        fc.pre(Array.from(costs).some(Number.isFinite));
        let prev = 0;
        const w = new Float64Array(costs.length);
        for (let e = -6; e <= 6; e += 0.5) {
          exponentialUtility({ temperature: 10 ** e }).weigh(costs, costs.length, w);
          const ess = kish(w);
          expect(ess).toBeGreaterThanOrEqual(prev * (1 - 1e-12));
          prev = ess;
        }
      }),
      { numRuns: 100 },
    );
  });

  it("is scale-free: costs a + s·C give the same weights and λ scaled by s", () => {
    fc.assert(
      fc.property(
        costArb,
        fc.double({ min: -100, max: 100, noNaN: true }),
        fc.integer({ min: -3, max: 3 }),
        (costs, a, e) => {
          const finite = Array.from(costs).filter(Number.isFinite);
          fc.pre(new Set(finite).size > 1);
          const s = 2 ** e; // exact scaling in binary floating point
          const shifted = costs.map((c) => a + s * c);
          fc.pre(
            new Set(Array.from(shifted).filter(Number.isFinite)).size === new Set(finite).size,
          );
          const l1 = essTemperature({ targetFraction: 0.2 });
          const l2 = essTemperature({ targetFraction: 0.2 });
          const w1 = new Float64Array(costs.length);
          const w2 = new Float64Array(costs.length);
          l1.weigh(costs, costs.length, w1);
          l2.weigh(shifted, costs.length, w2);
          // Same target, same bisection path up to rounding of the shift: ESS both within tolerance.
          expect(Math.abs(kish(w1) - kish(w2))).toBeLessThanOrEqual(0.021 * kish(w1));
        },
      ),
      { numRuns: 100 },
    );
  });

  it("edge cases: all failed → NaN; all equal → uniform with λ = +∞ and ℓ̂ = the common cost", () => {
    const loss = essTemperature();
    const w = new Float64Array(3);
    const inf = Number.POSITIVE_INFINITY;
    expect(loss.weigh(Float64Array.of(inf, Number.NaN, inf), 3, w)).toBeNaN();
    expect(loss.temperature).toBeNaN();
    expect(loss.weigh(Float64Array.of(2, 2, 2), 3, w)).toBe(2);
    expect(Array.from(w)).toEqual([1 / 3, 1 / 3, 1 / 3]);
    expect(loss.temperature).toBe(inf);
    expect(loss.weigh(Float64Array.of(2, inf, 2), 3, w)).toBe(inf);
    expect(Array.from(w)).toEqual([0.5, 0, 0.5]);
  });

  it("rejects bad options with typed errors", () => {
    catchRecedeError(() => essTemperature({ targetFraction: 0 }), {
      fn: "essTemperature",
      arg: "targetFraction",
    });
    catchRecedeError(() => essTemperature({ targetFraction: 1.5 }), {
      fn: "essTemperature",
      arg: "targetFraction",
    });
    catchRecedeError(() => essTemperature({ tolerance: -1 }), {
      fn: "essTemperature",
      arg: "tolerance",
    });
    catchRecedeError(() => essTemperature({ maxSteps: 0 }), {
      fn: "essTemperature",
      arg: "maxSteps",
    });
  });
});
