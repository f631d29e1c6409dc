/**
 * Small validation helpers used at this package's boundaries (all throw RecedeError). Checks that
 * `@recede/core` already provides (`requireVector`, `requireInRange`, `requireInteger`, …) are
 * used from there; what is here is either a named interval used often in this package or a shape
 * check the core does not have.
 *
 * @module
 */
import { RecedeError, requireFinite, requireInRange, requireInteger } from "@recede/core";

/** Throw unless `options` is a non-null object (the options record of `fn`). */
export function requireOptionsObject(fn: string, options: unknown): void {
  if (typeof options !== "object" || options === null) {
    throw new RecedeError("type", fn, "options", "an object", options);
  }
}

/**
 * Throw unless `x` is a non-null object with a method called `method` (a duck-typed contract such
 * as an environment's `collect` or an expert's `act`); `expected` names the contract in the message.
 */
export function requireInterface(
  fn: string,
  arg: string,
  x: unknown,
  method: string,
  expected: string,
): void {
  if (
    typeof x !== "object" ||
    x === null ||
    typeof (x as Record<string, unknown>)[method] !== "function"
  ) {
    throw new RecedeError("type", fn, arg, expected, x);
  }
}

/** Read an optional number option, falling back to a default, validated by `check`. */
export function optionalNumber(
  fn: string,
  arg: string,
  x: unknown,
  fallback: number,
  check: (fn: string, arg: string, x: unknown) => number,
): number {
  if (x === undefined) return fallback;
  return check(fn, arg, x);
}

/** Throw unless x is a finite number ≥ 0. */
export function requireNonNegative(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  if ((x as number) < 0) throw new RecedeError("range", fn, arg, ">= 0", x);
  return x as number;
}

/** Throw unless x is a finite number in (0, 1) (the core's intervals are closed at the top). */
export function requireOpenUnit(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  const v = x as number;
  if (v <= 0 || v >= 1) throw new RecedeError("range", fn, arg, "in (0, 1)", x);
  return v;
}

/** Throw unless x is a finite number in (0, 1]. */
export function requireUnitHalfOpen(fn: string, arg: string, x: unknown): number {
  return requireInRange(fn, arg, x, 0, 1, true);
}

/** Throw unless x is a finite number in [0, 1]. */
export function requireUnitClosed(fn: string, arg: string, x: unknown): number {
  return requireInRange(fn, arg, x, 0, 1);
}

/** Throw unless x is an integer ≥ 1. */
export function requireCount(fn: string, arg: string, x: unknown): number {
  return requireInteger(fn, arg, x, 1);
}

/** Throw unless `x` is a function. */
export function requireFunction(fn: string, arg: string, x: unknown): void {
  if (typeof x !== "function") throw new RecedeError("type", fn, arg, "a function", x);
}
