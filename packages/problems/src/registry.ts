/**
 * Registry of the reference problems by name, for benchmark harnesses and command lines.
 *
 * @module
 */
import { RecedeError } from "@recede/core";
import { type BicycleOptions, type BicycleProblem, bicycle } from "./bicycle.js";
import { type CartPoleOptions, type CartPoleProblem, cartPole } from "./cartPole.js";
import { type DoubleIntegratorOptions, doubleIntegrator } from "./doubleIntegrator.js";
import { type PendulumOptions, type PendulumProblem, pendulum } from "./pendulum.js";
import {
  type PlanarQuadrotorOptions,
  type PlanarQuadrotorProblem,
  planarQuadrotor,
} from "./planarQuadrotor.js";
import type { Problem } from "./problem.js";

/** Options accepted by each registered problem. */
export interface ProblemOptionsByName {
  "double-integrator": DoubleIntegratorOptions;
  pendulum: PendulumOptions;
  "cart-pole": CartPoleOptions;
  "planar-quadrotor": PlanarQuadrotorOptions;
  bicycle: BicycleOptions;
}

/** The problem type each registered factory returns. */
export interface ProblemByName {
  "double-integrator": Problem;
  pendulum: PendulumProblem;
  "cart-pole": CartPoleProblem;
  "planar-quadrotor": PlanarQuadrotorProblem;
  bicycle: BicycleProblem;
}

/** Name of a registered problem. */
export type ProblemName = keyof ProblemOptionsByName;

/** A problem factory: options in, fresh problem out. */
export type ProblemFactory<O, P extends Problem = Problem> = (options?: O) => P;

/** Every registered problem factory, by name. */
export const problems: {
  readonly [K in ProblemName]: ProblemFactory<ProblemOptionsByName[K], ProblemByName[K]>;
} = Object.freeze({
  "double-integrator": doubleIntegrator,
  pendulum,
  "cart-pole": cartPole,
  "planar-quadrotor": planarQuadrotor,
  bicycle,
});

/** The registered names, in a stable order. */
export const problemNames: readonly ProblemName[] = Object.freeze(
  Object.keys(problems) as ProblemName[],
);

/**
 * Build a registered problem by name. Throws a typed error naming the known problems when `name`
 * is not one of them.
 *
 * @example
 * ```ts
 * const p = getProblem("cart-pole", { forceLimit: 20 });
 * ```
 */
export function getProblem<K extends ProblemName>(
  name: K,
  options?: ProblemOptionsByName[K],
): ProblemByName[K] {
  if (typeof name !== "string" || !Object.hasOwn(problems, name)) {
    throw new RecedeError("range", "getProblem", "name", `one of ${problemNames.join(", ")}`, name);
  }
  const factory = problems[name] as ProblemFactory<ProblemOptionsByName[K], ProblemByName[K]>;
  return factory(options);
}
