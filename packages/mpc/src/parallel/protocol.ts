/**
 * Internal: the hand-off protocol between a controller on the main thread and its rollout worker
 * threads (never re-exported).
 *
 * One control block, an Int32Array on a SharedArrayBuffer:
 *   [GEN]  generation: the main thread writes a command, then increments GEN and notifies;
 *   [CMD]  the command (RUN, BIND, RESET, DUMP, LOAD, EXIT);
 *   per worker w at WORKER_BASE + 3w: DONE (the generation it finished), STATUS (0 ok, 1 failed),
 *   READY (1 once the model is built).
 * A worker sleeps in Atomics.wait on GEN, runs the command, stores its STATUS, then DONE = GEN, and
 * notifies; the main thread, after doing its own share, waits on each DONE. Data that is not in
 * the shared buffers (the bind configuration, stream states, error messages) travels over a
 * MessagePort per worker and is read synchronously with `receiveMessageOnPort` after the
 * hand-shake, so a synchronous `act` never needs the main thread's event loop.
 *
 * @module
 */
import type { StreamState } from "@recede/core";
import type { GaussianSampler } from "../distributions/gaussian.js";
import type { RolloutBuffers } from "../rollout.js";

export const GEN = 0;
export const CMD = 1;
export const WORKER_BASE = 4;
export const DONE = 0;
export const STATUS = 1;
export const READY = 2;
/** Control-block length for `workers` workers. */
export function controlLength(workers: number): number {
  return WORKER_BASE + 3 * workers;
}

export const CMD_RUN = 1;
export const CMD_BIND = 2;
export const CMD_RESET = 3;
export const CMD_DUMP = 4;
export const CMD_LOAD = 5;
export const CMD_EXIT = 9;

/** How every thread builds the planning model: import `module`, call `factory(...args)`. */
export interface RecipeData {
  readonly module: string;
  readonly factory: string;
  readonly args: readonly unknown[];
}

/** The first message to a worker (the piscina task's argument). */
export interface AttachTask {
  readonly index: number;
  readonly control: Int32Array;
  readonly port: unknown;
  readonly recipe: RecipeData;
  /**
   * The pool runs from the TypeScript sources (tests): register the tsx loader for the model's
   * imports (development only).
   */
  readonly fromSource: boolean;
}

/** What a worker needs to run its slices of one controller (sent with CMD_BIND). */
export interface BindConfig {
  readonly samples: number;
  readonly horizon: number;
  readonly sliceSize: number;
  /** Slices [firstSlice, endSlice) are this worker's. */
  readonly firstSlice: number;
  readonly endSlice: number;
  /** Seed path of the controller's root stream (slice s draws from fork(s)). */
  readonly seed: string;
  readonly lower: Float64Array;
  readonly upper: Float64Array;
  /** The measured state x_t (n), written by the main thread before each RUN. */
  readonly state: Float64Array;
  /** The K·H·m samples. */
  readonly sampled: Float64Array;
  readonly buffers: RolloutBuffers;
  /** The controller's rollout checks every intermediate state (RolloutOptions.checkEveryStep). */
  readonly checkEveryStep: boolean;
  /** Failures per slice. */
  readonly sliceFailures: Int32Array;
  /** Draw the worker's slices in the worker (Gaussian plans), or null: the main thread samples. */
  readonly sampler: GaussianSampler | null;
}

/** Replies a worker posts (read with receiveMessageOnPort). */
export type WorkerReply =
  | { readonly kind: "error"; readonly message: string }
  | { readonly kind: "streams"; readonly states: readonly StreamState[] };

/** Slices of thread j of `threads` (contiguous blocks; thread 0 is the main thread). */
export function sliceRange(slices: number, threads: number, j: number): [number, number] {
  return [Math.floor((j * slices) / threads), Math.floor(((j + 1) * slices) / threads)];
}
