/**
 * Elite-fraction loss: the cross-entropy method's indicator utility.
 *
 * @module
 */
import { RecedeError, requireInRange } from "@recede/core";
import { requireObject } from "../internal/input.js";
import type { SampleLoss } from "./types.js";

/** Options of {@link eliteFraction}. */
export interface EliteFractionOptions {
  /** Elite fraction ρ ∈ (0, 1]: the K_e = max(1, round(ρK)) lowest-cost samples are the elites. */
  readonly fraction: number;
}

const FN = "eliteFraction";

/**
 * Elite indicator S(C) = 1{C ≤ τ_t}, τ_t the K_e-th smallest sampled cost (MATH.md §3.6):
 *   K_e = max(1, round(ρK)),  w_i = 1/K_e on the K_e lowest costs, 0 elsewhere,
 * with ties broken by sample index, so there are exactly K_e elites (fewer only when fewer than K_e
 * samples have a finite cost: then every finite sample is an elite). Selection is an in-place
 * quickselect on an index buffer (no sort, no allocation after the first call).
 *
 * Loss estimate: the literal ℓ_t = −ln P[C ≤ τ_t] equals −ln ρ by construction of τ_t and carries no
 * information, so ℓ̂_t reported here is the mean elite cost (1/K_e) Σ_{i∈E} C_i, an estimate of
 * E[C | C ≤ τ_t].
 * Symbols ↔ options: ρ ↔ `fraction`.
 *
 * Source: R. Y. Rubinstein, "The Cross-Entropy Method for Combinatorial and Continuous Optimization",
 * Methodology and Computing in Applied Probability, 1999; R. Y. Rubinstein, D. P. Kroese,
 * "The Cross-Entropy Method", Springer, 2004.
 */
export function eliteFraction(options: EliteFractionOptions): SampleLoss {
  requireObject(FN, "options", options);
  const rho = requireInRange(FN, "fraction", options.fraction, 0, 1, true);
  if (!(rho > 0)) throw new RecedeError("range", FN, "fraction", "in (0, 1]", rho);
  return new EliteFraction(rho);
}

/**
 * Number of elites K_e = min(K, max(1, round(ρK))) for K samples and elite fraction ρ (rounding to
 * the nearest integer; common practice, Rubinstein & Kroese, "The Cross-Entropy Method", 2004).
 */
export function eliteCount(fraction: number, count: number): number {
  return Math.min(count, Math.max(1, Math.round(fraction * count)));
}

class EliteFraction implements SampleLoss {
  /** Scratch for {@link SampleLoss.weigh} (which returns what `weighInto` writes). */
  private readonly one: Float64Array = new Float64Array(1);
  readonly name = "elite-fraction";
  readonly normalized = true;
  private index = new Int32Array(0);
  constructor(readonly fraction: number) {}

  weigh(costs: Float64Array, count: number, weights: Float64Array): number {
    this.weighInto(costs, count, weights, this.one);
    return this.one[0];
  }

  weighInto(costs: Float64Array, count: number, weights: Float64Array, out: Float64Array): void {
    if (this.index.length < count) this.index = new Int32Array(count);
    const idx = this.index;
    let valid = 0;
    for (let i = 0; i < count; i++) {
      idx[i] = i;
      if (Number.isFinite(costs[i])) valid++;
    }
    if (valid === 0) {
      out[0] = Number.NaN;
      return;
    }
    const ke = Math.min(valid, eliteCount(this.fraction, count));
    if (ke < count) select(costs, idx, count, ke);
    for (let i = 0; i < count; i++) weights[i] = 0;
    const w = 1 / ke;
    let s = 0;
    for (let e = 0; e < ke; e++) {
      weights[idx[e]] = w;
      s += costs[idx[e]];
    }
    out[0] = s / ke;
  }
}

/** Strict total order: by cost (non-finite as +∞), then by index. */
function before(costs: Float64Array, a: number, b: number): boolean {
  let ca = costs[a];
  let cb = costs[b];
  if (!(ca < Number.POSITIVE_INFINITY)) ca = Number.POSITIVE_INFINITY;
  if (!(cb < Number.POSITIVE_INFINITY)) cb = Number.POSITIVE_INFINITY;
  return ca < cb || (ca === cb && a < b);
}

/** Quickselect: rearrange idx[0..n) so that idx[0..k) are the k first under `before`. */
function select(costs: Float64Array, idx: Int32Array, n: number, k: number): void {
  let lo = 0;
  let hi = n - 1;
  const target = k - 1;
  while (hi > lo) {
    // Median of three as pivot, moved to hi.
    const mid = (lo + hi) >>> 1;
    if (before(costs, idx[mid], idx[lo])) swap(idx, mid, lo);
    if (before(costs, idx[hi], idx[lo])) swap(idx, hi, lo);
    if (before(costs, idx[mid], idx[hi])) swap(idx, mid, hi);
    const pivot = idx[hi];
    let store = lo;
    for (let i = lo; i < hi; i++) {
      if (before(costs, idx[i], pivot)) {
        swap(idx, i, store);
        store++;
      }
    }
    swap(idx, store, hi);
    if (store === target) return;
    if (store < target) lo = store + 1;
    else hi = store - 1;
  }
}

function swap(idx: Int32Array, i: number, j: number): void {
  const t = idx[i];
  idx[i] = idx[j];
  idx[j] = t;
}
