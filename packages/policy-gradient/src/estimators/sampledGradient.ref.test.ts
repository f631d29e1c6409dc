import { readFileSync } from "node:fs";
import { createStream } from "@recede/core";
import {
  environmentFromProblem,
  gae,
  linearGaussianPolicy,
  linearValueFunction,
  reinforce,
  type ScoredSamples,
  type StochasticPolicy,
} from "@recede/policy-gradient";
import { doubleIntegrator } from "@recede/problems";
import { describe, expect, it } from "vitest";

// The sampled REINFORCE / GAE(λ = 1) gradient of a linear-Gaussian policy on the double integrator
// agrees with the exact LQR policy gradient of Fazel, Ge, Kakade & Mesbahi (ICML 2018) in its
// discounted, noisy form, computed independently with scipy.linalg.solve_discrete_lyapunov by
// scripts/reference/pg_lqr_gradient.py (case "double-integrator-discounted-noisy":
// A, B = ZOH double integrator with Δt = 0.1, Q = I, R = 0.1, Σ₀ = I, γ = 0.9, W = σ² = 0.25,
// K = [1, 1.5]).
// Agreement is asserted within 4 standard errors per component (the per-episode terms are
// independent because the baseline is fitted on a separate batch): under the normal approximation
// that is a two-sided 99.99% confidence interval per component, 99.987% for both jointly
// (Bonferroni). Seeds are fixed, so the test is deterministic.
const fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/lqr_gradient.json", import.meta.url), "utf8"),
) as { cases: { name: string; gradient: number[][]; K: number[][] }[] };
const ref = fixture.cases.find((c) => c.name === "double-integrator-discounted-noisy");
if (ref === undefined) throw new Error("fixture case missing");
const exact = ref.gradient.flat();

/** Per-episode gradient terms Σ_t w_t ∇ ln π(a_t|s_t) (first `dims` parameters), their mean and SE. */
function perEpisode(
  policy: StochasticPolicy,
  theta: Float64Array,
  s: ScoredSamples,
  E: number,
  T: number,
  dims: number,
) {
  const n = policy.stateSize;
  const a = policy.actionSize;
  const sum = new Float64Array(dims);
  const sum2 = new Float64Array(dims);
  const g = new Float64Array(policy.parameterCount);
  for (let e = 0; e < E; e++) {
    g.fill(0);
    for (let t = 0; t < T; t++) {
      const i = e * T + t;
      policy.addGradLogProb(theta, s.states, i * n, s.actions, i * a, s.weights[i], g);
    }
    for (let j = 0; j < dims; j++) {
      sum[j] += g[j];
      sum2[j] += g[j] * g[j];
    }
  }
  const mean = sum.map((x) => x / E);
  const se = mean.map((m, j) => Math.sqrt((sum2[j] / E - m * m) / (E - 1)));
  return { mean, se };
}

describe("sampled policy gradient vs the exact LQR gradient (scipy fixture)", () => {
  const problem = doubleIntegrator({ dt: 0.1, q: 1, r: 0.1, qf: 0 });
  const T = 150; // γ^T = 0.9^150 ≈ 1.4e-7: truncation is negligible next to the standard error
  const env = environmentFromProblem(problem, {
    horizon: T,
    initialState: new Float64Array(2),
    initialStateStd: 1, // Σ₀ = I
  });
  const policy = linearGaussianPolicy({
    stateSize: 2,
    actionSize: 1,
    bias: false,
    initialGain: ref.K,
    initialStd: 0.5,
  });
  const theta = policy.initialParameters();
  const E = 3000;

  it("REINFORCE with a value baseline fitted on an independent batch", () => {
    const value = linearValueFunction({ stateSize: 2, horizon: T });
    const est = reinforce({ discount: 0.9, baseline: value });
    const fitBatch = env.createBatch(500);
    est.score(env.collect(policy, theta, createStream(101), fitBatch)); // fits V
    const batch = env.createBatch(E);
    const s = est.score(env.collect(policy, theta, createStream(202), batch));
    const { mean, se } = perEpisode(policy, theta, s, E, T, 2);
    // Measured (seeds 101/202): mean = [-0.116, -1.416], SE = [0.043, 0.043]; exact [-0.116, -1.426].
    for (let j = 0; j < 2; j++) {
      expect(Math.abs(mean[j] - exact[j])).toBeLessThanOrEqual(4 * se[j]);
    }
    // The check has power: the standard error is small next to the gradient itself.
    expect(Math.hypot(se[0], se[1])).toBeLessThan(0.1 * Math.hypot(exact[0], exact[1]));
  });

  it("REINFORCE without a baseline is unbiased too (larger error bars)", () => {
    const est = reinforce({ discount: 0.9, baseline: "none" });
    const batch = env.createBatch(E);
    const s = est.score(env.collect(policy, theta, createStream(303), batch));
    const { mean, se } = perEpisode(policy, theta, s, E, T, 2);
    // Measured (seed 303): mean = [0.75, -1.65], SE = [2.6, 1.4] — thirty to sixty times the
    // standard error with the fitted baseline, which is what the baseline is for.
    expect(se[0]).toBeGreaterThan(10 * 0.043);
    for (let j = 0; j < 2; j++) expect(Math.abs(mean[j] - exact[j])).toBeLessThanOrEqual(4 * se[j]);
  });

  it("GAE with λ = 1 (Monte Carlo return minus V) estimates the same gradient", () => {
    const est = gae({ discount: 0.9, lambda: 1 });
    est.score(env.collect(policy, theta, createStream(404), env.createBatch(500))); // fits V
    const batch = env.createBatch(E);
    const s = est.score(env.collect(policy, theta, createStream(505), batch));
    const { mean, se } = perEpisode(policy, theta, s, E, T, 2);
    // Measured (seeds 404/505): mean = [-0.106, -1.377], SE = [0.041, 0.047].
    for (let j = 0; j < 2; j++) expect(Math.abs(mean[j] - exact[j])).toBeLessThanOrEqual(4 * se[j]);
  });
});
