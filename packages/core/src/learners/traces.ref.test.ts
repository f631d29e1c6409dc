import { readFileSync } from "node:fs";
import {
  adaGradStep,
  diagonalGaussian,
  dynamicMirrorDescent,
  entropy,
  euclidean,
  type Geometry,
  inverseSqrtStep,
  type MirrorDescentLearner,
  mahalanobis,
  mirrorDescent,
  positiveEntropy,
  type StepSize,
} from "@recede/core";
import { describe, expect, it } from "vitest";

// Reference traces from independent numpy implementations of the published updates
// (scripts/reference/core_learner_traces.py → fixtures/learner_traces.json): projected OGD
// (Zinkevich 2003), exponentiated gradient (Kivinen & Warmuth 1997), the M⁻¹-preconditioned step
// with np.linalg.solve, EGU, dynamic mirror descent (Hall & Willett 2015) and the Gaussian
// exponential tilt. Tolerance 1e-12 relative: the two implementations differ only in rounding
// (e.g. Cholesky vs LU solves, log-domain vs direct normalization).

interface Trace {
  name: string;
  geometry: Record<string, unknown> & { kind: string };
  stepSize: { kind: string; eta?: number; eta0?: number; delta?: number };
  dynamic?: { kind: string; omega: number; factor: number };
  initial: number[];
  gradients: number[][];
  decisions: number[][];
}

const fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/learner_traces.json", import.meta.url), "utf8"),
) as { traces: Trace[] };

function geometryOf(t: Trace): Geometry {
  const g = t.geometry;
  switch (g.kind) {
    case "euclidean-ball":
      return euclidean({
        dimension: t.initial.length,
        feasible: { kind: "ball", radius: g.radius as number, center: g.center as number[] },
      });
    case "euclidean-box":
      return euclidean({
        dimension: t.initial.length,
        feasible: { kind: "box", lower: g.lower as number[], upper: g.upper as number[] },
      });
    case "entropy":
      return entropy({ dimension: t.initial.length });
    case "positive-entropy":
      return positiveEntropy({ dimension: t.initial.length });
    case "mahalanobis":
      return mahalanobis({ metric: g.metric as number[][] });
    case "diagonal-gaussian":
      return diagonalGaussian({ dimension: g.dimension as number });
    default:
      throw new Error(`unknown geometry ${g.kind}`);
  }
}

function stepOf(t: Trace): number | StepSize {
  const s = t.stepSize;
  if (s.kind === "constant") return s.eta as number;
  if (s.kind === "inverse-sqrt") return inverseSqrtStep(s.eta0 as number);
  if (s.kind === "adagrad") return adaGradStep(s.eta0 as number, s.delta);
  throw new Error(`unknown step size ${s.kind}`);
}

function learnerOf(t: Trace): MirrorDescentLearner {
  const base = { geometry: geometryOf(t), initial: t.initial, stepSize: stepOf(t) };
  const dyn = t.dynamic;
  if (dyn === undefined) return mirrorDescent(base);
  const c = dyn.factor * Math.cos(dyn.omega);
  const s = dyn.factor * Math.sin(dyn.omega);
  return dynamicMirrorDescent({
    ...base,
    dynamic: (x, _round, out) => {
      out[0] = c * x[0] - s * x[1];
      out[1] = s * x[0] + c * x[1];
    },
  });
}

describe("learner traces vs independent numpy implementations", () => {
  it("covers every geometry and schedule kind", () => {
    expect(fixture.traces.length).toBe(7);
  });
  for (const t of fixture.traces) {
    it(t.name, () => {
      const l = learnerOf(t);
      for (let r = 0; r < t.gradients.length; r++) {
        l.update({ gradient: Float64Array.from(t.gradients[r]) });
        const x = l.decision();
        const want = t.decisions[r];
        for (let i = 0; i < want.length; i++) {
          expect(Math.abs(x[i] - want[i])).toBeLessThanOrEqual(1e-12 * (1 + Math.abs(want[i])));
        }
      }
    });
  }
});
