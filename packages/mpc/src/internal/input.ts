/**
 * Internal: option parsing shared by the mpc factories (never re-exported).
 *
 * @module
 */
import { type MatrixInput, RecedeError, toRowMajor } from "@recede/core";

/** Throw unless `options` is a non-null object. */
export function requireObject(fn: string, arg: string, options: unknown): void {
  if (typeof options !== "object" || options === null) {
    throw new RecedeError("type", fn, arg, "an options object", options);
  }
}

/**
 * Copy a number or an array into a fresh Float64Array of length `per·rows`: a scalar is broadcast,
 * an array of length `per` is repeated for every row, an array of length `per·rows` is copied.
 */
export function broadcast(
  fn: string,
  arg: string,
  v: unknown,
  per: number,
  rows: number,
  check: (x: number) => boolean,
  expected: string,
): Float64Array {
  const out = new Float64Array(per * rows);
  if (typeof v === "number") {
    if (!check(v)) throw new RecedeError("range", fn, arg, expected, v);
    out.fill(v);
    return out;
  }
  if (!(v instanceof Float64Array) && !Array.isArray(v)) {
    throw new RecedeError(
      "type",
      fn,
      arg,
      `a number or an array of length ${per} or ${per * rows}`,
      v,
    );
  }
  const a = v as ArrayLike<unknown>;
  if (a.length !== per && a.length !== per * rows) {
    throw new RecedeError("dimension", fn, arg, `of length ${per} or ${per * rows}`, v);
  }
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    if (typeof x !== "number" || Number.isNaN(x)) {
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "a number", x);
    }
    if (!check(x)) throw new RecedeError("range", fn, `${arg}[${i}]`, expected, x);
  }
  if (a.length === per) {
    for (let r = 0; r < rows; r++) for (let j = 0; j < per; j++) out[r * per + j] = a[j] as number;
  } else {
    for (let i = 0; i < a.length; i++) out[i] = a[i] as number;
  }
  return out;
}

/** A matrix given as a MatrixInput or as a row-major Float64Array of the expected size. */
export type MatrixLike = MatrixInput | Float64Array;

/** Copy a matrix (MatrixInput or row-major Float64Array) of shape rows×cols, checking finiteness. */
export function matrix(
  fn: string,
  arg: string,
  v: MatrixLike,
  rows: number,
  cols: number,
): Float64Array {
  if (v instanceof Float64Array) {
    if (v.length !== rows * cols) {
      throw new RecedeError("dimension", fn, arg, `of length ${rows}·${cols} = ${rows * cols}`, v);
    }
    for (let i = 0; i < v.length; i++) {
      if (!Number.isFinite(v[i]))
        throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", v[i]);
    }
    return new Float64Array(v);
  }
  return toRowMajor(fn, arg, v, rows, cols).data;
}

/** Rows and columns of a matrix input (a flat Float64Array reports −1 for both). */
export function shapeOf(v: MatrixLike): [number, number] {
  if (v instanceof Float64Array) return [-1, -1];
  if (Array.isArray(v)) {
    const rows = v as readonly (readonly number[])[];
    return [rows.length, rows.length > 0 && Array.isArray(rows[0]) ? rows[0].length : 0];
  }
  const o = v as { shape?: readonly number[]; rows?: number; cols?: number };
  if (o.shape !== undefined) return [o.shape[0] ?? -1, o.shape[1] ?? -1];
  return [o.rows ?? -1, o.cols ?? -1];
}
