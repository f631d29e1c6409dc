/**
 * Categorical plan: one categorical distribution per time step over a finite set of control
 * vectors (discrete actions), with the KL mirror step in expectation parameters.
 *
 * @module
 */
import { RecedeError, requireInRange, type Stream } from "@recede/core";
import { broadcast, type MatrixLike, matrix, requireObject, shapeOf } from "../internal/input.js";
import type { PlanBlock, PlanConfig, PlanDistribution, PlanFamily } from "./types.js";

/** Options of {@link categoricalPlan}. */
export interface CategoricalPlanOptions {
  /**
   * The C discrete actions as control vectors: a C×m matrix (matrix input, or a row-major
   * Float64Array of length C·m). Every choice must lie within the control bounds.
   */
  readonly choices: MatrixLike;
  /**
   * Initial probabilities p₀ (and "nominal" tail fill): length C (repeated over the horizon) or H·C;
   * each step's row must be non-negative and sum to 1 (within 1e-9).
   * @defaultValue uniform 1/C
   */
  readonly probabilities?: Float64Array | readonly number[];
  /**
   * Floor p_min ∈ [0, 1/C] mixed in after each update: p ← (1 − C·p_min)·p + p_min, which keeps
   * every action reachable (an engineering choice, not from a published source).
   * @defaultValue 0
   */
  readonly minProbability?: number;
}

const FN = "categoricalPlan";

/**
 * Independent per-step categorical distributions over C control vectors c_1 … c_C.
 *
 * The categorical family is exponential with sufficient statistic φ(a) = one-hot(a) and
 * expectation parameters p (the probabilities), so the KL mirror step of MATH.md §3.3 is the
 * convex combination (equivalently, an exponentiated step in natural parameters)
 *   p_t⁺ = (1 − γ) p_t + γ Σ_i w_i one-hot(a_{i,t}),
 * per time step t. Sampling: inverse CDF on one uniform per step and sample. The plan applied
 * (`mean`) is the most probable action per step (ties → lowest index).
 * Source: N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model
 * Predictive Control", RSS 2019 (MPC as mirror descent over exponential families).
 * Symbols ↔ options: c ↔ `choices`, p₀ ↔ `probabilities`, p_min ↔ `minProbability`.
 *
 * @example
 * ```ts
 * // A vent with three positions: closed, half, open.
 * const plan = categoricalPlan({ choices: [[0], [0.5], [1]] });
 * ```
 */
export function categoricalPlan(options: CategoricalPlanOptions): PlanFamily {
  requireObject(FN, "options", options);
  if (options.choices === undefined) {
    throw new RecedeError("type", FN, "choices", "a C×m matrix of control vectors", undefined);
  }
  return {
    name: "categorical",
    create(config: PlanConfig): PlanDistribution {
      const h = config.horizon;
      const m = config.controlSize;
      const raw = options.choices;
      let c: number;
      if (raw instanceof Float64Array) {
        if (raw.length === 0 || raw.length % m !== 0) {
          throw new RecedeError(
            "dimension",
            FN,
            "choices",
            `a length that is a multiple of ${m}`,
            raw,
          );
        }
        c = raw.length / m;
      } else c = shapeOf(raw)[0];
      if (!(c >= 1)) throw new RecedeError("dimension", FN, "choices", "at least one choice", c);
      const choices = matrix(FN, "choices", raw, c, m);
      for (let i = 0; i < c * m; i++) {
        const j = i % m;
        if (choices[i] < config.lower[j] || choices[i] > config.upper[j]) {
          throw new RecedeError(
            "range",
            FN,
            `choices[${Math.floor(i / m)}][${j}]`,
            "within the control bounds",
            choices[i],
          );
        }
      }
      const probs =
        options.probabilities === undefined
          ? new Float64Array(h * c).fill(1 / c)
          : broadcast(
              FN,
              "probabilities",
              options.probabilities,
              c,
              h,
              (x) => x >= 0 && x <= 1,
              "in [0, 1]",
            );
      for (let t = 0; t < h; t++) {
        let s = 0;
        for (let a = 0; a < c; a++) s += probs[t * c + a];
        if (Math.abs(s - 1) > 1e-9) {
          throw new RecedeError(
            "domain",
            FN,
            "probabilities",
            "rows summing to 1",
            `row ${t} sums to ${s}`,
          );
        }
      }
      const floor =
        options.minProbability === undefined
          ? 0
          : requireInRange(FN, "minProbability", options.minProbability, 0, 1 / c);
      return new CategoricalPlan(h, m, c, config.samples, choices, probs, floor);
    },
  };
}

class CategoricalPlan implements PlanDistribution {
  readonly name = "categorical";
  readonly stochastic = true;
  readonly meanIsParameter = false;
  readonly mean: Float64Array;
  readonly blocks: readonly PlanBlock[];
  /** Index of the action drawn for sample k at step t, at k·H + t. */
  private readonly actions: Int32Array;
  private readonly probs: Float64Array;
  private readonly target: Float64Array;
  /** Uniforms of the slice being sampled, at k·H + t. */
  private readonly uniforms: Float64Array;

  constructor(
    readonly horizon: number,
    readonly controlSize: number,
    private readonly count: number,
    samples: number,
    private readonly choices: Float64Array,
    initial: Float64Array,
    private readonly floor: number,
  ) {
    this.probs = new Float64Array(initial);
    this.target = new Float64Array(horizon * count);
    this.actions = new Int32Array(samples * horizon);
    this.uniforms = new Float64Array(samples * horizon);
    this.mean = new Float64Array(horizon * controlSize);
    this.blocks = [{ role: "mean", width: count, data: this.probs, initial, zeroAllowed: false }];
    this.sync();
  }

  sample(stream: Stream, first: number, count: number, out: Float64Array): void {
    const h = this.horizon;
    const m = this.controlSize;
    const c = this.count;
    const p = this.probs;
    const choices = this.choices;
    const uni = this.uniforms;
    stream.fillUniform(uni, first * h, count * h);
    for (let k = first; k < first + count; k++) {
      for (let t = 0; t < h; t++) {
        const u = uni[k * h + t];
        let a = 0;
        let acc = p[t * c];
        while (a < c - 1 && !(u < acc)) {
          a++;
          acc += p[t * c + a];
        }
        // Skip zero-probability actions reached only by round-off in the cumulative sum.
        while (p[t * c + a] === 0 && a > 0) a--;
        this.actions[k * h + t] = a;
        const o = (k * h + t) * m;
        for (let j = 0; j < m; j++) out[o + j] = choices[a * m + j];
      }
    }
  }

  update(
    _samples: Float64Array,
    count: number,
    weights: Float64Array,
    normalized: boolean,
    gamma: number,
  ): void {
    const h = this.horizon;
    const c = this.count;
    const tgt = this.target;
    const p = this.probs;
    for (let i = 0; i < h * c; i++) tgt[i] = 0;
    let wsum = 0;
    for (let k = 0; k < count; k++) {
      const w = weights[k];
      if (w === 0) continue;
      wsum += w;
      for (let t = 0; t < h; t++) tgt[t * c + this.actions[k * h + t]] += w;
    }
    for (let i = 0; i < h * c; i++) {
      p[i] = normalized
        ? (1 - gamma) * p[i] + gamma * tgt[i]
        : p[i] + gamma * (tgt[i] - wsum * p[i]);
    }
    if (!normalized) {
      // Signed weights can leave the simplex: clip at 0 and renormalize (Euclidean-style repair).
      for (let t = 0; t < h; t++) {
        let s = 0;
        for (let a = 0; a < c; a++) {
          if (!(p[t * c + a] > 0)) p[t * c + a] = 0;
          s += p[t * c + a];
        }
        for (let a = 0; a < c; a++) p[t * c + a] = s > 0 ? p[t * c + a] / s : 1 / c;
      }
    }
    if (this.floor > 0) {
      const keep = 1 - c * this.floor;
      for (let i = 0; i < h * c; i++) p[i] = keep * p[i] + this.floor;
    }
    this.sync();
  }

  sync(): void {
    const h = this.horizon;
    const m = this.controlSize;
    const c = this.count;
    const p = this.probs;
    for (let t = 0; t < h; t++) {
      let best = 0;
      for (let a = 1; a < c; a++) if (p[t * c + a] > p[t * c + best]) best = a;
      for (let j = 0; j < m; j++) this.mean[t * m + j] = this.choices[best * m + j];
    }
  }
}
