/**
 * Matrices at the API boundary: an `ndarray` view (the `ndarray` package) or a row-major
 * Float64Array with its shape. {@link toRowMajor} copies either into a fresh row-major
 * Float64Array; nothing in a hot loop goes through ndarray (it generates code at run time).
 *
 * @module
 */
import { RecedeError } from "./errors.js";

/** The subset of an `ndarray` view recede reads: data, shape, stride, offset. */
export interface NdArrayLike {
  readonly data: ArrayLike<number>;
  readonly shape: readonly number[];
  readonly stride: readonly number[];
  readonly offset: number;
}

/** A row-major matrix given as data and shape. */
export interface RowMajorMatrix {
  readonly data: Float64Array;
  readonly rows: number;
  readonly cols: number;
}

/** Anything recede accepts as a matrix. */
export type MatrixInput = NdArrayLike | RowMajorMatrix | readonly (readonly number[])[];

function isNd(m: unknown): m is NdArrayLike {
  return (
    typeof m === "object" &&
    m !== null &&
    "shape" in m &&
    "stride" in m &&
    "data" in m &&
    "offset" in m
  );
}

/**
 * Copy a matrix input into a row-major Float64Array, checking its shape and that every entry is
 * finite. `rows`/`cols` of −1 accept any size. Element (i, j) of an ndarray view is read at
 * `data[offset + i·stride[0] + j·stride[1]]`, so transposed, strided and offset views work.
 * Errors name `fn` and `arg` (the caller's function and argument).
 *
 * @example
 * ```ts
 * toRowMajor("myFunction", "A", [[1, 2], [3, 4]]); // { data: Float64Array [1, 2, 3, 4], rows: 2, cols: 2 }
 * ```
 */
export function toRowMajor(
  fn: string,
  arg: string,
  m: MatrixInput,
  rows = -1,
  cols = -1,
): RowMajorMatrix {
  let r: number;
  let c: number;
  let get: (i: number, j: number) => number;
  if (Array.isArray(m)) {
    const arr = m as readonly (readonly number[])[];
    r = arr.length;
    c = r > 0 ? arr[0].length : 0;
    for (const row of arr) {
      if (!Array.isArray(row) || row.length !== c) {
        throw new RecedeError("dimension", fn, arg, "a rectangular array of rows", m);
      }
    }
    get = (i, j) => arr[i][j];
  } else if (isNd(m)) {
    if (m.shape.length !== 2) {
      throw new RecedeError("dimension", fn, `${arg}.shape`, "2-dimensional", m.shape.length);
    }
    [r, c] = m.shape as [number, number];
    const [s0, s1] = m.stride as [number, number];
    get = (i, j) => m.data[m.offset + i * s0 + j * s1];
  } else if (
    typeof m === "object" &&
    m !== null &&
    (m as RowMajorMatrix).data instanceof Float64Array
  ) {
    const rm = m as RowMajorMatrix;
    r = rm.rows;
    c = rm.cols;
    if (!Number.isInteger(r) || !Number.isInteger(c) || r * c !== rm.data.length) {
      throw new RecedeError("dimension", fn, arg, "data of length rows·cols", rm.data);
    }
    get = (i, j) => rm.data[i * c + j];
  } else {
    throw new RecedeError("type", fn, arg, "an ndarray, {data, rows, cols} or an array of rows", m);
  }
  if ((rows >= 0 && r !== rows) || (cols >= 0 && c !== cols)) {
    throw new RecedeError(
      "dimension",
      fn,
      arg,
      `of shape ${rows >= 0 ? rows : "*"}×${cols >= 0 ? cols : "*"}`,
      `shape ${r}×${c}`,
    );
  }
  const data = new Float64Array(r * c);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < c; j++) {
      const v = get(i, j);
      if (!Number.isFinite(v))
        throw new RecedeError("non-finite", fn, `${arg}[${i}][${j}]`, "finite", v);
      data[i * c + j] = v;
    }
  }
  return { data, rows: r, cols: c };
}
