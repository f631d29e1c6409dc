/**
 * Loss objects with known structure, which the tracker accumulates exactly in streaming form:
 * affine losses ℓ(x) = ⟨g, x⟩ + c and quadratic losses ℓ(x) = ½ xᵀA x + bᵀx + c. Both implement
 * core's {@link LossObject}, so any learner can consume them.
 *
 * @module
 */

import type { LossObject } from "@recede/core";
import { kernels, RecedeError, requireFinite, requireVector } from "@recede/core";

/** An affine loss ℓ(x) = ⟨g, x⟩ + c. */
export interface LinearLoss extends LossObject {
  readonly kind: "linear";
  /** g (a copy owned by the loss). */
  readonly slope: Float64Array;
  /** c. */
  readonly constant: number;
}

/** ℓ(x) = ⟨g, x⟩ + c with g = `slope` (copied) and c = `constant`. @defaultValue constant 0 */
export function linearLoss(slope: Float64Array, constant = 0): LinearLoss {
  const g = Float64Array.from(requireVector("linearLoss", "slope", slope, slope?.length ?? 0));
  requireFinite("linearLoss", "constant", constant);
  const d = g.length;
  return {
    kind: "linear",
    slope: g,
    constant,
    value: (x: Float64Array): number => kernels.dot(d, g, 0, x, 0) + constant,
    gradient: (_x: Float64Array, out: Float64Array): Float64Array => kernels.copy(d, g, 0, out, 0),
  };
}

/**
 * A quadratic loss ℓ(x) = ½ xᵀA x + bᵀx + c with A symmetric positive semidefinite (d×d,
 * row-major), so ∇ℓ(x) = A x + b. When A is positive definite the minimizer is x* = −A⁻¹b.
 */
export interface QuadraticLoss extends LossObject {
  readonly kind: "quadratic";
  readonly dimension: number;
  /** A, row-major d×d, symmetrized copy: A ← (A + Aᵀ)/2. */
  readonly hessian: Float64Array;
  /** b (a copy). */
  readonly linear: Float64Array;
  /** c. */
  readonly constant: number;
}

/** Options of {@link quadraticLoss}. */
export interface QuadraticLossOptions {
  /** b. @defaultValue zero vector */
  readonly linear?: Float64Array;
  /** c. @defaultValue 0 */
  readonly constant?: number;
}

/**
 * ℓ(x) = ½ xᵀA x + bᵀx + c. `hessian` A is row-major d×d (d = √length), copied and symmetrized;
 * it must be finite. Positive semidefiniteness is the caller's promise (the best-in-hindsight solver
 * checks positive definiteness of the sum by Cholesky).
 */
export function quadraticLoss(
  hessian: Float64Array,
  options: QuadraticLossOptions = {},
): QuadraticLoss {
  const fn = "quadraticLoss";
  if (!(hessian instanceof Float64Array)) {
    throw new RecedeError("type", fn, "hessian", "a row-major Float64Array of length d*d", hessian);
  }
  const d = Math.round(Math.sqrt(hessian.length));
  if (d < 1 || d * d !== hessian.length) {
    throw new RecedeError("dimension", fn, "hessian", "of length d*d for some d >= 1", hessian);
  }
  requireVector(fn, "hessian", hessian, d * d);
  const A = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    for (let j = 0; j < d; j++) A[i * d + j] = 0.5 * (hessian[i * d + j] + hessian[j * d + i]);
  }
  const b =
    options.linear === undefined
      ? new Float64Array(d)
      : Float64Array.from(requireVector(fn, "linear", options.linear, d));
  const c = options.constant === undefined ? 0 : requireFinite(fn, "constant", options.constant);
  return {
    kind: "quadratic",
    dimension: d,
    hessian: A,
    linear: b,
    constant: c,
    value(x: Float64Array): number {
      let q = 0;
      for (let i = 0; i < d; i++) q += x[i] * kernels.dot(d, A, i * d, x, 0);
      return 0.5 * q + kernels.dot(d, b, 0, x, 0) + c;
    },
    gradient(x: Float64Array, out: Float64Array): Float64Array {
      for (let i = 0; i < d; i++) out[i] = kernels.dot(d, A, i * d, x, 0) + b[i];
      return out;
    },
  };
}

/** True when `loss` was made by {@link quadraticLoss} (or has the same shape). */
export function isQuadraticLoss(loss: LossObject | undefined): loss is QuadraticLoss {
  return (
    loss !== undefined &&
    (loss as Partial<QuadraticLoss>).kind === "quadratic" &&
    (loss as Partial<QuadraticLoss>).hessian instanceof Float64Array &&
    (loss as Partial<QuadraticLoss>).linear instanceof Float64Array
  );
}

/** True when `loss` was made by {@link linearLoss} (or has the same shape). */
export function isLinearLoss(loss: LossObject | undefined): loss is LinearLoss {
  return (
    loss !== undefined &&
    (loss as Partial<LinearLoss>).kind === "linear" &&
    (loss as Partial<LinearLoss>).slope instanceof Float64Array
  );
}
