import { createStream } from "@recede/core";
import { describe, expect, it } from "vitest";
import { eliteFraction } from "./eliteFraction.js";
import { expectedCost } from "./expectedCost.js";
import { exponentialUtility } from "./exponentialUtility.js";
import type { SampleLoss } from "./types.js";

describe("SampleLoss.weighInto", () => {
  const losses: [string, SampleLoss][] = [
    ["exponentialUtility", exponentialUtility({ temperature: 0.7 })],
    ["eliteFraction", eliteFraction({ fraction: 0.25 })],
    ["expectedCost", expectedCost()],
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
