/**
 * LQR controller from the Riccati solvers: the infinite-horizon DARE gain, or the receding
 * finite-horizon gain.
 *
 * @module
 */
import {
  type ControlBounds,
  type MatrixInput,
  RecedeError,
  type RowMajorMatrix,
  requireInteger,
} from "@recede/core";
import type { ControlPolicy } from "../closedLoop.js";
import type { ControlStep, StepReport } from "../controller.js";
import { requireObject } from "../internal/input.js";
import { dare, finiteHorizonLqr } from "../riccati.js";

/** Options of {@link lqr}. */
export interface LqrOptions {
  /** A (n×n). */
  readonly a: MatrixInput;
  /** B (n×m). */
  readonly b: MatrixInput;
  /** Q (n×n). */
  readonly q: MatrixInput;
  /** R (m×m). */
  readonly r: MatrixInput;
  /** Cross weight S (n×m). @defaultValue zero */
  readonly s?: MatrixInput;
  /**
   * Horizon N: when given, the receding finite-horizon law u = −K_0 x with K_0 from the Riccati
   * recursion over N steps from P_N = Q_f; when omitted, the DARE gain.
   * @defaultValue undefined (infinite horizon)
   */
  readonly horizon?: number;
  /** Terminal weight Q_f for the finite horizon. @defaultValue Q */
  readonly qf?: MatrixInput;
  /** Operating state x̄ (regulate x − x̄). @defaultValue 0 */
  readonly state?: Float64Array;
  /** Operating control ū (u = ū − K(x − x̄)). @defaultValue 0 */
  readonly control?: Float64Array;
  /** Saturate the output to these bounds (not optimal when active). @defaultValue none */
  readonly bounds?: ControlBounds;
}

/** An LQR controller: a fixed linear feedback. */
export interface LqrController extends ControlPolicy {
  /** The gain K applied (m×n). */
  readonly gain: RowMajorMatrix;
  /** The value matrix P (n×n): DARE solution, or P_0 of the finite recursion. */
  readonly value: RowMajorMatrix;
  /** Control steps taken. */
  readonly round: number;
}

/**
 * Linear-quadratic regulator as a controller: u = ū − K(x − x̄), with K the DARE gain
 * (infinite horizon) or the first gain K_0 of the finite-horizon Riccati recursion (receding
 * horizon), from the solvers `dare` and `finiteHorizonLqr` (MATH.md §4.1–4.2):
 *   K = (R + BᵀPB)⁻¹(BᵀPA + Sᵀ),  P = Q + AᵀPA − (AᵀPB + S)K.
 * The report's `loss` (and `costMin`, `costMean`) is the predicted optimal cost-to-go
 * (x − x̄)ᵀP(x − x̄). No allocation per step.
 *
 * Source: B. D. O. Anderson, J. B. Moore, "Optimal Control: Linear Quadratic Methods", Prentice
 * Hall, 1990; G. A. Hewer, "An Iterative Technique for the Computation of the Steady State Gains
 * for the Discrete Optimal Regulator", IEEE TAC, 1971.
 */
export function lqr(options: LqrOptions): LqrController {
  const fn = "lqr";
  requireObject(fn, "options", options);
  let gain: RowMajorMatrix;
  let value: RowMajorMatrix;
  if (options.horizon === undefined) {
    const sol = dare({ a: options.a, b: options.b, q: options.q, r: options.r, s: options.s });
    gain = sol.gain;
    value = sol.value;
  } else {
    const horizon = requireInteger(fn, "horizon", options.horizon, 1);
    const sol = finiteHorizonLqr({
      a: options.a,
      b: options.b,
      q: options.q,
      r: options.r,
      s: options.s,
      qf: options.qf ?? options.q,
      horizon,
    });
    gain = sol.gain(0);
    value = sol.value(0);
  }
  const m = gain.rows;
  const n = gain.cols;
  const xbar = vec(fn, "state", options.state, n);
  const ubar = vec(fn, "control", options.control, m);
  let lower: Float64Array | null = null;
  let upper: Float64Array | null = null;
  if (options.bounds !== undefined) {
    const b = options.bounds;
    if (!(b.lower instanceof Float64Array) || b.lower.length !== m) {
      throw new RecedeError(
        "dimension",
        fn,
        "bounds.lower",
        `a Float64Array of length ${m}`,
        b.lower,
      );
    }
    if (!(b.upper instanceof Float64Array) || b.upper.length !== m) {
      throw new RecedeError(
        "dimension",
        fn,
        "bounds.upper",
        `a Float64Array of length ${m}`,
        b.upper,
      );
    }
    lower = new Float64Array(b.lower);
    upper = new Float64Array(b.upper);
  }
  return new Lqr(n, m, gain, value, xbar, ubar, lower, upper);
}

function vec(fn: string, arg: string, v: Float64Array | undefined, len: number): Float64Array {
  if (v === undefined) return new Float64Array(len);
  if (!(v instanceof Float64Array) || v.length !== len) {
    throw new RecedeError("dimension", fn, arg, `a Float64Array of length ${len}`, v);
  }
  for (let i = 0; i < len; i++) {
    if (!Number.isFinite(v[i]))
      throw new RecedeError("non-finite", fn, `${arg}[${i}]`, "finite", v[i]);
  }
  return new Float64Array(v);
}

class Lqr implements LqrController {
  readonly name = "lqr";
  private rounds = 0;
  private readonly dx: Float64Array;
  private readonly u: Float64Array;
  private readonly rep: { -readonly [K in keyof StepReport]: StepReport[K] };
  private readonly result: ControlStep;

  constructor(
    readonly stateSize: number,
    readonly controlSize: number,
    readonly gain: RowMajorMatrix,
    readonly value: RowMajorMatrix,
    private readonly xbar: Float64Array,
    private readonly ubar: Float64Array,
    private readonly lower: Float64Array | null,
    private readonly upper: Float64Array | null,
  ) {
    this.dx = new Float64Array(stateSize);
    this.u = new Float64Array(controlSize);
    this.rep = {
      round: 0,
      costMin: 0,
      costMean: 0,
      loss: 0,
      effectiveSampleSize: 1,
      weightEntropy: 0,
      iterations: 1,
      failedSamples: 0,
      skippedIterations: 0,
      updated: true,
      stepSize: 1,
      wallTimeMs: 0,
    };
    this.result = { control: this.u, report: this.rep };
  }

  get round(): number {
    return this.rounds;
  }

  act(state: Float64Array): ControlStep {
    const t0 = performance.now();
    const n = this.stateSize;
    const m = this.controlSize;
    if (!(state instanceof Float64Array) || state.length !== n) {
      throw new RecedeError(
        "dimension",
        "lqr.act",
        "state",
        `a Float64Array of length ${n}`,
        state,
      );
    }
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(state[i]))
        throw new RecedeError("non-finite", "lqr.act", `state[${i}]`, "finite", state[i]);
    }
    const dx = this.dx;
    for (let i = 0; i < n; i++) dx[i] = state[i] - this.xbar[i];
    const k = this.gain.data;
    const p = this.value.data;
    for (let j = 0; j < m; j++) {
      let v = this.ubar[j];
      for (let i = 0; i < n; i++) v -= k[j * n + i] * dx[i];
      if (this.lower !== null && this.upper !== null) {
        if (v < this.lower[j]) v = this.lower[j];
        else if (v > this.upper[j]) v = this.upper[j];
      }
      this.u[j] = v;
    }
    let c = 0;
    for (let i = 0; i < n; i++) {
      let r = 0;
      for (let l = 0; l < n; l++) r += p[i * n + l] * dx[l];
      c += dx[i] * r;
    }
    this.rounds++;
    const rep = this.rep;
    rep.round = this.rounds;
    rep.costMin = c;
    rep.costMean = c;
    rep.loss = c;
    rep.wallTimeMs = performance.now() - t0;
    return this.result;
  }

  reset(): void {
    this.rounds = 0;
  }
}
