/**
 * An affine dynamic step Φ(x) = A x + b for dynamic mirror descent.
 *
 * @module
 */
import { RecedeError } from "../errors.js";
import { requireOptions, toVector, type VectorInput } from "../internal/vectorInput.js";
import { type MatrixInput, toRowMajor } from "../matrixInput.js";
import type { DynamicStep } from "./dynamicMirrorDescent.js";

/** Options of {@link affineDynamic}. */
export interface AffineDynamicOptions {
  /**
   * The d×d matrix A: an `ndarray` view, `{ data, rows, cols }` or an array of rows. Copied.
   */
  readonly matrix: MatrixInput;
  /**
   * The offset b (length d).
   * @defaultValue zero
   */
  readonly offset?: VectorInput;
}

/**
 * The affine dynamic step Φ(x) = A x + b, the model class of Hall & Willett's examples: a
 * comparator that moves as u_{t+1} = A u_t + b has zero path length relative to Φ, so dynamic
 * mirror descent tracks it with the static regret rate. For the guarantee, Φ should map the
 * feasible set into itself and not expand the divergence (e.g. A orthogonal or a contraction
 * in the Euclidean geometry). The result is validated by the learner like any other Φ.
 * Symbols ↔ options: A ↔ `matrix`, b ↔ `offset`. Allocates nothing per call.
 *
 * Source: E. Hall, R. Willett, "Online Convex Optimization in Dynamic Environments", IEEE J. Sel.
 * Topics Signal Process., 2015.
 *
 * @example
 * ```ts
 * const c = Math.cos(0.1);
 * const s = Math.sin(0.1);
 * const learner = dynamicMirrorDescent({
 *   geometry: euclidean({ dimension: 2 }),
 *   initial: [1, 0],
 *   stepSize: 0.1,
 *   dynamic: affineDynamic({ matrix: [[c, -s], [s, c]] }), // rotate by 0.1 rad per round
 * });
 * ```
 */
export function affineDynamic(options: AffineDynamicOptions): DynamicStep {
  const fn = "affineDynamic";
  requireOptions(fn, options);
  const a = toRowMajor(fn, "matrix", options.matrix);
  const d = a.rows;
  if (d < 1 || a.cols !== d) {
    throw new RecedeError(
      "dimension",
      fn,
      "matrix",
      "square (d×d, d >= 1)",
      `shape ${a.rows}×${a.cols}`,
    );
  }
  const b =
    options.offset === undefined ? new Float64Array(d) : toVector(fn, "offset", options.offset, d);
  const m = a.data;
  return (x, _round, out) => {
    if (x.length !== d) {
      throw new RecedeError("dimension", fn, "x", `of length ${d} (the matrix size)`, x);
    }
    for (let i = 0; i < d; i++) {
      let s = b[i];
      const row = i * d;
      for (let j = 0; j < d; j++) s += m[row + j] * x[j];
      out[i] = s;
    }
  };
}
