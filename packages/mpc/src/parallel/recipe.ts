/**
 * Building the planning model from a recipe, identically on every thread.
 *
 * @module
 */
import { type CostModel, type Dynamics, RecedeError } from "@recede/core";
import type { RecipeData } from "./protocol.js";

/**
 * How a thread builds the planning model: `import(module)`, then `await module[factory](...args)`,
 * whose result must carry `dynamics` and `cost` (a Problem of @recede/problems does). Functions
 * cannot cross threads, so every thread runs the same recipe; the arguments must be
 * structured-cloneable (plain data, typed arrays; a SharedArrayBuffer among them stays shared,
 * which is how a model can read data the main thread changes, such as a moving goal).
 */
export interface ModelRecipe {
  /**
   * Module to import: an absolute URL (for your own model,
   * `new URL("./model.js", import.meta.url).href`) or a package name that @recede/mpc can resolve
   * (e.g. `"@recede/problems"`).
   */
  readonly module: string;
  /** Name of the exported factory function in that module. */
  readonly factory: string;
  /** Arguments passed to the factory (structured-cloneable). @defaultValue [] */
  readonly args?: readonly unknown[];
}

/** A planning model built from a {@link ModelRecipe}. */
export interface RecipeModel {
  readonly dynamics: Dynamics;
  readonly cost: CostModel;
}

/** Import the module and call the factory (the same on the main thread and in workers). */
export async function buildModel(recipe: RecipeData): Promise<RecipeModel> {
  const fn = "startRolloutWorkers";
  const mod = (await import(recipe.module)) as Record<string, unknown>;
  const factory = mod[recipe.factory];
  if (typeof factory !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "model.factory",
      `the name of a function exported by ${JSON.stringify(recipe.module)}`,
      recipe.factory,
    );
  }
  const made = (await (factory as (...a: unknown[]) => unknown)(
    ...recipe.args,
  )) as Partial<RecipeModel> | null;
  if (
    made === null ||
    typeof made !== "object" ||
    typeof made.dynamics?.step !== "function" ||
    typeof made.cost?.running !== "function"
  ) {
    throw new RecedeError(
      "type",
      fn,
      "model",
      "a factory returning { dynamics, cost } (e.g. a Problem)",
      made,
    );
  }
  return { dynamics: made.dynamics, cost: made.cost };
}
