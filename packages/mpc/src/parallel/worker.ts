/**
 * Worker-thread entry (loaded by piscina, one long-lived task per thread): build the planning
 * model from its recipe, then serve commands from the shared control block until told to exit.
 * See protocol.ts for the hand-off.
 *
 * @module
 */
import { type MessagePort, receiveMessageOnPort } from "node:worker_threads";
import { type CostModel, createStream, type Dynamics, type Stream } from "@recede/core";
import { sampleGaussianRows } from "../distributions/gaussian.js";
import { adoptRollout, type Rollout } from "../rollout.js";
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
  DONE,
  GEN,
  READY,
  STATUS,
  WORKER_BASE,
  type WorkerReply,
} from "./protocol.js";
import { buildModel } from "./recipe.js";

interface Bound {
  readonly config: BindConfig;
  readonly rollout: Rollout;
  readonly streams: Stream[];
  readonly initial: ReturnType<Stream["getState"]>[];
}

/** Serve one controller's rollouts on this thread; resolves when the pool closes. */
export default async function attach(task: AttachTask): Promise<string> {
  const ctl = task.control;
  const port = task.port as MessagePort;
  const at = WORKER_BASE + 3 * task.index;
  const reply = (r: WorkerReply): void => port.postMessage(r);
  let model: { dynamics: Dynamics; cost: CostModel };
  try {
    if (task.fromSource) {
      // Development only: ESM imports of .ts sources in a worker need tsx's loader registered here.
      const tsx = "tsx/esm/api";
      ((await import(tsx)) as { register(): void }).register();
    }
    model = await buildModel(task.recipe);
  } catch (e) {
    reply({ kind: "error", message: messageOf(e) });
    Atomics.store(ctl, at + STATUS, 1);
    Atomics.store(ctl, at + READY, 1);
    Atomics.notify(ctl, at + READY);
    return "failed";
  }
  // Read the generation before announcing readiness: the main thread sends the first command
  // only once every worker is ready, so no command can slip in between.
  let seen = Atomics.load(ctl, GEN);
  let bound: Bound | null = null;
  Atomics.store(ctl, at + READY, 1);
  Atomics.notify(ctl, at + READY);
  for (;;) {
    Atomics.wait(ctl, GEN, seen);
    const gen = Atomics.load(ctl, GEN);
    if (gen === seen) continue;
    seen = gen;
    const cmd = Atomics.load(ctl, CMD);
    let status = 0;
    try {
      if (cmd === CMD_RUN) run(bound!);
      else if (cmd === CMD_BIND) bound = bind(port, model);
      else if (cmd === CMD_RESET) {
        for (let i = 0; i < bound!.streams.length; i++)
          bound!.streams[i].setState(bound!.initial[i]);
      } else if (cmd === CMD_DUMP) {
        reply({ kind: "streams", states: bound!.streams.map((s) => s.getState()) });
      } else if (cmd === CMD_LOAD) {
        const msg = receiveMessageOnPort(port)?.message as {
          states: ReturnType<Stream["getState"]>[];
        };
        for (let i = 0; i < bound!.streams.length; i++) bound!.streams[i].setState(msg.states[i]);
      }
    } catch (e) {
      status = 1;
      reply({ kind: "error", message: messageOf(e) });
    }
    Atomics.store(ctl, at + STATUS, status);
    Atomics.store(ctl, at + DONE, gen);
    Atomics.notify(ctl, at + DONE);
    if (cmd === CMD_EXIT) return "closed";
  }
}

function bind(port: MessagePort, model: { dynamics: Dynamics; cost: CostModel }): Bound {
  const msg = receiveMessageOnPort(port);
  if (msg === undefined) throw new Error("bind: no configuration received");
  const config = msg.message as BindConfig;
  const rollout = adoptRollout(
    model.dynamics,
    model.cost,
    config.samples,
    config.horizon,
    config.lower,
    config.upper,
    config.buffers,
    config.checkEveryStep,
  );
  const streams: Stream[] = [];
  if (config.sampler !== null) {
    const root = createStream(config.seed);
    for (let s = config.firstSlice; s < config.endSlice; s++) streams.push(root.fork(s));
  }
  return { config, rollout, streams, initial: streams.map((s) => s.getState()) };
}

/** Sample (if this thread owns the streams), clip and roll out this worker's slices. */
function run(b: Bound): void {
  const c = b.config;
  const k = c.samples;
  const size = c.sliceSize;
  const buf = c.sampled;
  const rollout = b.rollout;
  const sampler = c.sampler;
  for (let s = c.firstSlice; s < c.endSlice; s++) {
    const from = s * size;
    const count = from + size <= k ? size : k - from;
    if (sampler !== null)
      sampleGaussianRows(sampler, b.streams[s - c.firstSlice], from, count, buf);
    rollout.clip(buf, from, count);
    c.sliceFailures[s] = rollout.run(c.state, buf, from, count);
  }
}

function messageOf(e: unknown): string {
  return e instanceof Error ? `${e.name}: ${e.message}` : String(e);
}
