#!/usr/bin/env node
/**
 * `recede-bench`: the command line of bench/.
 *
 *   recede-bench sweep <sweep.json> [--out DIR] [--workers N] [--shard i/n] [--quick] [--trajectories] [--plan]
 *   recede-bench merge <DIR>... --out DIR
 *   recede-bench report <DIR>
 *   recede-bench demo [--quick] [--out DIR] [--workers N]
 *   recede-bench bench [SUITE...] [--quick]
 *   recede-bench kinds
 *
 * See bench/README.md.
 *
 * @module
 */
import { existsSync, mkdirSync, readdirSync, writeFileSync } from "node:fs";
import { basename, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { parseArgs } from "node:util";
import { builtinRegistry } from "./builtins.js";
import { runDemo } from "./demo/demo.js";
import { writeSweepOutputs } from "./outputs.js";
import { SpecError } from "./params.js";
import { currentMeta, summaryTable, textTable } from "./report.js";
import { appendResult, readResults } from "./results.js";
import type { RunRecord } from "./run.js";
import { parseShard } from "./spec.js";
import type { Suite } from "./suite.js";
import { sortRecords, summarize } from "./summary.js";
import { planSweep, readSweepFile, runSweep } from "./sweep.js";

const USAGE = `recede-bench — benchmark sweeps, suites and the demo of recede

usage:
  recede-bench sweep <sweep.json> [--out DIR] [--workers N] [--shard i/n] [--quick] [--trajectories] [--plan]
      run a sweep (problems × optimizers × seeds × episodes); resumes from DIR/results.jsonl
      --out DIR        output folder (default out/sweeps/<sweep name>, or …/shard-i-of-n)
      --workers N      worker threads (default: all cores; 1 = in this thread)
      --shard i/n      run only slice i of n (0 ≤ i < n); merge the slices with 'merge'
      --quick          smoke run: first seed, one episode of every pair
      --trajectories   keep every run's state trajectory in results.jsonl
      --plan           validate the file and list the runs (of this shard) without running
  recede-bench merge <DIR>... --out DIR
      combine the results.jsonl of shard folders and write the summary and report
  recede-bench report <DIR>
      re-render summary and report from DIR/results.jsonl
  recede-bench demo [--quick] [--out DIR] [--workers N]
      the rooftop parcel drone in gusts (writes out/demo/)
  recede-bench bench [SUITE...] [--quick]
      run benchmark suites (all when none named); writes bench/results/<suite>.json
  recede-bench kinds
      list the problems and optimizer kinds a sweep file may name, with their parameters
`;

const benchRoot = fileURLToPath(new URL("..", import.meta.url));

/** Entry point; returns the process exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  const [command, ...rest] = argv;
  const command_line = `recede-bench ${argv.join(" ")}`;
  switch (command) {
    case "sweep": {
      const { values, positionals } = parseArgs({
        args: rest,
        allowPositionals: true,
        options: {
          out: { type: "string" },
          workers: { type: "string" },
          shard: { type: "string" },
          quick: { type: "boolean", default: false },
          trajectories: { type: "boolean", default: false },
          plan: { type: "boolean", default: false },
        },
      });
      if (positionals.length !== 1) return usage("sweep needs exactly one sweep file");
      const source = readSweepFile(positionals[0]);
      const shard = values.shard ? parseShard(values.shard) : undefined;
      if (values.plan) {
        const plan = await planSweep(source, shard, values.quick);
        for (const r of plan.runs) process.stdout.write(`${r.key}\n`);
        process.stdout.write(
          `${plan.runs.length} of ${plan.all} runs${shard ? ` in shard ${shard.index}/${shard.count}` : ""} (sweep file valid)\n`,
        );
        return 0;
      }
      const workers = values.workers === undefined ? undefined : parseWorkers(values.workers);
      const name =
        typeof (source.raw as { name?: unknown }).name === "string"
          ? (source.raw as { name: string }).name
          : basename(positionals[0], ".json");
      const outDir =
        values.out ??
        join("out", "sweeps", name, ...(shard ? [`shard-${shard.index}-of-${shard.count}`] : []));
      let interrupted = false;
      const onSignal = (): void => {
        if (interrupted) process.exit(130);
        interrupted = true;
        process.stderr.write(
          `\ninterrupted: finished runs are kept in ${join(outDir, "results.jsonl")}; run the same command again to resume\n`,
        );
        process.exit(130);
      };
      process.on("SIGINT", onSignal);
      process.on("SIGTERM", onSignal);
      const outcome = await runSweep(source, {
        outDir,
        workers,
        shard,
        quick: values.quick,
        keepTrajectory: values.trajectories,
      });
      const files = await writeSweepOutputs(
        outDir,
        outcome.records,
        currentMeta(command_line),
        `Sweep ${outcome.spec.name}${shard ? ` (shard ${shard.index}/${shard.count})` : ""}`,
      );
      process.stdout.write(`${textTable(summaryTable(summarize(outcome.records)))}\n\n`);
      process.stdout.write(
        `${outcome.executed} runs executed, ${outcome.skipped} resumed from ${outcome.resultsPath}\nwrote ${files.summaryMd}, ${files.reportHtml} and ${files.charts.length} charts\n`,
      );
      return 0;
    }
    case "merge": {
      const { values, positionals } = parseArgs({
        args: rest,
        allowPositionals: true,
        options: { out: { type: "string" } },
      });
      if (positionals.length === 0 || !values.out)
        return usage("merge needs shard folders and --out DIR");
      const records = mergeResults(positionals, values.out);
      const files = await writeSweepOutputs(
        values.out,
        records,
        currentMeta(command_line),
        `Sweep (merged from ${positionals.length} folders)`,
      );
      process.stdout.write(
        `${textTable(summaryTable(summarize(records)))}\n\nmerged ${records.length} runs; wrote ${files.summaryMd} and ${files.reportHtml}\n`,
      );
      return 0;
    }
    case "report": {
      if (rest.length !== 1) return usage("report needs one folder");
      const records = readResults(join(rest[0], "results.jsonl"));
      if (records.length === 0) throw new SpecError(rest[0], "has no results.jsonl records");
      const files = await writeSweepOutputs(
        rest[0],
        records,
        currentMeta(command_line),
        `Sweep report`,
      );
      process.stdout.write(`wrote ${files.summaryMd} and ${files.reportHtml}\n`);
      return 0;
    }
    case "demo": {
      const { values } = parseArgs({
        args: rest,
        options: {
          quick: { type: "boolean", default: false },
          out: { type: "string", default: join("out", "demo") },
          workers: { type: "string" },
        },
      });
      await runDemo({
        outDir: values.out,
        quick: values.quick || process.env.RECEDE_DEMO_QUICK === "1",
        workers: values.workers === undefined ? undefined : parseWorkers(values.workers),
        command: command_line,
      });
      return 0;
    }
    case "bench":
      return runSuites(rest);
    case "kinds":
      process.stdout.write(describeKinds());
      return 0;
    case undefined:
    case "help":
    case "--help":
    case "-h":
      process.stdout.write(USAGE);
      return 0;
    default:
      return usage(`unknown command "${command}"`);
  }
}

function usage(message: string): number {
  process.stderr.write(`recede-bench: ${message}\n\n${USAGE}`);
  return 2;
}

function parseWorkers(text: string): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1)
    throw new SpecError("--workers", `must be an integer ≥ 1 (got "${text}")`);
  return n;
}

/**
 * Read the results.jsonl of every folder, keep one record per key (the same key in two folders
 * must be the same run), write them sorted to `outDir/results.jsonl` and return them.
 */
export function mergeResults(dirs: readonly string[], outDir: string): RunRecord[] {
  const byKey = new Map<string, RunRecord>();
  for (const d of dirs) {
    const path = join(d, "results.jsonl");
    if (!existsSync(path)) throw new SpecError(d, "has no results.jsonl");
    for (const r of readResults(path)) {
      const prev = byKey.get(r.key);
      if (prev && prev.config !== r.config)
        throw new SpecError(
          path,
          `run ${r.key} was made with another configuration than in an earlier folder`,
        );
      byKey.set(r.key, r);
    }
  }
  const records = sortRecords([...byKey.values()]);
  mkdirSync(outDir, { recursive: true });
  const out = join(outDir, "results.jsonl");
  writeFileSync(out, "");
  for (const r of records) appendResult(out, r);
  return records;
}

function describeKinds(): string {
  const r = builtinRegistry();
  const lines: string[] = ["problems:"];
  const param = (
    name: string,
    s: { type: string; description: string; default?: unknown },
  ): string =>
    `      ${name} (${s.type}${s.default !== undefined ? `, default ${JSON.stringify(s.default)}` : ""}): ${s.description}`;
  for (const id of r.problemIds()) {
    const d = r.problem(id)!;
    lines.push(`  ${id} — ${d.description}`);
    for (const [k, s] of Object.entries(d.params)) lines.push(param(k, s));
  }
  lines.push("", "optimizer kinds:");
  for (const kind of r.optimizerKinds()) {
    const d = r.optimizer(kind)!;
    lines.push(`  ${kind} — ${d.description}`);
    for (const [k, s] of Object.entries(d.params)) lines.push(param(k, s));
  }
  return `${lines.join("\n")}\n`;
}

/** `bench [SUITE...]`: load bench/dist/suites/<name>.js, run, write bench/results/<name>.json. */
async function runSuites(args: readonly string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args: [...args],
    allowPositionals: true,
    options: { quick: { type: "boolean", default: false } },
  });
  const suiteDir = fileURLToPath(new URL("./suites/", import.meta.url));
  const ext = import.meta.url.endsWith(".ts") ? ".ts" : ".js";
  const available = existsSync(suiteDir)
    ? readdirSync(suiteDir)
        .filter((f) => f.endsWith(ext) && !f.endsWith(`.test${ext}`) && !f.endsWith(`.d${ext}`))
        .map((f) => f.slice(0, -ext.length))
        .sort()
    : [];
  const names = positionals.length > 0 ? positionals : available;
  if (names.length === 0) {
    process.stderr.write(`recede-bench: no suites found in ${suiteDir} (run pnpm build first)\n`);
    return 1;
  }
  for (const n of names)
    if (!available.includes(n))
      return usage(`unknown suite "${n}"; available: ${available.join(", ") || "(none)"}`);
  const resultsDir = join(benchRoot, "results");
  mkdirSync(resultsDir, { recursive: true });
  let status = 0;
  for (const name of names) {
    const mod = (await import(pathToFileURL(join(suiteDir, `${name}${ext}`)).href)) as {
      suite?: Suite;
    };
    if (!mod.suite || typeof mod.suite.run !== "function") {
      process.stderr.write(`recede-bench: ${name}${ext} does not export \`suite\`\n`);
      status = 1;
      continue;
    }
    process.stderr.write(`suite ${name}: ${mod.suite.description}\n`);
    const started = Date.now();
    const output = await mod.suite.run({
      quick: values.quick,
      log: (m: string) => process.stderr.write(`  ${m}\n`),
    });
    const meta = {
      ...currentMeta(`pnpm bench ${name}${values.quick ? " --quick" : ""}`),
      seconds: (Date.now() - started) / 1000,
    };
    const path = join(resultsDir, `${name}.json`);
    writeFileSync(path, `${JSON.stringify({ meta, ...output.result }, null, 2)}\n`);
    for (const line of output.lines) process.stdout.write(`${name}: ${line}\n`);
    process.stdout.write(`${name}: wrote ${path}\n`);
  }
  return status;
}

const isMain =
  process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  main(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    (e: unknown) => {
      const code = (e as { code?: unknown }).code;
      if (
        e instanceof SpecError ||
        (typeof code === "string" && code.startsWith("ERR_PARSE_ARGS"))
      ) {
        process.stderr.write(`recede-bench: ${(e as Error).message}\n`);
        process.exitCode = 2;
      } else {
        process.stderr.write(
          `recede-bench: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`,
        );
        process.exitCode = 1;
      }
    },
  );
}
