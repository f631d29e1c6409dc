/**
 * Argument checks shared by the bound functions.
 *
 * @module
 * @internal
 */

import { RecedeError, requireFinite } from "@recede/core";

/** @internal Throw unless x is finite and > 0. */
export function positive(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  if ((x as number) <= 0) throw new RecedeError("range", fn, arg, "> 0", x);
  return x as number;
}

/** @internal Throw unless x is finite and ≥ 0. */
export function nonNegative(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  if ((x as number) < 0) throw new RecedeError("range", fn, arg, ">= 0", x);
  return x as number;
}

/** @internal Throw unless x is an integer ≥ 1. */
export function roundsArg(fn: string, x: unknown): number {
  if (typeof x !== "number" || !Number.isInteger(x) || x < 1) {
    throw new RecedeError("range", fn, "rounds", "an integer >= 1", x);
  }
  return x;
}

/** @internal Throw unless x is an integer ≥ 2 (Hedge needs N ≥ 2 experts for ln N > 0). */
export function expertsArg(fn: string, x: unknown): number {
  if (typeof x !== "number" || !Number.isInteger(x) || x < 2) {
    throw new RecedeError("range", fn, "experts", "an integer >= 2", x);
  }
  return x;
}
