import { createStream } from "@recede/core";
import {
  fisherGeometry,
  linearGaussianPolicy,
  mlpGaussianPolicy,
  softmaxPolicy,
} from "@recede/policy-gradient";
import { finiteVector, geometryLaws } from "@recede/testkit";
import { describe, it } from "vitest";

// The Fisher geometry passes the law table every recede geometry passes (non-negativity, the
// three-point identity of Chen & Teboulle 1993, ∇ψ*∘∇ψ = id, the mirror-step optimality condition
// and lemma of Beck & Teboulle 2003), with the metric frozen at a fixed θ and batch of states.
function prepared<P extends { initialParameters(): Float64Array; stateSize: number }>(
  policy: P & Parameters<typeof fisherGeometry>[0],
  damping: number,
) {
  const geo = fisherGeometry(policy, { damping, maxIterations: 200, tolerance: 1e-15 });
  const states = new Float64Array(8 * policy.stateSize);
  createStream(3).fillNormal(states, 0, states.length);
  const theta = policy.initialParameters();
  createStream(4).fillNormal(theta, 0, theta.length);
  for (let i = 0; i < theta.length; i++) theta[i] *= 0.5;
  geo.prepare(theta, states, 0, 8);
  return geo;
}

describe("fisherGeometry obeys the Bregman geometry laws", () => {
  const rows = [
    {
      name: "fisher / linear-gaussian",
      geometry: prepared(linearGaussianPolicy({ stateSize: 2, actionSize: 1 }), 1e-3),
    },
    {
      name: "fisher / mlp-gaussian",
      geometry: prepared(
        mlpGaussianPolicy({ stateSize: 2, actionSize: 1, hidden: [3], outputScale: 1 }),
        1e-2,
      ),
    },
    {
      name: "fisher / softmax (singular F, damped)",
      geometry: prepared(softmaxPolicy({ stateSize: 2, actionCount: 3 }), 1e-2),
    },
  ].map((r) => ({
    ...r,
    point: finiteVector(r.geometry.dimension, { min: -3, max: 3 }),
    gradient: finiteVector(r.geometry.dimension, { min: -3, max: 3 }),
    firstOrder: "exact" as const,
    tolerance: 1e-7,
  }));
  for (const law of geometryLaws(rows, { numRuns: 60 })) it(law.name, law.check);
});
