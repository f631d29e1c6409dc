/**
 * Reports: the Markdown summary table and the self-contained HTML page (inline CSS and inline SVG
 * charts, no scripts, no external requests).
 *
 * @module
 */
import { cpus } from "node:os";
import type { Chart } from "./charts.js";
import type { Interval } from "./stats.js";
import type { GroupOutcome, GroupTiming, SweepSummary } from "./summary.js";

/** Facts about where and how a result was produced (the `meta` block of every output). */
export interface RunMeta {
  /** The command line that produced the output. */
  readonly command: string;
  /** ISO 8601 time. */
  readonly date: string;
  /** Node.js version. */
  readonly node: string;
  /** CPU model. */
  readonly cpu: string;
  /** Logical cores. */
  readonly cores: number;
}

/** Meta block for the current process. */
export function currentMeta(command?: string): RunMeta {
  const list = cpus();
  return {
    command: command ?? process.argv.slice(1).join(" "),
    date: new Date().toISOString(),
    node: process.version,
    cpu: list[0]?.model?.trim() ?? "unknown",
    cores: list.length,
  };
}

/** Format a number with about 4 significant digits, no exponent for everyday sizes. */
export function fmt(v: number): string {
  if (!Number.isFinite(v)) return "–";
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a !== 0 && (a >= 1e6 || a < 1e-3)) return v.toExponential(2);
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return v.toFixed(1);
  if (a >= 1) return v.toFixed(2);
  return v.toFixed(3);
}

/** `mean [low, high]`, or the mean alone when there is one seed. */
export function fmtInterval(i: Interval): string {
  if (i.n <= 1) return fmt(i.mean);
  return `${fmt(i.mean)} [${fmt(i.low)}, ${fmt(i.high)}]`;
}

/** Table rows shared by the Markdown and HTML reports. */
export interface SummaryTable {
  readonly header: readonly string[];
  readonly rows: readonly (readonly string[])[];
  /** How many leading columns hold text (left-aligned); the rest are numbers. */
  readonly textColumns: number;
}

/**
 * The summary table: one row per (problem, optimizer). The problem column is left out when the
 * summary has a single problem.
 * @param metricLabels - column titles for scenario metrics, by metric name.
 * @param shares - metrics that are 0/1 per episode (e.g. "landed"): shown as a percentage of seeds
 *   without an interval.
 */
export function summaryTable(
  summary: SweepSummary,
  metricLabels: Readonly<Record<string, string>> = {},
  shares: readonly string[] = [],
): SummaryTable {
  const metricNames = [...new Set(summary.outcomes.flatMap((o) => Object.keys(o.metrics)))].sort();
  const oneProblem = new Set(summary.outcomes.map((o) => o.problem)).size <= 1;
  const header = [
    ...(oneProblem ? [] : ["problem"]),
    "optimizer",
    "seeds",
    "episode cost, mean [95% CI]",
    "success",
    "violations / episode",
    "samples / step",
    "compute / step, median (p95) ms",
    ...metricNames.map((m) => metricLabels[m] ?? m),
  ];
  const timing = new Map<string, GroupTiming>(
    summary.timing.map((t) => [`${t.problem}\u0000${t.optimizer}`, t]),
  );
  const metricCell = (o: GroupOutcome, m: string): string => {
    const i = o.metrics[m];
    if (!i || !Number.isFinite(i.mean)) return "–";
    if (shares.includes(m)) return `${Math.round(100 * i.mean)}%`;
    return fmtInterval(i);
  };
  const rows = summary.outcomes.map((o: GroupOutcome) => {
    const t = timing.get(`${o.problem}\u0000${o.optimizer}`);
    return [
      ...(oneProblem ? [] : [o.problem]),
      o.optimizer,
      `${o.seeds}${o.failures > 0 ? ` (${o.failures} failed)` : ""}`,
      fmtInterval(o.cost),
      `${o.successes}/${o.episodes}`,
      fmt(o.violations),
      fmt(o.samplesPerStep),
      t ? `${fmt(t.computeMedianMs)} (${fmt(t.computeP95Ms)})` : "–",
      ...metricNames.map((m) => metricCell(o, m)),
    ];
  });
  return { header, rows, textColumns: oneProblem ? 1 : 2 };
}

/** Render a table as GitHub-flavoured Markdown. */
export function markdownTable(table: SummaryTable): string {
  const esc = (s: string): string => s.replace(/\|/g, "\\|");
  const lines = [
    `| ${table.header.map(esc).join(" | ")} |`,
    `| ${table.header.map((_, i) => (i < table.textColumns ? "---" : "---:")).join(" | ")} |`,
    ...table.rows.map((r) => `| ${r.map(esc).join(" | ")} |`),
  ];
  return lines.join("\n");
}

/** Render a table as fixed-width text for the terminal. */
export function textTable(table: SummaryTable): string {
  const widths = table.header.map((h, i) =>
    Math.max(h.length, ...table.rows.map((r) => r[i].length)),
  );
  const line = (cells: readonly string[]): string =>
    cells
      .map((c, i) => (i < table.textColumns ? c.padEnd(widths[i]) : c.padStart(widths[i])))
      .join("  ");
  return [
    line(table.header),
    widths.map((w) => "-".repeat(w)).join("  "),
    ...table.rows.map(line),
  ].join("\n");
}

/** Escape text for HTML. */
export function escapeHtml(s: string): string {
  return s
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;");
}

/** A section of prose in a report (Markdown-free: paragraphs of plain text, or a definition list). */
export interface ReportSection {
  readonly heading: string;
  readonly paragraphs?: readonly string[];
  readonly items?: readonly (readonly [string, string])[];
}

/** Everything a report page shows. */
export interface ReportContent {
  readonly title: string;
  readonly intro: readonly string[];
  readonly table: SummaryTable;
  readonly charts: readonly Chart[];
  readonly sections: readonly ReportSection[];
  readonly meta: RunMeta;
}

/** The Markdown report (charts linked as files beside it). */
export function markdownReport(c: ReportContent): string {
  const out: string[] = [`# ${c.title}`, "", ...c.intro.flatMap((p) => [p, ""])];
  out.push("## Summary", "", markdownTable(c.table), "");
  for (const s of c.sections) {
    out.push(`## ${s.heading}`, "");
    for (const p of s.paragraphs ?? []) out.push(p, "");
    for (const [k, v] of s.items ?? []) out.push(`- **${k}**: ${v}`);
    if (s.items) out.push("");
  }
  out.push("## Charts", "");
  for (const ch of c.charts)
    out.push(`### ${ch.title}`, "", `![${ch.title}](${ch.file})`, "", ch.caption, "");
  out.push("## Run", "", ...metaLines(c.meta).map((l) => `- ${l}`), "");
  return out.join("\n");
}

function metaLines(m: RunMeta): string[] {
  return [
    `command: \`${m.command}\``,
    `date: ${m.date}`,
    `node: ${m.node}`,
    `CPU: ${m.cpu} × ${m.cores} logical cores`,
  ];
}

/** The self-contained HTML report: inline styles and SVG, no scripts, no network requests. */
export function htmlReport(c: ReportContent): string {
  const e = escapeHtml;
  const table = `<table><thead><tr>${c.table.header.map((h) => `<th>${e(h)}</th>`).join("")}</tr></thead><tbody>${c.table.rows
    .map(
      (r) =>
        `<tr>${r.map((v, i) => `<td${i >= c.table.textColumns ? ' class="num"' : ""}>${e(v)}</td>`).join("")}</tr>`,
    )
    .join("")}</tbody></table>`;
  const sections = c.sections
    .map(
      (s) =>
        `<section><h2>${e(s.heading)}</h2>${(s.paragraphs ?? []).map((p) => `<p>${e(p)}</p>`).join("")}${
          s.items
            ? `<dl>${s.items.map(([k, v]) => `<dt>${e(k)}</dt><dd>${e(v)}</dd>`).join("")}</dl>`
            : ""
        }</section>`,
    )
    .join("\n");
  const charts = c.charts
    .map(
      (ch) =>
        `<figure class="chart" id="${e(ch.file.replace(/\.svg$/, ""))}">${stripXmlProlog(ch.svg)}<figcaption><strong>${e(
          ch.title,
        )}.</strong> ${e(ch.caption)}</figcaption></figure>`,
    )
    .join("\n");
  const meta = metaLines(c.meta)
    .map((l) => `<li>${e(l.replace(/`/g, ""))}</li>`)
    .join("");
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<title>${e(c.title)}</title>
<style>
body { font-family: Helvetica, Arial, sans-serif; margin: 2rem auto; max-width: 1100px; padding: 0 1rem; color: #222; line-height: 1.45; }
h1 { font-size: 1.6rem; } h2 { font-size: 1.25rem; margin-top: 2rem; border-bottom: 1px solid #ddd; }
.table-wrap { overflow-x: auto; max-width: 100%; }
table { border-collapse: collapse; font-size: 0.85rem; margin: 1rem 0; }
th, td { border: 1px solid #ccc; padding: 0.3rem 0.55rem; } th { background: #f3f3f3; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.charts { display: flex; flex-wrap: wrap; gap: 1.5rem; }
figure.chart { margin: 0; max-width: 100%; } figure.chart svg { max-width: 100%; height: auto; display: block; }
figcaption { font-size: 0.88rem; color: #444; max-width: 680px; margin-top: 0.3rem; }
dt { font-weight: bold; margin-top: 0.4rem; } dd { margin-left: 1.2rem; }
.meta { font-size: 0.85rem; color: #555; }
</style>
</head>
<body>
<h1>${e(c.title)}</h1>
${c.intro.map((p) => `<p>${e(p)}</p>`).join("\n")}
<h2>Summary</h2>
<div class="table-wrap">${table}</div>
${sections}
<h2>Charts</h2>
<div class="charts">
${charts}
</div>
<h2>Run</h2>
<ul class="meta">${meta}</ul>
</body>
</html>
`;
}

function stripXmlProlog(svg: string): string {
  return svg.replace(/^<\?xml[^>]*>\s*/, "");
}
