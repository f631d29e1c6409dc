/**
 * Running a sweep: load and validate the sweep file, enumerate its runs, keep this shard's slice,
 * skip runs already in the results file (resume), execute the rest on worker threads, append each
 * record as it finishes, then write the summary, charts and report.
 *
 * @module
 */
import { mkdirSync, readFileSync } from "node:fs";
import { availableParallelism } from "node:os";
import { dirname, isAbsolute, join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { RecedeError } from "@recede/core";
import { builtinRegistry } from "./builtins.js";
import { SpecError } from "./params.js";
import { Progress, type ProgressSink } from "./progress.js";
import type { PluginModule, ProblemDefinition, Registry } from "./registry.js";
import { appendResult, finishedRuns, readResults, repairResults } from "./results.js";
import { executeRun, type RunRecord } from "./run.js";
import {
  enumerateRuns,
  parseSweepSpec,
  pluginPaths,
  type RunCell,
  type Shard,
  type SweepSpec,
  shardRuns,
} from "./spec.js";

/** A sweep file as read from disk: the raw JSON and the folder plugin paths resolve against. */
export interface SweepSource {
  /** The parsed JSON of the sweep file. */
  readonly raw: unknown;
  /** Folder of the sweep file. */
  readonly dir: string;
}

/** Read a sweep file (JSON syntax errors become a {@link SpecError} with the file name). */
export function readSweepFile(path: string): SweepSource {
  let text: string;
  try {
    text = readFileSync(path, "utf8");
  } catch (e) {
    throw new SpecError(path, `cannot read the sweep file (${(e as Error).message})`);
  }
  try {
    return { raw: JSON.parse(text), dir: dirname(resolve(path)) };
  } catch (e) {
    throw new SpecError(path, `is not valid JSON (${(e as Error).message})`);
  }
}

/**
 * Import a plugin module. A TypeScript plugin is loaded through tsx's `tsImport` when plain
 * `import()` cannot (worker threads do not inherit the main thread's module hooks).
 */
async function importPlugin(path: string): Promise<Partial<PluginModule>> {
  const url = pathToFileURL(path).href;
  try {
    return (await import(url)) as Partial<PluginModule>;
  } catch (e) {
    if (!path.endsWith(".ts")) throw e;
    const api = "tsx/esm/api";
    const { tsImport } = (await import(api)) as {
      tsImport(specifier: string, parent: string): Promise<Partial<PluginModule>>;
    };
    return tsImport(url, import.meta.url);
  }
}

/** Build the registry for a sweep: the built-in kinds plus what its plugins register. */
export async function registryFor(source: SweepSource): Promise<Registry> {
  const registry = builtinRegistry();
  const paths = pluginPaths(source.raw);
  for (let i = 0; i < paths.length; i++) {
    const p = isAbsolute(paths[i]) ? paths[i] : resolve(source.dir, paths[i]);
    let mod: Partial<PluginModule>;
    try {
      mod = await importPlugin(p);
    } catch (e) {
      throw new SpecError(`plugins[${i}]`, `cannot load ${p} (${(e as Error).message})`);
    }
    if (typeof mod.register !== "function")
      throw new SpecError(`plugins[${i}]`, `module ${p} must export a function register(registry)`);
    await mod.register(registry);
  }
  return registry;
}

/** Options of {@link runSweep}. */
export interface SweepOptions {
  /** Output folder (results.jsonl, summary, charts, report). */
  readonly outDir: string;
  /** Worker threads; 1 runs in this thread. @defaultValue all cores (os.availableParallelism()) */
  readonly workers?: number;
  /** Run only this shard's slice. @defaultValue the whole sweep */
  readonly shard?: Shard;
  /**
   * Smoke run: only the first seed and one episode of every (problem, optimizer) pair (also passed
   * to factories as `quick`). @defaultValue false
   */
  readonly quick?: boolean;
  /** Keep state trajectories in the records. @defaultValue false */
  readonly keepTrajectory?: boolean;
  /** Where progress goes. @defaultValue process.stderr */
  readonly progress?: ProgressSink;
  /** Stop after this many new runs (for tests of interrupt and resume). @defaultValue no limit */
  readonly maxRuns?: number;
}

/** What {@link runSweep} did. */
export interface SweepOutcome {
  readonly spec: SweepSpec;
  /** Runs of this shard. */
  readonly planned: number;
  /** Runs skipped because results.jsonl already had them. */
  readonly skipped: number;
  /** Runs executed now. */
  readonly executed: number;
  /** All records of this shard's runs (previous and new). */
  readonly records: RunRecord[];
  /** Path of the results file. */
  readonly resultsPath: string;
}

/** The task a worker thread receives. */
export interface WorkerTask {
  readonly raw: unknown;
  readonly dir: string;
  readonly cell: RunCell;
  readonly quick: boolean;
  readonly keepTrajectory: boolean;
}

/**
 * Check every (problem, optimizer) pair against a concrete problem before any run starts, so a
 * wrong size or an inapplicable optimizer is reported with its place in the file instead of as
 * failed runs.
 */
export function preflight(spec: SweepSpec, registry: Registry, quick: boolean): void {
  spec.problems.forEach((pe, i) => {
    let problem: ReturnType<ProblemDefinition["create"]>;
    try {
      problem = registry.problem(pe.problem)!.create(pe.params, {
        seed: spec.seeds[0],
        quick,
        registry,
        optimizerEntry: (label) => spec.optimizers.find((o) => o.label === label),
      });
    } catch (e) {
      throw new SpecError(`problems[${i}]`, (e as Error).message);
    }
    spec.optimizers.forEach((oe, j) => {
      if (oe.only && !oe.only.includes(pe.label)) return;
      const check = registry.optimizer(oe.kind)!.check;
      if (!check) return;
      try {
        check(oe.params, problem);
      } catch (e) {
        // A typed error names the parameter: point at it in the file.
        const arg = e instanceof RecedeError && e.arg in oe.params ? `.${e.arg}` : "";
        throw new SpecError(
          `optimizers[${j}]${arg}`,
          `on problem "${pe.label}": ${(e as Error).message}`,
        );
      }
    });
  });
}

/**
 * The runs `runSweep` would consider for this shard (before skipping finished ones), after
 * validating the file and checking every entry: for planning cluster jobs (`sweep --plan`).
 */
export async function planSweep(
  source: SweepSource,
  shard: Shard | undefined,
  quick = false,
): Promise<{ spec: SweepSpec; all: number; runs: RunCell[] }> {
  const registry = await registryFor(source);
  const parsed = parseSweepSpec(source.raw, registry);
  const spec: SweepSpec = quick
    ? { ...parsed, seeds: parsed.seeds.slice(0, 1), episodes: 1 }
    : parsed;
  preflight(spec, registry, quick);
  const every = enumerateRuns(spec);
  return { spec, all: every.length, runs: shardRuns(every, shard) };
}

/** Run (this shard of) a sweep, resuming from `outDir/results.jsonl`. */
export async function runSweep(source: SweepSource, options: SweepOptions): Promise<SweepOutcome> {
  const registry = await registryFor(source);
  const parsed = parseSweepSpec(source.raw, registry);
  // A smoke run: the first seed and one episode of every (problem, optimizer) pair.
  const spec: SweepSpec = options.quick
    ? { ...parsed, seeds: parsed.seeds.slice(0, 1), episodes: 1 }
    : parsed;
  preflight(spec, registry, options.quick ?? false);
  const all = shardRuns(enumerateRuns(spec), options.shard);
  mkdirSync(options.outDir, { recursive: true });
  const resultsPath = join(options.outDir, "results.jsonl");
  const configs = new Map(all.map((c) => [c.key, c.config] as const));
  const sink = options.progress ?? process.stderr;
  if (repairResults(resultsPath))
    sink.write(`resume: dropped a partly written last line of ${resultsPath}\n`);
  const done = finishedRuns(readResults(resultsPath), configs);
  const skipped = done.size;
  let todo = all.filter((c) => !done.has(c.key));
  if (options.maxRuns !== undefined) todo = todo.slice(0, options.maxRuns);
  if (done.size > 0)
    sink.write(
      `resume: ${done.size} of ${all.length} runs already in ${resultsPath}; running ${todo.length}\n`,
    );
  const progress = new Progress(todo.length, sink);
  const quick = options.quick ?? false;
  const keepTrajectory = options.keepTrajectory ?? false;
  const workers = Math.max(1, Math.min(options.workers ?? availableParallelism(), todo.length));

  const finish = (r: RunRecord): void => {
    appendResult(resultsPath, r);
    done.set(r.key, r);
    progress.tick(r.key, !r.error);
  };

  if (workers <= 1) {
    for (const cell of todo)
      finish(await executeRun(spec, cell, registry, { quick, keepTrajectory }));
  } else {
    const { Piscina } = await import("piscina");
    const fromSource = import.meta.url.endsWith(".ts");
    const pool = new Piscina({
      filename: new URL(fromSource ? "./worker.ts" : "./worker.js", import.meta.url).href,
      maxThreads: workers,
      minThreads: workers,
      idleTimeout: 1000,
      ...(fromSource ? { execArgv: ["--conditions=recede-source", "--import", "tsx"] } : {}),
    });
    try {
      await Promise.all(
        todo.map(async (cell) => {
          const task: WorkerTask = {
            raw: source.raw,
            dir: source.dir,
            cell,
            quick,
            keepTrajectory,
          };
          finish((await pool.run(task)) as RunRecord);
        }),
      );
    } finally {
      await pool.destroy();
    }
  }
  const records = all.filter((c) => done.has(c.key)).map((c) => done.get(c.key)!);
  return {
    spec,
    planned: all.length,
    skipped,
    executed: todo.length,
    records,
    resultsPath,
  };
}
