/**
 * The built-in registry: the reference problems, the bench scenarios, and every optimizer kind the
 * library offers (see optimizers.ts), plus the `nominal` baseline.
 *
 * @module
 */
import { parcelDroneDefinition } from "./demo/drone.js";
import { optimizerDefinitions } from "./optimizers.js";
import { referenceProblemDefinitions } from "./problems.js";
import { Registry } from "./registry.js";

/** A fresh registry with every built-in problem and optimizer kind. */
export function builtinRegistry(): Registry {
  const r = new Registry();
  for (const p of referenceProblemDefinitions()) r.registerProblem(p);
  r.registerProblem(parcelDroneDefinition);
  for (const o of optimizerDefinitions()) r.registerOptimizer(o);
  return r;
}
