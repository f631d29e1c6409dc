import {
  gaussianDiagonalStep,
  gaussianFullStep,
  kernels,
  klDiagonalGaussian,
  klGaussian,
} from "@recede/core";
import { catchRecedeError, finiteVector, positiveVector, spdMatrix } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

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

describe("gaussianFullStep / gaussianDiagonalStep (KL mirror step in expectation parameters)", () => {
  // Definition (Wagener et al., RSS 2019; MATH §3.3): the step is the convex combination of the
  // expectation parameters (μ, Σ + μμᵀ); Σ⁺ is then recovered as E[zzᵀ]⁺ − μ⁺μ⁺ᵀ.
  it("equals the convex combination of (μ, Σ + μμᵀ) and keeps Σ⁺ symmetric positive definite", () => {
    const k = 3;
    fc.assert(
      fc.property(
        finiteVector(k, { min: -3, max: 3 }),
        spdMatrix(k),
        finiteVector(k, { min: -3, max: 3 }),
        spdMatrix(k),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (mu, sigma, mb, sw, gamma) => {
          const mean = mu.slice();
          const cov = sigma.slice();
          gaussianFullStep(k, gamma, mean, 0, cov, 0, mb, 0, sw, 0);
          for (let i = 0; i < k; i++) {
            const m1 = (1 - gamma) * mu[i] + gamma * mb[i];
            expect(mean[i]).toBeCloseTo(m1, 12);
            for (let j = 0; j < k; j++) {
              const second =
                (1 - gamma) * (sigma[i * k + j] + mu[i] * mu[j]) +
                gamma * (sw[i * k + j] + mb[i] * mb[j]);
              const m1j = (1 - gamma) * mu[j] + gamma * mb[j];
              expect(Math.abs(cov[i * k + j] - (second - m1 * m1j))).toBeLessThanOrEqual(
                1e-11 * (1 + Math.abs(second)),
              );
              expect(cov[i * k + j]).toBe(cov[j * k + i]);
            }
          }
          expect(kernels.cholesky(k, cov, 0, new Float64Array(k * k), 0)).toBe(true);
        },
      ),
      { numRuns: 150 },
    );
  });

  it("the diagonal step equals the full step on diagonal covariances, with offsets", () => {
    fc.assert(
      fc.property(
        finiteVector(4),
        positiveVector(4, 0.01, 5),
        finiteVector(4),
        positiveVector(4, 0.01, 5),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (mu, v, mb, vb, gamma) => {
          // Diagonal buffers at offset 2 inside padded arrays.
          const pad = (a: Float64Array) => Float64Array.from([9, 9, ...a, 9]);
          const mean = pad(mu);
          const variance = pad(v);
          gaussianDiagonalStep(4, gamma, mean, 2, variance, 2, pad(mb), 2, pad(vb), 2);
          const fm = mu.slice();
          const fc2 = new Float64Array(16);
          const fw = new Float64Array(16);
          for (let i = 0; i < 4; i++) {
            fc2[i * 5] = v[i];
            fw[i * 5] = vb[i];
          }
          gaussianFullStep(4, gamma, fm, 0, fc2, 0, mb, 0, fw, 0);
          for (let i = 0; i < 4; i++) {
            expect(mean[2 + i]).toBeCloseTo(fm[i], 13);
            expect(variance[2 + i]).toBeCloseTo(fc2[i * 5], 12);
          }
          expect([mean[0], mean[1], mean[6], variance[0], variance[6]]).toEqual([9, 9, 9, 9, 9]);
        },
      ),
      { numRuns: 100 },
    );
    // Fixed covariance: variance = null updates the mean only.
    const m = new Float64Array([0, 0]);
    gaussianDiagonalStep(2, 0.25, m, 0, null, 0, new Float64Array([4, -4]), 0, null, 0);
    expect(Array.from(m)).toEqual([1, -1]);
  });
});
