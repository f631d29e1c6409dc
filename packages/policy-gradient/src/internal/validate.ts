/**
 * Small validation helpers used at this package's boundaries (all throw RecedeError).
 *
 * @module
 */
import { RecedeError, requireFinite, requireInteger } from "@recede/core";

/** Throw unless `x` is a Float64Array of exactly `n` finite entries. */
export function requireFiniteArray(fn: string, arg: string, x: unknown, n: number): Float64Array {
  if (!(x instanceof Float64Array)) {
    throw new RecedeError("type", fn, arg, `a Float64Array of length ${n}`, x);
  }
  if (x.length !== n) throw new RecedeError("dimension", fn, arg, `of length ${n}`, x);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i])) {
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", x[i]);
    }
  }
  return x;
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

/** Throw unless x is a finite number in (0, 1). */
export function requireOpenUnit(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  const v = x as number;
  if (v <= 0 || v >= 1) throw new RecedeError("range", fn, arg, "in (0, 1)", x);
  return v;
}

/** Throw unless x is a finite number in (0, 1]. */
export function requireUnitHalfOpen(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  const v = x as number;
  if (v <= 0 || v > 1) throw new RecedeError("range", fn, arg, "in (0, 1]", x);
  return v;
}

/** Throw unless x is a finite number in [0, 1]. */
export function requireUnitClosed(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  const v = x as number;
  if (v < 0 || v > 1) throw new RecedeError("range", fn, arg, "in [0, 1]", x);
  return v;
}

/** Throw unless x is an integer ≥ 1. */
export function requireCount(fn: string, arg: string, x: unknown): number {
  return requireInteger(fn, arg, x, 1);
}

/** Throw unless `x` is a function. */
export function requireFunction(fn: string, arg: string, x: unknown): void {
  if (typeof x !== "function") throw new RecedeError("type", fn, arg, "a function", x);
}
