import { createStream, gaussianDiagonalStep } from "@recede/core";
import { bitEqual, catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";
import { categoricalPlan } from "./categorical.js";
import { gaussianPlan } from "./gaussian.js";
import { pointPlan } from "./point.js";
import type { PlanConfig } from "./types.js";

const config = (h: number, m: number, k: number, lo = -Infinity, hi = Infinity): PlanConfig => ({
  horizon: h,
  controlSize: m,
  samples: k,
  lower: new Float64Array(m).fill(lo),
  upper: new Float64Array(m).fill(hi),
  caller: "test",
});

describe("gaussianPlan sampling", () => {
  it("has per-step mean μ, std σ, and AR(1) correlation a^|t−s| (20 000 sequences)", () => {
    const h = 6;
    const k = 20000;
    const a = 0.8;
    const dist = gaussianPlan({ mean: [1, -2], std: [0.5, 2], correlation: a }).create(
      config(h, 2, k),
    );
    const out = new Float64Array(k * h * 2);
    dist.sample(createStream(3), 0, k, out);
    for (let p = 0; p < h * 2; p++) {
      let s = 0;
      let ss = 0;
      for (let i = 0; i < k; i++) s += out[i * h * 2 + p];
      const mean = s / k;
      for (let i = 0; i < k; i++) ss += (out[i * h * 2 + p] - mean) ** 2;
      const sd = Math.sqrt(ss / (k - 1));
      const mu = p % 2 === 0 ? 1 : -2;
      const sigma = p % 2 === 0 ? 0.5 : 2;
      // Standard errors: σ/√k ≈ 0.0035σ for the mean, σ/√(2k) ≈ 0.005σ for the std; 5 s.e. margins.
      expect(Math.abs(mean - mu)).toBeLessThan(5 * (sigma / Math.sqrt(k)));
      expect(Math.abs(sd - sigma)).toBeLessThan(5 * (sigma / Math.sqrt(2 * k)));
    }
    // Correlation between steps t and t+2 of component 0: a² = 0.64 (stationary AR(1); Box & Jenkins 1970).
    let sxy = 0;
    for (let i = 0; i < k; i++)
      sxy += ((out[i * h * 2 + 2] - 1) / 0.5) * ((out[i * h * 2 + 6] - 1) / 0.5);
    expect(Math.abs(sxy / k - a * a)).toBeLessThan(0.03);
  });

  it("draws each slice from its own stream: order of slices does not matter", () => {
    const h = 5;
    const k = 70;
    const size = 16;
    const root = createStream("slices");
    const dist = gaussianPlan({ std: 1, correlation: 0.5, keepMeanSample: true }).create(
      config(h, 1, k),
    );
    const forward = new Float64Array(k * h);
    const backward = new Float64Array(k * h);
    const slices = Math.ceil(k / size);
    for (let s = 0; s < slices; s++)
      dist.sample(root.fork(s), s * size, Math.min(size, k - s * size), forward);
    for (let s = slices - 1; s >= 0; s--)
      dist.sample(root.fork(s), s * size, Math.min(size, k - s * size), backward);
    expect(bitEqual(forward, backward)).toBe(true);
    for (let t = 0; t < h; t++) expect(forward[t]).toBe(0); // sample 0 kept at the mean
  });
});

describe("gaussianPlan mirror step", () => {
  it("equals core's gaussianDiagonalStep on the weighted sample moments (MATH.md §3.4)", () => {
    const h = 3;
    const k = 50;
    const dist = gaussianPlan({ std: 1.5, adaptVariance: true }).create(config(h, 1, k));
    const samples = new Float64Array(k * h);
    createStream(9).fillNormal(samples, 0, k * h);
    const w = new Float64Array(k);
    for (let i = 0; i < k; i++) w[i] = (i % 7) + 1;
    const ws = w.reduce((a, b) => a + b, 0);
    for (let i = 0; i < k; i++) w[i] /= ws;
    const mean = new Float64Array(h);
    const variance = new Float64Array(h).fill(2.25);
    const tm = new Float64Array(h);
    const tv = new Float64Array(h);
    for (let t = 0; t < h; t++) {
      for (let i = 0; i < k; i++) tm[t] += w[i] * samples[i * h + t];
      for (let i = 0; i < k; i++) tv[t] += w[i] * (samples[i * h + t] - tm[t]) ** 2;
    }
    gaussianDiagonalStep(h, 0.3, mean, 0, variance, 0, tm, 0, tv, 0);
    dist.update(samples, k, w, true, 0.3);
    for (let t = 0; t < h; t++) {
      expect(dist.mean[t]).toBeCloseTo(mean[t], 14);
      expect(dist.blocks[1].data[t]).toBeCloseTo(variance[t], 14);
    }
  });

  it("with uniform weights and γ = 1 refits the sample mean and (biased) variance (MATH.md §10 (d))", () => {
    const dist = gaussianPlan({ std: 1, adaptVariance: true }).create(config(1, 1, 4));
    dist.update(
      Float64Array.from([1, 2, 3, 6]),
      4,
      Float64Array.from([0.25, 0.25, 0.25, 0.25]),
      true,
      1,
    );
    expect(dist.mean[0]).toBe(3);
    expect(dist.blocks[1].data[0]).toBe(3.5);
  });

  it("floors the adapted std at minStd", () => {
    const dist = gaussianPlan({ std: 1, adaptVariance: true, minStd: 0.2 }).create(config(1, 1, 2));
    dist.update(Float64Array.from([1, 1]), 2, Float64Array.from([0.5, 0.5]), true, 1);
    expect(dist.blocks[1].data[0]).toBeCloseTo(0.04, 15);
  });

  it("the signed (expected-cost) step moves the mean along Σ v_i (U_i − μ)", () => {
    const dist = gaussianPlan({ mean: 1, std: 1 }).create(config(1, 1, 2));
    dist.update(Float64Array.from([2, 0]), 2, Float64Array.from([0.5, -0.5]), false, 0.5);
    expect(dist.mean[0]).toBe(1 + 0.5 * (0.5 * 2 - 0.5 * 0));
  });

  it("rejects bad options with typed errors", () => {
    catchRecedeError(() => gaussianPlan({ std: 0 }), { fn: "gaussianPlan", arg: "std" });
    catchRecedeError(() => gaussianPlan({ correlation: 1 }), {
      fn: "gaussianPlan",
      arg: "correlation",
    });
    catchRecedeError(() => gaussianPlan({ std: [1, 2, 3] }).create(config(4, 2, 1)), {
      fn: "gaussianPlan",
      arg: "std",
      code: "dimension",
    });
    catchRecedeError(() => gaussianPlan({ mean: 2 }).create(config(4, 1, 1, -1, 1)), {
      fn: "gaussianPlan",
      code: "range",
    });
  });
});

describe("categoricalPlan", () => {
  const choices = [[-1], [0], [1]];

  it("samples with the plan's probabilities (frequencies within 5 s.e.)", () => {
    const k = 30000;
    const dist = categoricalPlan({ choices, probabilities: [0.2, 0.5, 0.3] }).create(
      config(2, 1, k),
    );
    const out = new Float64Array(k * 2);
    dist.sample(createStream(1), 0, k, out);
    const counts = [0, 0, 0];
    for (let i = 0; i < k; i++) counts[out[i * 2] + 1]++;
    for (const [a, p] of [0.2, 0.5, 0.3].entries()) {
      expect(Math.abs(counts[a] / k - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / k));
    }
    expect(Array.from(dist.mean)).toEqual([0, 0]); // the mode, choice 1 (control 0)
  });

  it("mirror step: p⁺ = (1−γ)p + γ Σ w one-hot(a), per step", () => {
    const dist = categoricalPlan({ choices }).create(config(1, 1, 3));
    const out = new Float64Array(3);
    dist.sample(createStream(5), 0, 3, out);
    const w = Float64Array.from([0.5, 0.25, 0.25]);
    dist.update(out, 3, w, true, 0.4);
    const expected = [1 / 3, 1 / 3, 1 / 3].map((p) => 0.6 * p);
    for (let i = 0; i < 3; i++) expected[out[i] + 1] += 0.4 * w[i];
    for (let a = 0; a < 3; a++) expect(dist.blocks[0].data[a]).toBeCloseTo(expected[a], 15);
    let s = 0;
    for (const p of dist.blocks[0].data) s += p;
    expect(s).toBeCloseTo(1, 15);
  });

  it("rejects choices outside the bounds and probabilities off the simplex", () => {
    catchRecedeError(() => categoricalPlan({ choices: [[5]] }).create(config(2, 1, 1, -1, 1)), {
      fn: "categoricalPlan",
      code: "range",
    });
    catchRecedeError(
      () => categoricalPlan({ choices, probabilities: [0.5, 0.5, 0.5] }).create(config(2, 1, 1)),
      {
        fn: "categoricalPlan",
        arg: "probabilities",
        code: "domain",
      },
    );
  });
});

describe("pointPlan", () => {
  it("samples the plan itself and takes the convex-combination step", () => {
    const dist = pointPlan({ mean: [1, 2] }).create(config(2, 1, 2));
    const out = new Float64Array(4);
    dist.sample(createStream(0), 0, 2, out);
    expect(Array.from(out)).toEqual([1, 2, 1, 2]);
    dist.update(Float64Array.from([3, 3, 5, 5]), 2, Float64Array.from([0.5, 0.5]), true, 0.5);
    expect(Array.from(dist.mean)).toEqual([2.5, 3]);
  });
});
