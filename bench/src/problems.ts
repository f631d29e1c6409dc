/**
 * Adapters from the reference problems of `@recede/problems` to the harness's
 * {@link BenchProblem}: the plant is the model itself (no mismatch), the episode cost is the
 * problem's cost, success is the problem's own test.
 *
 * @module
 */
import type { Stream } from "@recede/core";
import { getProblem, type Problem, type ProblemName, problemNames } from "@recede/problems";
import type { ParamSchemaMap, ParamValues } from "./params.js";
import type { BenchProblem, ProblemDefinition } from "./registry.js";

/** Parameters every reference problem accepts in a sweep file. */
export const referenceProblemParams: ParamSchemaMap = {
  steps: {
    type: "integer",
    min: 1,
    description: "episode length in control steps (default: the problem's suggested length)",
  },
  initialNoise: {
    type: "number",
    min: 0,
    default: 0,
    description: "std of a Gaussian perturbation added to every start-state component (per seed)",
  },
};

/** Wrap a {@link Problem} as a {@link BenchProblem}. */
export function fromReferenceProblem(p: Problem, params: ParamValues = {}): BenchProblem {
  const n = p.stateSize;
  const steps = (params.steps as number | undefined) ?? p.episodeLength;
  const noise = (params.initialNoise as number | undefined) ?? 0;
  const lq = p.linearQuadratic;
  return {
    id: p.name,
    stateSize: n,
    controlSize: p.controlSize,
    dt: p.dt,
    steps,
    model: p.dynamics,
    cost: p.cost,
    bounds: p.bounds,
    stateNames: p.stateNames,
    angleIndices: p.angleIndices,
    equilibrium: { state: Float64Array.from(p.goal), control: Float64Array.from(p.goalControl) },
    ...(lq ? { linearQuadratic: lq } : {}),
    initialState(rng: Stream): Float64Array {
      const x = p.initialState();
      if (noise > 0) for (let i = 0; i < n; i++) x[i] += noise * rng.normal();
      return x;
    },
    plantStep(x, u, t): void {
      p.dynamics.step(x, 0, u, 0, 1, t);
    },
    violation(): number {
      return 0;
    },
    finished(): boolean {
      return false;
    },
    outcome(states, count): { success: boolean; metrics: Record<string, number> } {
      const report = p.assess(states, count);
      return { success: report.success, metrics: { heldSteps: report.heldSteps } };
    },
  };
}

/** Registry entries for every problem of `@recede/problems`. */
export function referenceProblemDefinitions(): ProblemDefinition[] {
  return problemNames.map((name: ProblemName) => {
    const sample = getProblem(name);
    return {
      id: name,
      description: `${sample.description} Source: ${sample.source}`,
      params: referenceProblemParams,
      create: (params: ParamValues): BenchProblem => fromReferenceProblem(getProblem(name), params),
    };
  });
}
