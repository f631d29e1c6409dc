/**
 * The generic MPC controller: dynamic mirror descent on a distribution over control sequences
 * (MATH.md §3.8). Every named method (MPPI, CEM, LQR as a Newton step) is a choice of its parts.
 *
 * @module
 */
import {
  type ControlBounds,
  type CostModel,
  createStream,
  type Dynamics,
  type Geometry,
  type LossObject,
  type Observable,
  ObserverList,
  RecedeError,
  type RoundRecord,
  requireInteger,
  type Stream,
  type StreamState,
} from "@recede/core";
import { gaussianPlan } from "./distributions/gaussian.js";
import type { PlanDistribution, PlanFamily } from "./distributions/types.js";
import { requireObject } from "./internal/input.js";
import { float64Buffer } from "./internal/shared.js";
import type { GeometryFamily, ObjectiveFamily, PlanObjective } from "./losses/objective.js";
import type { SampleLoss } from "./losses/types.js";
import type { RolloutWorkers, SliceExecutor, WorkerBinding } from "./parallel/pool.js";
import { createRollout, type Rollout } from "./rollout.js";
import { type DynamicStep, shiftPlan } from "./shift.js";

/** A step size: a constant γ ∈ (0, 1], or a schedule γ(round, iteration) returning one. */
export type StepSize = number | ((round: number, iteration: number) => number);

/** The parts a controller is composed of. */
export interface ControllerParts {
  /** The model used for planning (batched). */
  readonly dynamics: Dynamics;
  /** The cost used for planning (batched running + terminal). */
  readonly cost: CostModel;
  /** Horizon H ≥ 1 (steps). */
  readonly horizon: number;
  /** Samples K ≥ 1 per iteration. @defaultValue 256 */
  readonly samples?: number;
  /** Distribution over control sequences. @defaultValue gaussianPlan() */
  readonly plan?: PlanFamily;
  /**
   * The loss: a {@link SampleLoss} (costs of sampled sequences → weights, with the KL geometry), or
   * an {@link ObjectiveFamily} (a differentiable J(U), with a vector geometry).
   */
  readonly loss: SampleLoss | ObjectiveFamily;
  /**
   * Geometry of the mirror step: `"kl"` (Bregman divergence of the plan family's log-partition,
   * i.e. the convex combination in expectation parameters; required with a sample loss), a core
   * {@link Geometry} on ℝ^{H·m}, or a {@link GeometryFamily} built from the objective.
   * @defaultValue "kl"
   */
  readonly geometry?: "kl" | Geometry | GeometryFamily;
  /** Step size γ ∈ (0, 1] or a schedule. @defaultValue 1 */
  readonly stepSize?: StepSize;
  /** Mirror steps per control step (on the same ℓ_t). @defaultValue 1 */
  readonly iterations?: number;
  /** Dynamic step after each control step. @defaultValue shiftPlan() (nominal fill) */
  readonly shift?: DynamicStep;
  /** Box bounds on the control (length m each). @defaultValue unbounded */
  readonly bounds?: ControlBounds;
  /** Seed of the random streams. @defaultValue 0 */
  readonly seed?: number | string;
  /**
   * Samples per slice: slice s covers samples [s·S, (s+1)·S) and draws its noise from
   * `stream.fork(s)`, so results do not depend on how slices are spread over workers.
   * @defaultValue 64
   */
  readonly sliceSize?: number;
  /** Name used in error messages and reports. @defaultValue "controller" */
  readonly name?: string;
  /**
   * Measure `report.wallTimeMs` with two `performance.now()` reads per step. On Node 20 every
   * clock read allocates (16 bytes per `performance.now()`, measured), so timing is opt-in: the
   * default step allocates nothing after warm-up (`report.wallTimeMs` is then NaN). Time the
   * control loop yourself, or set true (32 bytes per step).
   * @defaultValue false
   */
  readonly timing?: boolean;
  /**
   * Check every intermediate rollout state for non-finite values, not only the final state and
   * the summed cost (see {@link RolloutOptions}`.checkEveryStep`): needed only for a model or cost
   * that can turn a non-finite state finite again; costs about 4–5 % of the rollout.
   * @defaultValue false
   */
  readonly checkEveryStep?: boolean;
  /**
   * Put the sample, state, cost and weight buffers on SharedArrayBuffers (for worker threads that
   * process slices in place; the computation itself is unchanged).
   * @defaultValue false (true with `workers`)
   */
  readonly sharedMemory?: boolean;
  /**
   * Rollout worker threads from {@link startRolloutWorkers}: the slices of each iteration are
   * sampled, clipped and rolled out across the main thread and the workers (bit-identical to the
   * main-thread path). `dynamics` and `cost` must then be the pool's own (`pool.dynamics`,
   * `pool.cost`), which every worker builds from the same recipe. A pool serves one controller.
   * Only sample losses use the workers.
   * @defaultValue none (everything on the calling thread)
   */
  readonly workers?: RolloutWorkers;
}

/** What one control step reports. Fields are overwritten by the next `act`. */
export interface StepReport {
  /** Control step index t ≥ 1. */
  readonly round: number;
  /** Lowest sampled cost of the first iteration (J(U_t) for an objective). */
  readonly costMin: number;
  /** Mean cost over the finite samples of the first iteration (NaN if none). */
  readonly costMean: number;
  /** ℓ̂_t, the loss estimated at the plan played (first iteration), as defined by the loss. */
  readonly loss: number;
  /** Kish effective sample size (Σ|w|)²/Σw² of the first iteration's weights (1 for an objective). */
  readonly effectiveSampleSize: number;
  /** Entropy −Σ p ln p of p = |w|/Σ|w| of the first iteration's weights, in nats. */
  readonly weightEntropy: number;
  /** Mirror steps attempted. */
  readonly iterations: number;
  /** Failed samples summed over iterations. */
  readonly failedSamples: number;
  /** Iterations whose update was skipped because no sample (or gradient) was usable. */
  readonly skippedIterations: number;
  /** False when every iteration was skipped: the previous plan was kept (then shifted). */
  readonly updated: boolean;
  /** γ of the first iteration. */
  readonly stepSize: number;
  /** Wall time of `act`, in milliseconds (NaN when the controller was built with `timing: false`). */
  readonly wallTimeMs: number;
}

/** The result of {@link Controller.act}: the controller's own buffers, valid until the next call. */
export interface ControlStep {
  /** The control u_t to apply (length m). */
  readonly control: Float64Array;
  /** The step's report. */
  readonly report: StepReport;
}

/** A captured controller state for {@link Controller.restore}. */
export interface ControllerSnapshot {
  /** Controller name (checked on restore). */
  readonly name: string;
  /** Completed control steps. */
  readonly round: number;
  /** Copies of the plan's parameter blocks. */
  readonly blocks: readonly Float64Array[];
  /** States of the per-slice random streams. */
  readonly streams: readonly StreamState[];
}

/** A receding-horizon controller built by {@link createController}. */
export interface Controller extends Observable {
  /** Name used in errors and reports. */
  readonly name: string;
  /** n. */
  readonly stateSize: number;
  /** m. */
  readonly controlSize: number;
  /** H. */
  readonly horizon: number;
  /** K. */
  readonly samples: number;
  /** Completed control steps. */
  readonly round: number;
  /** The plan distribution (its blocks are the decision θ). */
  readonly distribution: PlanDistribution;
  /**
   * One control step from the measured state x_t (length n, finite): update the plan by
   * `iterations` mirror steps, return its first control, then apply the dynamic step.
   */
  act(state: Float64Array): ControlStep;
  /** The current plan (H·m; the distribution's own buffer — read, do not write). */
  plan(): Float64Array;
  /** Back to the initial plan, round 0 and the initial random streams (observers are kept). */
  reset(): void;
  /** Capture plan, round and random-stream states. */
  snapshot(): ControllerSnapshot;
  /** Return to a captured state (throws, state untouched, if it belongs to another shape). */
  restore(snapshot: ControllerSnapshot): void;
  /** Last sampled costs (K; +∞ for failed samples). */
  readonly costs: Float64Array;
  /**
   * The clipped control sequences of the last iteration, K·H·m (sample k, step t at (k·H + t)·m);
   * empty for an objective-driven controller. Read only.
   */
  readonly sampled: Float64Array;
  /** Last weights (K). */
  readonly weights: Float64Array;
}

/**
 * Build a controller from its parts (dynamic mirror descent MPC).
 *
 * One control step (MATH.md §3.8), from the measured state x_t and the plan θ_t:
 * repeat `iterations` times — draw K sequences U_i ∼ π_θ (slice s from `stream.fork(s)`), clip them
 * to the bounds, roll out the model, C_i = Σ_h c(x̂_h, u_h, h) + c_H(x̂_H) (failed → +∞), weights
 * w = loss(C), and take the mirror step θ ← step_γ(θ; w) in expectation parameters (geometry `"kl"`);
 * or, with an objective, θ ← argmin γ⟨∇J(θ), ·⟩ + D(·‖θ) in the given geometry. Then apply
 * u_t = first control of the plan, and carry the plan forward: θ_{t+1} = Φ(θ̃_t).
 * Symbols ↔ options: K ↔ `samples`, H ↔ `horizon`, γ ↔ `stepSize`, Φ ↔ `shift`.
 *
 * Regret hook: the controller is {@link Observable}; after each control step it emits a
 * {@link RoundRecord} with `decision` = the plan mean θ_t before the update (H·m) and `loss` = ℓ̂_t,
 * the loss estimated from the first iteration's samples at θ_t (see each loss's documentation);
 * with an objective also `gradient` = ∇J(θ_t) (at the plan before the first iteration) and
 * `lossObject` = J for this state.
 *
 * Failures: a sample whose rollout fails gets cost +∞ and weight 0 (counted in the report); if no
 * sample of an iteration is usable that iteration's update is skipped, and if all are, the previous
 * plan is kept (and shifted) and `report.updated` is false.
 *
 * Source: N. Wagener, C.-A. Cheng, J. Sacks, B. Boots, "An Online Learning Approach to Model
 * Predictive Control", RSS 2019; E. C. Hall, R. M. Willett, "Online Convex Optimization in Dynamic
 * Environments", 2015.
 *
 * @example
 * ```ts
 * const ctrl = createController({
 *   dynamics, cost, horizon: 30, samples: 256,
 *   plan: gaussianPlan({ std: 1 }),
 *   loss: exponentialUtility({ temperature: 1 }),
 *   stepSize: 0.8,
 *   bounds: { lower: new Float64Array([-2]), upper: new Float64Array([2]) },
 * });
 * const { control, report } = ctrl.act(state);
 * ```
 */
export function createController(parts: ControllerParts): Controller {
  requireObject("createController", "parts", parts);
  const name = parts.name ?? "controller";
  if (typeof name !== "string")
    throw new RecedeError("type", "createController", "name", "a string", name);
  const fn = name === "controller" ? "createController" : name;
  const dyn = parts.dynamics;
  const cost = parts.cost;
  if (dyn === null || typeof dyn !== "object" || typeof dyn.step !== "function") {
    throw new RecedeError("type", fn, "dynamics", "a Dynamics object with a step method", dyn);
  }
  if (cost === null || typeof cost !== "object" || typeof cost.running !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "cost",
      "a CostModel with running and terminal methods",
      cost,
    );
  }
  const n = requireInteger(fn, "dynamics.stateSize", dyn.stateSize, 1);
  const m = requireInteger(fn, "dynamics.controlSize", dyn.controlSize, 1);
  const horizon = requireInteger(fn, "horizon", parts.horizon, 1);
  if (parts.checkEveryStep !== undefined && typeof parts.checkEveryStep !== "boolean") {
    throw new RecedeError("type", fn, "checkEveryStep", "a boolean", parts.checkEveryStep);
  }
  const samples = requireInteger(fn, "samples", parts.samples ?? 256, 1);
  const iterations = requireInteger(fn, "iterations", parts.iterations ?? 1, 1);
  const sliceSize = requireInteger(fn, "sliceSize", parts.sliceSize ?? 64, 1);
  const stepSize = parts.stepSize ?? 1;
  if (typeof stepSize === "number") checkStep(fn, "stepSize", stepSize);
  else if (typeof stepSize !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "stepSize",
      "a number in (0, 1] or a schedule function",
      stepSize,
    );
  }
  const [lower, upper] = parseBounds(fn, parts.bounds, m);
  const pool = parts.workers;
  if (pool !== undefined) {
    if (pool === null || typeof (pool as unknown as WorkerBinding).bind !== "function") {
      throw new RecedeError("type", fn, "workers", "a pool from startRolloutWorkers", pool);
    }
    if (dyn !== pool.dynamics || cost !== pool.cost) {
      throw new RecedeError(
        "state",
        fn,
        "dynamics",
        "the pool's own dynamics and cost (workers.dynamics, workers.cost), which the workers rebuild from its recipe",
        "another model",
      );
    }
  }
  const shared = parts.sharedMemory ?? pool !== undefined;
  if (typeof shared !== "boolean")
    throw new RecedeError("type", fn, "sharedMemory", "a boolean", shared);
  const loss = parts.loss;
  if (loss === null || typeof loss !== "object") {
    throw new RecedeError("type", fn, "loss", "a sample loss or an objective", loss);
  }
  const isSample = typeof (loss as SampleLoss).weigh === "function";
  if (!isSample && typeof (loss as ObjectiveFamily).create !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "loss",
      "a sample loss (weigh) or an objective family (create)",
      loss,
    );
  }
  const family = parts.plan ?? gaussianPlan();
  if (family === null || typeof family !== "object" || typeof family.create !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "plan",
      "a plan family (gaussianPlan, categoricalPlan, pointPlan, …)",
      family,
    );
  }
  const dist = family.create({
    horizon,
    controlSize: m,
    samples,
    lower,
    upper,
    caller: fn,
    sharedMemory: shared,
  });
  const shift = parts.shift ?? shiftPlan();
  if (shift === null || typeof shift !== "object" || typeof shift.apply !== "function") {
    throw new RecedeError("type", fn, "shift", "a dynamic step (shiftPlan, customShift)", shift);
  }
  shift.check(dist, fn);
  const geometryIn = parts.geometry ?? "kl";
  let objective: PlanObjective | null = null;
  let geometry: Geometry | null = null;
  let rollout: Rollout | null = null;
  if (isSample) {
    if (geometryIn !== "kl") {
      throw new RecedeError("type", fn, "geometry", '"kl" with a sample loss', geometryIn);
    }
    if (cost.stateSize !== n || cost.controlSize !== m) {
      throw new RecedeError(
        "dimension",
        fn,
        "cost",
        `sizes n = ${n}, m = ${m} (the model's)`,
        `n = ${cost.stateSize}, m = ${cost.controlSize}`,
      );
    }
    rollout = createRollout({
      dynamics: dyn,
      cost,
      samples,
      horizon,
      lower,
      upper,
      sharedMemory: shared,
      checkEveryStep: parts.checkEveryStep ?? false,
    });
  } else {
    if (!dist.meanIsParameter) {
      throw new RecedeError(
        "type",
        fn,
        "plan",
        "a plan whose mean is a parameter (pointPlan, gaussianPlan) with an objective",
        dist.name,
      );
    }
    objective = (loss as ObjectiveFamily).create({ dynamics: dyn, cost, horizon, caller: fn });
    if (geometryIn === "kl") {
      throw new RecedeError(
        "type",
        fn,
        "geometry",
        "a vector geometry (e.g. hessianMetric()) with an objective",
        "kl",
      );
    }
    if (typeof (geometryIn as GeometryFamily).create === "function") {
      geometry = (geometryIn as GeometryFamily).create(objective);
    } else if (typeof (geometryIn as Geometry).step === "function") {
      geometry = geometryIn as Geometry;
    } else {
      throw new RecedeError("type", fn, "geometry", "a Geometry or a geometry family", geometryIn);
    }
    if (geometry.dimension !== horizon * m) {
      throw new RecedeError(
        "dimension",
        fn,
        "geometry.dimension",
        `H·m = ${horizon * m}`,
        geometry.dimension,
      );
    }
  }
  const timing = parts.timing ?? false;
  if (typeof timing !== "boolean") throw new RecedeError("type", fn, "timing", "a boolean", timing);
  const seed = parts.seed ?? 0;
  const root = createStream(seed);
  return new GenericController(
    name,
    n,
    m,
    horizon,
    samples,
    iterations,
    sliceSize,
    stepSize,
    lower,
    upper,
    dist,
    isSample ? (loss as SampleLoss) : null,
    objective,
    geometry,
    rollout,
    shift,
    root,
    timing,
    shared,
    isSample ? ((pool as unknown as WorkerBinding | undefined) ?? null) : null,
  );
}

function checkStep(fn: string, arg: string, g: unknown): number {
  if (typeof g !== "number" || !(g > 0 && g <= 1)) {
    throw new RecedeError("range", fn, arg, "in (0, 1]", g);
  }
  return g;
}

function parseBounds(
  fn: string,
  bounds: ControlBounds | undefined,
  m: number,
): [Float64Array, Float64Array] {
  const lower = new Float64Array(m).fill(Number.NEGATIVE_INFINITY);
  const upper = new Float64Array(m).fill(Number.POSITIVE_INFINITY);
  if (bounds === undefined) return [lower, upper];
  if (bounds === null || typeof bounds !== "object") {
    throw new RecedeError("type", fn, "bounds", "{ lower, upper } Float64Arrays", bounds);
  }
  for (const key of ["lower", "upper"] as const) {
    const v = bounds[key];
    if (!(v instanceof Float64Array))
      throw new RecedeError("type", fn, `bounds.${key}`, `a Float64Array of length ${m}`, v);
    if (v.length !== m)
      throw new RecedeError("dimension", fn, `bounds.${key}`, `of length ${m}`, v);
  }
  for (let j = 0; j < m; j++) {
    const lo = bounds.lower[j];
    const hi = bounds.upper[j];
    if (
      Number.isNaN(lo) ||
      Number.isNaN(hi) ||
      lo > hi ||
      lo === Number.POSITIVE_INFINITY ||
      hi === Number.NEGATIVE_INFINITY
    ) {
      throw new RecedeError(
        "range",
        fn,
        `bounds[${j}]`,
        "lower ≤ upper, not NaN",
        `[${lo}, ${hi}]`,
      );
    }
    lower[j] = lo;
    upper[j] = hi;
  }
  return [lower, upper];
}

interface MutableReport {
  round: number;
  costMin: number;
  costMean: number;
  loss: number;
  effectiveSampleSize: number;
  weightEntropy: number;
  iterations: number;
  failedSamples: number;
  skippedIterations: number;
  updated: boolean;
  stepSize: number;
  wallTimeMs: number;
}

interface MutableRecord {
  round: number;
  decision: Float64Array;
  loss: number;
  gradient: Float64Array | undefined;
  lossObject: LossObject | undefined;
}

class GenericController implements Controller {
  private roundCount = 0;
  private readonly observers = new ObserverList();
  private readonly streams: Stream[];
  private readonly initialStreams: StreamState[];
  readonly sampled: Float64Array;
  readonly weights: Float64Array;
  readonly costs: Float64Array;
  private readonly gammas: Float64Array;
  private readonly decision: Float64Array;
  private readonly grad: Float64Array;
  private readonly firstGrad: Float64Array;
  private readonly stateBuf: Float64Array;
  private readonly backup: Float64Array[];
  private readonly control: Float64Array;
  private readonly report: MutableReport;
  private readonly result: ControlStep;
  private readonly record: MutableRecord;
  private readonly lossObject: LossObject | undefined;
  private readonly slices: number;
  private readonly actName: string;
  private readonly exec: SliceExecutor | null;
  /** [ℓ̂] of the current iteration, kept unboxed (see SampleLoss.weighInto). */
  private readonly estimate: Float64Array = new Float64Array(1);

  constructor(
    readonly name: string,
    readonly stateSize: number,
    readonly controlSize: number,
    readonly horizon: number,
    readonly samples: number,
    private readonly iterations: number,
    private readonly sliceSize: number,
    private readonly stepSize: StepSize,
    private readonly lower: Float64Array,
    private readonly upper: Float64Array,
    readonly distribution: PlanDistribution,
    private readonly loss: SampleLoss | null,
    private readonly objective: PlanObjective | null,
    private readonly geometry: Geometry | null,
    private readonly rollout: Rollout | null,
    private readonly shift: DynamicStep,
    root: Stream,
    private readonly timing: boolean,
    shared: boolean,
    binding: WorkerBinding | null,
  ) {
    const len = horizon * controlSize;
    this.actName = `${name}.act`;
    this.slices = Math.ceil(samples / sliceSize);
    this.streams = [];
    this.initialStreams = [];
    for (let s = 0; s < this.slices; s++) {
      const st = root.fork(s);
      this.streams.push(st);
      this.initialStreams.push(st.getState());
    }
    this.sampled = float64Buffer(rollout === null ? 0 : samples * len, shared);
    this.weights = float64Buffer(samples, shared);
    this.costs = rollout === null ? new Float64Array(samples) : rollout.costs;
    this.gammas = new Float64Array(iterations);
    this.decision = new Float64Array(len);
    this.grad = new Float64Array(len);
    this.firstGrad = new Float64Array(len);
    this.stateBuf = new Float64Array(stateSize);
    this.backup = distribution.blocks.map((b) => new Float64Array(b.data.length));
    this.control = new Float64Array(controlSize);
    this.report = {
      round: 0,
      costMin: Number.NaN,
      costMean: Number.NaN,
      loss: Number.NaN,
      effectiveSampleSize: Number.NaN,
      weightEntropy: Number.NaN,
      iterations: 0,
      failedSamples: 0,
      skippedIterations: 0,
      updated: false,
      stepSize: Number.NaN,
      wallTimeMs: 0,
    };
    this.result = { control: this.control, report: this.report };
    if (objective !== null) {
      const obj = objective;
      const x = this.stateBuf;
      const scratch = new Float64Array(len);
      this.lossObject = {
        value: (u: Float64Array): number => obj.gradient(x, u, scratch),
        gradient: (u: Float64Array, out: Float64Array): Float64Array => {
          obj.gradient(x, u, out);
          return out;
        },
      };
    }
    this.record = {
      round: 0,
      decision: this.decision,
      loss: Number.NaN,
      gradient: undefined,
      lossObject: undefined,
    };
    this.exec =
      binding === null || rollout === null
        ? null
        : binding.bind({
            fn: this.actName,
            samples,
            horizon,
            sliceSize,
            slices: this.slices,
            seed: root.seed,
            lower,
            upper,
            rollout,
            sampled: this.sampled,
            distribution,
            streams: this.streams,
          });
  }

  get round(): number {
    return this.roundCount;
  }

  observe(listener: (record: RoundRecord) => void): () => void {
    return this.observers.add(listener);
  }

  plan(): Float64Array {
    return this.distribution.mean;
  }

  act(state: Float64Array): ControlStep {
    const t0 = this.timing ? performance.now() : 0;
    const fn = this.actName;
    const n = this.stateSize;
    if (!(state instanceof Float64Array)) {
      throw new RecedeError("type", fn, "state", `a Float64Array of length ${n}`, state);
    }
    if (state.length !== n)
      throw new RecedeError("dimension", fn, "state", `of length ${n}`, state);
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(state[i]))
        throw new RecedeError("non-finite", fn, `state[${i}]`, "finite", state[i]);
    }
    const round = this.roundCount + 1;
    const gammas = this.gammas;
    for (let it = 0; it < this.iterations; it++) {
      const g = typeof this.stepSize === "number" ? this.stepSize : this.stepSize(round, it);
      if (typeof g !== "number" || !(g > 0 && g <= 1))
        checkStep(fn, `stepSize(${round}, ${it})`, g);
      gammas[it] = g as number;
    }
    const dist = this.distribution;
    const blocks = dist.blocks;
    for (let b = 0; b < blocks.length; b++) this.backup[b].set(blocks[b].data);
    this.decision.set(dist.mean);
    const x = this.stateBuf;
    x.set(state);
    const rep = this.report;
    rep.round = round;
    rep.iterations = this.iterations;
    rep.failedSamples = 0;
    rep.skippedIterations = 0;
    rep.stepSize = gammas[0];
    rep.costMin = Number.NaN;
    rep.costMean = Number.NaN;
    rep.loss = Number.NaN;
    rep.effectiveSampleSize = Number.NaN;
    rep.weightEntropy = Number.NaN;
    try {
      for (let it = 0; it < this.iterations; it++) {
        // The iteration index, not γ, is passed: a non-integer double argument would be boxed.
        if (this.loss !== null) this.sampleStep(x, it);
        else this.objectiveStep(x, it);
      }
      rep.updated = rep.skippedIterations < this.iterations;
      const ctl = this.control;
      const mean = dist.mean;
      for (let j = 0; j < this.controlSize; j++) ctl[j] = mean[j];
      this.roundCount = round;
      if (this.observers.active) {
        const rec = this.record;
        rec.round = round;
        rec.loss = rep.loss;
        rec.gradient = this.objective !== null ? this.firstGrad : undefined;
        rec.lossObject = this.lossObject;
        this.observers.emit(rec as RoundRecord);
      }
      this.shift.apply(dist, round);
    } catch (e) {
      for (let b = 0; b < blocks.length; b++) blocks[b].data.set(this.backup[b]);
      dist.sync();
      this.roundCount = round - 1;
      throw e;
    }
    rep.wallTimeMs = this.timing ? performance.now() - t0 : Number.NaN;
    return this.result;
  }

  private sampleStep(x: Float64Array, it: number): void {
    const gamma = this.gammas[it];
    const first = it === 0;
    const rollout = this.rollout!;
    const loss = this.loss!;
    const dist = this.distribution;
    const k = this.samples;
    const size = this.sliceSize;
    const buf = this.sampled;
    let failures = 0;
    if (this.exec !== null) failures = this.exec.run(x);
    else {
      for (let s = 0; s < this.slices; s++) {
        const from = s * size;
        const count = from + size <= k ? size : k - from;
        dist.sample(this.streams[s], from, count, buf);
        rollout.clip(buf, from, count);
        failures += rollout.run(x, buf, from, count);
      }
    }
    const rep = this.report;
    rep.failedSamples += failures;
    const costs = rollout.costs;
    const w = this.weights;
    const est = this.estimate;
    if (failures === k) est[0] = Number.NaN;
    else if (loss.weighInto !== undefined) loss.weighInto(costs, k, w, est);
    else est[0] = loss.weigh(costs, k, w);
    const value = est[0];
    // Weight summaries (and a guard against a loss that produced unusable weights).
    let abs = 0;
    let sq = 0;
    for (let i = 0; i < k; i++) {
      const wi = w[i];
      abs += wi < 0 ? -wi : wi;
      sq += wi * wi;
    }
    // value === value and abs − abs === 0 are the NaN and finiteness tests without a call (a
    // double passed to a call V8 does not inline is boxed; measured by the alloc benchmark).
    const usable =
      failures < k &&
      // biome-ignore lint/suspicious/noSelfCompare: the allocation-free NaN test (see above).
      value === value &&
      abs - abs === 0 &&
      (abs > 0 || !loss.normalized);
    if (first) {
      let min = Number.POSITIVE_INFINITY;
      let sum = 0;
      for (let i = 0; i < k; i++) {
        const c = costs[i];
        if (c < min) min = c;
        if (c < Number.POSITIVE_INFINITY) sum += c;
      }
      rep.costMin = min;
      rep.costMean = failures < k ? sum / (k - failures) : Number.NaN;
      rep.loss = value;
      if (usable && abs > 0) {
        rep.effectiveSampleSize = (abs * abs) / sq;
        let ent = 0;
        for (let i = 0; i < k; i++) {
          const p = (w[i] < 0 ? -w[i] : w[i]) / abs;
          if (p > 0) ent -= p * Math.log(p);
        }
        rep.weightEntropy = ent;
      }
    }
    if (!usable) {
      rep.skippedIterations++;
      return;
    }
    dist.update(buf, k, w, loss.normalized, gamma);
    if (dist.meanIsParameter) this.clipMean();
  }

  private objectiveStep(x: Float64Array, it: number): void {
    const gamma = this.gammas[it];
    const first = it === 0;
    const obj = this.objective!;
    const dist = this.distribution;
    const g = this.grad;
    const value = obj.gradient(x, dist.mean, g);
    let ok = Number.isFinite(value);
    for (let i = 0; i < g.length && ok; i++) ok = Number.isFinite(g[i]);
    const rep = this.report;
    if (first) {
      rep.costMin = value;
      rep.costMean = value;
      rep.loss = value;
      rep.effectiveSampleSize = 1;
      rep.weightEntropy = 0;
      this.firstGrad.set(g);
    }
    if (!ok) {
      rep.failedSamples++;
      rep.skippedIterations++;
      return;
    }
    this.geometry!.step(dist.mean, g, gamma, dist.mean);
    this.clipMean();
    dist.sync();
  }

  /** Keep the plan within the bounds (Euclidean clip, per component). */
  private clipMean(): void {
    const mean = this.distribution.mean;
    const m = this.controlSize;
    const lo = this.lower;
    const hi = this.upper;
    // Every load and store runs on every pass: a branch that stores only when the mean leaves the
    // box has no type feedback until the first time it does, and that first time (often long after
    // warm-up) deoptimized the whole inlined step, which then ran unoptimized, allocating a heap
    // number per double operation until V8 re-optimized it (about 1 MB; bench alloc, --trace-deopt).
    for (let p = 0; p < mean.length; p++) {
      const j = p % m;
      const v = mean[p];
      const l = lo[j];
      const h = hi[j];
      // NaN stays NaN (both comparisons false), as before.
      // biome-ignore lint/complexity/useMathMinMax: compare-and-select, the form rollout.clip uses.
      mean[p] = v < l ? l : v > h ? h : v;
    }
  }

  reset(): void {
    const dist = this.distribution;
    for (const b of dist.blocks) b.data.set(b.initial);
    dist.sync();
    for (let s = 0; s < this.slices; s++) this.streams[s].setState(this.initialStreams[s]);
    this.exec?.resetStreams();
    this.roundCount = 0;
  }

  snapshot(): ControllerSnapshot {
    const streams = this.streams.map((s) => s.getState());
    this.exec?.dumpStreams(streams);
    return {
      name: this.name,
      round: this.roundCount,
      blocks: this.distribution.blocks.map((b) => new Float64Array(b.data)),
      streams,
    };
  }

  restore(snapshot: ControllerSnapshot): void {
    const fn = `${this.name}.restore`;
    if (snapshot === null || typeof snapshot !== "object") {
      throw new RecedeError("type", fn, "snapshot", "a snapshot from this controller", snapshot);
    }
    const blocks = this.distribution.blocks;
    if (snapshot.name !== this.name) {
      throw new RecedeError("state", fn, "snapshot.name", JSON.stringify(this.name), snapshot.name);
    }
    if (!Array.isArray(snapshot.blocks) || snapshot.blocks.length !== blocks.length) {
      throw new RecedeError(
        "dimension",
        fn,
        "snapshot.blocks",
        `${blocks.length} blocks`,
        snapshot.blocks,
      );
    }
    for (let b = 0; b < blocks.length; b++) {
      const v = snapshot.blocks[b];
      if (!(v instanceof Float64Array) || v.length !== blocks[b].data.length) {
        throw new RecedeError(
          "dimension",
          fn,
          `snapshot.blocks[${b}]`,
          `a Float64Array of length ${blocks[b].data.length}`,
          v,
        );
      }
    }
    if (!Array.isArray(snapshot.streams) || snapshot.streams.length !== this.slices) {
      throw new RecedeError(
        "dimension",
        fn,
        "snapshot.streams",
        `${this.slices} stream states`,
        snapshot.streams,
      );
    }
    for (let s = 0; s < this.slices; s++) {
      if (snapshot.streams[s]?.seed !== this.streams[s].seed) {
        throw new RecedeError(
          "state",
          fn,
          `snapshot.streams[${s}].seed`,
          JSON.stringify(this.streams[s].seed),
          snapshot.streams[s]?.seed,
        );
      }
    }
    requireInteger(fn, "snapshot.round", snapshot.round, 0);
    this.exec?.loadStreams(snapshot.streams);
    for (let b = 0; b < blocks.length; b++) blocks[b].data.set(snapshot.blocks[b]);
    this.distribution.sync();
    for (let s = 0; s < this.slices; s++) this.streams[s].setState(snapshot.streams[s]);
    this.roundCount = snapshot.round;
  }
}
