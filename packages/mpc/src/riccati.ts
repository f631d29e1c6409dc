/**
 * Riccati solvers for linear-quadratic regulation: the finite-horizon backward recursion (time-
 * varying data and a cross term allowed), the infinite-horizon discrete algebraic Riccati equation
 * (DARE), and the value matrix of a fixed gain.
 *
 * Convention (MATH.md §4.1, no factor ½): dynamics x_{k+1} = A_k x_k + B_k u_k, cost
 *   J = Σ_{k<N} (x_kᵀQ_kx_k + 2x_kᵀS_ku_k + u_kᵀR_ku_k) + x_NᵀQ_f x_N,
 * control u_k = −K_k x_k. Matrices are row-major; every solve uses a Cholesky factor of
 * R + BᵀPB and every value matrix is symmetrized after each step.
 *
 * @module
 */
import {
  discreteLyapunov,
  kernels,
  type MatrixInput,
  RecedeError,
  type RowMajorMatrix,
  requireInteger,
  requirePositive,
  spectralRadius,
  toRowMajor,
} from "@recede/core";

/** One matrix, or a sequence of N matrices (one per stage k = 0 … N−1) for time-varying data. */
export type MatrixSequence = MatrixInput | readonly MatrixInput[];

/** Data of a finite-horizon LQ problem for {@link finiteHorizonLqr}. */
export interface FiniteHorizonLqrInput {
  /** A (n×n), or A_0 … A_{N−1}. */
  readonly a: MatrixSequence;
  /** B (n×m), or B_0 … B_{N−1}. */
  readonly b: MatrixSequence;
  /** Q (n×n, symmetric), or Q_0 … Q_{N−1}. */
  readonly q: MatrixSequence;
  /** R (m×m, symmetric; R + BᵀPB must be positive definite at every stage), or R_0 … R_{N−1}. */
  readonly r: MatrixSequence;
  /**
   * Cross weight S (n×m), or S_0 … S_{N−1}.
   * @defaultValue zero
   */
  readonly s?: MatrixSequence;
  /** Terminal weight Q_f (n×n, symmetric). */
  readonly qf: MatrixInput;
  /** Horizon N ≥ 1 (number of controls). */
  readonly horizon: number;
}

/** Result of {@link finiteHorizonLqr}. */
export interface FiniteHorizonLqrSolution {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Horizon N. */
  readonly horizon: number;
  /** Gains K_0 … K_{N−1}, each m×n row-major, K_k at offset k·m·n; u_k = −K_k x_k. */
  readonly gains: Float64Array;
  /** Value matrices P_0 … P_N, each n×n row-major, P_k at offset k·n·n; P_N = Q_f. */
  readonly values: Float64Array;
  /** A copy of K_k. */
  gain(k: number): RowMajorMatrix;
  /** A copy of P_k. */
  value(k: number): RowMajorMatrix;
  /** Optimal cost J* = x₀ᵀP₀x₀ from x₀. */
  cost(x0: ArrayLike<number>): number;
  /**
   * The optimal trajectory from x₀: states x_0 … x_N ((N+1)·n) and controls u_k = −K_k x_k (N·m).
   */
  rollout(x0: ArrayLike<number>): {
    readonly states: Float64Array;
    readonly controls: Float64Array;
  };
}

/** Data of an infinite-horizon LQ problem (time-invariant). */
export interface LqrSystem {
  /** A (n×n). */
  readonly a: MatrixInput;
  /** B (n×m). */
  readonly b: MatrixInput;
  /** Q (n×n, symmetric; usually PSD, see {@link dare} for the general case). */
  readonly q: MatrixInput;
  /** R (m×m, symmetric; usually positive definite, see {@link dare}). */
  readonly r: MatrixInput;
  /**
   * Cross weight S (n×m); usually [[Q, S], [Sᵀ, R]] ⪰ 0.
   * @defaultValue zero
   */
  readonly s?: MatrixInput;
}

/** Options of {@link dare}. */
export interface DareOptions {
  /**
   * Convergence: stop when ‖P_{i+1} − P_i‖_F ≤ tolerance·‖P_{i+1}‖_F.
   * @defaultValue 1e-13
   */
  readonly tolerance?: number;
  /**
   * Maximum Riccati (value) iterations used to reach a stabilizing gain.
   * @defaultValue 10000
   */
  readonly maxIterations?: number;
  /**
   * Maximum Hewer (Newton) iterations after a stabilizing gain is found.
   * @defaultValue 50
   */
  readonly maxNewtonIterations?: number;
  /**
   * A stabilizing gain K₀ (m×n, ρ(A − BK₀) < 1) to start Hewer's iteration from, skipping the
   * Riccati iterations.
   * @defaultValue none
   */
  readonly initialGain?: MatrixInput;
}

/** Result of {@link dare}. */
export interface DareSolution {
  /** Gain K = (R + BᵀPB)⁻¹(BᵀPA + Sᵀ) (m×n); u = −Kx. */
  readonly gain: RowMajorMatrix;
  /** Stabilizing solution P (n×n, symmetric PSD). */
  readonly value: RowMajorMatrix;
  /** ρ(A − BK) < 1. */
  readonly closedLoopSpectralRadius: number;
  /**
   * Whether R + BᵀPB is positive definite at the solution (always, for Q ⪰ 0 and R ≻ 0); false
   * for a generalized DARE with indefinite weights, solved with LU instead of Cholesky.
   */
  readonly definite: boolean;
  /** Relative DARE residual ‖P − (Q + AᵀPA − (AᵀPB + S)K)‖_F / max(1, ‖P‖_F). */
  readonly residual: number;
  /** Riccati (value) iterations used. */
  readonly riccatiIterations: number;
  /** Hewer (Newton) iterations used. */
  readonly newtonIterations: number;
}

/** Opaque scratch for {@link riccatiStep}; make one with {@link riccatiWorkspace}. */
export interface RiccatiWorkspace {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
}

class Workspace implements RiccatiWorkspace {
  readonly stateSize: number;
  readonly controlSize: number;
  readonly pa: Float64Array;
  readonly pb: Float64Array;
  readonly g: Float64Array;
  readonly ht: Float64Array;
  readonly v: Float64Array;
  constructor(n: number, m: number) {
    this.stateSize = n;
    this.controlSize = m;
    this.pa = new Float64Array(n * n);
    this.pb = new Float64Array(n * m);
    this.g = new Float64Array(m * m);
    this.ht = new Float64Array(n * m);
    this.v = new Float64Array(m);
  }
}

/** Scratch buffers for n states and m controls (allocated once; reuse across steps). */
export function riccatiWorkspace(stateSize: number, controlSize: number): RiccatiWorkspace {
  const n = requireInteger("riccatiWorkspace", "stateSize", stateSize, 1);
  const m = requireInteger("riccatiWorkspace", "controlSize", controlSize, 1);
  return new Workspace(n, m);
}

/**
 * One backward Riccati step on flat row-major arrays, no allocation, no validation:
 *   K = (R + BᵀP⁺B)⁻¹(BᵀP⁺A + Sᵀ),   P = Q + AᵀP⁺A − (AᵀP⁺B + S)K,
 * then P ← ½(P + Pᵀ) (MATH.md §4.1). Reads A (n×n) at `oa`, B (n×m) at `ob`, Q at `oq`, R at `or`,
 * S (n×m) at `os` (pass `null` for none) and P⁺ at `opn`; writes K (m×n) at `ok` and P at `op`
 * (P must not alias P⁺). Returns false, with K and P partly written, when R + BᵀP⁺B is not
 * numerically positive definite.
 */
export function riccatiStep(
  w: RiccatiWorkspace,
  a: Float64Array,
  oa: number,
  b: Float64Array,
  ob: number,
  q: Float64Array,
  oq: number,
  r: Float64Array,
  or: number,
  s: Float64Array | null,
  os: number,
  pNext: Float64Array,
  opn: number,
  k: Float64Array,
  ok: number,
  p: Float64Array,
  op: number,
): boolean {
  const n = w.stateSize;
  const m = w.controlSize;
  const { pa, pb, g, ht, v } = w as Workspace;
  kernels.gemm(n, n, n, pNext, opn, a, oa, pa, 0); // P⁺A
  kernels.gemm(n, n, m, pNext, opn, b, ob, pb, 0); // P⁺B
  // G = R + BᵀP⁺B (m×m)
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let acc = r[or + i * m + j];
      for (let t = 0; t < n; t++) acc += b[ob + t * m + i] * pb[t * m + j];
      g[i * m + j] = acc;
    }
  }
  // Hᵀ = AᵀP⁺B + S (n×m)
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < m; j++) {
      let acc = s === null ? 0 : s[os + i * m + j];
      for (let t = 0; t < n; t++) acc += a[oa + t * n + i] * pb[t * m + j];
      ht[i * m + j] = acc;
    }
  }
  // symmetrize G before factoring (it is symmetric in exact arithmetic)
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < i; j++) {
      const avg = 0.5 * (g[i * m + j] + g[j * m + i]);
      g[i * m + j] = avg;
      g[j * m + i] = avg;
    }
  }
  if (!kernels.cholesky(m, g, 0, g, 0)) return false;
  // K = G⁻¹H: column i of K is G⁻¹ (row i of Hᵀ)
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < m; j++) v[j] = ht[i * m + j];
    kernels.choleskySolve(m, g, 0, v, 0);
    for (let j = 0; j < m; j++) k[ok + j * n + i] = v[j];
  }
  // P = Q + AᵀP⁺A − HᵀK
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let acc = q[oq + i * n + j];
      for (let t = 0; t < n; t++) acc += a[oa + t * n + i] * pa[t * n + j];
      for (let t = 0; t < m; t++) acc -= ht[i * m + t] * k[ok + t * n + j];
      p[op + i * n + j] = acc;
    }
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const avg = 0.5 * (p[op + i * n + j] + p[op + j * n + i]);
      p[op + i * n + j] = avg;
      p[op + j * n + i] = avg;
    }
  }
  return true;
}

function isSequence(v: unknown): v is readonly MatrixInput[] {
  if (!Array.isArray(v) || v.length === 0) return false;
  const first = v[0];
  // an array of rows has numbers (or nothing) in its first row; a sequence has matrices
  return !(Array.isArray(first) && (first.length === 0 || typeof first[0] === "number"));
}

/** Parse a constant or per-stage matrix into N stacked copies (rows×cols each). */
function parseSequence(
  fn: string,
  arg: string,
  v: MatrixSequence,
  horizon: number,
  rows: number,
  cols: number,
): Float64Array {
  const size = rows * cols;
  const out = new Float64Array(horizon * size);
  if (isSequence(v)) {
    if (v.length !== horizon) {
      throw new RecedeError("dimension", fn, arg, `a sequence of ${horizon} matrices`, v);
    }
    for (let k = 0; k < horizon; k++) {
      out.set(toRowMajor(fn, `${arg}[${k}]`, v[k], rows, cols).data, k * size);
    }
  } else {
    const one = toRowMajor(fn, arg, v, rows, cols).data;
    for (let k = 0; k < horizon; k++) out.set(one, k * size);
  }
  return out;
}

function firstShape(fn: string, arg: string, v: MatrixSequence): RowMajorMatrix {
  if (isSequence(v)) return toRowMajor(fn, `${arg}[0]`, v[0]);
  return toRowMajor(fn, arg, v);
}

function requireSymmetric(fn: string, arg: string, x: Float64Array, n: number, at: number): void {
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(x[at + i]));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      if (Math.abs(x[at + i * n + j] - x[at + j * n + i]) > 1e-12 * Math.max(1, scale)) {
        throw new RecedeError("not-spd", fn, arg, "symmetric", `entry [${i}][${j}] ≠ [${j}][${i}]`);
      }
    }
  }
}

/**
 * Finite-horizon discrete LQR by the backward Riccati recursion (MATH.md §4.1): P_N = Q_f and, for
 * k = N−1 … 0,
 *   K_k = (R_k + B_kᵀP_{k+1}B_k)⁻¹(B_kᵀP_{k+1}A_k + S_kᵀ),
 *   P_k = Q_k + A_kᵀP_{k+1}A_k − (A_kᵀP_{k+1}B_k + S_k)K_k,
 * optimal control u_k = −K_k x_k, optimal cost x₀ᵀP₀x₀. Time-varying data: give any of a, b, q, r,
 * s as a sequence of N matrices. Symbols ↔ options: A ↔ `a`, B ↔ `b`, Q ↔ `q`, R ↔ `r`, S ↔ `s`,
 * Q_f ↔ `qf`, N ↔ `horizon`. Source: B. D. O. Anderson, J. B. Moore, "Optimal Control: Linear
 * Quadratic Methods", Prentice Hall, 1990, ch. 2.
 *
 * Throws a typed error for shapes that do not match, non-symmetric weights, or a stage where
 * R_k + B_kᵀP_{k+1}B_k is not positive definite (naming the stage).
 *
 * @example
 * ```ts
 * const sol = finiteHorizonLqr({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]], q: [[1, 0], [0, 1]],
 *   r: [[0.1]], qf: [[1, 0], [0, 1]], horizon: 50 });
 * const u0 = -(sol.gains[0] * 1 + sol.gains[1] * 0); // u₀ = −K₀x₀ for x₀ = (1, 0)
 * ```
 */
export function finiteHorizonLqr(input: FiniteHorizonLqrInput): FiniteHorizonLqrSolution {
  const fn = "finiteHorizonLqr";
  if (typeof input !== "object" || input === null) {
    throw new RecedeError("type", fn, "input", "an object {a, b, q, r, qf, horizon}", input);
  }
  const N = requireInteger(fn, "horizon", input.horizon, 1);
  const a0 = firstShape(fn, "a", input.a);
  const n = a0.rows;
  const m = firstShape(fn, "b", input.b).cols;
  if (n < 1 || m < 1) throw new RecedeError("dimension", fn, "b", "at least 1×1", `${n}×${m}`);
  const A = parseSequence(fn, "a", input.a, N, n, n);
  const B = parseSequence(fn, "b", input.b, N, n, m);
  const Q = parseSequence(fn, "q", input.q, N, n, n);
  const R = parseSequence(fn, "r", input.r, N, m, m);
  const S = input.s === undefined ? null : parseSequence(fn, "s", input.s, N, n, m);
  const Qf = toRowMajor(fn, "qf", input.qf, n, n).data;
  for (let k = 0; k < N; k++) {
    requireSymmetric(fn, N > 1 ? `q[${k}]` : "q", Q, n, k * n * n);
    requireSymmetric(fn, N > 1 ? `r[${k}]` : "r", R, m, k * m * m);
  }
  requireSymmetric(fn, "qf", Qf, n, 0);

  const gains = new Float64Array(N * m * n);
  const values = new Float64Array((N + 1) * n * n);
  values.set(Qf, N * n * n);
  const w = riccatiWorkspace(n, m);
  for (let k = N - 1; k >= 0; k--) {
    const ok = riccatiStep(
      w,
      A,
      k * n * n,
      B,
      k * n * m,
      Q,
      k * n * n,
      R,
      k * m * m,
      S,
      k * n * m,
      values,
      (k + 1) * n * n,
      gains,
      k * m * n,
      values,
      k * n * n,
    );
    if (!ok) {
      throw new RecedeError(
        "not-spd",
        fn,
        `r[${k}]`,
        "such that R + BᵀPB is positive definite",
        `a stage-${k} matrix R + BᵀPB that is not`,
      );
    }
  }

  const copyBlock = (src: Float64Array, k: number, rows: number, cols: number): RowMajorMatrix => ({
    data: src.slice(k * rows * cols, (k + 1) * rows * cols),
    rows,
    cols,
  });
  const readX0 = (x0: ArrayLike<number>, who: string): Float64Array => {
    if (x0 === null || typeof x0 !== "object" || x0.length !== n) {
      throw new RecedeError("dimension", who, "x0", `a vector of length ${n}`, x0);
    }
    const x = Float64Array.from(x0);
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(x[i]))
        throw new RecedeError("non-finite", who, `x0[${i}]`, "finite", x[i]);
    }
    return x;
  };
  return {
    stateSize: n,
    controlSize: m,
    horizon: N,
    gains,
    values,
    gain(k: number): RowMajorMatrix {
      requireInteger("FiniteHorizonLqrSolution.gain", "k", k, 0);
      if (k >= N) throw new RecedeError("range", "FiniteHorizonLqrSolution.gain", "k", `< ${N}`, k);
      return copyBlock(gains, k, m, n);
    },
    value(k: number): RowMajorMatrix {
      requireInteger("FiniteHorizonLqrSolution.value", "k", k, 0);
      if (k > N) throw new RecedeError("range", "FiniteHorizonLqrSolution.value", "k", `≤ ${N}`, k);
      return copyBlock(values, k, n, n);
    },
    cost(x0: ArrayLike<number>): number {
      const x = readX0(x0, "FiniteHorizonLqrSolution.cost");
      let c = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) c += x[i] * values[i * n + j] * x[j];
      }
      return c;
    },
    rollout(x0: ArrayLike<number>) {
      const x = readX0(x0, "FiniteHorizonLqrSolution.rollout");
      const states = new Float64Array((N + 1) * n);
      const controls = new Float64Array(N * m);
      states.set(x, 0);
      for (let k = 0; k < N; k++) {
        const xo = k * n;
        for (let j = 0; j < m; j++) {
          let u = 0;
          for (let i = 0; i < n; i++) u -= gains[k * m * n + j * n + i] * states[xo + i];
          controls[k * m + j] = u;
        }
        for (let i = 0; i < n; i++) {
          let acc = 0;
          for (let t = 0; t < n; t++) acc += A[k * n * n + i * n + t] * states[xo + t];
          for (let t = 0; t < m; t++) acc += B[k * n * m + i * m + t] * controls[k * m + t];
          states[xo + n + i] = acc;
        }
      }
      return { states, controls };
    },
  };
}

interface ParsedSystem {
  n: number;
  m: number;
  a: Float64Array;
  b: Float64Array;
  q: Float64Array;
  r: Float64Array;
  s: Float64Array | null;
}

function parseSystem(fn: string, sys: LqrSystem): ParsedSystem {
  if (typeof sys !== "object" || sys === null) {
    throw new RecedeError("type", fn, "system", "an object {a, b, q, r}", sys);
  }
  const a = toRowMajor(fn, "a", sys.a);
  if (a.rows !== a.cols || a.rows < 1) {
    throw new RecedeError("dimension", fn, "a", "square", `shape ${a.rows}×${a.cols}`);
  }
  const n = a.rows;
  const b = toRowMajor(fn, "b", sys.b, n);
  const m = b.cols;
  if (m < 1) throw new RecedeError("dimension", fn, "b", "at least one column", "0 columns");
  const q = toRowMajor(fn, "q", sys.q, n, n).data;
  const r = toRowMajor(fn, "r", sys.r, m, m).data;
  const s = sys.s === undefined ? null : toRowMajor(fn, "s", sys.s, n, m).data;
  requireSymmetric(fn, "q", q, n, 0);
  requireSymmetric(fn, "r", r, m, 0);
  return { n, m, a: a.data, b: b.data, q, r, s };
}

function frob(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * x[i];
  return Math.sqrt(s);
}

/** A − BK (n×n). */
function closedLoop(sys: ParsedSystem, k: Float64Array): Float64Array {
  const { n, m, a, b } = sys;
  const out = new Float64Array(a);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let acc = 0;
      for (let t = 0; t < m; t++) acc += b[i * m + t] * k[t * n + j];
      out[i * n + j] -= acc;
    }
  }
  return out;
}

/** Q + KᵀRK − SK − KᵀSᵀ (n×n): the per-step cost of u = −Kx. */
function closedLoopWeight(sys: ParsedSystem, k: Float64Array): Float64Array {
  const { n, m, q, r, s } = sys;
  const out = new Float64Array(q);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let acc = 0;
      for (let p = 0; p < m; p++) {
        for (let t = 0; t < m; t++) acc += k[p * n + i] * r[p * m + t] * k[t * n + j];
      }
      if (s !== null) {
        for (let p = 0; p < m; p++)
          acc -= s[i * m + p] * k[p * n + j] + k[p * n + i] * s[j * m + p];
      }
      out[i * n + j] += acc;
    }
  }
  return out;
}

/**
 * Value matrix P_K of a fixed linear gain K (u = −Kx) on an infinite horizon:
 *   P_K = (A − BK)ᵀP_K(A − BK) + Q + KᵀRK − SK − KᵀSᵀ,
 * so the closed-loop cost Σ_k (x_kᵀQx_k + 2x_kᵀSu_k + u_kᵀRu_k) from x₀ is x₀ᵀP_Kx₀ (MATH.md §4.2;
 * G. A. Hewer, "An Iterative Technique for the Computation of the Steady State Gains for the
 * Discrete Optimal Regulator", IEEE TAC 16(4), 1971). Solved with core's `discreteLyapunov`.
 *
 * Throws a typed error (`code: "domain"`) when K is not stabilizing (ρ(A − BK) ≥ 1), since the cost
 * is then infinite for some x₀.
 */
export function closedLoopValue(system: LqrSystem, gain: MatrixInput): RowMajorMatrix {
  const fn = "closedLoopValue";
  const sys = parseSystem(fn, system);
  const k = toRowMajor(fn, "gain", gain, sys.m, sys.n).data;
  const acl = closedLoop(sys, k);
  const rho = spectralRadius({ data: acl, rows: sys.n, cols: sys.n });
  if (!(rho < 1)) {
    throw new RecedeError(
      "domain",
      fn,
      "gain",
      "stabilizing (ρ(A − BK) < 1)",
      `ρ(A − BK) = ${rho}`,
    );
  }
  return discreteLyapunov(
    { data: acl, rows: sys.n, cols: sys.n },
    { data: closedLoopWeight(sys, k), rows: sys.n, cols: sys.n },
  );
}

/**
 * K = (R + BᵀPB)⁻¹(BᵀPA + Sᵀ) and the DARE right-hand side Q + AᵀPA − (AᵀPB + S)K, via one
 * Riccati step from P. When R + BᵀPB is not positive definite (possible for the generalized DARE
 * with indefinite weights) the step falls back to an LU solve with partial pivoting; returns
 * "definite", "indefinite", or "singular".
 */
function gainFromValue(
  sys: ParsedSystem,
  w: RiccatiWorkspace,
  p: Float64Array,
  k: Float64Array,
  rhs: Float64Array,
): "definite" | "indefinite" | "singular" {
  if (riccatiStep(w, sys.a, 0, sys.b, 0, sys.q, 0, sys.r, 0, sys.s, 0, p, 0, k, 0, rhs, 0)) {
    return "definite";
  }
  const { n, m, a, b, q, r, s } = sys;
  const pb = new Float64Array(n * m);
  kernels.gemm(n, n, m, p, 0, b, 0, pb, 0);
  const pa = new Float64Array(n * n);
  kernels.gemm(n, n, n, p, 0, a, 0, pa, 0);
  const g = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      let acc = r[i * m + j];
      for (let t = 0; t < n; t++) acc += b[t * m + i] * pb[t * m + j];
      g[i * m + j] = acc;
    }
  }
  // H = BᵀPA + Sᵀ (m×n), solved in place to K = G⁻¹H
  const h = new Float64Array(m * n);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      let acc = s === null ? 0 : s[j * m + i];
      for (let t = 0; t < n; t++) acc += b[t * m + i] * pa[t * n + j];
      h[i * n + j] = acc;
    }
  }
  const hCopy = new Float64Array(h);
  if (!luSolveColumns(m, g, n, h)) return "singular";
  k.set(h);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let acc = q[i * n + j];
      for (let t = 0; t < n; t++) acc += a[t * n + i] * pa[t * n + j];
      for (let t = 0; t < m; t++) acc -= hCopy[t * n + i] * h[t * n + j];
      rhs[i * n + j] = acc;
    }
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const avg = 0.5 * (rhs[i * n + j] + rhs[j * n + i]);
      rhs[i * n + j] = avg;
      rhs[j * n + i] = avg;
    }
  }
  return "indefinite";
}

/** Solve G X = H in place (G m×m overwritten, H m×c) by LU with partial pivoting. */
function luSolveColumns(m: number, g: Float64Array, c: number, h: Float64Array): boolean {
  let scale = 0;
  for (let i = 0; i < m * m; i++) scale = Math.max(scale, Math.abs(g[i]));
  for (let col = 0; col < m; col++) {
    let piv = col;
    for (let r = col + 1; r < m; r++) {
      if (Math.abs(g[r * m + col]) > Math.abs(g[piv * m + col])) piv = r;
    }
    if (!(Math.abs(g[piv * m + col]) > 1e-14 * scale)) return false;
    if (piv !== col) {
      for (let j = 0; j < m; j++) {
        const t = g[col * m + j];
        g[col * m + j] = g[piv * m + j];
        g[piv * m + j] = t;
      }
      for (let j = 0; j < c; j++) {
        const t = h[col * c + j];
        h[col * c + j] = h[piv * c + j];
        h[piv * c + j] = t;
      }
    }
    for (let r = col + 1; r < m; r++) {
      const f = g[r * m + col] / g[col * m + col];
      for (let j = col; j < m; j++) g[r * m + j] -= f * g[col * m + j];
      for (let j = 0; j < c; j++) h[r * c + j] -= f * h[col * c + j];
    }
  }
  for (let r = m - 1; r >= 0; r--) {
    for (let j = 0; j < c; j++) {
      let acc = h[r * c + j];
      for (let t = r + 1; t < m; t++) acc -= g[r * m + t] * h[t * c + j];
      h[r * c + j] = acc / g[r * m + r];
    }
  }
  return true;
}

/**
 * Stabilizing solution of the discrete algebraic Riccati equation (MATH.md §4.2)
 *   P = Q + AᵀPA − (AᵀPB + S)(R + BᵀPB)⁻¹(BᵀPA + Sᵀ),   K = (R + BᵀPB)⁻¹(BᵀPA + Sᵀ).
 *
 * Method: Riccati value iteration P ← Q + AᵀPA − (AᵀPB + S)K from P = Q + δI until the gain is
 * stabilizing (ρ(A − BK) < 1, checked by `spectralRadius`), then Hewer's iteration (Newton's method
 * on the DARE; G. A. Hewer, IEEE TAC 16(4), 1971): P_i solves the Lyapunov equation of the current
 * gain ({@link closedLoopValue}), K_{i+1} = (R + BᵀP_iB)⁻¹(BᵀP_iA + Sᵀ), until ‖ΔP‖_F ≤
 * tolerance·‖P‖_F (quadratic convergence). The stabilizing solution exists when (A, B) is
 * stabilizable and (A − BR⁻¹Sᵀ, (Q − SR⁻¹Sᵀ)^½) is detectable (B. D. O. Anderson, J. B. Moore,
 * "Optimal Control: Linear Quadratic Methods", 1990). Like scipy's `solve_discrete_are`, Q and R
 * need only be symmetric (the generalized DARE): what is checked is that R + BᵀPB stays
 * invertible along the iteration (Cholesky solves when it is positive definite, LU with partial
 * pivoting otherwise) and that the result is stabilizing with a small residual.
 *
 * Throws a typed error (`code: "domain"`) naming `(A, B)` when no stabilizing gain is reached
 * (value iteration diverges, or converges to a non-stabilizing gain: (A, B) not stabilizable or the
 * cost not detectable), or when the final residual exceeds 1e-8.
 *
 * @example
 * ```ts
 * const { gain, value } = dare({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]],
 *   q: [[1, 0], [0, 1]], r: [[0.1]] });
 * ```
 */
export function dare(system: LqrSystem, options: DareOptions = {}): DareSolution {
  const fn = "dare";
  const sys = parseSystem(fn, system);
  const { n, m } = sys;
  const tol = requirePositive(fn, "tolerance", options.tolerance ?? 1e-13);
  const maxIt = requireInteger(fn, "maxIterations", options.maxIterations ?? 10000, 0);
  const maxNewton = requireInteger(fn, "maxNewtonIterations", options.maxNewtonIterations ?? 50, 0);
  const w = riccatiWorkspace(n, m);
  // Start the value iteration from P₀ = Q + δI, δ = max(1, max|Q_ij|): a positive definite start
  // reaches the stabilizing solution even when Q alone does not see an unstable mode.
  let p = new Float64Array(sys.q);
  let qScale = 1;
  for (let i = 0; i < n * n; i++) qScale = Math.max(qScale, Math.abs(sys.q[i]));
  for (let i = 0; i < n; i++) p[i * n + i] += qScale;
  let next = new Float64Array(n * n);
  const k = new Float64Array(m * n);
  let riccatiIterations = 0;
  let stabilizing = false;
  const rhoOf = (gain: Float64Array): number =>
    spectralRadius({ data: closedLoop(sys, gain), rows: n, cols: n });
  const notStabilizable = (why: string): RecedeError =>
    new RecedeError(
      "domain",
      fn,
      "(A, B)",
      "stabilizable, with the cost detectable (so that a stabilizing DARE solution exists)",
      why,
    );

  if (options.initialGain !== undefined) {
    k.set(toRowMajor(fn, "initialGain", options.initialGain, m, n).data);
    const rho = rhoOf(k);
    if (!(rho < 1)) {
      throw new RecedeError(
        "domain",
        fn,
        "initialGain",
        "stabilizing (ρ(A − BK₀) < 1)",
        `ρ(A − BK₀) = ${rho}`,
      );
    }
    stabilizing = true;
  } else {
    // Value iteration until the gain stabilizes (or P converges).
    for (let it = 0; it < maxIt; it++) {
      if (gainFromValue(sys, w, p, k, next) === "singular") {
        throw notStabilizable(`R + BᵀPB became singular at Riccati iteration ${it}`);
      }
      riccatiIterations++;
      let diff = 0;
      let size = 0;
      let finite = true;
      for (let i = 0; i < n * n; i++) {
        if (!Number.isFinite(next[i])) finite = false;
        const d = next[i] - p[i];
        diff += d * d;
        size += next[i] * next[i];
      }
      if (!finite) throw notStabilizable(`P diverged after ${it + 1} Riccati iterations`);
      const t = p;
      p = next;
      next = t;
      const converged = Math.sqrt(diff) <= tol * Math.sqrt(size);
      // test the gain often at first, then at growing intervals (the test costs ~60 n³ flops)
      const check = it < 8 || (it & (it - 1)) === 0 || it % 64 === 0;
      if (converged || check) {
        // the gain of the *current* P
        gainFromValue(sys, w, p, k, next);
        const rho = rhoOf(k);
        if (rho < 1) {
          stabilizing = true;
          break;
        }
        if (converged) {
          throw notStabilizable(
            `Riccati iteration converged to a non-stabilizing gain (ρ(A − BK) = ${rho})`,
          );
        }
      }
    }
    if (!stabilizing) {
      throw notStabilizable(`no stabilizing gain after ${maxIt} Riccati iterations`);
    }
  }

  // Hewer / Newton–Kleinman polish from the stabilizing gain k.
  let newtonIterations = 0;
  let havePolished = false;
  let lastDiff = Number.POSITIVE_INFINITY;
  for (let it = 0; it < maxNewton; it++) {
    const acl = closedLoop(sys, k);
    let pk: Float64Array;
    try {
      pk = discreteLyapunov(
        { data: acl, rows: n, cols: n },
        { data: closedLoopWeight(sys, k), rows: n, cols: n },
      ).data;
    } catch (e) {
      if (havePolished) break; // rounding pushed a near-marginal gain over the edge: keep the last P
      throw notStabilizable(
        `the Lyapunov solve of a stabilizing gain failed (${e instanceof Error ? e.message : e})`,
      );
    }
    newtonIterations++;
    let diff = 0;
    for (let i = 0; i < n * n; i++) diff += (pk[i] - p[i]) * (pk[i] - p[i]);
    p = new Float64Array(pk);
    havePolished = true;
    if (gainFromValue(sys, w, p, k, next) === "singular") {
      throw notStabilizable(`R + BᵀPB became singular at Newton iteration ${it}`);
    }
    const step = Math.sqrt(diff);
    if (step <= tol * frob(p)) break;
    // quadratic convergence ends at the rounding level: stop once the steps stop shrinking
    if (it >= 2 && step >= lastDiff) break;
    lastDiff = step;
  }
  const kind = gainFromValue(sys, w, p, k, next);
  if (kind === "singular") throw notStabilizable("R + BᵀPB is singular at the solution");
  let res = 0;
  for (let i = 0; i < n * n; i++) res += (p[i] - next[i]) * (p[i] - next[i]);
  const residual = Math.sqrt(res) / Math.max(1, frob(p));
  const rho = rhoOf(k);
  if (!(rho < 1) || !(residual <= 1e-8)) {
    throw notStabilizable(`no converged stabilizing solution (residual ${residual}, ρ = ${rho})`);
  }
  return {
    gain: { data: new Float64Array(k), rows: m, cols: n },
    value: { data: new Float64Array(p), rows: n, cols: n },
    closedLoopSpectralRadius: rho,
    residual,
    definite: kind === "definite",
    riccatiIterations,
    newtonIterations,
  };
}
