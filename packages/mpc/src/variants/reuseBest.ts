/**
 * Derived variant: carry the best sampled sequences of one mirror step into the next, through the
 * controller's own dynamic step.
 *
 * @module
 */
import { RecedeError, type Stream } from "@recede/core";
import type {
  PlanBlock,
  PlanConfig,
  PlanDistribution,
  PlanFamily,
} from "../distributions/types.js";
import { requireObject } from "../internal/input.js";

/** Options of {@link reuseBest}. */
export interface ReuseBestOptions {
  /**
   * Number r ≥ 0 of sequences carried forward (the r largest weights of the last update).
   * Must be less than the controller's samples K. r = 0 returns the wrapped family's
   * distribution unchanged.
   * @defaultValue 1
   */
  readonly keep?: number;
}

const FN = "reuseBest";

/**
 * Wrap a plan family so that the r highest-weighted sequences of each update are remembered and
 * offered again as the first r samples of the next iteration — after the controller's dynamic step
 * Φ has shifted them with the rest of the plan:
 *   after an update with weights w over samples U_1 … U_K:  M ← (U_{(1)}, …, U_{(r)}), the r largest
 *   w (ties: lower sample index first);
 *   Φ shifts every remembered sequence by one step like a mean block (tail fill = the shift's mean
 *   fill, "nominal" being the wrapped plan's initial last step);
 *   next draw:  U_k = M_k for k < r, U_k ∼ π_θ (the wrapped family) for k ≥ r.
 * Within one control step (`iterations` > 1) the remembered sequences are the best of the previous
 * iteration, unshifted. Before the first update M holds the initial plan mean repeated r times.
 * The memory is one extra {@link PlanBlock} (role "mean", width r·m, laid out
 * `data[t·r·m + i·m + j]`), so snapshots, restore, reset and rollback of a failed step cover it.
 *
 * The carried sequences are not draws from π_θ: the self-normalized weights then no longer
 * estimate E_π[S φ]/E_π[S] exactly (they mix the plan with r point masses). The update is the
 * wrapped family's own mirror step on this mixed sample set — an engineering choice that trades
 * that bias for samples that are already good. Each sample of a slice still depends only on the
 * slice's stream and the plan's parameters (memory included), so results do not depend on how
 * slices are spread over workers. The wrapped family draws all K rows (rows k < r are then
 * overwritten), so rows k ≥ r are bit-identical to the wrapped family's; a wrapped
 * `keepMeanSample` (row 0) is therefore overwritten too.
 * Symbols ↔ options: r ↔ `keep`.
 *
 * Derived variant. Published source of the idea (keeping elite sequences across iterations and
 * shifting them to the next control step, in CEM planners): C. Pinneri, S. Sawant, S. Blaes,
 * J. Achterhold, J. Stueckler, M. Rolínek, G. Martius, "Sample-efficient Cross-Entropy Method for
 * Real-time Planning", CoRL 2020. Here it wraps any plan family and works with any sample loss
 * (MPPI weights included).
 *
 * @example
 * ```ts
 * const plan = reuseBest(gaussianPlan({ std: 2, correlation: 0.8 }), { keep: 4 });
 * const ctrl = createController({ dynamics, cost, horizon: 40, samples: 32, plan,
 *   loss: exponentialUtility({ temperature: 10 }) });
 * ```
 */
export function reuseBest(base: PlanFamily, options: ReuseBestOptions = {}): PlanFamily {
  if (base === null || typeof base !== "object" || typeof base.create !== "function") {
    throw new RecedeError("type", FN, "base", "a plan family (gaussianPlan, …)", base);
  }
  requireObject(FN, "options", options);
  const keep = options.keep ?? 1;
  if (typeof keep !== "number" || !Number.isInteger(keep) || keep < 0) {
    throw new RecedeError("range", FN, "keep", "an integer ≥ 0", keep);
  }
  return {
    name: keep === 0 ? base.name : `reuse(${base.name})`,
    create(config: PlanConfig): PlanDistribution {
      const inner = base.create(config);
      if (keep === 0) return inner;
      if (keep >= config.samples) {
        throw new RecedeError(
          "range",
          config.caller,
          "plan.keep",
          `less than the samples K = ${config.samples}`,
          keep,
        );
      }
      if (!inner.stochastic) {
        throw new RecedeError(
          "type",
          config.caller,
          "plan",
          "a stochastic plan family to wrap with reuseBest",
          inner.name,
        );
      }
      return new ReuseBest(inner, keep, config.samples);
    },
  };
}

class ReuseBest implements PlanDistribution {
  readonly name: string;
  readonly horizon: number;
  readonly controlSize: number;
  readonly stochastic = true;
  readonly meanIsParameter: boolean;
  readonly mean: Float64Array;
  readonly blocks: readonly PlanBlock[];
  /** Remembered sequences, time-major: step t, sequence i, component j at t·r·m + i·m + j. */
  private readonly memory: Float64Array;
  /** Indices of the current top-r, best first. */
  private readonly top: Int32Array;

  constructor(
    private readonly inner: PlanDistribution,
    private readonly keep: number,
    samples: number,
  ) {
    this.name = `reuse(${inner.name})`;
    this.horizon = inner.horizon;
    this.controlSize = inner.controlSize;
    this.meanIsParameter = inner.meanIsParameter;
    this.mean = inner.mean;
    const h = inner.horizon;
    const m = inner.controlSize;
    const initial = new Float64Array(h * keep * m);
    for (let t = 0; t < h; t++)
      for (let i = 0; i < keep; i++)
        for (let j = 0; j < m; j++) initial[(t * keep + i) * m + j] = inner.mean[t * m + j];
    this.memory = new Float64Array(initial);
    this.top = new Int32Array(Math.min(keep, samples));
    this.blocks = [
      ...inner.blocks,
      { role: "mean", width: keep * m, data: this.memory, initial, zeroAllowed: true },
    ];
  }

  sample(stream: Stream, first: number, count: number, out: Float64Array): void {
    this.inner.sample(stream, first, count, out);
    const r = this.keep;
    if (first >= r) return;
    const h = this.horizon;
    const m = this.controlSize;
    const mem = this.memory;
    const end = Math.min(first + count, r);
    for (let k = first; k < end; k++) {
      for (let t = 0; t < h; t++) {
        const src = (t * r + k) * m;
        const dst = (k * h + t) * m;
        for (let j = 0; j < m; j++) out[dst + j] = mem[src + j];
      }
    }
  }

  update(
    samples: Float64Array,
    count: number,
    weights: Float64Array,
    normalized: boolean,
    gamma: number,
  ): void {
    // Select the top-r by weight (ties: lower index) by insertion into a short sorted list.
    const r = Math.min(this.keep, count);
    const top = this.top;
    let filled = 0;
    for (let k = 0; k < count; k++) {
      const w = weights[k];
      if (filled === r && !(w > weights[top[r - 1]])) continue;
      let pos = filled < r ? filled : r - 1;
      while (pos > 0 && w > weights[top[pos - 1]]) {
        top[pos] = top[pos - 1];
        pos--;
      }
      top[pos] = k;
      if (filled < r) filled++;
    }
    const h = this.horizon;
    const m = this.controlSize;
    const keep = this.keep;
    const mem = this.memory;
    for (let i = 0; i < r; i++) {
      const k = top[i];
      for (let t = 0; t < h; t++) {
        const src = (k * h + t) * m;
        const dst = (t * keep + i) * m;
        for (let j = 0; j < m; j++) mem[dst + j] = samples[src + j];
      }
    }
    this.inner.update(samples, count, weights, normalized, gamma);
  }

  sync(): void {
    this.inner.sync();
  }
}
