import {
  diagonalGaussian,
  gaussianDiagonalStep,
  klDiagonalGaussian,
  klGaussian,
} from "@recede/core";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";

describe("diagonalGaussian", () => {
  it("the step is the exponential tilt N⁺ ∝ N_t·exp(−η(a z + b z²)) (product of Gaussians)", () => {
    // N(μ, σ²)·exp(−η(a z + b z²)) is Gaussian with precision 1/σ² + 2ηb and
    // mean (μ/σ² − ηa)/(1/σ² + 2ηb) (completing the square; common practice).
    const geo = diagonalGaussian({ dimension: 1 });
    const mu = 0.7;
    const v = 2;
    const [a, b, eta] = [0.4, 0.3, 0.5];
    const x = geo.fromMeanVariance(
      new Float64Array([mu]),
      new Float64Array([v]),
      new Float64Array(2),
    );
    const out = geo.step(x, new Float64Array([a, b]), eta, new Float64Array(2));
    const mean = new Float64Array(1);
    const variance = new Float64Array(1);
    geo.toMeanVariance(out, mean, variance);
    const prec = 1 / v + 2 * eta * b;
    expect(variance[0]).toBeCloseTo(1 / prec, 14);
    expect(mean[0]).toBeCloseTo((mu / v - eta * a) / prec, 14);
  });
  it("in natural parameters, the step with g = m_t − m̂ is gaussianDiagonalStep's convex combination", () => {
    // Wagener et al. 2019 / MATH §3.3: m⁺ = (1−γ)m_t + γm̂ for the log-utility loss.
    const geo = diagonalGaussian({ dimension: 2, parameters: "natural" });
    const mean = new Float64Array([0.5, -1]);
    const variance = new Float64Array([2, 0.3]);
    const tm = new Float64Array([1.5, -0.2]); // weighted sample mean μ̄
    const tv = new Float64Array([0.4, 0.9]); // weighted sample variance about μ̄
    const gamma = 0.35;
    const theta = geo.fromMeanVariance(mean, variance, new Float64Array(4));
    // g = ∇_θℓ = m_t − m̂ in expectation parameters (μ, μ² + σ²).
    const g = new Float64Array(4);
    for (let i = 0; i < 2; i++) {
      g[i] = mean[i] - tm[i];
      g[2 + i] = mean[i] * mean[i] + variance[i] - (tm[i] * tm[i] + tv[i]);
    }
    const out = geo.step(theta, g, gamma, new Float64Array(4));
    const m = new Float64Array(2);
    const v = new Float64Array(2);
    geo.toMeanVariance(out, m, v);
    gaussianDiagonalStep(2, gamma, mean, 0, variance, 0, tm, 0, tv, 0);
    for (let i = 0; i < 2; i++) {
      expect(m[i]).toBeCloseTo(mean[i], 13);
      expect(v[i]).toBeCloseTo(variance[i], 13);
    }
    // D in natural parameters is KL with the arguments swapped.
    const a = geo.fromMeanVariance(
      new Float64Array([0, 1]),
      new Float64Array([1, 2]),
      new Float64Array(4),
    );
    const b = geo.fromMeanVariance(
      new Float64Array([1, 0]),
      new Float64Array([0.5, 1]),
      new Float64Array(4),
    );
    expect(geo.divergence(a, b)).toBeCloseTo(
      klDiagonalGaussian([1, 0], [0.5, 1], [0, 1], [1, 2]),
      13,
    );
    catchRecedeError(() => diagonalGaussian({ dimension: 1, parameters: "mean" as never }), {
      code: "type",
      arg: "parameters",
    });
  });

  it("a step that would make the precision non-positive writes NaN (outside the domain)", () => {
    const geo = diagonalGaussian({ dimension: 1 });
    const x = geo.fromMeanVariance(
      new Float64Array([0]),
      new Float64Array([1]),
      new Float64Array(2),
    );
    const out = geo.step(x, new Float64Array([0, -1]), 1, new Float64Array(2));
    expect(geo.contains(out)).toBe(false);
  });
  it("agrees with klDiagonalGaussian and klGaussian", () => {
    const geo = diagonalGaussian({ dimension: 2 });
    const x = geo.fromMeanVariance(
      new Float64Array([1, -1]),
      new Float64Array([0.5, 2]),
      new Float64Array(4),
    );
    const y = geo.fromMeanVariance(
      new Float64Array([0, 0.5]),
      new Float64Array([1, 0.3]),
      new Float64Array(4),
    );
    const ref = klDiagonalGaussian([1, -1], [0.5, 2], [0, 0.5], [1, 0.3]);
    expect(geo.divergence(x, y)).toBeCloseTo(ref, 13);
    expect(
      klGaussian(
        [1, -1],
        [
          [0.5, 0],
          [0, 2],
        ],
        [0, 0.5],
        [
          [1, 0],
          [0, 0.3],
        ],
      ),
    ).toBeCloseTo(ref, 13);
  });
  it("rejects bad options and values with typed errors", () => {
    catchRecedeError(() => diagonalGaussian({ dimension: 0 }), {
      code: "range",
      fn: "diagonalGaussian",
      arg: "dimension",
    });
    const geo = diagonalGaussian({ dimension: 1 });
    catchRecedeError(
      () => geo.fromMeanVariance(new Float64Array([0]), new Float64Array([0]), new Float64Array(2)),
      {
        code: "domain",
        arg: "variance[0]",
      },
    );
  });
});
