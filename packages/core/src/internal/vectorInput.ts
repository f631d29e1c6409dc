/**
 * Internal: copy a vector given at the API boundary into a fresh Float64Array, validated.
 *
 * @module
 */
import { RecedeError } from "../errors.js";

/** A vector at the API boundary: a Float64Array or a plain array of numbers. */
export type VectorInput = Float64Array | readonly number[];

/**
 * Copy `v` into a new Float64Array of length `n` (any length when `n < 0`), checking every entry
 * is finite (or, with `allowInfinite`, not NaN).
 */
export function toVector(
  fn: string,
  arg: string,
  v: unknown,
  n: number,
  allowInfinite = false,
): Float64Array {
  if (!(v instanceof Float64Array) && !Array.isArray(v)) {
    throw new RecedeError(
      "type",
      fn,
      arg,
      n >= 0 ? `a Float64Array or number[] of length ${n}` : "a Float64Array or number[]",
      v,
    );
  }
  const src = v as ArrayLike<unknown>;
  if (n >= 0 && src.length !== n) throw new RecedeError("dimension", fn, arg, `of length ${n}`, v);
  const out = new Float64Array(src.length);
  for (let i = 0; i < src.length; i++) {
    const x = src[i];
    if (typeof x !== "number" || Number.isNaN(x) || (!allowInfinite && !Number.isFinite(x))) {
      throw new RecedeError(
        "non-finite",
        fn,
        `${arg}[${i}]`,
        allowInfinite ? "a number (not NaN)" : "finite",
        x,
      );
    }
    out[i] = x;
  }
  return out;
}

/** Throw unless `options` is a non-null object. */
export function requireOptions(fn: string, options: unknown): void {
  if (typeof options !== "object" || options === null) {
    throw new RecedeError("type", fn, "options", "an options object", options);
  }
}
