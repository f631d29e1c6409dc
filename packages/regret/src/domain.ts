/**
 * Decision domains for best-in-hindsight comparators: the probability simplex, a box and a
 * Euclidean ball, with the closed-form minimum of a linear function over each (MATH.md §1.7) and
 * the Euclidean diameter used by the published bounds.
 *
 * For a linear loss sum ⟨Γ, u⟩ (Γ = Σ_t g_t) the minimum over a compact convex set is attained at
 * an extreme point (Rockafellar, "Convex Analysis", Princeton 1970, Cor. 32.3.2):
 * - simplex Δ_d = {u ≥ 0, Σu_i = 1}: min_i Γ_i at the vertex e_i (first index on ties);
 * - box [a, b]: Σ_i min(a_i Γ_i, b_i Γ_i), at u_i = a_i if Γ_i ≥ 0, else b_i;
 * - ball {‖u − c‖₂ ≤ r}: ⟨Γ, c⟩ − r‖Γ‖₂, at u = c − rΓ/‖Γ‖₂ (u = c when Γ = 0).
 *
 * @module
 */

import { kernels, RecedeError, requirePositive, requireVector } from "@recede/core";

/** The probability simplex Δ_d = {u ∈ ℝ^d : u ≥ 0, Σ_i u_i = 1}. */
export interface SimplexDomain {
  readonly kind: "simplex";
  readonly dimension: number;
}

/** The box {u : lower ≤ u ≤ upper} (component-wise). */
export interface BoxDomain {
  readonly kind: "box";
  readonly dimension: number;
  /** a, the lower corner (a copy owned by the domain). */
  readonly lower: Float64Array;
  /** b, the upper corner (a copy owned by the domain). */
  readonly upper: Float64Array;
}

/** The Euclidean ball {u : ‖u − center‖₂ ≤ radius}. */
export interface BallDomain {
  readonly kind: "ball";
  readonly dimension: number;
  /** c (a copy owned by the domain). */
  readonly center: Float64Array;
  /** r > 0. */
  readonly radius: number;
}

/** A compact convex decision set with a closed-form linear minimizer. */
export type Domain = SimplexDomain | BoxDomain | BallDomain;

/** The probability simplex Δ_d in ℝ^d (d ≥ 1). */
export function simplexDomain(dimension: number): SimplexDomain {
  if (!Number.isInteger(dimension) || dimension < 1) {
    throw new RecedeError("range", "simplexDomain", "dimension", "an integer >= 1", dimension);
  }
  return { kind: "simplex", dimension };
}

/**
 * The box [lower, upper] ⊂ ℝ^d. Both corners are copied; lower ≤ upper component-wise.
 * A `number` for `upper`/`lower` is broadcast when the other is a vector; two numbers need
 * `dimension`.
 */
export function boxDomain(
  lower: Float64Array | number,
  upper: Float64Array | number,
  dimension?: number,
): BoxDomain {
  const fn = "boxDomain";
  const d =
    lower instanceof Float64Array
      ? lower.length
      : upper instanceof Float64Array
        ? upper.length
        : (dimension ?? Number.NaN);
  if (!Number.isInteger(d) || d < 1) {
    throw new RecedeError("range", fn, "dimension", "an integer >= 1", dimension);
  }
  const lo = expand(fn, "lower", lower, d);
  const hi = expand(fn, "upper", upper, d);
  for (let i = 0; i < d; i++) {
    if (!(lo[i] <= hi[i])) {
      throw new RecedeError("range", fn, `upper[${i}]`, `>= lower[${i}] = ${lo[i]}`, hi[i]);
    }
  }
  return { kind: "box", dimension: d, lower: lo, upper: hi };
}

function expand(fn: string, arg: string, v: Float64Array | number, d: number): Float64Array {
  if (typeof v === "number") {
    if (!Number.isFinite(v)) throw new RecedeError("non-finite", fn, arg, "a finite number", v);
    return new Float64Array(d).fill(v);
  }
  return Float64Array.from(requireVector(fn, arg, v, d));
}

/** The Euclidean ball of `radius` r > 0 about `center` (copied). */
export function ballDomain(center: Float64Array, radius: number): BallDomain {
  if (!(center instanceof Float64Array) || center.length < 1) {
    throw new RecedeError("type", "ballDomain", "center", "a non-empty Float64Array", center);
  }
  requireVector("ballDomain", "center", center, center.length);
  requirePositive("ballDomain", "radius", radius);
  return { kind: "ball", dimension: center.length, center: Float64Array.from(center), radius };
}

/**
 * min_{u ∈ X} ⟨Γ, u⟩ in closed form; writes the minimizer into `argmin` when given. Reads
 * Γ = `gamma[offset … offset + d)`. No allocation.
 *
 * Simplex: min_i Γ_i at the vertex e_i (first index on ties); box [a, b]: Σ_i min(a_iΓ_i, b_iΓ_i)
 * at u_i = a_i if Γ_i ≥ 0, else b_i; ball (c, r): ⟨Γ, c⟩ − r‖Γ‖₂ at u = c − rΓ/‖Γ‖₂ (u = c when
 * Γ = 0) (MATH.md §1.7). A linear function attains its minimum over a compact convex set at an
 * extreme point: R. T. Rockafellar, "Convex Analysis", Princeton, 1970, Cor. 32.3.2.
 */
export function linearMinimum(
  domain: Domain,
  gamma: Float64Array,
  offset = 0,
  argmin?: Float64Array,
): number {
  const d = domain.dimension;
  switch (domain.kind) {
    case "simplex": {
      let best = 0;
      for (let i = 1; i < d; i++) if (gamma[offset + i] < gamma[offset + best]) best = i;
      if (argmin) {
        kernels.fill(d, 0, argmin, 0);
        argmin[best] = 1;
      }
      return gamma[offset + best];
    }
    case "box": {
      let s = 0;
      for (let i = 0; i < d; i++) {
        const g = gamma[offset + i];
        const u = g >= 0 ? domain.lower[i] : domain.upper[i];
        s += g * u;
        if (argmin) argmin[i] = u;
      }
      return s;
    }
    case "ball": {
      const n = kernels.nrm2(d, gamma, offset);
      const c = domain.center;
      const s = kernels.dot(d, gamma, offset, c, 0) - domain.radius * n;
      if (argmin) {
        for (let i = 0; i < d; i++) {
          argmin[i] = n > 0 ? c[i] - (domain.radius * gamma[offset + i]) / n : c[i];
        }
      }
      return s;
    }
  }
}

/**
 * The Euclidean diameter D = max_{x,y ∈ X} ‖x − y‖₂: √2 for the simplex (d ≥ 2; 0 for d = 1),
 * ‖b − a‖₂ for a box, 2r for a ball. This is the D of the OGD bounds (MATH.md §1.3).
 */
export function domainDiameter(domain: Domain): number {
  switch (domain.kind) {
    case "simplex":
      return domain.dimension >= 2 ? Math.SQRT2 : 0;
    case "box": {
      let s = 0;
      const d = domain.dimension;
      for (let i = 0; i < d; i++) {
        const w = domain.upper[i] - domain.lower[i];
        s += w * w;
      }
      return Math.sqrt(s);
    }
    case "ball":
      return 2 * domain.radius;
  }
}

/**
 * True when u ∈ X up to an absolute slack `tolerance` per constraint. No allocation.
 *
 * @param tolerance - slack allowed on each inequality (and on Σu = 1 for the simplex)
 * @defaultValue tolerance 1e-12
 */
export function domainContains(domain: Domain, u: Float64Array, tolerance = 1e-12): boolean {
  const d = domain.dimension;
  if (u.length !== d) return false;
  switch (domain.kind) {
    case "simplex": {
      let s = 0;
      for (let i = 0; i < d; i++) {
        if (!(u[i] >= -tolerance)) return false;
        s += u[i];
      }
      return Math.abs(s - 1) <= tolerance * Math.max(1, d);
    }
    case "box":
      for (let i = 0; i < d; i++) {
        if (!(u[i] >= domain.lower[i] - tolerance && u[i] <= domain.upper[i] + tolerance)) {
          return false;
        }
      }
      return true;
    case "ball": {
      let s = 0;
      for (let i = 0; i < d; i++) {
        const e = u[i] - domain.center[i];
        s += e * e;
      }
      return Math.sqrt(s) <= domain.radius + tolerance;
    }
  }
}
