/**
 * Option parsing shared by the problem factories (internal; not re-exported).
 *
 * @module
 */
import {
  kernels,
  type MatrixInput,
  RecedeError,
  type RowMajorMatrix,
  toRowMajor,
} from "@recede/core";

/**
 * A weight matrix given as a scalar s (meaning s·I), a list of diagonal entries, or a full matrix
 * (any {@link MatrixInput}).
 */
export type WeightInput = number | readonly number[] | MatrixInput;

/** Parse a weight into a fresh n×n row-major matrix and check symmetry and (semi)definiteness. */
export function parseWeight(
  fn: string,
  arg: string,
  w: WeightInput,
  n: number,
  definite: "psd" | "pd",
): Float64Array {
  let out: Float64Array;
  if (typeof w === "number") {
    if (!Number.isFinite(w)) throw new RecedeError("non-finite", fn, arg, "a finite number", w);
    out = new Float64Array(n * n);
    for (let i = 0; i < n; i++) out[i * n + i] = w;
  } else if (Array.isArray(w) && (w.length === 0 || typeof w[0] === "number")) {
    const d = w as readonly number[];
    if (d.length !== n) throw new RecedeError("dimension", fn, arg, `a diagonal of length ${n}`, d);
    out = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      if (typeof d[i] !== "number" || !Number.isFinite(d[i])) {
        throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", d[i]);
      }
      out[i * n + i] = d[i];
    }
  } else {
    out = toRowMajor(fn, arg, w as MatrixInput, n, n).data;
  }
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(out[i]));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      if (Math.abs(out[i * n + j] - out[j * n + i]) > 1e-12 * Math.max(1, scale)) {
        throw new RecedeError("not-spd", fn, arg, "symmetric", `entry [${i}][${j}] ≠ [${j}][${i}]`);
      }
    }
  }
  // Definiteness by a Cholesky attempt; a semidefinite weight gets a relative jitter first.
  const work = new Float64Array(out);
  if (definite === "psd") {
    const jitter = 1e-10 * Math.max(1, scale);
    for (let i = 0; i < n; i++) work[i * n + i] += jitter;
  }
  if (n > 0 && !kernels.cholesky(n, work, 0, work, 0)) {
    throw new RecedeError(
      "not-spd",
      fn,
      arg,
      definite === "psd" ? "positive semidefinite" : "positive definite",
      "a matrix that is not",
    );
  }
  return out;
}

/** Parse an optional vector option of length n (a fresh Float64Array). */
export function parseVector(
  fn: string,
  arg: string,
  v: ArrayLike<number> | undefined,
  n: number,
  fallback: ArrayLike<number>,
): Float64Array {
  const src = v ?? fallback;
  if (src === null || typeof src !== "object" || typeof src.length !== "number") {
    throw new RecedeError("type", fn, arg, `an array of ${n} numbers`, src);
  }
  if (src.length !== n) throw new RecedeError("dimension", fn, arg, `of length ${n}`, src);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = src[i];
    if (typeof x !== "number" || !Number.isFinite(x)) {
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", x);
    }
    out[i] = x;
  }
  return out;
}

/** Number of states in a flat trajectory, validated. */
export function trajectoryCount(
  fn: string,
  states: Float64Array,
  n: number,
  count: number | undefined,
): number {
  if (!(states instanceof Float64Array)) {
    throw new RecedeError("type", fn, "states", "a Float64Array", states);
  }
  const c = count ?? Math.floor(states.length / n);
  if (!Number.isInteger(c) || c < 1 || c * n > states.length) {
    throw new RecedeError(
      "range",
      fn,
      "count",
      `an integer in [1, ${Math.floor(states.length / n)}]`,
      c,
    );
  }
  return c;
}

/** View a parsed n×n weight as a {@link RowMajorMatrix} option value. */
export function square(data: Float64Array, n: number): RowMajorMatrix {
  return { data, rows: n, cols: n };
}
