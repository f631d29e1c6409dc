import { createStream } from "@recede/core";
import {
  linearGaussianPolicy,
  mlpGaussianPolicy,
  type StochasticPolicy,
  softmaxPolicy,
} from "@recede/policy-gradient";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

// Properties of the three policy families, over random parameters, states and actions:
//  - ∇_θ ln π matches central finite differences of ln π (the definition of the gradient);
//  - Fisher-vector products match (a) second-order finite differences of the closed-form mean KL,
//    uᵀFv = ¼[q(u+v) − q(u−v)], q(w) = (KL(θ‖θ+hw) + KL(θ‖θ−hw))/h², since
//    KL(π_θ‖π_θ+δ) = ½δᵀF(θ)δ + O(‖δ‖³) (Amari 1998; MATH.md §2.4), and (b) the Monte Carlo
//    average of ∇ln π (∇ln π)ᵀ v (the definition of F, Kakade 2001), within 5 standard errors;
//  - KL(θ‖θ) = 0 and KL ≥ 0.

interface Family {
  name: string;
  policy: StochasticPolicy;
}

const families: Family[] = [
  { name: "linear-gaussian (bias)", policy: linearGaussianPolicy({ stateSize: 3, actionSize: 2 }) },
  {
    name: "linear-gaussian (no bias)",
    policy: linearGaussianPolicy({ stateSize: 2, actionSize: 1, bias: false }),
  },
  {
    name: "mlp-gaussian",
    policy: mlpGaussianPolicy({ stateSize: 3, actionSize: 2, hidden: [5, 4], outputScale: 1 }),
  },
  {
    name: "mlp-gaussian (input normalization)",
    policy: mlpGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      hidden: [3],
      stateOffset: [0.5, -1],
      stateScale: [2, 0.5],
    }),
  },
  { name: "softmax", policy: softmaxPolicy({ stateSize: 3, actionCount: 4 }) },
];

function params(p: StochasticPolicy): fc.Arbitrary<Float64Array> {
  return fc
    .array(fc.double({ min: -1, max: 1, noNaN: true }), {
      minLength: p.parameterCount,
      maxLength: p.parameterCount,
    })
    .map((a) => new Float64Array(a));
}
function vec(n: number, lim = 1): fc.Arbitrary<Float64Array> {
  return fc
    .array(fc.double({ min: -lim, max: lim, noNaN: true }), { minLength: n, maxLength: n })
    .map((a) => new Float64Array(a));
}
function action(p: StochasticPolicy): fc.Arbitrary<Float64Array> {
  if (p.kind === "categorical") {
    return fc.integer({ min: 0, max: p.actionCount - 1 }).map((a) => new Float64Array([a]));
  }
  return vec(p.actionSize, 2);
}

for (const { name, policy: p } of families) {
  describe(`${name}: log-probability gradient and Fisher-vector products`, () => {
    it("∇ ln π matches central finite differences", () => {
      fc.assert(
        fc.property(params(p), vec(p.stateSize, 2), action(p), (theta, s, a) => {
          const g = new Float64Array(p.parameterCount);
          const lp = p.addGradLogProb(theta, s, 0, a, 0, 1, g);
          expect(lp).toBeCloseTo(p.logProb(theta, s, 0, a, 0), 12);
          const h = 1e-6;
          for (let i = 0; i < p.parameterCount; i++) {
            const tp = theta.slice();
            const tm = theta.slice();
            tp[i] += h;
            tm[i] -= h;
            const fd = (p.logProb(tp, s, 0, a, 0) - p.logProb(tm, s, 0, a, 0)) / (2 * h);
            expect(Math.abs(fd - g[i])).toBeLessThan(1e-6 * (1 + Math.abs(g[i])));
          }
        }),
        { numRuns: 100 },
      );
    });

    it("addGradLogProb accumulates w·∇ ln π", () => {
      fc.assert(
        fc.property(
          params(p),
          vec(p.stateSize, 2),
          action(p),
          fc.double({ min: -3, max: 3, noNaN: true }),
          (theta, s, a, w) => {
            const g1 = new Float64Array(p.parameterCount);
            p.addGradLogProb(theta, s, 0, a, 0, 1, g1);
            const g2 = new Float64Array(p.parameterCount).fill(0.25);
            p.addGradLogProb(theta, s, 0, a, 0, w, g2);
            for (let i = 0; i < p.parameterCount; i++)
              expect(g2[i]).toBeCloseTo(0.25 + w * g1[i], 10);
          },
        ),
        { numRuns: 100 },
      );
    });

    it("Fisher-vector products match second-order finite differences of the mean KL", () => {
      fc.assert(
        fc.property(
          params(p),
          vec(3 * p.stateSize, 2),
          vec(p.parameterCount),
          vec(p.parameterCount),
          (theta, states, u, v) => {
            const count = 3;
            const fv = p.fisherVectorProduct(
              theta,
              states,
              0,
              count,
              v,
              new Float64Array(p.parameterCount),
            );
            let uFv = 0;
            for (let i = 0; i < p.parameterCount; i++) uFv += u[i] * fv[i];
            const h = 1e-3;
            const q = (w: Float64Array) => {
              const tp = theta.slice();
              const tm = theta.slice();
              for (let i = 0; i < w.length; i++) {
                tp[i] += h * w[i];
                tm[i] -= h * w[i];
              }
              return (
                (p.meanKl(theta, tp, states, 0, count) + p.meanKl(theta, tm, states, 0, count)) /
                (h * h)
              );
            };
            const up = u.map((x, i) => x + v[i]);
            const um = u.map((x, i) => x - v[i]);
            const fd = 0.25 * (q(up) - q(um));
            expect(Math.abs(fd - uFv)).toBeLessThan(1e-4 * (1 + Math.abs(uFv) + q(up) + q(um)));
          },
        ),
        { numRuns: 60 },
      );
    });

    it("Fisher-vector products match the Monte Carlo E[∇ln π ∇ln πᵀ] v (5 standard errors)", () => {
      fc.assert(
        fc.property(
          params(p),
          vec(p.stateSize, 1.5),
          vec(p.parameterCount),
          fc.integer({ min: 0, max: 1e6 }),
          (theta, s, v, seed) => {
            const d = p.parameterCount;
            const fv = p.fisherVectorProduct(theta, s, 0, 1, v, new Float64Array(d));
            const M = 20000;
            const stream = createStream(seed);
            const a = new Float64Array(p.actionSize);
            const g = new Float64Array(d);
            const sum = new Float64Array(d);
            const sum2 = new Float64Array(d);
            for (let k = 0; k < M; k++) {
              p.sample(theta, s, 0, stream, a, 0);
              g.fill(0);
              p.addGradLogProb(theta, s, 0, a, 0, 1, g);
              let gv = 0;
              for (let i = 0; i < d; i++) gv += g[i] * v[i];
              for (let i = 0; i < d; i++) {
                const x = g[i] * gv;
                sum[i] += x;
                sum2[i] += x * x;
              }
            }
            for (let i = 0; i < d; i++) {
              const mean = sum[i] / M;
              const se = Math.sqrt(Math.max(0, sum2[i] / M - mean * mean) / M);
              expect(Math.abs(mean - fv[i])).toBeLessThanOrEqual(5 * se + 1e-9);
            }
          },
        ),
        { numRuns: 10 },
      );
    });

    it("KL(θ‖θ) = 0 and KL(θ‖θ′) ≥ 0", () => {
      fc.assert(
        fc.property(params(p), params(p), vec(2 * p.stateSize, 2), (t1, t2, states) => {
          expect(Math.abs(p.meanKl(t1, t1, states, 0, 2))).toBeLessThan(1e-14);
          expect(p.meanKl(t1, t2, states, 0, 2)).toBeGreaterThanOrEqual(-1e-14);
        }),
        { numRuns: 100 },
      );
    });
  });
}

describe("sampling", () => {
  it("same seed → bit-identical samples; Gaussian samples have the policy's mean and std", () => {
    const p = linearGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      initialGain: [[1, -2]],
      initialStd: 0.5,
    });
    const theta = p.initialParameters();
    theta[2] = 0.3; // bias
    const s = new Float64Array([0.4, 0.1]);
    const mu = -(0.4 - 0.2) + 0.3;
    const a = new Float64Array(1);
    const draw = (seed: number, M: number) => {
      const st = createStream(seed);
      const out = new Float64Array(M);
      for (let k = 0; k < M; k++) {
        p.sample(theta, s, 0, st, a, 0);
        out[k] = a[0];
      }
      return out;
    };
    expect(Array.from(draw(3, 50))).toEqual(Array.from(draw(3, 50)));
    const xs = draw(4, 40000);
    const mean = xs.reduce((t, x) => t + x, 0) / xs.length;
    const v = xs.reduce((t, x) => t + (x - mean) ** 2, 0) / (xs.length - 1);
    // standard error of the mean 0.5/√40000 = 0.0025; of the variance ≈ σ²√(2/M) ≈ 0.0018
    expect(Math.abs(mean - mu)).toBeLessThan(5 * 0.0025);
    expect(Math.abs(v - 0.25)).toBeLessThan(5 * 0.0018);
  });

  it("softmax samples follow the softmax probabilities (chi-square, 3 dof, p > 0.001)", () => {
    const p = softmaxPolicy({ stateSize: 2, actionCount: 4 });
    const theta = new Float64Array([0.5, -1, 0, 0.3, -0.7, 0.2, 1, 1, 0.1, -0.2, 0, 0.4]);
    const s = new Float64Array([0.6, -0.4]);
    const probs = p.probabilities(theta, s, 0, new Float64Array(4));
    const st = createStream(9);
    const counts = [0, 0, 0, 0];
    const a = new Float64Array(1);
    const M = 20000;
    for (let k = 0; k < M; k++) {
      p.sample(theta, s, 0, st, a, 0);
      counts[a[0]]++;
    }
    let chi = 0;
    for (let i = 0; i < 4; i++) chi += (counts[i] - M * probs[i]) ** 2 / (M * probs[i]);
    // χ²₃ upper 0.1% point = 16.27 (standard statistical tables)
    expect(chi).toBeLessThan(16.27);
    expect(probs.reduce((t, x) => t + x, 0)).toBeCloseTo(1, 14);
  });
});
