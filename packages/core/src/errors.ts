/**
 * Typed errors. Every error thrown by recede for bad input is a {@link RecedeError} whose message
 * names the function, the argument, what was expected and what was given, for example
 * `mppi: temperature must be > 0 (got -0.5)`.
 *
 * @module
 */

/** What kind of contract an argument broke. */
export type RecedeErrorCode =
  | "dimension" // wrong length or shape
  | "non-finite" // NaN or ±Infinity where a finite number is required
  | "range" // a number outside its allowed interval (step size ≤ 0, K < 1, …)
  | "not-spd" // a matrix that must be symmetric positive definite is not
  | "domain" // a point outside the geometry's domain (off the simplex, negative variance, …)
  | "type" // a value of the wrong kind (not a Float64Array, not a function, …)
  | "state" // an operation that is invalid in the object's current state
  | "callback"; // a user-supplied function (loss, dynamic step, schedule) threw

/**
 * Base class of every error recede throws for invalid input.
 *
 * Fields are machine-readable copies of what the message says.
 */
export class RecedeError extends Error {
  /** The public function or method that rejected the input, e.g. `"mirrorDescent"`. */
  readonly fn: string;
  /** The argument or option at fault, e.g. `"stepSize"`. */
  readonly arg: string;
  /** What was expected, in words, e.g. `"> 0"`. */
  readonly expected: string;
  /** What was given, rendered as text. */
  readonly got: string;
  /** The kind of contract broken. */
  readonly code: RecedeErrorCode;

  constructor(code: RecedeErrorCode, fn: string, arg: string, expected: string, got: unknown) {
    const given = describe(got);
    super(`${fn}: ${arg} must be ${expected} (got ${given})`);
    this.name = "RecedeError";
    this.code = code;
    this.fn = fn;
    this.arg = arg;
    this.expected = expected;
    this.got = given;
  }
}

/** Render a value briefly for an error message. */
export function describe(v: unknown): string {
  if (typeof v === "number") return Number.isNaN(v) ? "NaN" : String(v);
  if (typeof v === "string") return JSON.stringify(v);
  if (v === null || v === undefined) return String(v);
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
    const a = v as unknown as ArrayLike<number>;
    return `${v.constructor.name}(length ${a.length})`;
  }
  if (Array.isArray(v)) return `Array(length ${v.length})`;
  if (typeof v === "function") return "a function";
  if (typeof v === "object") return "an object";
  return String(v);
}

/** Throw unless `x` is a finite number. */
export function requireFinite(fn: string, arg: string, x: unknown): number {
  if (typeof x !== "number" || !Number.isFinite(x)) {
    throw new RecedeError("non-finite", fn, arg, "a finite number", x);
  }
  return x;
}

/** Throw unless `x` is a finite number > 0. */
export function requirePositive(fn: string, arg: string, x: unknown): number {
  requireFinite(fn, arg, x);
  if ((x as number) <= 0) throw new RecedeError("range", fn, arg, "> 0", x);
  return x as number;
}

/** Throw unless `x` is an integer ≥ `min`. */
export function requireInteger(fn: string, arg: string, x: unknown, min = 0): number {
  if (typeof x !== "number" || !Number.isInteger(x) || x < min) {
    throw new RecedeError("range", fn, arg, `an integer >= ${min}`, x);
  }
  return x;
}

/** Throw unless `lo ≤ x ≤ hi` (or `lo < x` when `openLow`). */
export function requireInRange(
  fn: string,
  arg: string,
  x: unknown,
  lo: number,
  hi: number,
  openLow = false,
): number {
  requireFinite(fn, arg, x);
  const v = x as number;
  if ((openLow ? v <= lo : v < lo) || v > hi) {
    throw new RecedeError("range", fn, arg, `in ${openLow ? "(" : "["}${lo}, ${hi}]`, x);
  }
  return v;
}

/** Throw unless `x` is a Float64Array of length `n` whose entries are all finite. */
export function requireVector(fn: string, arg: string, x: unknown, n: number): Float64Array {
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
