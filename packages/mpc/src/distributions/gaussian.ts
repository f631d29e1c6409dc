/**
 * Gaussian plan: independent per-step Gaussians with diagonal covariance, optionally
 * time-correlated noise, with the KL mirror step in expectation parameters.
 *
 * @module
 */
import { gaussianDiagonalStep, RecedeError, requireInRange, type Stream } from "@recede/core";
import { broadcast, requireObject } from "../internal/input.js";
import { float64Buffer } from "../internal/shared.js";
import type { PlanBlock, PlanConfig, PlanDistribution, PlanFamily } from "./types.js";

/** Options of {@link gaussianPlan}. */
export interface GaussianPlanOptions {
  /**
   * Initial mean μ₀ (also the "nominal" tail fill of the dynamic step): a number, one control
   * (length m) repeated over the horizon, or a whole sequence (length H·m). Must lie within the
   * control bounds.
   * @defaultValue 0
   */
  readonly mean?: number | Float64Array | readonly number[];
  /**
   * Initial standard deviation σ₀ > 0 per control component: a number, length m, or length H·m.
   * @defaultValue 1
   */
  readonly std?: number | Float64Array | readonly number[];
  /**
   * Refit the variance by the mirror step (true, as in CEM) or keep it fixed (false, as in MPPI).
   * @defaultValue false
   */
  readonly adaptVariance?: boolean;
  /**
   * Floor σ_min ≥ 0 on the adapted standard deviation: σ² ← max(σ², σ_min²) after each update
   * (an engineering choice against collapse, MATH.md §3.4; not from a published source).
   * @defaultValue 0
   */
  readonly minStd?: number;
  /**
   * Correlation a ∈ [0, 1) of the noise between consecutive steps (first-order autoregressive
   * noise, see {@link gaussianPlan}); 0 gives white noise.
   * @defaultValue 0
   */
  readonly correlation?: number;
  /**
   * Keep sample 0 at the unperturbed mean (noise is still drawn for it, so switching this on does
   * not change the other samples).
   * @defaultValue false
   */
  readonly keepMeanSample?: boolean;
}

const FN = "gaussianPlan";

/**
 * A Gaussian over control sequences, N(μ, diag σ²) per step, with optional first-order
 * autoregressive (AR(1)) noise across time for smooth controls.
 *
 * Sampling (per sample, per control component j):
 *   e_0 = z_0,  e_t = a·e_{t−1} + √(1−a²)·z_t,  U_t = μ_t + σ_t ⊙ e_t,  z_t ~ N(0, 1) i.i.d.
 * The AR(1) recursion started in its stationary law keeps Var e_t = 1 for every t and gives
 * Corr(e_t, e_s) = a^{|t−s|} (derived here: Var e_t = a²·1 + (1−a²) = 1; the stationary AR(1)
 * process is textbook, G. E. P. Box, G. M. Jenkins, "Time Series Analysis: Forecasting and Control",
 * 1970, from memory). So every marginal is N(μ_t, σ_t²) whatever a is.
 *
 * Mirror step (MATH.md §3.3–3.4; N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning
 * Approach to Model Predictive Control", RSS 2019): with weights w over the clipped samples,
 * μ̄ = Σ w_i U_i, s² = Σ w_i (U_i − μ̄)²,
 *   μ⁺ = (1−γ)μ + γμ̄,   σ²⁺ = (1−γ)σ² + γs² + γ(1−γ)(μ − μ̄)²   (only when `adaptVariance`),
 * computed by `gaussianDiagonalStep` of `@recede/core`. The mean update is the exact KL mirror step
 * for any fixed covariance, including the AR(1) one; with correlated noise the variance refit
 * matches the per-coordinate marginals only (the correlation a stays fixed).
 * Symbols ↔ options: μ₀ ↔ `mean`, σ₀ ↔ `std`, σ_min ↔ `minStd`, a ↔ `correlation`.
 *
 * @example
 * ```ts
 * const plan = gaussianPlan({ std: 0.5, correlation: 0.8 }); // smooth exploration
 * ```
 */
export function gaussianPlan(options: GaussianPlanOptions = {}): PlanFamily {
  requireObject(FN, "options", options);
  const correlation =
    options.correlation === undefined
      ? 0
      : requireInRange(FN, "correlation", options.correlation, 0, 1);
  if (correlation >= 1) throw new RecedeError("range", FN, "correlation", "in [0, 1)", correlation);
  const minStd =
    options.minStd === undefined
      ? 0
      : requireInRange(FN, "minStd", options.minStd, 0, Number.MAX_VALUE);
  const adapt = options.adaptVariance ?? false;
  if (typeof adapt !== "boolean")
    throw new RecedeError("type", FN, "adaptVariance", "a boolean", adapt);
  const keep = options.keepMeanSample ?? false;
  if (typeof keep !== "boolean")
    throw new RecedeError("type", FN, "keepMeanSample", "a boolean", keep);
  const meanIn = options.mean ?? 0;
  const stdIn = options.std ?? 1;
  if (typeof stdIn === "number" && !(stdIn > 0 && Number.isFinite(stdIn))) {
    throw new RecedeError("range", FN, "std", "finite and > 0", stdIn);
  }
  if (typeof meanIn === "number" && !Number.isFinite(meanIn)) {
    throw new RecedeError("non-finite", FN, "mean", "finite", meanIn);
  }
  return {
    name: "gaussian",
    create(config: PlanConfig): PlanDistribution {
      const h = config.horizon;
      const m = config.controlSize;
      const mean = broadcast(FN, "mean", meanIn, m, h, Number.isFinite, "finite");
      for (let i = 0; i < h * m; i++) {
        const j = i % m;
        if (mean[i] < config.lower[j] || mean[i] > config.upper[j]) {
          throw new RecedeError(
            "range",
            FN,
            `mean[${i}]`,
            `within the control bounds [${config.lower[j]}, ${config.upper[j]}]`,
            mean[i],
          );
        }
      }
      const std = broadcast(
        FN,
        "std",
        stdIn,
        m,
        h,
        (x) => x > 0 && Number.isFinite(x),
        "finite and > 0",
      );
      return new GaussianPlan(
        h,
        m,
        mean,
        std,
        adapt,
        minStd,
        correlation,
        keep,
        config.sharedMemory ?? false,
      );
    },
  };
}

class GaussianPlan implements PlanDistribution {
  readonly name = "gaussian";
  readonly stochastic = true;
  readonly meanIsParameter = true;
  readonly mean: Float64Array;
  readonly blocks: readonly PlanBlock[];
  private readonly variance: Float64Array;
  private readonly std: Float64Array;
  private readonly targetMean: Float64Array;
  private readonly targetVar: Float64Array;
  private readonly len: number;
  /** σ_min² in a one-element array, so hot loops load it as a raw double (no boxing). */
  private readonly minVar: Float64Array;
  private readonly innovation: number;
  private samplerRecord: GaussianSampler | undefined = undefined;
  /** [Σw] of the last update (kept unboxed). */
  private readonly sums: Float64Array = new Float64Array(1);

  constructor(
    readonly horizon: number,
    readonly controlSize: number,
    initialMean: Float64Array,
    initialStd: Float64Array,
    private readonly adapt: boolean,
    minStd: number,
    private readonly correlation: number,
    private readonly keepMean: boolean,
    shared: boolean,
  ) {
    const len = horizon * controlSize;
    this.len = len;
    // μ and σ are what sampling reads: on shared memory when worker threads sample in place.
    this.mean = float64Buffer(len, shared);
    this.mean.set(initialMean);
    const initialVar = new Float64Array(len);
    for (let i = 0; i < len; i++) initialVar[i] = initialStd[i] * initialStd[i];
    this.variance = new Float64Array(initialVar);
    this.std = float64Buffer(len, shared);
    this.std.set(initialStd);
    this.targetMean = new Float64Array(len);
    this.targetVar = new Float64Array(len);
    this.minVar = Float64Array.of(minStd * minStd);
    this.innovation = Math.sqrt(1 - correlation * correlation);
    this.blocks = [
      {
        role: "mean",
        width: controlSize,
        data: this.mean,
        initial: initialMean,
        zeroAllowed: true,
      },
      {
        role: "spread",
        width: controlSize,
        data: this.variance,
        initial: initialVar,
        zeroAllowed: false,
      },
    ];
  }

  sample(stream: Stream, first: number, count: number, out: Float64Array): void {
    sampleGaussianRows(this.sampler, stream, first, count, out);
  }

  /** What a worker thread needs to draw the same samples (see parallel/protocol.ts). */
  get sampler(): GaussianSampler {
    const s = this.samplerRecord;
    if (s !== undefined) return s;
    this.samplerRecord = {
      kind: "gaussian",
      length: this.len,
      controlSize: this.controlSize,
      mean: this.mean,
      std: this.std,
      correlation: this.correlation,
      innovation: this.innovation,
      keepMean: this.keepMean,
    };
    return this.samplerRecord;
  }

  update(
    samples: Float64Array,
    count: number,
    weights: Float64Array,
    normalized: boolean,
    gamma: number,
  ): void {
    // The long loops live in module functions: compiled on their own, they leave this driver
    // with type feedback for every statement (an on-stack-replaced loop here used to leave the
    // code after it without feedback, and the method deoptimized at the end of every call).
    const len = this.len;
    const tm = this.targetMean;
    const tv = this.targetVar;
    const sums = this.sums;
    weightedSum(samples, count, weights, len, tm, sums);
    // No double is loaded into a local on the normalized path: this method runs once per
    // iteration, so V8 optimizes it late (after about a thousand control steps at K = 2000), and
    // until then every double local is a heap allocation (bench alloc, --trace-opt).
    if (normalized) {
      if (this.adapt) {
        weightedSpread(samples, count, weights, len, tm, tv);
        gaussianDiagonalStep(len, gamma, this.mean, 0, this.variance, 0, tm, 0, tv, 0);
      } else {
        gaussianDiagonalStep(len, gamma, this.mean, 0, null, 0, tm, 0, null, 0);
      }
    } else {
      // Signed weights: m⁺ = m + γ(Σ v φ − (Σ v) m) in expectation parameters (μ, σ² + μ²).
      const wsum = sums[0];
      const mean = this.mean;
      const variance = this.variance;
      if (this.adapt) weightedSecondMoment(samples, count, weights, len, tv);
      for (let p = 0; p < len; p++) {
        const mu = mean[p];
        const mu1 = mu + gamma * (tm[p] - wsum * mu);
        if (this.adapt) {
          const second = variance[p] + mu * mu;
          const second1 = second + gamma * (tv[p] - wsum * second);
          variance[p] = second1 - mu1 * mu1;
        }
        mean[p] = mu1;
      }
    }
    if (this.adapt) this.sync();
  }

  sync(): void {
    const v = this.variance;
    const s = this.std;
    const floor = this.minVar[0];
    for (let p = 0; p < this.len; p++) {
      const y = v[p];
      // biome-ignore lint/complexity/useMathMinMax: Math.max would keep NaN; this maps NaN to the floor.
      const x = y >= floor ? y : floor;
      v[p] = x;
      s[p] = Math.sqrt(x);
    }
  }
}

/**
 * Everything sampling from a Gaussian plan reads, as plain data (structured-cloneable: μ and σ on
 * SharedArrayBuffers when the plan was built with `sharedMemory`), so a worker thread draws
 * exactly the samples the plan itself would (internal).
 */
export interface GaussianSampler {
  readonly kind: "gaussian";
  /** H·m. */
  readonly length: number;
  /** m. */
  readonly controlSize: number;
  /** μ (H·m), the plan's own buffer. */
  readonly mean: Float64Array;
  /** σ (H·m), the plan's own buffer. */
  readonly std: Float64Array;
  /** a. */
  readonly correlation: number;
  /** √(1 − a²). */
  readonly innovation: number;
  /** Sample 0 at the mean. */
  readonly keepMean: boolean;
}

/**
 * Draw samples `first … first+count−1` of a Gaussian plan into `out` (rows of H·m) from `stream`:
 * U = μ + σ ⊙ e with AR(1) noise e (see {@link gaussianPlan}). The one implementation, used by the
 * plan and by worker threads alike.
 */
export function sampleGaussianRows(
  g: GaussianSampler,
  stream: Stream,
  first: number,
  count: number,
  out: Float64Array,
): void {
  const len = g.length;
  const m = g.controlSize;
  const mean = g.mean;
  const std = g.std;
  const a = g.correlation;
  const c = g.innovation;
  const keep = g.keepMean;
  stream.fillNormal(out, first * len, count * len);
  for (let k = first; k < first + count; k++) {
    const base = k * len;
    if (a > 0) {
      // e_t = a e_{t−1} + √(1−a²) z_t, in place, ascending t (e_{t−1} already transformed).
      for (let p = m; p < len; p++) out[base + p] = a * out[base + p - m] + c * out[base + p];
    }
    if (k === 0 && keep) {
      for (let p = 0; p < len; p++) out[base + p] = mean[p];
    } else {
      for (let p = 0; p < len; p++) out[base + p] = mean[p] + std[p] * out[base + p];
    }
  }
}

/** tm ← Σ_k w_k U_k over the samples with w_k ≠ 0; sums[0] ← Σ_k w_k. */
function weightedSum(
  samples: Float64Array,
  count: number,
  weights: Float64Array,
  len: number,
  tm: Float64Array,
  sums: Float64Array,
): void {
  for (let p = 0; p < len; p++) tm[p] = 0;
  let wsum = 0;
  for (let k = 0; k < count; k++) {
    const w = weights[k];
    if (w === 0) continue;
    wsum += w;
    const base = k * len;
    for (let p = 0; p < len; p++) tm[p] += w * samples[base + p];
  }
  sums[0] = wsum;
}

/** tv ← Σ_k w_k (U_k − tm)² over the samples with w_k ≠ 0. */
function weightedSpread(
  samples: Float64Array,
  count: number,
  weights: Float64Array,
  len: number,
  tm: Float64Array,
  tv: Float64Array,
): void {
  for (let p = 0; p < len; p++) tv[p] = 0;
  for (let k = 0; k < count; k++) {
    const w = weights[k];
    if (w === 0) continue;
    const base = k * len;
    for (let p = 0; p < len; p++) {
      const d = samples[base + p] - tm[p];
      tv[p] += w * d * d;
    }
  }
}

/** tv ← Σ_k w_k U_k² over the samples with w_k ≠ 0. */
function weightedSecondMoment(
  samples: Float64Array,
  count: number,
  weights: Float64Array,
  len: number,
  tv: Float64Array,
): void {
  for (let p = 0; p < len; p++) tv[p] = 0;
  for (let k = 0; k < count; k++) {
    const w = weights[k];
    if (w === 0) continue;
    const base = k * len;
    for (let p = 0; p < len; p++) {
      const u = samples[base + p];
      tv[p] += w * u * u;
    }
  }
}
