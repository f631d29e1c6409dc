/**
 * Batched quadratic tracking cost, with an optional time-varying reference trajectory.
 *
 * @module
 */
import { type CostModel, RecedeError, requireInteger } from "@recede/core";
import { parseWeight, type WeightInput } from "../internal/options.js";
import { wrapAngle } from "../problem.js";
import { limitPenalty, type StateLimitTerm } from "./stateLimitPenalty.js";

/** Options of {@link quadraticCost}. */
export interface QuadraticCostOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Running state weight Q (n×n, symmetric PSD): scalar s = s·I, a diagonal, or a matrix. */
  readonly q: WeightInput;
  /** Running control weight R (m×m, symmetric PSD; PD for LQR). */
  readonly r: WeightInput;
  /**
   * Terminal state weight Qf.
   * @defaultValue the running weight Q
   */
  readonly qf?: WeightInput;
  /**
   * State reference r: one state (length n) or a trajectory of rows r_0, r_1, … (length rows·n,
   * row-major). Row min(start + t, rows − 1) is used at horizon step t.
   * @defaultValue the origin
   */
  readonly reference?: ArrayLike<number>;
  /**
   * Control reference ū: one control (length m) or a trajectory (rows·m), indexed like `reference`.
   * @defaultValue zero
   */
  readonly controlReference?: ArrayLike<number>;
  /**
   * Horizon H used to pick the terminal reference row min(start + H, rows − 1). When omitted the
   * terminal cost uses the last reference row.
   * @defaultValue undefined (last row)
   */
  readonly horizon?: number;
  /**
   * State components that are angles: their errors x_i − r_i are wrapped into (−π, π].
   * @defaultValue []
   */
  readonly angleIndices?: readonly number[];
}

/**
 * A quadratic cost that also exposes its weights and lets the caller move along the reference.
 */
export interface QuadraticCost extends CostModel {
  /** Q, row-major n×n (a copy owned by the cost; do not mutate). */
  readonly q: Float64Array;
  /** R, row-major m×m. */
  readonly r: Float64Array;
  /** Qf, row-major n×n. */
  readonly qf: Float64Array;
  /** Index of the reference row used at horizon step t = 0. */
  readonly start: number;
  /**
   * Move the reference window: horizon step t then uses row min(start + t, rows − 1). A receding-
   * horizon tracker calls `setStart(k)` before planning at episode step k.
   */
  setStart(start: number): void;
  /**
   * Replace the state reference (and optionally the control reference) in place, e.g. when the goal
   * moves. Lengths must equal those given at construction (nothing is reallocated); on bad input a
   * typed error is thrown and the old reference is kept.
   */
  setReference(reference: ArrayLike<number>, controlReference?: ArrayLike<number>): void;
}

/**
 * Batched quadratic tracking cost
 *   c(x, u, t) = (x − r_{s+t})ᵀ Q (x − r_{s+t}) + (u − ū_{s+t})ᵀ R (u − ū_{s+t}),
 *   c_H(x) = (x − r_{s+H})ᵀ Qf (x − r_{s+H}),
 * with reference rows clamped to the last one, s = `start` (see {@link QuadraticCost.setStart}),
 * and angle components of x − r wrapped into (−π, π]. No factor ½ (MATH.md §4.1 convention, the
 * one the Riccati solvers use). Symbols ↔ options: Q ↔ `q`, R ↔ `r`, Qf ↔ `qf`, r ↔ `reference`,
 * ū ↔ `controlReference`, H ↔ `horizon`.
 *
 * Diagonal weights take a faster path; nothing is allocated per call. Source: the standard LQ
 * tracking cost (B. D. O. Anderson, J. B. Moore, "Optimal Control: Linear Quadratic Methods", 1990).
 *
 * @example
 * ```ts
 * const cost = quadraticCost({ stateSize: 2, controlSize: 1, q: [1, 0.1], r: 0.01 });
 * const out = new Float64Array(1);
 * cost.running(new Float64Array([1, 0]), 0, new Float64Array([2]), 0, 1, 0, out, 0); // out[0] = 1.04
 * ```
 */
export function quadraticCost(options: QuadraticCostOptions): QuadraticCost {
  const fn = "quadraticCost";
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const m = requireInteger(fn, "controlSize", options.controlSize, 0);
  const q = parseWeight(fn, "q", options.q, n, "psd");
  const r = parseWeight(fn, "r", options.r, m, "psd");
  const qf =
    options.qf === undefined ? new Float64Array(q) : parseWeight(fn, "qf", options.qf, n, "psd");
  const ref = parseTrajectory(fn, "reference", options.reference, n);
  const uref = parseTrajectory(fn, "controlReference", options.controlReference, m);
  const horizon =
    options.horizon === undefined ? -1 : requireInteger(fn, "horizon", options.horizon, 1);
  const isAngle = new Uint8Array(n);
  for (const i of options.angleIndices ?? []) {
    if (!Number.isInteger(i) || i < 0 || i >= n) {
      throw new RecedeError("range", fn, "angleIndices", `integers in [0, ${n - 1}]`, i);
    }
    isAngle[i] = 1;
  }
  return new QuadraticCostImpl(n, m, q, r, qf, ref, uref, horizon, isAngle);
}

function parseTrajectory(
  fn: string,
  arg: string,
  v: ArrayLike<number> | undefined,
  width: number,
): Float64Array {
  if (v === undefined) return new Float64Array(Math.max(width, 1));
  if (v === null || typeof v !== "object" || typeof v.length !== "number") {
    throw new RecedeError("type", fn, arg, "an array of numbers", v);
  }
  if (width === 0) return new Float64Array(1);
  if (v.length === 0 || v.length % width !== 0) {
    throw new RecedeError(
      "dimension",
      fn,
      arg,
      `a length that is a positive multiple of ${width}`,
      v,
    );
  }
  const out = new Float64Array(v.length);
  for (let i = 0; i < v.length; i++) {
    if (typeof v[i] !== "number" || !Number.isFinite(v[i])) {
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", v[i]);
    }
    out[i] = v[i];
  }
  return out;
}

function checkSameLength(fn: string, arg: string, v: ArrayLike<number>, len: number): void {
  if (v === null || typeof v !== "object" || v.length !== len) {
    throw new RecedeError("dimension", fn, arg, `of length ${len} (as at construction)`, v);
  }
  for (let i = 0; i < len; i++) {
    if (typeof v[i] !== "number" || !Number.isFinite(v[i])) {
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", v[i]);
    }
  }
}

function isDiagonal(n: number, w: Float64Array): boolean {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) if (i !== j && w[i * n + j] !== 0) return false;
  }
  return true;
}

/** The quadratic cost (internal class: `sumCosts` fuses it with a following soft-limit term). */
export class QuadraticCostImpl implements QuadraticCost {
  readonly stateSize: number;
  readonly controlSize: number;
  readonly q: Float64Array;
  readonly r: Float64Array;
  readonly qf: Float64Array;
  start = 0;
  private readonly ref: Float64Array;
  private readonly refRows: number;
  private readonly uref: Float64Array;
  private readonly urefRows: number;
  private readonly horizon: number;
  private readonly isAngle: Uint8Array;
  private readonly hasAngle: boolean;
  private readonly qDiag: boolean;
  private readonly rDiag: boolean;
  private readonly qfDiag: boolean;
  private readonly dx: Float64Array;
  private readonly du: Float64Array;
  private readonly qd: Float64Array;
  private readonly rd: Float64Array;

  constructor(
    n: number,
    m: number,
    q: Float64Array,
    r: Float64Array,
    qf: Float64Array,
    ref: Float64Array,
    uref: Float64Array,
    horizon: number,
    isAngle: Uint8Array,
  ) {
    this.stateSize = n;
    this.controlSize = m;
    this.q = q;
    this.r = r;
    this.qf = qf;
    this.ref = ref;
    this.refRows = ref.length / n;
    this.uref = uref;
    this.urefRows = m === 0 ? 1 : uref.length / m;
    this.horizon = horizon;
    this.isAngle = isAngle;
    this.hasAngle = isAngle.some((v) => v === 1);
    this.qDiag = isDiagonal(n, q);
    this.rDiag = isDiagonal(m, r);
    this.qfDiag = isDiagonal(n, qf);
    this.dx = new Float64Array(n);
    this.du = new Float64Array(Math.max(m, 1));
    this.qd = new Float64Array(n);
    this.rd = new Float64Array(m);
    for (let i = 0; i < n; i++) this.qd[i] = q[i * n + i];
    for (let j = 0; j < m; j++) this.rd[j] = r[j * m + j];
  }

  setStart(start: number): void {
    this.start = requireInteger("QuadraticCost.setStart", "start", start, 0);
  }

  setReference(reference: ArrayLike<number>, controlReference?: ArrayLike<number>): void {
    const fn = "QuadraticCost.setReference";
    // validate everything before writing anything
    checkSameLength(fn, "reference", reference, this.ref.length);
    if (controlReference !== undefined && this.controlSize > 0) {
      checkSameLength(fn, "controlReference", controlReference, this.uref.length);
    }
    for (let i = 0; i < this.ref.length; i++) this.ref[i] = reference[i];
    if (controlReference !== undefined && this.controlSize > 0) {
      for (let i = 0; i < this.uref.length; i++) this.uref[i] = controlReference[i];
    }
  }

  running(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    t: number,
    out: Float64Array,
    oo: number,
  ): void {
    const n = this.stateSize;
    const m = this.controlSize;
    const rb = Math.min(this.start + t, this.refRows - 1) * n;
    const ub = Math.min(this.start + t, this.urefRows - 1) * m;
    if (this.qDiag && this.rDiag) {
      // fast path: diagonal weights, no scratch
      const { qd, rd, ref, uref, isAngle, hasAngle } = this;
      if (n === 4) {
        this.running4(x, xo, u, uo, count, rb, ub, out, oo);
        return;
      }
      if (n === 2) {
        this.running2(x, xo, u, uo, count, rb, ub, out, oo);
        return;
      }
      if (n === 6) {
        this.running6(x, xo, u, uo, count, rb, ub, out, oo);
        return;
      }
      for (let k = 0; k < count; k++) {
        const xb = xo + k * n;
        const ubk = uo + k * m;
        let c = 0;
        for (let i = 0; i < n; i++) {
          let d = x[xb + i] - ref[rb + i];
          if (hasAngle && isAngle[i] === 1) d = wrapAngle(d);
          c += qd[i] * d * d;
        }
        for (let j = 0; j < m; j++) {
          const d = u[ubk + j] - uref[ub + j];
          c += rd[j] * d * d;
        }
        out[oo + k] += c;
      }
      return;
    }
    for (let k = 0; k < count; k++) {
      const c =
        this.form(n, this.q, this.qDiag, x, xo + k * n, this.ref, rb, this.dx, this.hasAngle) +
        this.form(m, this.r, this.rDiag, u, uo + k * m, this.uref, ub, this.du, false);
      out[oo + k] += c;
    }
  }

  /**
   * The diagonal fast path unrolled for n = 2 (the pendulum, a one-axis double integrator): the
   * same terms in the same order as the general loop, so the sums are bit-identical; half the time
   * of the general loop (scratch measurement, pendulum, 10⁵ states: 1.0 → 0.5 ms).
   */
  private running2(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    rb: number,
    ub: number,
    out: Float64Array,
    oo: number,
  ): void {
    const { qd, rd, ref, uref, isAngle } = this;
    const m = this.controlSize;
    const q0 = qd[0];
    const q1 = qd[1];
    const r0 = ref[rb];
    const r1 = ref[rb + 1];
    const a0 = isAngle[0] === 1;
    const a1 = isAngle[1] === 1;
    const s0 = m > 0 ? rd[0] : 0;
    const u0 = m > 0 ? uref[ub] : 0;
    for (let k = 0; k < count; k++) {
      const xb = xo + 2 * k;
      let d0 = x[xb] - r0;
      let d1 = x[xb + 1] - r1;
      if (a0) d0 = wrapAngle(d0);
      if (a1) d1 = wrapAngle(d1);
      let c = 0;
      c += q0 * d0 * d0;
      c += q1 * d1 * d1;
      if (m === 1) {
        const e0 = u[uo + k] - u0;
        c += s0 * e0 * e0;
      } else {
        const ubk = uo + k * m;
        for (let j = 0; j < m; j++) {
          const d = u[ubk + j] - uref[ub + j];
          c += rd[j] * d * d;
        }
      }
      out[oo + k] += c;
    }
  }

  /** The diagonal fast path unrolled for n = 6 (the planar quadrotor); as `running2`. */
  private running6(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    rb: number,
    ub: number,
    out: Float64Array,
    oo: number,
  ): void {
    const { qd, rd, ref, uref, isAngle } = this;
    const m = this.controlSize;
    const q0 = qd[0];
    const q1 = qd[1];
    const q2 = qd[2];
    const q3 = qd[3];
    const q4 = qd[4];
    const q5 = qd[5];
    const r0 = ref[rb];
    const r1 = ref[rb + 1];
    const r2 = ref[rb + 2];
    const r3 = ref[rb + 3];
    const r4 = ref[rb + 4];
    const r5 = ref[rb + 5];
    const a0 = isAngle[0] === 1;
    const a1 = isAngle[1] === 1;
    const a2 = isAngle[2] === 1;
    const a3 = isAngle[3] === 1;
    const a4 = isAngle[4] === 1;
    const a5 = isAngle[5] === 1;
    const s0 = m > 0 ? rd[0] : 0;
    const s1 = m > 1 ? rd[1] : 0;
    const u0 = m > 0 ? uref[ub] : 0;
    const u1 = m > 1 ? uref[ub + 1] : 0;
    for (let k = 0; k < count; k++) {
      const xb = xo + 6 * k;
      let d0 = x[xb] - r0;
      let d1 = x[xb + 1] - r1;
      let d2 = x[xb + 2] - r2;
      let d3 = x[xb + 3] - r3;
      let d4 = x[xb + 4] - r4;
      let d5 = x[xb + 5] - r5;
      if (a0) d0 = wrapAngle(d0);
      if (a1) d1 = wrapAngle(d1);
      if (a2) d2 = wrapAngle(d2);
      if (a3) d3 = wrapAngle(d3);
      if (a4) d4 = wrapAngle(d4);
      if (a5) d5 = wrapAngle(d5);
      let c = 0;
      c += q0 * d0 * d0;
      c += q1 * d1 * d1;
      c += q2 * d2 * d2;
      c += q3 * d3 * d3;
      c += q4 * d4 * d4;
      c += q5 * d5 * d5;
      const ubk = uo + k * m;
      if (m === 2) {
        const e0 = u[ubk] - u0;
        const e1 = u[ubk + 1] - u1;
        c += s0 * e0 * e0;
        c += s1 * e1 * e1;
      } else {
        for (let j = 0; j < m; j++) {
          const d = u[ubk + j] - uref[ub + j];
          c += rd[j] * d * d;
        }
      }
      out[oo + k] += c;
    }
  }

  /**
   * The diagonal fast path unrolled for n = 4 (the planar reference problems): the same terms in
   * the same order as the general loop, so the sums are bit-identical; about 10 % of an MPPI step
   * on the bicycle was this loop's per-component overhead (measured by the throughput profile).
   */
  private running4(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    rb: number,
    ub: number,
    out: Float64Array,
    oo: number,
  ): void {
    const { qd, rd, ref, uref, isAngle } = this;
    const m = this.controlSize;
    const q0 = qd[0];
    const q1 = qd[1];
    const q2 = qd[2];
    const q3 = qd[3];
    const r0 = ref[rb];
    const r1 = ref[rb + 1];
    const r2 = ref[rb + 2];
    const r3 = ref[rb + 3];
    const a0 = isAngle[0] === 1;
    const a1 = isAngle[1] === 1;
    const a2 = isAngle[2] === 1;
    const a3 = isAngle[3] === 1;
    const s0 = m > 0 ? rd[0] : 0;
    const s1 = m > 1 ? rd[1] : 0;
    const u0 = m > 0 ? uref[ub] : 0;
    const u1 = m > 1 ? uref[ub + 1] : 0;
    for (let k = 0; k < count; k++) {
      const xb = xo + 4 * k;
      let d0 = x[xb] - r0;
      let d1 = x[xb + 1] - r1;
      let d2 = x[xb + 2] - r2;
      let d3 = x[xb + 3] - r3;
      if (a0) d0 = wrapAngle(d0);
      if (a1) d1 = wrapAngle(d1);
      if (a2) d2 = wrapAngle(d2);
      if (a3) d3 = wrapAngle(d3);
      let c = 0;
      c += q0 * d0 * d0;
      c += q1 * d1 * d1;
      c += q2 * d2 * d2;
      c += q3 * d3 * d3;
      const ubk = uo + k * m;
      if (m === 2) {
        const e0 = u[ubk] - u0;
        const e1 = u[ubk + 1] - u1;
        c += s0 * e0 * e0;
        c += s1 * e1 * e1;
      } else if (m === 1) {
        const e0 = u[ubk] - u0;
        c += s0 * e0 * e0;
      } else {
        for (let j = 0; j < m; j++) {
          const d = u[ubk + j] - uref[ub + j];
          c += rd[j] * d * d;
        }
      }
      out[oo + k] += c;
    }
  }

  /**
   * `running` of this cost and then of `lim`, in one pass over the states (internal: `sumCosts`
   * fuses a diagonal quadratic cost with the soft-limit term that follows it). Per sample,
   * out ← (out + c_quadratic) + c_limits with each part summed in the order of its own `running`,
   * so the result is bit-identical to the two separate calls.
   */
  runningWithLimits(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    t: number,
    out: Float64Array,
    oo: number,
    lim: StateLimitTerm,
  ): void {
    if (!(this.qDiag && this.rDiag)) {
      this.running(x, xo, u, uo, count, t, out, oo);
      lim.running(x, xo, u, uo, count, t, out, oo);
      return;
    }
    const n = this.stateSize;
    const m = this.controlSize;
    const rb = Math.min(this.start + t, this.refRows - 1) * n;
    const ub = Math.min(this.start + t, this.urefRows - 1) * m;
    if (n === 4 && lim.idx.length === 1) {
      this.running4Limit1(x, xo, u, uo, count, rb, ub, out, oo, lim);
      return;
    }
    const { qd, rd, ref, uref, isAngle, hasAngle } = this;
    const { idx, lo, hi, w, flag } = lim;
    const L = idx.length;
    for (let k = 0; k < count; k++) {
      const xb = xo + k * n;
      const ubk = uo + k * m;
      let c = 0;
      for (let i = 0; i < n; i++) {
        let d = x[xb + i] - ref[rb + i];
        if (hasAngle && isAngle[i] === 1) d = wrapAngle(d);
        c += qd[i] * d * d;
      }
      for (let j = 0; j < m; j++) {
        const d = u[ubk + j] - uref[ub + j];
        c += rd[j] * d * d;
      }
      let s = 0;
      for (let j = 0; j < L; j++) s += limitPenalty(x[xb + idx[j]], lo[j], hi[j], w[j], flag[j]);
      out[oo + k] = out[oo + k] + c + s;
    }
  }

  /** `runningWithLimits` unrolled for n = 4 and one limit (the bicycle's and cart-pole's costs). */
  private running4Limit1(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    rb: number,
    ub: number,
    out: Float64Array,
    oo: number,
    lim: StateLimitTerm,
  ): void {
    const { qd, rd, ref, uref, isAngle } = this;
    const m = this.controlSize;
    const q0 = qd[0];
    const q1 = qd[1];
    const q2 = qd[2];
    const q3 = qd[3];
    const r0 = ref[rb];
    const r1 = ref[rb + 1];
    const r2 = ref[rb + 2];
    const r3 = ref[rb + 3];
    const a0 = isAngle[0] === 1;
    const a1 = isAngle[1] === 1;
    const a2 = isAngle[2] === 1;
    const a3 = isAngle[3] === 1;
    // R and ū of the first two control components (read only when m ≥ 1 resp. m = 2).
    const s0 = m > 0 ? rd[0] : 0;
    const s1 = m > 1 ? rd[1] : 0;
    const u0 = m > 0 ? uref[ub] : 0;
    const u1 = m > 1 ? uref[ub + 1] : 0;
    const li = lim.idx[0];
    const lhi = lim.hi[0];
    const llo = lim.lo[0];
    const lw = lim.w[0];
    const lf = lim.flag[0];
    for (let k = 0; k < count; k++) {
      const xb = xo + 4 * k;
      let d0 = x[xb] - r0;
      let d1 = x[xb + 1] - r1;
      let d2 = x[xb + 2] - r2;
      let d3 = x[xb + 3] - r3;
      if (a0) d0 = wrapAngle(d0);
      if (a1) d1 = wrapAngle(d1);
      if (a2) d2 = wrapAngle(d2);
      if (a3) d3 = wrapAngle(d3);
      let c = 0;
      c += q0 * d0 * d0;
      c += q1 * d1 * d1;
      c += q2 * d2 * d2;
      c += q3 * d3 * d3;
      const ubk = uo + k * m;
      if (m === 2) {
        const e0 = u[ubk] - u0;
        const e1 = u[ubk + 1] - u1;
        c += s0 * e0 * e0;
        c += s1 * e1 * e1;
      } else if (m === 1) {
        const e0 = u[ubk] - u0;
        c += s0 * e0 * e0;
      } else {
        for (let j = 0; j < m; j++) {
          const d = u[ubk + j] - uref[ub + j];
          c += rd[j] * d * d;
        }
      }
      // 0 + penalty, as in the general loop (limitPenalty returns −0 inside: 0 + (−0) = +0).
      const s = 0 + limitPenalty(x[xb + li], llo, lhi, lw, lf);
      out[oo + k] = out[oo + k] + c + s;
    }
  }

  terminal(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void {
    const n = this.stateSize;
    const row =
      this.horizon < 0 ? this.refRows - 1 : Math.min(this.start + this.horizon, this.refRows - 1);
    for (let k = 0; k < count; k++) {
      out[oo + k] += this.form(
        n,
        this.qf,
        this.qfDiag,
        x,
        xo + k * n,
        this.ref,
        row * n,
        this.dx,
        this.hasAngle,
      );
    }
  }

  /** (v − ref)ᵀ W (v − ref) for one sample. */
  private form(
    d: number,
    w: Float64Array,
    diag: boolean,
    v: Float64Array,
    vo: number,
    ref: Float64Array,
    ro: number,
    e: Float64Array,
    wrap: boolean,
  ): number {
    if (d === 0) return 0;
    for (let i = 0; i < d; i++) {
      let di = v[vo + i] - ref[ro + i];
      if (wrap && this.isAngle[i] === 1) di = wrapAngle(di);
      e[i] = di;
    }
    let s = 0;
    if (diag) {
      for (let i = 0; i < d; i++) s += w[i * d + i] * e[i] * e[i];
      return s;
    }
    for (let i = 0; i < d; i++) {
      let row = 0;
      for (let j = 0; j < d; j++) row += w[i * d + j] * e[j];
      s += e[i] * row;
    }
    return s;
  }
}
