/**
 * Writing a sweep's outputs from its run records: summary.json, summary.md, charts/*.svg and the
 * self-contained report.html. Used by `sweep`, `merge` and `report` alike, so a merged set of
 * shards produces exactly the files a single-process run would.
 *
 * @module
 */
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import {
  type Chart,
  computeChart,
  costCurveChart,
  regretChart,
  samplesCostChart,
  trackedRegretChart,
} from "./charts.js";
import {
  htmlReport,
  markdownReport,
  type ReportContent,
  type ReportSection,
  type RunMeta,
  summaryTable,
} from "./report.js";
import type { RunRecord } from "./run.js";
import { type SweepSummary, sortRecords, summarize } from "./summary.js";

/** The files written by {@link writeSweepOutputs}. */
export interface SweepFiles {
  readonly summaryJson: string;
  readonly summaryMd: string;
  readonly reportHtml: string;
  readonly charts: readonly string[];
}

/** The standard charts for each problem of a summary. */
export async function sweepCharts(
  summary: SweepSummary,
  records: readonly RunRecord[],
): Promise<Chart[]> {
  const charts: Chart[] = [];
  const problems = [...new Set(summary.outcomes.map((o) => o.problem))];
  for (const p of problems) {
    const groups = summary.outcomes.filter((o) => o.problem === p);
    const dt = records.find((r) => r.problem === p && Number.isFinite(r.dt))?.dt ?? 1;
    charts.push(await costCurveChart(p, groups, dt));
    if (groups.length > 1) charts.push(await regretChart(p, groups, dt));
    if (groups.some((g) => g.trackedRegret && g.trackedRegret.length > 0))
      charts.push(await trackedRegretChart(p, groups, dt));
    charts.push(
      await computeChart(
        p,
        summary.timing.filter((t) => t.problem === p),
      ),
    );
    charts.push(await samplesCostChart(p, groups));
  }
  return charts;
}

/** Write the summary, charts and report of `records` into `dir`. */
export async function writeSweepOutputs(
  dir: string,
  records: readonly RunRecord[],
  meta: RunMeta,
  title: string,
  extra: {
    intro?: readonly string[];
    sections?: readonly ReportSection[];
    charts?: readonly Chart[];
    /** Markdown file name. @defaultValue "summary.md" */
    markdownName?: string;
    /** Sub-folder for the SVG charts ("" = beside the report). @defaultValue "charts" */
    chartDir?: string;
    /** Column titles for scenario metrics, by metric name. */
    metricLabels?: Readonly<Record<string, string>>;
    /** Metrics that are 0/1 per episode, shown as percentages (see {@link summaryTable}). */
    shares?: readonly string[];
  } = {},
): Promise<SweepFiles> {
  const chartDir = extra.chartDir ?? "charts";
  mkdirSync(join(dir, chartDir), { recursive: true });
  const summary = summarize(records);
  const charts = [...(extra.charts ?? []), ...(await sweepCharts(summary, records))];
  const chartFiles: string[] = [];
  for (const c of charts) {
    const path = join(dir, chartDir, c.file);
    writeFileSync(path, c.svg);
    chartFiles.push(path);
  }
  const summaryJson = join(dir, "summary.json");
  writeFileSync(summaryJson, `${JSON.stringify({ meta, summary }, null, 1)}\n`);
  const failures = sortRecords(records).filter((r) => r.error);
  const sections: ReportSection[] = [...(extra.sections ?? [])];
  if (failures.length > 0)
    sections.push({
      heading: "Failed runs",
      items: failures.slice(0, 50).map((r) => [r.key, r.error ?? ""] as const),
    });
  const content: ReportContent = {
    title,
    intro: extra.intro ?? [
      `${summary.runs} runs. Costs are means over seeds with 95% Student-t confidence intervals (the episodes of a seed are averaged first).`,
    ],
    table: summaryTable(summary, extra.metricLabels, extra.shares),
    charts: charts.map((c) => ({ ...c, file: chartDir ? `${chartDir}/${c.file}` : c.file })),
    sections,
    meta,
  };
  const summaryMd = join(dir, extra.markdownName ?? "summary.md");
  writeFileSync(summaryMd, markdownReport(content));
  const reportHtml = join(dir, "report.html");
  writeFileSync(reportHtml, htmlReport(content));
  return { summaryJson, summaryMd, reportHtml, charts: chartFiles };
}
