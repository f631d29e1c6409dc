/**
 * The Euclidean geometry: ψ(x) = ½‖x‖², D(x‖y) = ½‖x − y‖², mirror step = projected gradient step.
 *
 * @module
 */
import { RecedeError, requireInteger, requirePositive } from "../errors.js";
import { requireOptions, toVector, type VectorInput } from "../internal/vectorInput.js";
import type { Geometry } from "./geometry.js";

/**
 * A closed ball {x : ‖x − c‖ ≤ r} in the geometry's own norm (Euclidean for {@link euclidean},
 * the M-norm ‖v‖_M = √(vᵀMv) for {@link mahalanobis}).
 *
 * Symbols ↔ options: r ↔ `radius`, c ↔ `center`.
 */
export interface BallSet {
  readonly kind: "ball";
  /** Radius r > 0. */
  readonly radius: number;
  /**
   * Center c, of the geometry's dimension.
   * @defaultValue the origin
   */
  readonly center?: VectorInput;
}

/**
 * A box {x : lᵢ ≤ xᵢ ≤ uᵢ}. Bounds may be a single number (the same for every coordinate) or one
 * per coordinate; ±Infinity leaves a side open (e.g. `{ lower: 0, upper: Infinity }` is the
 * non-negative orthant).
 *
 * Symbols ↔ options: l ↔ `lower`, u ↔ `upper`.
 */
export interface BoxSet {
  readonly kind: "box";
  /** Lower bounds l (a number or one per coordinate; −Infinity for none). */
  readonly lower: VectorInput | number;
  /** Upper bounds u ≥ l (a number or one per coordinate; +Infinity for none). */
  readonly upper: VectorInput | number;
}

/**
 * The scaled probability simplex {x : xᵢ ≥ 0, Σᵢ xᵢ = z}.
 *
 * Symbols ↔ options: z ↔ `total`.
 */
export interface SimplexSet {
  readonly kind: "simplex";
  /**
   * The sum z > 0 of every feasible point.
   * @defaultValue 1
   */
  readonly total?: number;
}

/** Feasible sets the Euclidean geometry projects onto in closed form. */
export type EuclideanFeasibleSet = BallSet | BoxSet | SimplexSet;

/** Options of {@link euclidean}. */
export interface EuclideanOptions {
  /** Length d of the decision vector (an integer ≥ 1). */
  readonly dimension: number;
  /**
   * Feasible set X; the step ends with the Euclidean projection onto it.
   * @defaultValue none (X = ℝᵈ)
   */
  readonly feasible?: EuclideanFeasibleSet;
  /**
   * Relative slack of {@link Geometry.contains}, which absorbs the rounding of the projection
   * itself: a ball accepts ‖x − c‖ ≤ r·(1 + tolerance); a simplex accepts
   * |Σxᵢ − z| ≤ (tolerance + d·2⁻⁵³)·z (boxes are exact).
   * @defaultValue 1e-12
   */
  readonly tolerance?: number;
}

/** The Euclidean geometry, with its projection exposed. */
export interface EuclideanGeometry extends Geometry {
  readonly name: "euclidean";
  /** The feasible set's kind, or `"none"`. */
  readonly feasibleKind: "none" | "ball" | "box" | "simplex";
  /** out ← Π_X(x), the Euclidean projection onto the feasible set (a copy when there is none). */
  project(x: Float64Array, out: Float64Array): Float64Array;
}

const FN = "euclidean";

/**
 * The Euclidean geometry on ℝᵈ, optionally restricted to a ball, a box or a scaled simplex.
 *
 * ψ(x) = ½‖x‖², D(x‖y) = ½‖x − y‖², ∇ψ = ∇ψ* = identity on ℝᵈ (the projection belongs to the
 * step), and the mirror step is online (projected) gradient descent:  x⁺ = Π_X(x_t − η g),  with
 * Π_X the Euclidean projection
 * (ball: c + (x − c)·min(1, r/‖x − c‖); box: clamp each coordinate; simplex: xᵢ = max(vᵢ − τ, 0)
 * with the threshold τ found by sorting, O(d log d) — Duchi, Shalev-Shwartz, Singer & Chandra,
 * "Efficient Projections onto the ℓ1-Ball for Learning in High Dimensions", ICML, 2008).
 * Symbols ↔ options: d ↔ `dimension`, X ↔ `feasible`.
 *
 * Source: M. Zinkevich, "Online Convex Programming and Generalized Infinitesimal Gradient Ascent",
 * ICML, 2003 (the projected step); E. Hazan, "Introduction to Online Convex Optimization", 2016, §3.1.
 *
 * @example
 * ```ts
 * const g = euclidean({ dimension: 2, feasible: { kind: "ball", radius: 1 } });
 * const x = new Float64Array([0.5, 0]);
 * g.step(x, new Float64Array([-10, 0]), 0.1, x); // x = [1, 0]: the step left the ball and was projected back
 * ```
 */
export function euclidean(options: EuclideanOptions): EuclideanGeometry {
  requireOptions(FN, options);
  const d = requireInteger(FN, "dimension", options.dimension, 1);
  const tol = options.tolerance === undefined ? 1e-12 : options.tolerance;
  if (typeof tol !== "number" || !(tol >= 0) || !Number.isFinite(tol)) {
    throw new RecedeError("range", FN, "tolerance", "a finite number >= 0", tol);
  }
  const f = options.feasible;
  if (f === undefined) return new EuclideanImpl(d, 0, null, null, null, 0, tol);
  if (typeof f !== "object" || f === null) {
    throw new RecedeError("type", FN, "feasible", '{ kind: "ball" | "box" | "simplex", … }', f);
  }
  if (f.kind === "ball") {
    const r = requirePositive(FN, "feasible.radius", f.radius);
    const c =
      f.center === undefined ? new Float64Array(d) : toVector(FN, "feasible.center", f.center, d);
    return new EuclideanImpl(d, 1, c, null, null, r, tol);
  }
  if (f.kind === "box") {
    const lo = boxBound(d, "feasible.lower", f.lower, -1);
    const hi = boxBound(d, "feasible.upper", f.upper, 1);
    for (let i = 0; i < d; i++) {
      if (!(lo[i] <= hi[i])) {
        throw new RecedeError(
          "range",
          FN,
          `feasible.lower[${i}]`,
          `<= upper[${i}] = ${hi[i]}`,
          lo[i],
        );
      }
    }
    return new EuclideanImpl(d, 2, null, lo, hi, 0, tol);
  }
  if (f.kind === "simplex") {
    const z = f.total === undefined ? 1 : requirePositive(FN, "feasible.total", f.total);
    return new EuclideanImpl(d, 3, null, null, null, z, tol);
  }
  throw new RecedeError(
    "type",
    FN,
    "feasible.kind",
    '"ball", "box" or "simplex"',
    (f as { kind?: unknown }).kind,
  );
}

function boxBound(d: number, arg: string, v: unknown, side: -1 | 1): Float64Array {
  let out: Float64Array;
  if (typeof v === "number") {
    if (Number.isNaN(v)) throw new RecedeError("non-finite", FN, arg, "a number (not NaN)", v);
    out = new Float64Array(d).fill(v);
  } else {
    out = toVector(FN, arg, v, d, true);
  }
  // A lower bound of +∞ or an upper bound of −∞ leaves nothing feasible.
  for (let i = 0; i < d; i++) {
    if (out[i] === side * Number.NEGATIVE_INFINITY) {
      throw new RecedeError(
        "range",
        FN,
        `${arg}[${i}]`,
        side < 0 ? "< Infinity" : "> -Infinity",
        out[i],
      );
    }
  }
  return out;
}

class EuclideanImpl implements EuclideanGeometry {
  readonly name = "euclidean" as const;
  readonly feasibleKind: "none" | "ball" | "box" | "simplex";
  private readonly sorted: Float64Array | null;
  constructor(
    readonly dimension: number,
    private readonly kind: 0 | 1 | 2 | 3,
    private readonly center: Float64Array | null,
    private readonly lower: Float64Array | null,
    private readonly upper: Float64Array | null,
    private readonly radius: number,
    private readonly tol: number,
  ) {
    this.feasibleKind = kind === 0 ? "none" : kind === 1 ? "ball" : kind === 2 ? "box" : "simplex";
    this.sorted = kind === 3 ? new Float64Array(dimension) : null;
  }

  potential(x: Float64Array): number {
    let s = 0;
    for (let i = 0; i < this.dimension; i++) s += x[i] * x[i];
    return 0.5 * s;
  }

  divergence(x: Float64Array, y: Float64Array): number {
    let s = 0;
    for (let i = 0; i < this.dimension; i++) {
      const e = x[i] - y[i];
      s += e * e;
    }
    return 0.5 * s;
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = x[i];
    return out;
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = theta[i];
    return out;
  }

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    for (let i = 0; i < this.dimension; i++) out[i] = xt[i] - eta * g[i];
    return this.kind === 0 ? out : this.project(out, out);
  }

  project(x: Float64Array, out: Float64Array): Float64Array {
    const d = this.dimension;
    if (this.kind === 1) {
      const c = this.center as Float64Array;
      // ‖x − c‖ with scaling, so huge steps do not overflow to Infinity.
      let amax = 0;
      for (let i = 0; i < d; i++) {
        const a = Math.abs(x[i] - c[i]);
        if (a > amax) amax = a;
      }
      let norm = 0;
      if (amax > 0 && Number.isFinite(amax)) {
        let s = 0;
        for (let i = 0; i < d; i++) {
          const r = (x[i] - c[i]) / amax;
          s += r * r;
        }
        norm = amax * Math.sqrt(s);
      } else norm = amax;
      if (norm > this.radius) {
        const k = this.radius / norm;
        for (let i = 0; i < d; i++) out[i] = c[i] + (x[i] - c[i]) * k;
      } else if (out !== x) for (let i = 0; i < d; i++) out[i] = x[i];
    } else if (this.kind === 2) {
      const lo = this.lower as Float64Array;
      const hi = this.upper as Float64Array;
      for (let i = 0; i < d; i++) {
        const v = x[i];
        out[i] = v < lo[i] ? lo[i] : Math.min(v, hi[i]);
      }
    } else if (this.kind === 3) {
      // τ = (Σ_{j≤ρ} u_j − z)/ρ over the ρ largest entries u (sorted), the largest ρ with u_ρ > τ.
      const u = this.sorted as Float64Array;
      for (let i = 0; i < d; i++) u[i] = x[i];
      u.sort();
      const z = this.radius;
      let cum = 0;
      let tau = 0;
      for (let j = 1; j <= d; j++) {
        const uj = u[d - j];
        cum += uj;
        const t = (cum - z) / j;
        if (uj > t) tau = t;
        else break;
      }
      for (let i = 0; i < d; i++) out[i] = Math.max(x[i] - tau, 0);
    } else if (out !== x) for (let i = 0; i < d; i++) out[i] = x[i];
    return out;
  }

  contains(x: Float64Array): boolean {
    const d = this.dimension;
    if (x.length !== d) return false;
    for (let i = 0; i < d; i++) if (!Number.isFinite(x[i])) return false;
    if (this.kind === 1) {
      const c = this.center as Float64Array;
      let s = 0;
      for (let i = 0; i < d; i++) {
        const e = x[i] - c[i];
        s += e * e;
      }
      return Math.sqrt(s) <= this.radius * (1 + this.tol);
    }
    if (this.kind === 2) {
      const lo = this.lower as Float64Array;
      const hi = this.upper as Float64Array;
      for (let i = 0; i < d; i++) if (x[i] < lo[i] || x[i] > hi[i]) return false;
    }
    if (this.kind === 3) {
      let s = 0;
      for (let i = 0; i < d; i++) {
        if (x[i] < 0) return false;
        s += x[i];
      }
      // Rounding of the projection's sum grows with d: allow d·2⁻⁵³ on top of the tolerance.
      return Math.abs(s - this.radius) <= (this.tol + d * 1.1102230246251565e-16) * this.radius;
    }
    return true;
  }
}
