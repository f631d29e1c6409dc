/**
 * Export of the tracker's per-round series and summaries as CSV and JSON text.
 *
 * Numbers are written with JavaScript's shortest round-trip representation, so a value parsed back
 * is bit-identical. Non-finite values become an empty CSV field and `null` in JSON.
 *
 * @module
 */

import type { RegretSeries, RegretSummary } from "./tracker.js";

function cell(v: number): string {
  return Number.isFinite(v) ? String(v) : "";
}

/**
 * The series as CSV (RFC 4180): a header row with the column names, then one row per round.
 * Lines end with `\n`.
 */
export function seriesToCsv(series: RegretSeries): string {
  const names = series.names;
  const cols = names.map((n) => series.columns[n]);
  const lines: string[] = [names.join(",")];
  for (let r = 0; r < series.length; r++) {
    let line = "";
    for (let c = 0; c < cols.length; c++) line += (c > 0 ? "," : "") + cell(cols[c][r]);
    lines.push(line);
  }
  return `${lines.join("\n")}\n`;
}

/** JSON replacer: typed arrays → arrays, non-finite numbers → null. */
function replacer(_key: string, value: unknown): unknown {
  if (value instanceof Float64Array)
    return Array.from(value, (v) => (Number.isFinite(v) ? v : null));
  if (typeof value === "number" && !Number.isFinite(value)) return null;
  return value;
}

/** The series as JSON: `{"names": [...], "length": n, "columns": {"round": [...], ...}}`. */
export function seriesToJson(series: RegretSeries, indent?: number): string {
  return JSON.stringify(
    { names: series.names, length: series.length, columns: series.columns },
    replacer,
    indent,
  );
}

/** A summary as JSON (typed arrays as arrays; NaN/±∞ as null; kinds that are off omitted). */
export function summaryToJson(summary: RegretSummary, indent?: number): string {
  return JSON.stringify(summary, replacer, indent);
}
