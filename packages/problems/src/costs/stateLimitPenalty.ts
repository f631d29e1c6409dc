/**
 * Soft limits on state components, as a batched cost.
 *
 * @module
 */
import { type CostModel, RecedeError, requireFinite, requireInteger } from "@recede/core";

/** One soft limit lower ≤ x_index ≤ upper. */
export interface StateLimit {
  /** State component the limit applies to. */
  readonly index: number;
  /**
   * Lower limit.
   * @defaultValue -Infinity
   */
  readonly lower?: number;
  /**
   * Upper limit.
   * @defaultValue Infinity
   */
  readonly upper?: number;
  /** Weight w of the squared violation (> 0). */
  readonly weight: number;
  /**
   * Constant added once per step while the limit is violated (an "exceeded" flag that makes
   * sampling controllers avoid the region even for small violations).
   * @defaultValue 0
   */
  readonly violationCost?: number;
}

/** Options of {@link stateLimitPenalty}. */
export interface StateLimitPenaltyOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** The limits. */
  readonly limits: readonly StateLimit[];
  /**
   * Whether the terminal cost also charges the penalty.
   * @defaultValue true
   */
  readonly terminal?: boolean;
}

/**
 * Soft state limits (a quadratic exterior penalty, common practice; J. Nocedal, S. J. Wright,
 * "Numerical Optimization", 2nd ed., 2006, §17.1):
 *   c(x) = Σ_limits w·([x_i − upper]₊² + [lower − x_i]₊²) + violationCost·1{x_i ∉ [lower, upper]}.
 * Used e.g. for the cart-pole's track ends.
 */
export function stateLimitPenalty(options: StateLimitPenaltyOptions): CostModel {
  const fn = "stateLimitPenalty";
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const m = requireInteger(fn, "controlSize", options.controlSize, 0);
  const limits = options.limits;
  if (!Array.isArray(limits)) throw new RecedeError("type", fn, "limits", "an array", limits);
  const L = limits.length;
  const idx = new Int32Array(L);
  const lo = new Float64Array(L);
  const hi = new Float64Array(L);
  const w = new Float64Array(L);
  const flag = new Float64Array(L);
  limits.forEach((lim, j) => {
    const i = lim.index;
    if (!Number.isInteger(i) || i < 0 || i >= n) {
      throw new RecedeError("range", fn, `limits[${j}].index`, `an integer in [0, ${n - 1}]`, i);
    }
    idx[j] = i;
    lo[j] = lim.lower ?? Number.NEGATIVE_INFINITY;
    hi[j] = lim.upper ?? Number.POSITIVE_INFINITY;
    if (Number.isNaN(lo[j]) || Number.isNaN(hi[j]) || !(lo[j] <= hi[j])) {
      throw new RecedeError("range", fn, `limits[${j}]`, "lower ≤ upper", `[${lo[j]}, ${hi[j]}]`);
    }
    w[j] = requireFinite(fn, `limits[${j}].weight`, lim.weight);
    if (w[j] < 0) throw new RecedeError("range", fn, `limits[${j}].weight`, ">= 0", w[j]);
    flag[j] = requireFinite(fn, `limits[${j}].violationCost`, lim.violationCost ?? 0);
    if (flag[j] < 0) {
      throw new RecedeError("range", fn, `limits[${j}].violationCost`, ">= 0", flag[j]);
    }
  });
  const withTerminal = options.terminal ?? true;
  const penalty = (x: Float64Array, b: number): number => {
    let s = 0;
    for (let j = 0; j < L; j++) {
      const v = x[b + idx[j]];
      if (v > hi[j]) {
        const e = v - hi[j];
        s += w[j] * e * e + flag[j];
      } else if (v < lo[j]) {
        const e = lo[j] - v;
        s += w[j] * e * e + flag[j];
      }
    }
    return s;
  };
  return {
    stateSize: n,
    controlSize: m,
    running(x, xo, _u, _uo, count, _t, out, oo): void {
      for (let k = 0; k < count; k++) out[oo + k] += penalty(x, xo + k * n);
    },
    terminal(x, xo, count, out, oo): void {
      if (!withTerminal) return;
      for (let k = 0; k < count; k++) out[oo + k] += penalty(x, xo + k * n);
    },
  };
}
