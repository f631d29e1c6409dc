/**
 * Rollout worker threads: the sample → clip → roll-out part of each control step split across
 * threads that share the controller's buffers.
 *
 * @module
 */
import {
  type CostModel,
  type Dynamics,
  RecedeError,
  requireInteger,
  type Stream,
  type StreamState,
} from "@recede/core";
import type { PlanDistribution } from "../distributions/types.js";
import { requireObject } from "../internal/input.js";
import { type Rollout, rolloutBuffers } from "../rollout.js";
import {
  type AttachTask,
  type BindConfig,
  CMD,
  CMD_BIND,
  CMD_DUMP,
  CMD_EXIT,
  CMD_LOAD,
  CMD_RESET,
  CMD_RUN,
  controlLength,
  DONE,
  GEN,
  READY,
  STATUS,
  sliceRange,
  WORKER_BASE,
  type WorkerReply,
} from "./protocol.js";
import { buildModel, type ModelRecipe } from "./recipe.js";

/**
 * Default of {@link RolloutWorkersOptions.minWork}, from a measurement: `pnpm bench parallel`
 * (field `switch_over`; bicycle, H = 20, 2-core Xeon at 2.6 GHz, Node 20, quiet machine,
 * 2026-12-02) found one thread faster at K·H = 320, 640 and 1280 (0.121 vs 0.134 ms per step)
 * and two threads faster from K·H = 2560 on (0.235 vs 0.200 ms); interpolating the step times
 * puts the crossing near K·H ≈ 1600, so 2048 is a round value just above it. The hand-off round
 * trip is tens of µs and grows when the worker must be woken on a loaded machine: measure on
 * your own machine and set `minWork` from it.
 */
export const DEFAULT_MIN_WORK = 2048;

/** Options of {@link startRolloutWorkers}. */
export interface RolloutWorkersOptions {
  /** How every thread builds the planning model (functions cannot be sent to threads). */
  readonly model: ModelRecipe;
  /**
   * Worker threads besides the main thread (which takes a share of the slices too); 0 keeps
   * everything on the main thread.
   * @defaultValue os.availableParallelism() − 1
   */
  readonly workers?: number;
  /**
   * Smallest amount of work K·H (samples × horizon) for which a controller uses the workers;
   * smaller controllers run entirely on the main thread, where the hand-off would cost more than
   * it saves.
   * @defaultValue 2048 (measured switch-over on a 2-core machine; `pnpm bench parallel`)
   */
  readonly minWork?: number;
  /**
   * How long a control step waits for a worker before it fails with a typed error (ms).
   * @defaultValue 10000
   */
  readonly timeoutMs?: number;
}

/**
 * A pool of rollout worker threads with the planning model built from a {@link ModelRecipe}, for
 * one controller: pass it as `workers` to `createController` (or a preset) together with its
 * `dynamics` and `cost`.
 */
export interface RolloutWorkers {
  /** Worker threads besides the main thread. */
  readonly workers: number;
  /** The planning model, built on the main thread from the recipe. */
  readonly dynamics: Dynamics;
  /** The planning cost, built on the main thread from the recipe. */
  readonly cost: CostModel;
  /** K·H below which a controller stays on the main thread. */
  readonly minWork: number;
  /** True once {@link RolloutWorkers.close} was called (or a worker failed). */
  readonly closed: boolean;
  /** Stop the worker threads. Idempotent. A controller using the pool then throws on `act`. */
  close(): Promise<void>;
}

/** What the controller hands to the pool when it is built (internal). */
export interface ControllerBinding {
  readonly fn: string;
  readonly samples: number;
  readonly horizon: number;
  readonly sliceSize: number;
  readonly slices: number;
  readonly seed: string;
  readonly lower: Float64Array;
  readonly upper: Float64Array;
  readonly rollout: Rollout;
  readonly sampled: Float64Array;
  readonly distribution: PlanDistribution;
  readonly streams: readonly Stream[];
}

/**
 * Runs every slice of one iteration (sample, clip, roll out) across the threads (internal; the
 * controller's only view of the pool).
 */
export interface SliceExecutor {
  /** Sample, clip and roll out all slices from state `x`; returns the number of failed samples. */
  run(x: Float64Array): number;
  /** Overwrite the entries of `states` whose streams live in workers with their current states. */
  dumpStreams(states: StreamState[]): void;
  /** Send the worker-owned entries of `states` to the workers. */
  loadStreams(states: readonly StreamState[]): void;
  /** Reset the worker-owned streams to their initial states. */
  resetStreams(): void;
}

/** The pool's binding entry point (internal). */
export interface WorkerBinding {
  bind(binding: ControllerBinding): SliceExecutor | null;
}

const FN = "startRolloutWorkers";

/**
 * Start rollout worker threads (a piscina pool) that build the planning model from `model`, and
 * build the same model on the main thread.
 *
 * The controller splits each iteration's K samples into slices of `sliceSize`; slice s always
 * draws from its own stream `fork(s)` of the controller's seed, and is always rolled out by the
 * same code on the same shared buffers (samples K·H·m, states K·n, costs K on SharedArrayBuffers),
 * so plans and controls are bit-identical for any number of workers, including none. Thread 0 (the
 * main thread) takes the first block of slices, worker w the (w+1)-th; Gaussian plans are sampled
 * in the threads themselves, other plans on the main thread before the hand-off. The weights, the
 * mirror step and the shift stay on the main thread. Per-step hand-off: a shared control block
 * with Atomics.wait/notify, so `act` stays synchronous (Node's main thread may block; a browser's
 * may not, so in browsers use the main-thread path: no workers).
 *
 * Failure: a worker that throws or does not answer within `timeoutMs` fails `act` with a typed
 * error (code "callback" or "state"), the controller's plan is left as it was, and the pool is
 * closed (its streams can no longer be trusted); build a new pool and controller to continue.
 *
 * @example
 * ```ts
 * const pool = await startRolloutWorkers({
 *   model: { module: "@recede/problems", factory: "bicycle", args: [{ goal: [4, 3] }] },
 *   workers: 1,
 * });
 * const ctrl = mppi({ dynamics: pool.dynamics, cost: pool.cost, workers: pool,
 *   horizon: 50, samples: 2000, noise: [0.75, 0.3] });
 * const { control } = ctrl.act(state);
 * await pool.close();
 * ```
 */
export async function startRolloutWorkers(options: RolloutWorkersOptions): Promise<RolloutWorkers> {
  requireObject(FN, "options", options);
  const recipe = options.model;
  requireObject(FN, "model", recipe);
  if (typeof recipe.module !== "string" || recipe.module.length === 0) {
    throw new RecedeError("type", FN, "model.module", "a module specifier or URL", recipe.module);
  }
  if (typeof recipe.factory !== "string" || recipe.factory.length === 0) {
    throw new RecedeError("type", FN, "model.factory", "an export name", recipe.factory);
  }
  const args = recipe.args ?? [];
  if (!Array.isArray(args)) throw new RecedeError("type", FN, "model.args", "an array", args);
  const os = await import("node:os");
  const workers = requireInteger(
    FN,
    "workers",
    options.workers ?? Math.max(0, os.availableParallelism() - 1),
    0,
  );
  const minWork = requireInteger(FN, "minWork", options.minWork ?? DEFAULT_MIN_WORK, 0);
  const timeoutMs = options.timeoutMs ?? 10_000;
  if (typeof timeoutMs !== "number" || !(timeoutMs > 0)) {
    throw new RecedeError("range", FN, "timeoutMs", "> 0", timeoutMs);
  }
  const data = { module: recipe.module, factory: recipe.factory, args };
  const model = await buildModel(data);
  const pool = new WorkerPool(workers, minWork, timeoutMs, model.dynamics, model.cost);
  if (workers > 0) await pool.start(data);
  return pool;
}

type PortLike = {
  postMessage(v: unknown, transfer?: readonly unknown[]): void;
  close(): void;
};
type ReceiveFn = (port: PortLike) => { message: unknown } | undefined;

class WorkerPool implements RolloutWorkers, WorkerBinding {
  private readonly control: Int32Array;
  private ports: PortLike[] = [];
  private receive: ReceiveFn | null = null;
  private piscina: { destroy(): Promise<void> } | null = null;
  private tasks: Promise<unknown>[] = [];
  private failure: string | null = null;
  private isClosed = false;
  private bound = false;

  constructor(
    readonly workers: number,
    readonly minWork: number,
    private readonly timeoutMs: number,
    readonly dynamics: Dynamics,
    readonly cost: CostModel,
  ) {
    this.control = new Int32Array(new SharedArrayBuffer(4 * controlLength(workers)));
  }

  get closed(): boolean {
    return this.isClosed;
  }

  async start(recipe: AttachTask["recipe"]): Promise<void> {
    const wt = await import("node:worker_threads");
    const { Piscina } = await import("piscina");
    this.receive = wt.receiveMessageOnPort as unknown as ReceiveFn;
    const fromSource = import.meta.url.endsWith(".ts");
    const piscina = new Piscina({
      filename: new URL(fromSource ? "./worker.ts" : "./worker.js", import.meta.url).href,
      minThreads: this.workers,
      maxThreads: this.workers,
      idleTimeout: 2 ** 31 - 1,
      ...(fromSource ? { execArgv: ["--conditions=recede-source", "--import", "tsx"] } : {}),
    });
    this.piscina = piscina;
    for (let w = 0; w < this.workers; w++) {
      const { port1, port2 } = new wt.MessageChannel();
      this.ports.push(port1 as unknown as PortLike);
      const task: AttachTask = {
        index: w,
        control: this.control,
        port: port2,
        recipe,
        fromSource,
      };
      const done = piscina.run(task, { transferList: [port2] }).catch((e: unknown) => {
        this.failure ??= `worker ${w} stopped: ${e instanceof Error ? e.message : String(e)}`;
        // Wake a waiting main thread (it then sees the failure) and keep the task settled.
        Atomics.store(this.control, WORKER_BASE + 3 * w + READY, 1);
      });
      this.tasks.push(done);
    }
    // Wait (asynchronously) until every worker has built its model.
    const deadline = Date.now() + Math.max(this.timeoutMs, 30_000);
    for (;;) {
      let ready = 0;
      for (let w = 0; w < this.workers; w++) {
        if (Atomics.load(this.control, WORKER_BASE + 3 * w + READY) === 1) ready++;
      }
      if (ready === this.workers) break;
      if (Date.now() > deadline) this.failure ??= "workers did not start in time";
      if (this.failure !== null) break;
      await new Promise((r) => setTimeout(r, 2));
    }
    for (let w = 0; w < this.workers && this.failure === null; w++) {
      if (Atomics.load(this.control, WORKER_BASE + 3 * w + STATUS) !== 0) {
        this.failure = this.drainError(w) ?? `worker ${w} failed to build the model`;
      }
    }
    if (this.failure !== null) {
      const msg = this.failure;
      await this.close();
      throw new RecedeError("callback", FN, "model", "a recipe every worker can build", msg);
    }
  }

  bind(b: ControllerBinding): SliceExecutor | null {
    if (this.isClosed) {
      throw new RecedeError("state", b.fn, "workers", "an open pool", "a closed pool");
    }
    if (this.bound) {
      throw new RecedeError(
        "state",
        b.fn,
        "workers",
        "a pool not yet used by another controller",
        "a pool already bound",
      );
    }
    this.bound = true;
    if (this.workers === 0 || b.samples * b.horizon < this.minWork || b.slices < 2) return null;
    const threads = Math.min(this.workers + 1, b.slices);
    const sampler =
      (b.distribution as { sampler?: BindConfig["sampler"] }).sampler?.kind === "gaussian" &&
      b.distribution.mean.buffer instanceof SharedArrayBuffer
        ? (b.distribution as unknown as { sampler: NonNullable<BindConfig["sampler"]> }).sampler
        : null;
    const state = new Float64Array(new SharedArrayBuffer(8 * b.rollout.stateSize));
    const sliceFailures = new Int32Array(new SharedArrayBuffer(4 * b.slices));
    const ranges: [number, number][] = [];
    for (let j = 0; j < threads; j++) ranges.push(sliceRange(b.slices, threads, j));
    const active = threads - 1;
    for (let w = 0; w < active; w++) {
      const [firstSlice, endSlice] = ranges[w + 1];
      const config: BindConfig = {
        samples: b.samples,
        horizon: b.horizon,
        sliceSize: b.sliceSize,
        firstSlice,
        endSlice,
        seed: b.seed,
        lower: b.lower,
        upper: b.upper,
        state,
        sampled: b.sampled,
        buffers: rolloutBuffers(b.rollout),
        checkEveryStep: b.rollout.checkEveryStep,
        sliceFailures,
        sampler,
      };
      this.ports[w].postMessage(config);
    }
    // Workers beyond the number of slice blocks get an empty range.
    for (let w = active; w < this.workers; w++) {
      this.ports[w].postMessage({
        samples: b.samples,
        horizon: b.horizon,
        sliceSize: b.sliceSize,
        firstSlice: 0,
        endSlice: 0,
        seed: b.seed,
        lower: b.lower,
        upper: b.upper,
        state,
        sampled: b.sampled,
        buffers: rolloutBuffers(b.rollout),
        checkEveryStep: b.rollout.checkEveryStep,
        sliceFailures,
        sampler,
      } satisfies BindConfig);
    }
    this.dispatch(CMD_BIND, b.fn);
    return new WorkerExecutor(this, b, ranges, sampler !== null, state, sliceFailures);
  }

  /** Send a command to every worker and wait until all have done it (throws on failure). */
  dispatch(cmd: number, fn: string): void {
    this.signal(cmd, fn);
    this.await(fn);
  }

  /** Start a command on every worker (does not wait). */
  signal(cmd: number, fn: string): void {
    if (this.failure !== null || this.isClosed) {
      throw new RecedeError(
        "state",
        fn,
        "workers",
        "an open pool",
        this.failure ?? "a closed pool",
      );
    }
    const ctl = this.control;
    Atomics.store(ctl, CMD, cmd);
    Atomics.add(ctl, GEN, 1);
    Atomics.notify(ctl, GEN);
  }

  /** Wait until every worker has finished the current command; throws a typed error on failure. */
  await(fn: string): void {
    const ctl = this.control;
    const gen = Atomics.load(ctl, GEN);
    let failed = -1;
    for (let w = 0; w < this.workers; w++) {
      const at = WORKER_BASE + 3 * w;
      for (;;) {
        const d = Atomics.load(ctl, at + DONE);
        if (d === gen) break;
        if (Atomics.wait(ctl, at + DONE, d, this.timeoutMs) === "timed-out") {
          this.failure = `worker ${w} did not answer within ${this.timeoutMs} ms`;
          this.isClosed = true;
          void this.shutdown();
          throw new RecedeError("state", fn, "workers", "workers that answer", this.failure);
        }
      }
      if (Atomics.load(ctl, at + STATUS) !== 0 && failed < 0) failed = w;
    }
    if (failed >= 0) {
      this.failure = this.drainError(failed) ?? `worker ${failed} failed`;
      this.isClosed = true;
      void this.shutdown();
      throw new RecedeError(
        "callback",
        fn,
        "workers",
        "rollout workers that run without error",
        this.failure,
      );
    }
  }

  /** The replies of worker w since the last read. */
  replies(w: number): WorkerReply[] {
    const out: WorkerReply[] = [];
    const receive = this.receive;
    if (receive === null) return out;
    for (;;) {
      const m = receive(this.ports[w]);
      if (m === undefined) return out;
      out.push(m.message as WorkerReply);
    }
  }

  post(w: number, message: unknown): void {
    this.ports[w].postMessage(message);
  }

  private drainError(w: number): string | undefined {
    for (const r of this.replies(w)) if (r.kind === "error") return r.message;
    return undefined;
  }

  async close(): Promise<void> {
    if (this.piscina === null) {
      this.isClosed = true;
      return;
    }
    if (!this.isClosed && this.failure === null) {
      this.isClosed = true;
      const ctl = this.control;
      Atomics.store(ctl, CMD, CMD_EXIT);
      Atomics.add(ctl, GEN, 1);
      Atomics.notify(ctl, GEN);
    }
    this.isClosed = true;
    await this.shutdown();
  }

  private async shutdown(): Promise<void> {
    const p = this.piscina;
    if (p === null) return;
    this.piscina = null;
    // Workers that exited their loop have settled their tasks; destroy() ends the threads (and
    // any that hang).
    await Promise.race([Promise.all(this.tasks), new Promise((r) => setTimeout(r, 1000))]);
    await p.destroy();
    for (const port of this.ports) port.close();
  }
}

class WorkerExecutor implements SliceExecutor {
  private readonly mainEnd: number;

  constructor(
    private readonly pool: WorkerPool,
    private readonly b: ControllerBinding,
    private readonly ranges: readonly [number, number][],
    private readonly workerSampling: boolean,
    private readonly state: Float64Array,
    private readonly sliceFailures: Int32Array,
  ) {
    this.mainEnd = ranges[0][1];
  }

  run(x: Float64Array): number {
    const b = this.b;
    const fn = b.fn;
    const k = b.samples;
    const size = b.sliceSize;
    const buf = b.sampled;
    const dist = b.distribution;
    const streams = b.streams;
    const rollout = b.rollout;
    const fails = this.sliceFailures;
    this.state.set(x);
    if (!this.workerSampling) {
      for (let s = 0; s < b.slices; s++) {
        const from = s * size;
        dist.sample(streams[s], from, from + size <= k ? size : k - from, buf);
      }
    }
    this.pool.signal(CMD_RUN, fn);
    try {
      for (let s = 0; s < this.mainEnd; s++) {
        const from = s * size;
        const count = from + size <= k ? size : k - from;
        if (this.workerSampling) dist.sample(streams[s], from, count, buf);
        rollout.clip(buf, from, count);
        fails[s] = rollout.run(x, buf, from, count);
      }
    } finally {
      this.pool.await(fn);
    }
    let failures = 0;
    for (let s = 0; s < b.slices; s++) failures += fails[s];
    return failures;
  }

  dumpStreams(states: StreamState[]): void {
    if (!this.workerSampling) return;
    const fn = `${this.b.fn.replace(/\.act$/, "")}.snapshot`;
    this.pool.dispatch(CMD_DUMP, fn);
    for (let w = 0; w < this.ranges.length - 1; w++) {
      const [first] = this.ranges[w + 1];
      for (const r of this.pool.replies(w)) {
        if (r.kind !== "streams") continue;
        for (let i = 0; i < r.states.length; i++) states[first + i] = r.states[i];
      }
    }
  }

  loadStreams(states: readonly StreamState[]): void {
    if (!this.workerSampling) return;
    for (let w = 0; w < this.pool.workers; w++) {
      const r = this.ranges[w + 1];
      this.pool.post(w, { states: r === undefined ? [] : states.slice(r[0], r[1]) });
    }
    this.pool.dispatch(CMD_LOAD, `${this.b.fn.replace(/\.act$/, "")}.restore`);
  }

  resetStreams(): void {
    if (!this.workerSampling) return;
    this.pool.dispatch(CMD_RESET, `${this.b.fn.replace(/\.act$/, "")}.reset`);
  }
}
