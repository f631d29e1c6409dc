/**
 * The Fisher geometry: a Mahalanobis geometry whose metric is the policy's (damped) Fisher
 * information at the current parameters, applied matrix-free.
 *
 * @module
 */
import { type Geometry, RecedeError, requireInteger, requirePositive } from "@recede/core";
import { requireNonNegative } from "../internal/validate.js";
import type { StochasticPolicy } from "../policies/policy.js";
import { type ConjugateGradientReport, conjugateGradient } from "./conjugateGradient.js";

/**
 * A geometry whose metric depends on the data of the round: the update calls
 * {@link PreparableGeometry.prepare} with the current parameters and the batch's states before
 * stepping.
 */
export interface PreparableGeometry extends Geometry {
  /** Freeze the metric at θ and the `count` states at `states[so ..]`. */
  prepare(theta: Float64Array, states: Float64Array, so: number, count: number): void;
}

/** Options of {@link fisherGeometry}. */
export interface FisherGeometryOptions {
  /**
   * Damping ζ: the metric is F + ζ I (keeps the solve well posed when F is singular).
   * @defaultValue 1e-3
   */
  readonly damping?: number;
  /**
   * Conjugate-gradient iteration budget per solve.
   * @defaultValue 20
   */
  readonly maxIterations?: number;
  /**
   * Relative residual at which CG stops, ‖r‖ ≤ tolerance·‖g‖.
   * @defaultValue 1e-10
   */
  readonly tolerance?: number;
  /**
   * Largest number of states the Fisher average uses; larger batches are subsampled at evenly
   * spaced indices (common practice to cut the cost of Fisher-vector products).
   * @defaultValue 4096
   */
  readonly maxStates?: number;
}

/**
 * The Fisher geometry (see {@link fisherGeometry}). Counters make its cost visible.
 */
export class FisherGeometry implements PreparableGeometry {
  readonly name: string = "fisher";
  readonly dimension: number;
  /** The policy family. */
  readonly policy: StochasticPolicy;
  /** ζ. */
  readonly damping: number;
  /** CG budget. */
  readonly maxIterations: number;
  /** CG relative tolerance. */
  readonly tolerance: number;
  /** Subsampling cap on states. */
  readonly maxStates: number;
  /** Fisher-vector products computed since construction. */
  fisherProducts = 0;
  /** The report of the last CG solve (null before the first). */
  lastSolve: ConjugateGradientReport | null = null;
  private readonly theta: Float64Array;
  private states: Float64Array = new Float64Array(0);
  private own: Float64Array = new Float64Array(0);
  private so = 0;
  private count = 0;
  private prepared = false;
  private readonly tmp: Float64Array;
  private readonly tmp2: Float64Array;
  private readonly scratch: { r: Float64Array; p: Float64Array; ap: Float64Array };
  private readonly applyFn: (v: Float64Array, out: Float64Array) => void;

  /** Use {@link fisherGeometry}; the constructor trusts validated options. */
  constructor(
    policy: StochasticPolicy,
    damping: number,
    maxIterations: number,
    tolerance: number,
    maxStates: number,
  ) {
    const d = policy.parameterCount;
    this.policy = policy;
    this.dimension = d;
    this.damping = damping;
    this.maxIterations = maxIterations;
    this.tolerance = tolerance;
    this.maxStates = maxStates;
    this.theta = new Float64Array(d);
    this.tmp = new Float64Array(d);
    this.tmp2 = new Float64Array(d);
    this.scratch = { r: new Float64Array(d), p: new Float64Array(d), ap: new Float64Array(d) };
    this.applyFn = (v, out) => this.apply(v, out);
  }

  /** Whether {@link prepare} has been called. */
  get isPrepared(): boolean {
    return this.prepared;
  }

  prepare(theta: Float64Array, states: Float64Array, so: number, count: number): void {
    const fn = "FisherGeometry.prepare";
    const n = this.policy.stateSize;
    if (!(theta instanceof Float64Array) || theta.length !== this.dimension) {
      throw new RecedeError(
        "dimension",
        fn,
        "theta",
        `a Float64Array of length ${this.dimension}`,
        theta,
      );
    }
    requireInteger(fn, "count", count, 1);
    if (!(states instanceof Float64Array) || states.length < so + count * n) {
      throw new RecedeError(
        "dimension",
        fn,
        "states",
        `a Float64Array holding ${count} states of size ${n}`,
        states,
      );
    }
    this.theta.set(theta);
    if (count <= this.maxStates) {
      this.states = states;
      this.so = so;
      this.count = count;
    } else {
      const c = this.maxStates;
      if (this.own.length !== c * n) this.own = new Float64Array(c * n);
      for (let k = 0; k < c; k++) {
        const src = so + Math.floor((k * count) / c) * n;
        for (let i = 0; i < n; i++) this.own[k * n + i] = states[src + i];
      }
      this.states = this.own;
      this.so = 0;
      this.count = c;
    }
    this.prepared = true;
  }

  private requirePrepared(fn: string): void {
    if (!this.prepared) {
      throw new RecedeError(
        "state",
        fn,
        "geometry",
        "prepared with prepare(theta, states, so, count) first",
        "an unprepared geometry",
      );
    }
  }

  /** out ← (F + ζ I) v at the prepared point. `out` must not alias `v`. Returns `out`. */
  apply(v: Float64Array, out: Float64Array): Float64Array {
    this.requirePrepared("FisherGeometry.apply");
    this.policy.fisherVectorProduct(this.theta, this.states, this.so, this.count, v, out);
    this.fisherProducts++;
    const z = this.damping;
    for (let i = 0; i < this.dimension; i++) out[i] += z * v[i];
    return out;
  }

  /** out ← (F + ζ I)⁻¹ g by conjugate gradient. `out` must not alias `g`. Returns `out`. */
  solve(g: Float64Array, out: Float64Array): Float64Array {
    this.requirePrepared("FisherGeometry.solve");
    this.lastSolve = conjugateGradient(
      this.dimension,
      this.applyFn,
      g,
      out,
      this.scratch,
      this.maxIterations,
      this.tolerance,
    );
    return out;
  }

  potential(x: Float64Array): number {
    this.apply(x, this.tmp);
    let s = 0;
    for (let i = 0; i < this.dimension; i++) s += x[i] * this.tmp[i];
    return 0.5 * s;
  }

  divergence(x: Float64Array, y: Float64Array): number {
    for (let i = 0; i < this.dimension; i++) this.tmp2[i] = x[i] - y[i];
    this.apply(this.tmp2, this.tmp);
    let s = 0;
    for (let i = 0; i < this.dimension; i++) s += this.tmp2[i] * this.tmp[i];
    return 0.5 * s;
  }

  mirrorMap(x: Float64Array, out: Float64Array): Float64Array {
    if (out === x) {
      this.tmp2.set(x);
      return this.apply(this.tmp2, out);
    }
    return this.apply(x, out);
  }

  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array {
    if (out === theta) {
      this.tmp2.set(theta);
      return this.solve(this.tmp2, out);
    }
    return this.solve(theta, out);
  }

  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array {
    this.solve(g, this.tmp);
    for (let i = 0; i < this.dimension; i++) out[i] = xt[i] - eta * this.tmp[i];
    return out;
  }

  contains(x: Float64Array): boolean {
    if (!(x instanceof Float64Array) || x.length !== this.dimension) return false;
    for (let i = 0; i < this.dimension; i++) if (!Number.isFinite(x[i])) return false;
    return true;
  }
}

/**
 * The Fisher geometry of a policy family: ψ(θ) = ½ θᵀ(F + ζI)θ with F = F(θ_k) frozen at the
 * prepared parameters θ_k and states, so the mirror step is the natural-gradient step
 *   θ⁺ = θ_k − η (F(θ_k) + ζ I)⁻¹ g,
 * solved matrix-free by conjugate gradient with the family's analytic Fisher-vector products.
 * D(θ‖θ_k) = ½ (θ − θ_k)ᵀ (F + ζI) (θ − θ_k); with ζ = 0 it is the second-order expansion of the
 * mean KL(π_{θ_k} ‖ π_θ) (MATH.md §2.4, §5.3). Symbols ↔ options: ζ ↔ `damping`. The states are
 * held by reference until the next `prepare` (batches larger than `maxStates` are copied).
 *
 * Sources: S. Kakade, "A Natural Policy Gradient", NIPS 14, 2001; S. Amari, "Natural Gradient
 * Works Efficiently in Learning", Neural Computation, 1998; the damped CG solve as in
 * J. Schulman et al., "Trust Region Policy Optimization", ICML, 2015.
 *
 * @example
 * ```ts
 * const geo = fisherGeometry(pi, { damping: 1e-3 });
 * const opt = policyOptimizer({ policy: pi, geometry: geo, stepSize: 0.05 });
 * ```
 */
export function fisherGeometry(
  policy: StochasticPolicy,
  options: FisherGeometryOptions = {},
): FisherGeometry {
  const fn = "fisherGeometry";
  if (
    typeof policy !== "object" ||
    policy === null ||
    typeof policy.fisherVectorProduct !== "function"
  ) {
    throw new RecedeError("type", fn, "policy", "a StochasticPolicy", policy);
  }
  const damping = requireNonNegative(fn, "damping", options.damping ?? 1e-3);
  const maxIt = requireInteger(fn, "maxIterations", options.maxIterations ?? 20, 1);
  const tol = requirePositive(fn, "tolerance", options.tolerance ?? 1e-10);
  const maxStates = requireInteger(fn, "maxStates", options.maxStates ?? 4096, 1);
  return new FisherGeometry(policy, damping, maxIt, tol, maxStates);
}
