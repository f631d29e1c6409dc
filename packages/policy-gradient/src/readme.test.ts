import { createStream } from "@recede/core";
import {
  environmentFromProblem,
  gae,
  linearGaussianPolicy,
  lqrPolicyProblem,
  policyActor,
  policyOptimizer,
} from "@recede/policy-gradient";
import { doubleIntegrator } from "@recede/problems";
import { describe, expect, it } from "vitest";

// The README's "Train a policy" snippet and the doc-comment example of lqrPolicyProblem, run as
// written (so the documentation cannot rot).
describe("documentation examples", () => {
  it("README: train a policy", () => {
    const problem = doubleIntegrator({ dt: 0.1 });
    const env = environmentFromProblem(problem, {
      horizon: 100,
      initialState: new Float64Array(2),
      initialStateStd: 1,
    });
    const policy = linearGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      bias: false,
      initialGain: [[1, 1.5]],
      initialStd: 0.5,
    });
    const optimizer = policyOptimizer({
      policy,
      geometry: "fisher",
      trustRegion: { radius: 0.02 },
    });
    const estimator = gae({ discount: 0.9, lambda: 0.95 });
    const batch = env.createBatch(200);
    const stream = createStream(7);
    const first = env.evaluate(policyActor(policy, optimizer.decision()), 10, createStream(1)).mean;
    for (let round = 0; round < 60; round++) {
      env.collect(policy, optimizer.decision(), stream, batch);
      optimizer.update({ samples: estimator.score(batch) });
    }
    const controller = policyActor(policy, optimizer.decision());
    const last = env.evaluate(controller, 10, createStream(1)).mean;
    expect(last).toBeLessThan(first);
  });

  it("lqrPolicyProblem example: Gauss–Newton from K = [1, 1.5] reaches the DARE gain", () => {
    const lqr = lqrPolicyProblem({
      a: [
        [1, 0.1],
        [0, 1],
      ],
      b: [[0.005], [0.1]],
      q: [
        [1, 0],
        [0, 1],
      ],
      r: [[0.1]],
    });
    let k: Float64Array = new Float64Array([1, 1.5]);
    for (let i = 0; i < 50; i++) k = lqr.step(k, "gauss-newton", 0.5);
    // DARE gain from scipy.linalg.solve_discrete_are (fixture lqr_gradient.json, "double-integrator")
    expect(k[0]).toBeCloseTo(2.5857008966598656, 9);
    expect(k[1]).toBeCloseTo(3.443435917845341, 9);
  });
});
