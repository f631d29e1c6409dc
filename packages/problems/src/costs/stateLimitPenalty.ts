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
  return new StateLimitTerm(n, m, idx, lo, hi, w, flag, withTerminal);
}

/**
 * The soft-limit cost (internal class: `sumCosts` recognises it and fuses it into the pass of a
 * preceding diagonal {@link quadraticCost}, see quadraticCost.ts `runningWithLimits`).
 */
export class StateLimitTerm implements CostModel {
  constructor(
    readonly stateSize: number,
    readonly controlSize: number,
    /** State component of each limit. */
    readonly idx: Int32Array,
    /** Lower limits (−∞ for none). */
    readonly lo: Float64Array,
    /** Upper limits (+∞ for none). */
    readonly hi: Float64Array,
    /** Weights w. */
    readonly w: Float64Array,
    /** Violation costs. */
    readonly flag: Float64Array,
    /** Whether the terminal cost charges the penalty too. */
    readonly withTerminal: boolean,
  ) {}

  running(
    x: Float64Array,
    xo: number,
    _u: Float64Array,
    _uo: number,
    count: number,
    _t: number,
    out: Float64Array,
    oo: number,
  ): void {
    this.charge(x, xo, count, out, oo);
  }

  terminal(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void {
    if (this.withTerminal) this.charge(x, xo, count, out, oo);
  }

  /** out[oo+k] += penalty(x_k), the penalty summed over the limits in their order. */
  private charge(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void {
    const n = this.stateSize;
    const { idx, lo, hi, w, flag } = this;
    const L = idx.length;
    for (let k = 0; k < count; k++) {
      const b = xo + k * n;
      let s = 0;
      for (let j = 0; j < L; j++) s += limitPenalty(x[b + idx[j]], lo[j], hi[j], w[j], flag[j]);
      out[oo + k] += s;
    }
  }
}

/**
 * w·e² + violationCost with e = v − upper when v > upper, e = lower − v when v < lower; −0 inside
 * (NaN counts as inside). Written for V8's type feedback: every operation runs on every call, and
 * "inside" is the double −0, not the small integer 0, so no operation first sees a double (or runs
 * at all) long after warm-up — which deoptimized the compiled rollout once per process (seen with
 * `--trace-deopt`). Callers add it to a sum that starts at +0 (0 + (−0) = +0), so the bits are
 * those of the branchy form: for doubles, v − upper > 0 exactly when v > upper.
 */
export function limitPenalty(v: number, lo: number, hi: number, w: number, flag: number): number {
  const over = v - hi;
  const under = lo - v;
  const e = over > 0 ? over : under > 0 ? under : -0;
  const p = w * e * e + flag;
  return e > 0 ? p : -0;
}
