import { readFileSync } from "node:fs";
import { createStream } from "@recede/core";
import {
  environmentFromProblem,
  gae,
  linearGaussianPolicy,
  type PolicyOptimizer,
  policyOptimizer,
} from "@recede/policy-gradient";
import { doubleIntegrator } from "@recede/problems";
import { describe, expect, it } from "vitest";

// Sampled policy gradient on a linear-quadratic problem converges to the optimal gain, which is
// the DARE gain of the discounted problem (√γA, √γB, Q, R) computed by
// scipy.linalg.solve_discrete_are in scripts/reference/pg_lqr_gradient.py (fixture entry
// "double-integrator-discounted"; Gaussian action noise only adds a K-independent constant to the
// cost — Fazel, Ge, Kakade & Mesbahi, ICML 2018, with the substitution of MATH.md §5.6).
// Setting: ZOH double integrator Δt = 0.1, Q = I, R = 0.1, γ = 0.9, x₀ ∼ N(0, I), T = 100,
// 200 episodes per round, GAE(0.9, 0.95), linear-Gaussian policy from K₀ = [1, 1.5], σ₀ = 0.5,
// 60 rounds, seed 7.
const fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/lqr_gradient.json", import.meta.url), "utf8"),
) as { dare: { name: string; K: number[][] }[] };
const dare = fixture.dare.find((d) => d.name === "double-integrator-discounted");
if (dare === undefined) throw new Error("fixture entry missing");
const kStar = dare.K.flat();

function train(opt: PolicyOptimizer, rounds: number, onRound?: () => void): Float64Array {
  const problem = doubleIntegrator({ dt: 0.1, q: 1, r: 0.1, qf: 0 });
  const env = environmentFromProblem(problem, {
    horizon: 100,
    initialState: new Float64Array(2),
    initialStateStd: 1,
  });
  const est = gae({ discount: 0.9, lambda: 0.95 });
  const batch = env.createBatch(200);
  const stream = createStream(7);
  for (let k = 0; k < rounds; k++) {
    env.collect(opt.policy, opt.decision(), stream, batch);
    opt.update({ samples: est.score(batch) });
    onRound?.();
  }
  return opt.decision().slice();
}
const relErr = (k: Float64Array) =>
  Math.hypot(k[0] - kStar[0], k[1] - kStar[1]) / Math.hypot(kStar[0], kStar[1]);
const policy = linearGaussianPolicy({
  stateSize: 2,
  actionSize: 1,
  bias: false,
  initialGain: [[1, 1.5]],
  initialStd: 0.5,
});

describe("policy gradient on the double integrator converges to the discounted DARE gain", () => {
  // Measured after 60 rounds (relative error ‖K − K*‖/‖K*‖): natural PG 0.2%, KL trust region 0.1%,
  // vanilla PG about 24% (K = [1.11, 2.02] vs K* = [1.368, 2.704]).
  let npgErr = Number.NaN;

  it("natural policy gradient (Fisher geometry, constant step η = 0.05)", () => {
    const opt = policyOptimizer({ policy, geometry: "fisher", stepSize: 0.05 });
    const k = train(opt, 60);
    npgErr = relErr(k);
    expect(npgErr).toBeLessThan(0.015);
  });

  it("KL trust region (δ = 0.02): converges, and every step respects δ", () => {
    const opt = policyOptimizer({ policy, geometry: "fisher", trustRegion: { radius: 0.02 } });
    let accepted = 0;
    const k = train(opt, 60, () => {
      const r = opt.lastReport;
      if (r === null) throw new Error("no report");
      expect(r.kl).toBeLessThanOrEqual(0.02);
      if (r.accepted) {
        accepted++;
        expect(r.surrogateAfter).toBeLessThan(r.surrogate);
      }
    });
    expect(accepted).toBeGreaterThan(50);
    expect(relErr(k)).toBeLessThan(0.015);
  });

  it("vanilla policy gradient (Euclidean geometry) is far slower on the same budget", () => {
    const opt = policyOptimizer({ policy, geometry: "euclidean", stepSize: 0.01 });
    const k = train(opt, 60);
    expect(relErr(k)).toBeGreaterThan(5 * 0.015);
    expect(relErr(k)).toBeLessThan(relErr(new Float64Array([1, 1.5]))); // but it does improve
  });
});
