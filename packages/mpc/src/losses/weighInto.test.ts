import { createStream, kernels } from "@recede/core";
import { describe, expect, it } from "vitest";
import { essTemperature } from "../variants/essTemperature.js";
import { customLoss } from "./customLoss.js";
import { eliteFraction } from "./eliteFraction.js";
import { expectedCost } from "./expectedCost.js";
import { exponentialUtility } from "./exponentialUtility.js";
import type { SampleLoss } from "./types.js";

describe("SampleLoss.weighInto", () => {
  const losses: [string, SampleLoss][] = [
    ["exponentialUtility", exponentialUtility({ temperature: 0.7 })],
    ["eliteFraction", eliteFraction({ fraction: 0.25 })],
    ["expectedCost", expectedCost()],
    ["customLoss", customLoss({ score: (c, n, a) => a.set(c.subarray(0, n).map((v) => -v / 3)) })],
    ["essTemperature", essTemperature({ targetFraction: 0.2 })],
  ];
  for (const [name, loss] of losses) {
    it(`${name}: writes the same estimate and weights as weigh, bit for bit (with failed samples)`, () => {
      const k = 50;
      const costs = new Float64Array(k);
      createStream(9).fillNormal(costs, 0, k);
      for (let i = 0; i < k; i++) costs[i] = 10 + 3 * costs[i];
      costs[7] = Number.POSITIVE_INFINITY;
      const w1 = new Float64Array(k);
      const w2 = new Float64Array(k);
      const out = new Float64Array(1);
      const v = loss.weigh(costs, k, w1);
      expect(loss.weighInto).toBeTypeOf("function");
      loss.weighInto!(costs, k, w2, out);
      expect(Object.is(out[0], v)).toBe(true);
      expect(Array.from(w2)).toEqual(Array.from(w1));
      // All failed: NaN from both.
      const bad = new Float64Array(k).fill(Number.POSITIVE_INFINITY);
      loss.weighInto!(bad, k, w2, out);
      expect(Number.isNaN(out[0])).toBe(true);
      expect(Number.isNaN(loss.weigh(bad, k, w1))).toBe(true);
    });
  }
});

describe("estimates written through an output array equal the formulas on the returned lse", () => {
  // ℓ̂ = ρ − λ(lse − ln K) for the exponential utility and −(lse − ln K) for a custom score, with
  // lse as returned by kernels.expWeights (the form these losses used before writing it to `out`).
  const k = 40;
  const costs = new Float64Array(k);
  createStream(21).fillNormal(costs, 0, k);
  for (let i = 0; i < k; i++) costs[i] = 5 + 2 * costs[i];
  costs[3] = Number.POSITIVE_INFINITY;
  const out = new Float64Array(1);
  const w = new Float64Array(k);
  const a = new Float64Array(k);
  it("exponentialUtility", () => {
    const lambda = 0.7;
    let rho = Number.POSITIVE_INFINITY;
    for (const c of costs) if (c < rho) rho = c;
    for (let i = 0; i < k; i++) {
      a[i] = Number.isFinite(costs[i])
        ? -(costs[i] - rho) * (1 / lambda)
        : Number.NEGATIVE_INFINITY;
    }
    const lse = kernels.expWeights(k, a, 0, new Float64Array(k), 0);
    exponentialUtility({ temperature: lambda }).weighInto!(costs, k, w, out);
    expect(Object.is(out[0], rho - lambda * (lse - Math.log(k)))).toBe(true);
  });
  it("customLoss (and NaN when the lse is not finite)", () => {
    const score = (c: Float64Array, n: number, s: Float64Array): void => {
      for (let i = 0; i < n; i++) s[i] = -Math.sqrt(Math.abs(c[i]));
    };
    for (let i = 0; i < k; i++) {
      a[i] = Number.isFinite(costs[i]) ? -Math.sqrt(Math.abs(costs[i])) : Number.NEGATIVE_INFINITY;
    }
    const lse = kernels.expWeights(k, a, 0, new Float64Array(k), 0);
    const loss = customLoss({ score });
    loss.weighInto!(costs, k, w, out);
    expect(Object.is(out[0], -(lse - Math.log(k)))).toBe(true);
    const up = customLoss({ score: (_c, n, s) => s.fill(Number.POSITIVE_INFINITY, 0, n) });
    up.weighInto!(costs, k, w, out);
    expect(Number.isNaN(out[0])).toBe(true);
  });
});
