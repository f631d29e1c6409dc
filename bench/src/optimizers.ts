/**
 * The optimizer kinds a sweep file can name, each an adapter from a library factory to the
 * harness's {@link BenchController}:
 *
 * - `nominal`: apply the problem's equilibrium control (hover thrust, zero torque) — the
 *   do-nothing baseline every optimizer should beat;
 * - the MPC kinds of `@recede/mpc` and the distilled policies of `@recede/policy-gradient`
 *   (see optimizers/*.ts).
 *
 * @module
 */

import { distilledDefinition } from "./optimizers/distilled.js";
import { mpcOptimizerDefinitions } from "./optimizers/mpc.js";
import type { BenchController, BenchProblem, OptimizerDefinition } from "./registry.js";

/** The `nominal` baseline: u_t = ū (the equilibrium control, or zero) at every step. */
export const nominalDefinition: OptimizerDefinition = {
  kind: "nominal",
  description: "Apply the problem's equilibrium control at every step (do-nothing baseline).",
  params: {},
  create(_params, problem: BenchProblem): BenchController {
    const u = problem.equilibrium
      ? Float64Array.from(problem.equilibrium.control)
      : new Float64Array(problem.controlSize);
    return { act: () => ({ control: u, samples: 0 }) };
  },
};

/** Every built-in optimizer kind. */
export function optimizerDefinitions(): OptimizerDefinition[] {
  return [nominalDefinition, ...mpcOptimizerDefinitions(), distilledDefinition];
}
