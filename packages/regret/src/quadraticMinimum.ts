/**
 * Minimizer of a summed quadratic ½ uᵀA u + bᵀu (A symmetric positive definite), unconstrained or
 * on a box — the exact best fixed decision in hindsight for quadratic losses, because
 * Σ_t (½ uᵀA_t u + b_tᵀu + c_t) = ½ uᵀ(Σ A_t)u + (Σ b_t)ᵀu + Σ c_t.
 *
 * Unconstrained: u* = −A⁻¹b by Cholesky (A = LLᵀ; no explicit inverse, MATH.md §8.4).
 *
 * Box [a, b]: the projected Newton method of D. P. Bertsekas ("Projected Newton Methods for
 * Optimization Problems with Simple Constraints", SIAM J. Control Optim. 20(2), 1982). At u_k with
 * gradient g = Au + b, let ε_k = min(ε, ‖u_k − Π(u_k − g)‖∞) and call coordinate i ε-active when
 * (u_i ≤ a_i + ε_k and g_i > 0) or (u_i ≥ b_i − ε_k and g_i < 0); F is the rest. The direction is
 * the Newton step on F, p_F = −A_FF⁻¹ g_F, and a scaled gradient step p_i = −g_i / A_ii on the
 * ε-active set; the step is u(α) = Π(u + αp) with α = 1, ½, ¼, … until the Armijo condition
 *   f(u) − f(u(α)) ≥ σ (−α Σ_{i∈F} g_i p_i + Σ_{i∉F} g_i (u_i − u(α)_i)),  σ = 10⁻⁴
 * holds (f differences are evaluated exactly as gᵀδ + ½δᵀAδ). For a strictly convex quadratic
 * the active set is identified after finitely many iterations and the Newton step on F is then
 * exact, so the method stops at the solution up to round-off.
 *
 * A final polish fixes the identified active set exactly: coordinates within 10⁻⁸(1 + b_i − a_i)
 * of a bound whose gradient points outward are set to that bound, the free coordinates are solved
 * from A_FF u_F = −(b_F + A_FA u_A) by Cholesky, and the result is kept when it is feasible and
 * its residual is no larger — so the KKT conditions then hold to round-off, not just to the
 * tolerance.
 *
 * Convergence criterion: ‖u − Π_{[a,b]}(u − ∇f(u))‖∞ ≤ tolerance · (1 + ‖b‖∞) (the projected-
 * gradient residual, zero exactly at the KKT point); otherwise it stops after `maxIterations` and
 * says so in `status`.
 *
 * @module
 */

import { kernels, RecedeError, requireInteger, requirePositive, requireVector } from "@recede/core";

/** How a quadratic minimization ended. */
export type QuadraticMinimumStatus = "converged" | "max-iterations" | "not-spd";

/** Result of {@link minimizeQuadratic}. */
export interface QuadraticMinimum {
  /** The minimizer u* (NaN-filled when `status` is `"not-spd"`). */
  readonly argmin: Float64Array;
  /** ½ u*ᵀA u* + bᵀu* + constant (NaN when `status` is `"not-spd"`). */
  readonly value: number;
  readonly status: QuadraticMinimumStatus;
  /** Projected Newton iterations used (0 when unconstrained). */
  readonly iterations: number;
  /** Final ‖u − Π(u − ∇f(u))‖∞ (the convergence measure; 0 for the unconstrained solve). */
  readonly residual: number;
}

/** Options of {@link minimizeQuadratic}. */
export interface QuadraticMinimumOptions {
  /**
   * Box lower corner a (with `upper`); omit both for the unconstrained problem.
   * @defaultValue none (unconstrained)
   */
  readonly lower?: Float64Array;
  /**
   * Box upper corner b.
   * @defaultValue none (unconstrained)
   */
  readonly upper?: Float64Array;
  /** Added constant c. @defaultValue 0 */
  readonly constant?: number;
  /** Relative tolerance on the projected-gradient residual. @defaultValue 1e-12 */
  readonly tolerance?: number;
  /** Iteration cap of the projected Newton loop. @defaultValue 200 */
  readonly maxIterations?: number;
}

/**
 * min ½ uᵀA u + bᵀu + c over ℝ^d or a box, with A (row-major d×d) symmetric positive definite.
 *
 * Unconstrained: u* = −A⁻¹b by Cholesky. Box [a, b]: projected Newton (Newton step on the free
 * coordinates, scaled gradient step on the ε-active ones, Armijo backtracking along the projection
 * arc), stopped when ‖u − Π(u − ∇f(u))‖∞ ≤ `tolerance`·(1 + ‖b‖∞), then an exact re-solve on the
 * final active set. Source: D. P. Bertsekas, "Projected Newton Methods for Optimization Problems
 * with Simple Constraints", SIAM J. Control Optim., 1982.
 */
export function minimizeQuadratic(
  hessian: Float64Array,
  linear: Float64Array,
  options: QuadraticMinimumOptions = {},
): QuadraticMinimum {
  const fn = "minimizeQuadratic";
  const d = linear instanceof Float64Array ? linear.length : 0;
  if (d < 1) throw new RecedeError("type", fn, "linear", "a non-empty Float64Array", linear);
  requireVector(fn, "linear", linear, d);
  requireVector(fn, "hessian", hessian, d * d);
  const hasBox = options.lower !== undefined || options.upper !== undefined;
  if (hasBox) {
    requireVector(fn, "lower", options.lower, d);
    requireVector(fn, "upper", options.upper, d);
  }
  const tol = options.tolerance === undefined ? 1e-12 : options.tolerance;
  requirePositive(fn, "tolerance", tol);
  const maxIt = options.maxIterations === undefined ? 200 : options.maxIterations;
  requireInteger(fn, "maxIterations", maxIt, 1);
  const solver = new QuadraticSolver(d);
  const argmin = new Float64Array(d);
  const r = solver.solve(
    hessian,
    0,
    linear,
    0,
    hasBox ? (options.lower as Float64Array) : null,
    hasBox ? (options.upper as Float64Array) : null,
    argmin,
    tol,
    maxIt,
  );
  const value = r.status === "not-spd" ? Number.NaN : r.value + (options.constant ?? 0);
  return { argmin, value, status: r.status, iterations: r.iterations, residual: r.residual };
}

/** Mutable result record of {@link QuadraticSolver.solve} (reused: no allocation per solve). */
export interface QuadraticSolveReport {
  status: QuadraticMinimumStatus;
  value: number;
  iterations: number;
  residual: number;
}

/**
 * Workspace-owning solver for d-dimensional problems: allocates at construction only.
 * @internal
 */
export class QuadraticSolver {
  private readonly d: number;
  private readonly chol: Float64Array;
  private readonly sub: Float64Array;
  private readonly g: Float64Array;
  private readonly p: Float64Array;
  private readonly trial: Float64Array;
  private readonly delta: Float64Array;
  private readonly rhs: Float64Array;
  private readonly free: Int32Array;
  private threshold = 0;
  private readonly report: QuadraticSolveReport = {
    status: "converged",
    value: 0,
    iterations: 0,
    residual: 0,
  };

  constructor(d: number) {
    this.d = d;
    this.chol = new Float64Array(d * d);
    this.sub = new Float64Array(d * d);
    this.g = new Float64Array(d);
    this.p = new Float64Array(d);
    this.trial = new Float64Array(d);
    this.delta = new Float64Array(d);
    this.rhs = new Float64Array(d);
    this.free = new Int32Array(d);
  }

  /**
   * Solve into `x`; returns the solver's own report record (valid until the next call).
   * `value` excludes any constant.
   */
  solve(
    A: Float64Array,
    oa: number,
    b: Float64Array,
    ob: number,
    lo: Float64Array | null,
    hi: Float64Array | null,
    x: Float64Array,
    tol: number,
    maxIt: number,
  ): QuadraticSolveReport {
    const d = this.d;
    const rep = this.report;
    rep.iterations = 0;
    rep.residual = 0;
    if (!kernels.cholesky(d, A, oa, this.chol, 0)) {
      kernels.fill(d, Number.NaN, x, 0);
      rep.status = "not-spd";
      rep.value = Number.NaN;
      rep.residual = Number.NaN;
      return rep;
    }
    for (let i = 0; i < d; i++) x[i] = -b[ob + i];
    kernels.choleskySolve(d, this.chol, 0, x, 0);
    rep.status = "converged";
    if (lo !== null && hi !== null) {
      for (let i = 0; i < d; i++) x[i] = clamp(x[i], lo[i], hi[i]);
      this.projectedNewton(A, oa, b, ob, lo, hi, x, tol, maxIt);
      this.polish(A, oa, b, ob, lo, hi, x);
    }
    rep.value = this.objective(A, oa, b, ob, x);
    return rep;
  }

  private objective(A: Float64Array, oa: number, b: Float64Array, ob: number, x: Float64Array) {
    const d = this.d;
    let q = 0;
    for (let i = 0; i < d; i++) q += x[i] * kernels.dot(d, A, oa + i * d, x, 0);
    return 0.5 * q + kernels.dot(d, b, ob, x, 0);
  }

  /** Fix the active set exactly and re-solve the free coordinates (see the module comment). */
  private polish(
    A: Float64Array,
    oa: number,
    b: Float64Array,
    ob: number,
    lo: Float64Array,
    hi: Float64Array,
    x: Float64Array,
  ): void {
    const d = this.d;
    const { g, trial, rhs, free, sub, chol } = this;
    const rep = this.report;
    gradientInto(d, A, oa, b, ob, x, g);
    let nf = 0;
    for (let i = 0; i < d; i++) {
      const eps = 1e-8 * (1 + hi[i] - lo[i]);
      if (lo[i] === hi[i]) trial[i] = lo[i];
      else if (x[i] <= lo[i] + eps && g[i] >= 0) trial[i] = lo[i];
      else if (x[i] >= hi[i] - eps && g[i] <= 0) trial[i] = hi[i];
      else {
        trial[i] = x[i];
        free[nf++] = i;
      }
    }
    if (nf > 0) {
      for (let r = 0; r < nf; r++) {
        const fi = free[r];
        let s = -b[ob + fi];
        for (let j = 0; j < d; j++) {
          if (!isFree(free, nf, j)) s -= A[oa + fi * d + j] * trial[j];
        }
        rhs[r] = s;
        for (let c = 0; c < nf; c++) sub[r * nf + c] = A[oa + fi * d + free[c]];
      }
      if (!kernels.cholesky(nf, sub, 0, chol, 0)) return;
      kernels.choleskySolve(nf, chol, 0, rhs, 0);
      for (let r = 0; r < nf; r++) {
        const fi = free[r];
        if (!(rhs[r] >= lo[fi] && rhs[r] <= hi[fi])) return;
        trial[fi] = rhs[r];
      }
    }
    // g is free again: reuse it for the gradient at the trial point.
    const res = projectedResidual(d, trial, gradientInto(d, A, oa, b, ob, trial, g), lo, hi);
    if (res <= rep.residual) {
      kernels.copy(d, trial, 0, x, 0);
      rep.residual = res;
      if (res <= this.threshold) rep.status = "converged";
    }
  }

  private projectedNewton(
    A: Float64Array,
    oa: number,
    b: Float64Array,
    ob: number,
    lo: Float64Array,
    hi: Float64Array,
    x: Float64Array,
    tol: number,
    maxIt: number,
  ): void {
    const d = this.d;
    const { g, p, trial, delta, rhs, free, sub, chol } = this;
    const rep = this.report;
    let bmax = 0;
    for (let i = 0; i < d; i++) bmax = Math.max(bmax, Math.abs(b[ob + i]));
    const threshold = tol * (1 + bmax);
    this.threshold = threshold;
    const epsilon0 = 1e-3;
    const sigma = 1e-4;
    rep.status = "max-iterations";
    for (let it = 0; it <= maxIt; it++) {
      const res = projectedResidual(d, x, gradientInto(d, A, oa, b, ob, x, g), lo, hi);
      rep.residual = res;
      rep.iterations = it;
      if (res <= threshold) {
        rep.status = "converged";
        return;
      }
      if (it === maxIt) return;
      const eps = Math.min(epsilon0, res);
      let nf = 0;
      for (let i = 0; i < d; i++) {
        const active = (x[i] <= lo[i] + eps && g[i] > 0) || (x[i] >= hi[i] - eps && g[i] < 0);
        if (active) p[i] = -g[i] / A[oa + i * d + i];
        else free[nf++] = i;
      }
      for (let r = 0; r < nf; r++) {
        const fi = free[r];
        rhs[r] = -g[fi];
        for (let c = 0; c < nf; c++) sub[r * nf + c] = A[oa + fi * d + free[c]];
      }
      if (nf > 0) {
        // A principal submatrix of an SPD matrix is SPD, so this cannot fail in exact arithmetic.
        if (!kernels.cholesky(nf, sub, 0, chol, 0)) return;
        kernels.choleskySolve(nf, chol, 0, rhs, 0);
        for (let r = 0; r < nf; r++) p[free[r]] = rhs[r];
      }
      let alpha = 1;
      for (let ls = 0; ls < 60; ls++) {
        for (let i = 0; i < d; i++) {
          trial[i] = clamp(x[i] + alpha * p[i], lo[i], hi[i]);
          delta[i] = trial[i] - x[i];
        }
        // f(trial) − f(x) = gᵀδ + ½ δᵀAδ, exact for a quadratic.
        let lin = 0;
        let quad = 0;
        for (let i = 0; i < d; i++) {
          lin += g[i] * delta[i];
          quad += delta[i] * kernels.dot(d, A, oa + i * d, delta, 0);
        }
        const decrease = -(lin + 0.5 * quad);
        let predicted = 0;
        let fi = 0;
        for (let i = 0; i < d; i++) {
          if (fi < nf && free[fi] === i) {
            predicted -= alpha * g[i] * p[i];
            fi++;
          } else predicted -= g[i] * delta[i];
        }
        if (decrease >= sigma * predicted) break;
        alpha *= 0.5;
      }
      kernels.copy(d, trial, 0, x, 0);
    }
  }
}

function isFree(free: Int32Array, nf: number, j: number): boolean {
  for (let r = 0; r < nf; r++) if (free[r] === j) return true;
  return false;
}

/** g ← ∇f(x) = A x + b (A row-major d×d at `oa`, b at `ob`). Returns `g`. */
function gradientInto(
  d: number,
  A: Float64Array,
  oa: number,
  b: Float64Array,
  ob: number,
  x: Float64Array,
  g: Float64Array,
): Float64Array {
  for (let i = 0; i < d; i++) g[i] = kernels.dot(d, A, oa + i * d, x, 0) + b[ob + i];
  return g;
}

/** ‖x − Π_[lo, hi](x − g)‖∞, the projected-gradient residual (zero exactly at a KKT point). */
function projectedResidual(
  d: number,
  x: Float64Array,
  g: Float64Array,
  lo: Float64Array,
  hi: Float64Array,
): number {
  let res = 0;
  for (let i = 0; i < d; i++)
    res = Math.max(res, Math.abs(x[i] - clamp(x[i] - g[i], lo[i], hi[i])));
  return res;
}

function clamp(v: number, lo: number, hi: number): number {
  return Math.max(lo, Math.min(v, hi));
}
