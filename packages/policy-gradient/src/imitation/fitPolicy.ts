/**
 * Supervised refit of a policy to an imitation data set: the per-round "follow the leader" step of
 * behaviour cloning and DAgger.
 *
 * @module
 */
import { kernels, RecedeError, requireInteger, requirePositive, requireVector } from "@recede/core";
import { requireNonNegative } from "../internal/validate.js";
import { LinearGaussianPolicy } from "../policies/linearGaussian.js";
import { MlpGaussianPolicy } from "../policies/mlpGaussian.js";
import type { StochasticPolicy } from "../policies/policy.js";
import { ImitationDataset } from "./dataset.js";

/** Options of {@link fitPolicy}. */
export interface FitPolicyOptions {
  /**
   * Ridge ζ of the linear least-squares fit, (ZᵀZ/N + ζI) w = ZᵀA/N.
   * @defaultValue 1e-8
   */
  readonly ridge?: number;
  /**
   * Full-batch gradient steps (Adam) for families without a closed-form fit.
   * @defaultValue 300
   */
  readonly iterations?: number;
  /**
   * Adam step size.
   * @defaultValue 0.01
   */
  readonly learningRate?: number;
}

/** What {@link fitPolicy} did. */
export interface FitPolicyReport {
  /** `"least-squares"` (linear-Gaussian) or `"adam"` (gradient steps). */
  readonly method: "least-squares" | "adam";
  /** The imitation loss after the fit (see {@link imitationLoss}). */
  readonly loss: number;
  /** Gradient steps taken (0 for least squares). */
  readonly iterations: number;
}

/**
 * The imitation loss of θ on a data set: the mean squared action error (1/N) Σ ‖μ_θ(s_i) − a*_i‖²
 * for Gaussian families (the convex per-round loss of DAgger for continuous controls, MATH.md
 * §6), the mean negative log-likelihood −(1/N) Σ ln π_θ(a*_i | s_i) for categorical ones.
 */
export function imitationLoss(
  policy: StochasticPolicy,
  theta: Float64Array,
  data: ImitationDataset,
): number {
  const N = data.size;
  if (N === 0) return 0;
  const n = policy.stateSize;
  const w = data.labelSize;
  let s = 0;
  if (policy.kind === "categorical") {
    for (let i = 0; i < N; i++) s -= policy.logProb(theta, data.states, i * n, data.labels, i * w);
    return s / N;
  }
  const mu = new Float64Array(policy.actionSize);
  for (let i = 0; i < N; i++) {
    policy.mean(theta, data.states, i * n, mu, 0);
    for (let j = 0; j < w; j++) {
      const e = mu[j] - data.labels[i * w + j];
      s += e * e;
    }
  }
  return s / N;
}

function fitLinear(
  policy: LinearGaussianPolicy,
  theta: Float64Array,
  data: ImitationDataset,
  ridge: number,
): boolean {
  const n = policy.stateSize;
  const m = policy.actionSize;
  const p = n + (policy.hasBias ? 1 : 0);
  const N = data.size;
  const G = new Float64Array(p * p);
  const rhs = new Float64Array(p * m);
  const z = new Float64Array(p);
  for (let i = 0; i < N; i++) {
    for (let k = 0; k < n; k++) z[k] = -data.states[i * n + k];
    if (policy.hasBias) z[n] = 1;
    for (let q = 0; q < p; q++) {
      for (let r = 0; r <= q; r++) G[q * p + r] += z[q] * z[r];
      for (let j = 0; j < m; j++) rhs[q * m + j] += z[q] * data.labels[i * m + j];
    }
  }
  for (let q = 0; q < p; q++) {
    for (let r = 0; r <= q; r++) {
      G[q * p + r] /= N;
      G[r * p + q] = G[q * p + r];
    }
    for (let j = 0; j < m; j++) rhs[q * m + j] /= N;
  }
  for (let q = 0; q < p; q++) G[q * p + q] += ridge;
  if (!kernels.cholesky(p, G, 0, G, 0)) return false;
  const col = new Float64Array(p);
  for (let j = 0; j < m; j++) {
    for (let q = 0; q < p; q++) col[q] = rhs[q * m + j];
    kernels.choleskySolve(p, G, 0, col, 0);
    for (let k = 0; k < n; k++) theta[j * n + k] = col[k];
    if (policy.hasBias) theta[m * n + j] = col[n];
  }
  return true;
}

/** Full-batch Adam on the imitation loss; returns the iterations run. */
function fitAdam(
  policy: StochasticPolicy,
  theta: Float64Array,
  data: ImitationDataset,
  iterations: number,
  lr: number,
): void {
  const d = policy.parameterCount;
  const n = policy.stateSize;
  const w = data.labelSize;
  const N = data.size;
  const g = new Float64Array(d);
  const m1 = new Float64Array(d);
  const m2 = new Float64Array(d);
  const mlp = policy instanceof MlpGaussianPolicy ? policy : null;
  // Parameters the loss does not touch (the log-std of a squared-error fit) keep their values.
  const frozenFrom = mlp !== null ? mlp.logStdOffset : d;
  const b1 = 0.9;
  const b2 = 0.999;
  const eps = 1e-8;
  for (let it = 1; it <= iterations; it++) {
    g.fill(0);
    for (let i = 0; i < N; i++) {
      if (mlp !== null) {
        mlp.addSquaredErrorGradient(theta, data.states, i * n, data.labels, i * w, 1 / N, g);
      } else {
        policy.addGradLogProb(theta, data.states, i * n, data.labels, i * w, -1 / N, g);
      }
    }
    const c1 = 1 - b1 ** it;
    const c2 = 1 - b2 ** it;
    for (let q = 0; q < frozenFrom; q++) {
      m1[q] = b1 * m1[q] + (1 - b1) * g[q];
      m2[q] = b2 * m2[q] + (1 - b2) * g[q] * g[q];
      theta[q] -= (lr * (m1[q] / c1)) / (Math.sqrt(m2[q] / c2) + eps);
    }
  }
}

/**
 * Refit θ to the data set by minimizing the imitation loss (see {@link imitationLoss}):
 * - linear-Gaussian policies: the squared action error is a linear least-squares problem in (K, b),
 *   solved exactly by ridge normal equations and Cholesky (log-std unchanged);
 * - tanh-MLP Gaussian policies: full-batch Adam on ½·(1/N)Σ‖μ_θ(s_i) − a*_i‖², warm-started from θ
 *   (log-std unchanged);
 * - other families (softmax, user families): full-batch Adam on the negative log-likelihood.
 * Adam: D. P. Kingma, J. Ba, "Adam: A Method for Stochastic Optimization", ICLR, 2015.
 * θ is updated in place only when the fit succeeds with finite values; otherwise a typed error is
 * thrown and θ is untouched.
 *
 * @example
 * ```ts
 * const report = fitPolicy(pi, theta, dataset, { ridge: 1e-6 });
 * ```
 */
export function fitPolicy(
  policy: StochasticPolicy,
  theta: Float64Array,
  data: ImitationDataset,
  options: FitPolicyOptions = {},
): FitPolicyReport {
  const fn = "fitPolicy";
  requireVector(fn, "theta", theta, policy.parameterCount);
  if (!(data instanceof ImitationDataset))
    throw new RecedeError("type", fn, "data", "an ImitationDataset", data);
  if (data.stateSize !== policy.stateSize || data.labelSize !== policy.actionSize) {
    throw new RecedeError(
      "dimension",
      fn,
      "data",
      `states of size ${policy.stateSize} and labels of size ${policy.actionSize}`,
      `states ${data.stateSize}, labels ${data.labelSize}`,
    );
  }
  if (data.size === 0) throw new RecedeError("range", fn, "data.size", ">= 1", 0);
  const ridge = requireNonNegative(fn, "ridge", options.ridge ?? 1e-8);
  const iterations = requireInteger(fn, "iterations", options.iterations ?? 300, 1);
  const lr = requirePositive(fn, "learningRate", options.learningRate ?? 0.01);
  const work = theta.slice();
  let method: "least-squares" | "adam";
  let its = 0;
  if (policy instanceof LinearGaussianPolicy) {
    method = "least-squares";
    if (!fitLinear(policy, work, data, ridge)) {
      throw new RecedeError(
        "not-spd",
        fn,
        "ridge",
        "large enough for the normal equations to be positive definite",
        ridge,
      );
    }
  } else {
    method = "adam";
    fitAdam(policy, work, data, iterations, lr);
    its = iterations;
  }
  for (let i = 0; i < work.length; i++) {
    if (!Number.isFinite(work[i])) {
      throw new RecedeError(
        "non-finite",
        fn,
        "data",
        "a data set that gives a finite fit",
        `θ[${i}] = ${work[i]}`,
      );
    }
  }
  theta.set(work);
  return { method, loss: imitationLoss(policy, theta, data), iterations: its };
}
