/**
 * Worker-thread entry for sweeps (loaded by piscina): builds the registry of the sweep once per
 * thread, then executes the runs it is handed.
 *
 * @module
 */
import type { Registry } from "./registry.js";
import { executeRun, type RunRecord } from "./run.js";
import { parseSweepSpec, type SweepSpec } from "./spec.js";
import { registryFor, type WorkerTask } from "./sweep.js";

let cached: { text: string; registry: Registry; spec: SweepSpec } | undefined;

/** Execute one run of a sweep in this thread. */
export default async function runTask(task: WorkerTask): Promise<RunRecord> {
  const text = `${task.dir}\u0000${JSON.stringify(task.raw)}`;
  if (!cached || cached.text !== text) {
    const registry = await registryFor({ raw: task.raw, dir: task.dir });
    cached = { text, registry, spec: parseSweepSpec(task.raw, registry) };
  }
  return executeRun(cached.spec, task.cell, cached.registry, {
    quick: task.quick,
    keepTrajectory: task.keepTrajectory,
  });
}
