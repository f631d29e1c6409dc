// Compensated summation (TwoSum cascade, "Sum2" of T. Ogita, S. M. Rump, S. Oishi, "Accurate Sum
// and Dot Product", SIAM J. Sci. Comput. 2005) recovers sums that cancel catastrophically
// (N. J. Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., 2002, §4.3).
// Exact references are computed with BigInt-scaled integers.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { compensatedSum, pairwiseSum } from "./summation.js";

describe("summation", () => {
  it("recovers [1, 1e100, 1, −1e100] = 2 where the naive loop returns 0", () => {
    const x = [1, 1e100, 1, -1e100];
    expect(x.reduce((a, b) => a + b, 0)).toBe(0);
    expect(compensatedSum(x)).toBe(2);
  });

  it("a million copies of 0.1 sum to 100000 within one ulp (naive loop is off by ~1e-6)", () => {
    const x = new Float64Array(1_000_000).fill(0.1);
    // 1e6 · fl(0.1) = 100000.0000000000055511…, whose nearest double is 100000 (ulp 1.46e-11).
    const exact = 100000;
    expect(Math.abs(compensatedSum(x) - exact)).toBeLessThanOrEqual(1.5e-11);
    expect(Math.abs(pairwiseSum(x) - exact)).toBeLessThanOrEqual(1e-9);
    let naive = 0;
    for (const v of x) naive += v;
    expect(Math.abs(naive - exact)).toBeGreaterThan(1e-7);
  });

  it("integers scaled by 2^-20 sum exactly (fast-check, reference by BigInt)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -(2 ** 40), max: 2 ** 40 }), { maxLength: 300 }),
        (ints) => {
          const x = ints.map((i) => i * 2 ** -20);
          const exact = Number(ints.reduce((a, b) => a + BigInt(b), 0n)) * 2 ** -20;
          expect(compensatedSum(x)).toBe(exact);
        },
      ),
      { numRuns: 200, seed: 4 },
    );
  });

  it("strided and offset access", () => {
    const x = [9, 1, 9, 2, 9, 3];
    expect(compensatedSum(x, 1, 3, 2)).toBe(6);
    expect(pairwiseSum(x, 2, 3)).toBe(20);
  });
});
