import {
  diagonalGaussian,
  entropy,
  gaussianDiagonalStep,
  klDiagonalGaussian,
  klGaussian,
  positiveEntropy,
} from "@recede/core";
import { catchRecedeError, finiteVector, simplexPoint } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

function sum(x: Float64Array): number {
  let s = 0;
  for (const v of x) s += v;
  return s;
}

describe("entropy (simplex)", () => {
  it("one step is the Hedge update p_i e^{−ηℓ_i} / Σ_j p_j e^{−ηℓ_j} (Cesa-Bianchi & Lugosi 2006, §2.1)", () => {
    fc.assert(
      fc.property(
        simplexPoint(6, 1e-3),
        finiteVector(6, { min: 0, max: 1 }),
        fc.double({ min: 0, max: 5, noNaN: true }),
        (p, l, eta) => {
          const out = entropy({ dimension: 6 }).step(p, l, eta, new Float64Array(6));
          let z = 0;
          for (let i = 0; i < 6; i++) z += p[i] * Math.exp(-eta * l[i]);
          for (let i = 0; i < 6; i++)
            expect(out[i]).toBeCloseTo((p[i] * Math.exp(-eta * l[i])) / z, 14);
        },
      ),
      { numRuns: 100 },
    );
  });

  it("T steps from uniform give p_{T+1,i} ∝ exp(−η Σ_t ℓ_{t,i}) (Hedge's closed form)", () => {
    const n = 4;
    const geo = entropy({ dimension: n });
    const p = new Float64Array(n).fill(1 / n);
    const cum = new Float64Array(n);
    const losses = fc.sample(finiteVector(n, { min: 0, max: 1 }), { seed: 5, numRuns: 300 });
    for (const l of losses) {
      geo.step(p, l, 0.1, p);
      for (let i = 0; i < n; i++) cum[i] += l[i];
    }
    let m = Number.POSITIVE_INFINITY;
    for (const c of cum) m = Math.min(m, c);
    let z = 0;
    for (let i = 0; i < n; i++) z += Math.exp(-0.1 * (cum[i] - m));
    for (let i = 0; i < n; i++) expect(p[i]).toBeCloseTo(Math.exp(-0.1 * (cum[i] - m)) / z, 12);
  });

  it("gradients of ±1e6 (and ±1e300) neither overflow nor leave the simplex", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 40 }).chain((n) =>
          fc.tuple(
            simplexPoint(n, 1e-12),
            fc.array(fc.constantFrom(1e6, -1e6, 0, 1e300, -1e300, 3.5), {
              minLength: n,
              maxLength: n,
            }),
            fc.double({ min: 1e-3, max: 100, noNaN: true }),
          ),
        ),
        ([p, g, eta]) => {
          const n = p.length;
          const out = entropy({ dimension: n }).step(
            p,
            Float64Array.from(g),
            eta,
            new Float64Array(n),
          );
          for (const v of out) {
            expect(Number.isFinite(v)).toBe(true);
            expect(v).toBeGreaterThanOrEqual(0);
          }
          expect(Math.abs(sum(out) - 1)).toBeLessThanOrEqual(1e-12);
        },
      ),
      { numRuns: 200 },
    );
    const out = entropy({ dimension: 3 }).step(
      new Float64Array([1 / 3, 1 / 3, 1 / 3]),
      new Float64Array([1e6, 0, -1e6]),
      1,
      new Float64Array(3),
    );
    expect(Array.from(out)).toEqual([0, 0, 1]);
  });

  it("stays on the simplex within 1e-12 over 20 000 rounds of adversarial losses", () => {
    const n = 64;
    const geo = entropy({ dimension: n });
    const p = new Float64Array(n).fill(1 / n);
    const g = new Float64Array(n);
    let worst = 0;
    let negative = 0;
    for (let t = 0; t < 20_000; t++) {
      for (let i = 0; i < n; i++)
        g[i] = ((i * 7919 + t * 104_729) % 1000) / 1000 - (i === t % n ? 50 : 0);
      geo.step(p, g, 0.5, p);
      worst = Math.max(worst, Math.abs(sum(p) - 1));
      for (const v of p) if (!(v >= 0)) negative++;
    }
    expect(worst).toBeLessThanOrEqual(1e-12);
    expect(negative).toBe(0);
  });

  it("D is KL on the simplex; +∞ when y has a zero where x has mass", () => {
    const geo = entropy({ dimension: 2 });
    const kl = 0.25 * Math.log(0.25 / 0.5) + 0.75 * Math.log(0.75 / 0.5);
    expect(
      geo.divergence(new Float64Array([0.25, 0.75]), new Float64Array([0.5, 0.5])),
    ).toBeCloseTo(kl, 15);
    expect(geo.divergence(new Float64Array([0.5, 0.5]), new Float64Array([1, 0]))).toBe(
      Number.POSITIVE_INFINITY,
    );
    expect(geo.divergence(new Float64Array([1, 0]), new Float64Array([0.5, 0.5]))).toBeCloseTo(
      Math.log(2),
      15,
    );
    expect(geo.contains(new Float64Array([0.5, 0.6]))).toBe(false);
    expect(geo.contains(new Float64Array([-0.1, 1.1]))).toBe(false);
    expect(geo.contains(new Float64Array([1, 0]))).toBe(true);
  });

  it("rejects bad options with typed errors", () => {
    catchRecedeError(() => entropy({ dimension: 0 }), {
      code: "range",
      fn: "entropy",
      arg: "dimension",
    });
    catchRecedeError(() => entropy({ dimension: Number.NaN }), {
      code: "range",
      fn: "entropy",
      arg: "dimension",
      message: "NaN",
    });
    catchRecedeError(() => entropy({ dimension: 3, tolerance: Number.POSITIVE_INFINITY }), {
      code: "range",
      arg: "tolerance",
    });
    catchRecedeError(() => entropy(null as never), { code: "type", arg: "options" });
  });
});

describe("positiveEntropy (orthant)", () => {
  it("step is the unnormalized multiplicative update x e^{−ηg} (Kivinen & Warmuth 1997, EGU)", () => {
    const geo = positiveEntropy({ dimension: 3 });
    const out = geo.step(
      new Float64Array([1, 2, 3]),
      new Float64Array([Math.LN2, 0, -1]),
      1,
      new Float64Array(3),
    );
    expect(out[0]).toBeCloseTo(0.5, 15);
    expect(out[1]).toBe(2);
    expect(out[2]).toBeCloseTo(3 * Math.E, 14);
    expect(geo.divergence(new Float64Array([1, 1, 1]), new Float64Array([1, 1, 1]))).toBe(0);
    expect(geo.divergence(new Float64Array([2, 1, 1]), new Float64Array([1, 1, 1]))).toBeCloseTo(
      2 * Math.LN2 - 1,
      15,
    );
  });
  it("an overflowing or underflowing step is outside the domain (contains is false)", () => {
    const geo = positiveEntropy({ dimension: 1 });
    expect(
      geo.contains(
        geo.step(new Float64Array([1]), new Float64Array([-1e6]), 1, new Float64Array(1)),
      ),
    ).toBe(false);
    expect(
      geo.contains(
        geo.step(new Float64Array([1]), new Float64Array([1e6]), 1, new Float64Array(1)),
      ),
    ).toBe(false);
  });
  it("rejects bad options", () => {
    catchRecedeError(() => positiveEntropy({ dimension: -1 }), {
      code: "range",
      fn: "positiveEntropy",
      arg: "dimension",
    });
  });
});

describe("diagonalGaussian (expectation parameters)", () => {
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

describe("klDiagonalGaussian / klGaussian typed errors", () => {
  it("name the function, the argument, what was expected and what was given", () => {
    catchRecedeError(() => klDiagonalGaussian([0], [0], [0], [1]), {
      code: "domain",
      fn: "klDiagonalGaussian",
      arg: "variance0[0]",
    });
    catchRecedeError(() => klDiagonalGaussian([0, 1], [1], [0], [1]), {
      code: "dimension",
      fn: "klDiagonalGaussian",
      arg: "variance0",
    });
    catchRecedeError(() => klDiagonalGaussian([Number.NaN], [1], [0], [1]), {
      code: "non-finite",
      arg: "mean0[0]",
    });
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          [
            [1, 2],
            [2, 1],
          ],
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
        ),
      { code: "not-spd", fn: "klGaussian", arg: "cov0" },
    );
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
          [0, 0],
          [
            [1, 0.3],
            [0, 1],
          ],
        ),
      { code: "not-spd", arg: "cov1", message: "symmetric" },
    );
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          new Float64Array(3),
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
        ),
      { code: "dimension", arg: "cov0" },
    );
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
          [0],
          [
            [1, 0],
            [0, 1],
          ],
        ),
      { code: "dimension", arg: "mean1" },
    );
  });
  it("is zero for identical Gaussians and exact for a textbook case", () => {
    expect(
      klGaussian(
        [1, 2],
        [
          [2, 0.5],
          [0.5, 1],
        ],
        [1, 2],
        [
          [2, 0.5],
          [0.5, 1],
        ],
      ),
    ).toBe(0);
    // The klGaussian doc example: tr = 1, quadratic = ½, k = 2, ln det ratio = 2 ln 2.
    expect(
      klGaussian(
        [0, 0],
        [
          [1, 0],
          [0, 1],
        ],
        [1, 0],
        [
          [2, 0],
          [0, 2],
        ],
      ),
    ).toBeCloseTo(0.5 * (1 + 0.5 - 2 + 2 * Math.LN2), 15);
    // ½(1/2 + 0 − 1 + ln 2) for N(0,1) ‖ N(0,2).
    expect(klDiagonalGaussian([0], [1], [0], [2])).toBeCloseTo(0.5 * (0.5 - 1 + Math.LN2), 15);
  });
});
