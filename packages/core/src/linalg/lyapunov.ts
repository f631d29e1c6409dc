/**
 * The discrete Lyapunov (Stein) equation X = AᵀXA + Q, and the spectral radius test it needs.
 *
 * Used for the closed-loop cost of a fixed linear gain (LQR policy evaluation, Hewer's method, the
 * exact LQR policy gradient of Fazel, Ge, Kakade & Mesbahi 2018), which is why it lives in core.
 *
 * @module
 */
import { RecedeError, requireInteger, requirePositive } from "../errors.js";
import { type MatrixInput, type RowMajorMatrix, toRowMajor } from "../matrixInput.js";

/** Options of {@link discreteLyapunov}. */
export interface LyapunovOptions {
  /**
   * `"kronecker"`: solve the n²×n² linear system (I − Aᵀ⊗Aᵀ) vec X = vec Q by LU with partial
   * pivoting, O(n⁶), exact up to rounding; `"doubling"`: the Smith doubling iteration, O(n³) per
   * step; `"auto"`: Kronecker for n ≤ 12, doubling above.
   * @defaultValue "auto"
   */
  readonly method?: "auto" | "kronecker" | "doubling";
  /**
   * Doubling stops when the last increment's Frobenius norm is ≤ tolerance·‖X‖_F.
   * @defaultValue 1e-15
   */
  readonly tolerance?: number;
  /**
   * Maximum doubling steps (each doubles the number of summed terms, so 64 covers ρ(A) up to
   * 1 − 1e-17 in exact arithmetic).
   * @defaultValue 64
   */
  readonly maxIterations?: number;
}

/**
 * Spectral radius ρ(A) = max |λᵢ(A)| of a square matrix, by normalized repeated squaring:
 * ρ(A) = lim_k ‖A^(2^k)‖^(1/2^k) (Gelfand's formula; e.g. R. A. Horn, C. R. Johnson, "Matrix
 * Analysis", 2nd ed., 2013, Cor. 5.6.14). Each squaring is rescaled to unit Frobenius norm and the
 * logarithms of the scales are accumulated, so nothing overflows; 2^k reaches 2^62, which makes the
 * polynomial factor of a defective eigenvalue negligible. Returns 0 for a nilpotent matrix.
 *
 * @example
 * ```ts
 * spectralRadius([[0.5, 10], [0, -0.9]]); // 0.9 (to ~1e-15)
 * ```
 */
export function spectralRadius(a: MatrixInput): number {
  const m = toRowMajor("spectralRadius", "a", a);
  if (m.rows !== m.cols) {
    throw new RecedeError(
      "dimension",
      "spectralRadius",
      "a",
      "square",
      `shape ${m.rows}×${m.cols}`,
    );
  }
  return spectralRadiusFlat(m.rows, m.data);
}

/** {@link spectralRadius} on a row-major n×n Float64Array (not modified). */
export function spectralRadiusFlat(n: number, a: Float64Array): number {
  if (n === 0) return 0;
  let b = new Float64Array(n * n);
  let c = new Float64Array(n * n);
  let s = frob(n * n, a);
  if (s === 0) return 0;
  for (let i = 0; i < n * n; i++) b[i] = a[i] / s;
  let logScale = Math.log(s); // A^(2^k) = exp(logScale)·B_k, ‖B_k‖_F = 1
  let pow = 1;
  let estimate = Math.exp(logScale);
  for (let k = 0; k < 62; k++) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let acc = 0;
        for (let p = 0; p < n; p++) acc += b[i * n + p] * b[p * n + j];
        c[i * n + j] = acc;
      }
    }
    s = frob(n * n, c);
    if (s === 0) return 0;
    for (let i = 0; i < n * n; i++) c[i] /= s;
    logScale = 2 * logScale + Math.log(s);
    pow *= 2;
    const t = b;
    b = c;
    c = t;
    const next = Math.exp(logScale / pow);
    if (k >= 8 && Math.abs(next - estimate) <= 1e-16 * next) return next;
    estimate = next;
  }
  return estimate;
}

/**
 * Solve the discrete Lyapunov (Stein) equation X = AᵀXA + Q for X (n×n), A with ρ(A) < 1.
 *
 * The solution is X = Σ_{k≥0} (Aᵀ)^k Q A^k; it is unique when ρ(A) < 1, and symmetric (PSD) when Q
 * is. With A = A_cl = A − BK and Q = Q + KᵀRK, X is the value matrix of the fixed gain K: the
 * closed-loop cost from x₀ is x₀ᵀXx₀ (MATH.md §4.2). Methods: Kronecker product solve (common
 * practice) or the doubling iteration X_{j+1} = X_j + A_jᵀX_jA_j, A_{j+1} = A_j² (R. A. Smith,
 * "Matrix Equation XA + BX = C", SIAM J. Appl. Math. 16(1), 1968). A symmetric Q gives an exactly
 * symmetric X (the result is symmetrized).
 *
 * Throws a typed error (`code: "domain"`) when ρ(A) ≥ 1, naming the spectral radius found.
 *
 * @example
 * ```ts
 * const x = discreteLyapunov([[0.5]], [[3]]); // x.data[0] = 3 / (1 − 0.25) = 4
 * ```
 */
export function discreteLyapunov(
  a: MatrixInput,
  q: MatrixInput,
  options: LyapunovOptions = {},
): RowMajorMatrix {
  const fn = "discreteLyapunov";
  const am = toRowMajor(fn, "a", a);
  if (am.rows !== am.cols) {
    throw new RecedeError("dimension", fn, "a", "square", `shape ${am.rows}×${am.cols}`);
  }
  const n = am.rows;
  const qm = toRowMajor(fn, "q", q, n, n);
  const method = options.method ?? "auto";
  if (method !== "auto" && method !== "kronecker" && method !== "doubling") {
    throw new RecedeError("range", fn, "method", '"auto", "kronecker" or "doubling"', method);
  }
  const tol = requirePositive(fn, "tolerance", options.tolerance ?? 1e-15);
  const maxIt = requireInteger(fn, "maxIterations", options.maxIterations ?? 64, 1);
  const rho = spectralRadiusFlat(n, am.data);
  if (!(rho < 1)) {
    throw new RecedeError("domain", fn, "a", "a matrix with spectral radius < 1", `ρ(A) = ${rho}`);
  }
  const useKron = method === "kronecker" || (method === "auto" && n <= 12);
  const x = useKron
    ? lyapunovKronecker(n, am.data, qm.data)
    : lyapunovDoubling(n, am.data, qm.data, tol, maxIt);
  let symmetric = true;
  for (let i = 0; i < n && symmetric; i++) {
    for (let j = 0; j < i; j++) {
      if (qm.data[i * n + j] !== qm.data[j * n + i]) {
        symmetric = false;
        break;
      }
    }
  }
  if (symmetric) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < i; j++) {
        const v = 0.5 * (x[i * n + j] + x[j * n + i]);
        x[i * n + j] = v;
        x[j * n + i] = v;
      }
    }
  }
  return { data: x, rows: n, cols: n };
}

function frob(len: number, a: Float64Array): number {
  // scaled sum of squares so huge or tiny entries neither overflow nor underflow
  let scale = 0;
  for (let i = 0; i < len; i++) scale = Math.max(scale, Math.abs(a[i]));
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let s = 0;
  for (let i = 0; i < len; i++) {
    const v = a[i] / scale;
    s += v * v;
  }
  return scale * Math.sqrt(s);
}

/** (I − Aᵀ⊗Aᵀ) vec X = vec Q with row-major vec: row (i,j), column (k,l) holds δ − A_ki·A_lj. */
function lyapunovKronecker(n: number, a: Float64Array, q: Float64Array): Float64Array {
  const N = n * n;
  const M = new Float64Array(N * N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const r = i * n + j;
      for (let k = 0; k < n; k++) {
        const aki = a[k * n + i];
        for (let l = 0; l < n; l++) M[r * N + k * n + l] = -aki * a[l * n + j];
      }
      M[r * N + r] += 1;
    }
  }
  const x = new Float64Array(q);
  luSolveInPlace(N, M, x);
  return x;
}

/** Gaussian elimination with partial pivoting; M is overwritten, b ← M⁻¹ b. */
function luSolveInPlace(N: number, M: Float64Array, b: Float64Array): void {
  for (let c = 0; c < N; c++) {
    let piv = c;
    let best = Math.abs(M[c * N + c]);
    for (let r = c + 1; r < N; r++) {
      const v = Math.abs(M[r * N + c]);
      if (v > best) {
        best = v;
        piv = r;
      }
    }
    if (piv !== c) {
      for (let j = c; j < N; j++) {
        const t = M[c * N + j];
        M[c * N + j] = M[piv * N + j];
        M[piv * N + j] = t;
      }
      const t = b[c];
      b[c] = b[piv];
      b[piv] = t;
    }
    const d = M[c * N + c];
    for (let r = c + 1; r < N; r++) {
      const f = M[r * N + c] / d;
      if (f === 0) continue;
      for (let j = c + 1; j < N; j++) M[r * N + j] -= f * M[c * N + j];
      b[r] -= f * b[c];
    }
  }
  for (let r = N - 1; r >= 0; r--) {
    let s = b[r];
    for (let j = r + 1; j < N; j++) s -= M[r * N + j] * b[j];
    b[r] = s / M[r * N + r];
  }
}

function lyapunovDoubling(
  n: number,
  a: Float64Array,
  q: Float64Array,
  tol: number,
  maxIt: number,
): Float64Array {
  const x = new Float64Array(q);
  let ak = new Float64Array(a);
  let next = new Float64Array(n * n);
  const t = new Float64Array(n * n);
  const inc = new Float64Array(n * n);
  for (let it = 0; it < maxIt; it++) {
    // t = X·A_k, inc = A_kᵀ·t
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let p = 0; p < n; p++) s += x[i * n + p] * ak[p * n + j];
        t[i * n + j] = s;
      }
    }
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let p = 0; p < n; p++) s += ak[p * n + i] * t[p * n + j];
        inc[i * n + j] = s;
      }
    }
    for (let i = 0; i < n * n; i++) x[i] += inc[i];
    if (frob(n * n, inc) <= tol * frob(n * n, x)) return x;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let p = 0; p < n; p++) s += ak[i * n + p] * ak[p * n + j];
        next[i * n + j] = s;
      }
    }
    const sw = ak;
    ak = next;
    next = sw;
  }
  throw new RecedeError(
    "domain",
    "discreteLyapunov",
    "a",
    `a matrix for which doubling converges within ${maxIt} steps`,
    "no convergence (spectral radius too close to 1?)",
  );
}
