/**
 * The results file: one JSON object per line (`results.jsonl`), one line per finished run,
 * appended as runs finish so an interrupted sweep keeps what it did. A truncated last line (the
 * process was killed mid-write) is ignored on reading.
 *
 * @module
 */
import { appendFileSync, existsSync, readFileSync, truncateSync } from "node:fs";
import type { RunRecord } from "./run.js";

/** Read every complete record of a results file (none when it does not exist). */
export function readResults(path: string): RunRecord[] {
  if (!existsSync(path)) return [];
  const out: RunRecord[] = [];
  const lines = readFileSync(path, "utf8").split("\n");
  lines.forEach((line, i) => {
    if (line.trim() === "") return;
    try {
      out.push(revive(JSON.parse(line) as RunRecord));
    } catch (e) {
      // Only the last line may be cut short by an interrupt; anything else is a corrupt file.
      if (i < lines.length - 1 && lines.slice(i + 1).some((l) => l.trim() !== ""))
        throw new Error(`${path}:${i + 1}: not a JSON record (${(e as Error).message})`);
    }
  });
  return out;
}

/**
 * Cut a partial last line (left by a kill in the middle of a write) so that appends start on a
 * fresh line. Returns true when something was cut.
 */
export function repairResults(path: string): boolean {
  if (!existsSync(path)) return false;
  const buf = readFileSync(path);
  if (buf.length === 0 || buf[buf.length - 1] === 0x0a) return false;
  const cut = buf.lastIndexOf(0x0a);
  truncateSync(path, cut + 1);
  return true;
}

/** JSON has no NaN: failed runs are written with null and read back as NaN. */
function revive(r: RunRecord): RunRecord {
  const nan = (v: unknown): number => (typeof v === "number" ? v : Number.NaN);
  const metrics: Record<string, number> = {};
  for (const [k, v] of Object.entries(r.metrics ?? {})) metrics[k] = nan(v);
  return {
    ...r,
    metrics,
    cost: nan(r.cost),
    computeMedianMs: nan(r.computeMedianMs),
    computeP95Ms: nan(r.computeP95Ms),
  };
}

/** Append one record as a line. The write is a single call so a line is never interleaved. */
export function appendResult(path: string, record: RunRecord): void {
  appendFileSync(path, `${JSON.stringify(record)}\n`);
}

/**
 * Keep the latest record per key whose configuration hash matches `configs` (records of runs no
 * longer in the sweep, or run under another configuration, are dropped). Returns a map by key.
 */
export function finishedRuns(
  records: readonly RunRecord[],
  configs: ReadonlyMap<string, string>,
): Map<string, RunRecord> {
  const done = new Map<string, RunRecord>();
  for (const r of records) if (configs.get(r.key) === r.config) done.set(r.key, r);
  return done;
}
