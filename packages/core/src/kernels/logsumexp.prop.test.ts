import { readFileSync } from "node:fs";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { expWeights } from "./logsumexp.js";

// Scores and lse from scipy.special.logsumexp (scripts/reference/core_kernels.py →
// fixtures/kernels.json; P. Virtanen et al., "SciPy 1.0", Nature Methods 17, 2020).
const ref = JSON.parse(
  readFileSync(new URL("../../fixtures/kernels.json", import.meta.url), "utf8"),
) as { scores: (number | null)[]; logsumexp: number; softmax: number[] };

/** Both forms of expWeights on the same scores: [returned lse, written lse, weights, weights]. */
function both(a: Float64Array): [number, number, Float64Array, Float64Array] {
  const n = a.length;
  const w1 = new Float64Array(n).fill(-3.5);
  const w2 = new Float64Array(n).fill(-3.5);
  const out = new Float64Array([7, 7, 7]);
  const r = expWeights(n, a, 0, w1, 0);
  const ret = expWeights(n, a, 0, w2, 0, out, 1);
  expect(ret).toBeUndefined();
  expect(out[0]).toBe(7);
  expect(out[2]).toBe(7);
  return [r, out[1], w1, w2];
}

describe("expWeights with an output array (the allocation-free form)", () => {
  it("writes scipy.special.logsumexp's value to lse[ol] and the same weights as the returning form", () => {
    const a = Float64Array.from(ref.scores, (v) => (v === null ? Number.NEGATIVE_INFINITY : v));
    const [r, o, w1, w2] = both(a);
    expect(Math.abs(o - ref.logsumexp)).toBeLessThanOrEqual(1e-12 * Math.abs(ref.logsumexp));
    expect(Object.is(o, r)).toBe(true);
    expect(Array.from(w2)).toEqual(Array.from(w1));
  });

  it("bit-identical to the returning form for any scores, including ±∞ and NaN (fast-check)", () => {
    const score = fc.oneof(
      { weight: 6, arbitrary: fc.double({ min: -1e6, max: 1e6, noNaN: true }) },
      { weight: 1, arbitrary: fc.constantFrom(Number.NEGATIVE_INFINITY, Number.NaN) },
      { weight: 1, arbitrary: fc.constant(Number.POSITIVE_INFINITY) },
    );
    fc.assert(
      fc.property(fc.array(score, { minLength: 0, maxLength: 40 }), (xs) => {
        const [r, o, w1, w2] = both(Float64Array.from(xs));
        expect(Object.is(o, r)).toBe(true);
        expect(Array.from(w2)).toEqual(Array.from(w1));
      }),
      { numRuns: 200 },
    );
  });

  it("all −∞ or NaN: writes −∞ and leaves the weights untouched", () => {
    const w = new Float64Array([5, 5]);
    const out = new Float64Array(1);
    expWeights(2, Float64Array.of(Number.NEGATIVE_INFINITY, Number.NaN), 0, w, 0, out, 0);
    expect(out[0]).toBe(Number.NEGATIVE_INFINITY);
    expect(Array.from(w)).toEqual([5, 5]);
  });
});
