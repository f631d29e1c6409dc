/**
 * Charts for sweep and demo reports: vega-lite specifications compiled and rendered to SVG by vega
 * in Node (no browser, no hand-written SVG).
 *
 * Charts: cumulative cost per step with 95% bands, regret against the best optimizer in hindsight,
 * compute time per control step (median and 95th percentile), samples per step against episode cost,
 * and, for the demo, the landing trajectories.
 *
 * @module
 */
import * as vega from "vega";
import { compile, type TopLevelSpec } from "vega-lite";
import type { GroupOutcome, GroupTiming } from "./summary.js";

/** A chart ready for a report: a file name, a title for the page, and the SVG text. */
export interface Chart {
  /** File name without folder, e.g. `cost-pendulum.svg`. */
  readonly file: string;
  /** Caption shown on the report page. */
  readonly title: string;
  /** One sentence on how to read it. */
  readonly caption: string;
  /** The rendered SVG document. */
  readonly svg: string;
}

/** Render a vega-lite specification to an SVG string. */
export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const compiled = compile(spec).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: "none" });
  const svg = await view.toSVG();
  view.finalize();
  return svg;
}

const SCHEMA = "https://vega.github.io/schema/vega-lite/v6.json";
const WIDTH = 560;
const HEIGHT = 300;
const FONT = { font: "Helvetica, Arial, sans-serif", labelFontSize: 12, titleFontSize: 13 };
const CONFIG = {
  font: FONT.font,
  axis: {
    labelFontSize: FONT.labelFontSize,
    titleFontSize: FONT.titleFontSize,
    grid: true,
    gridOpacity: 0.5,
  },
  legend: {
    labelFontSize: FONT.labelFontSize,
    titleFontSize: FONT.titleFontSize,
    labelLimit: 320,
    symbolOpacity: 1,
    symbolType: "stroke",
    symbolStrokeWidth: 3,
  },
  title: { fontSize: 15, anchor: "start" as const, subtitleFontSize: 12, subtitleColor: "#555" },
  view: { stroke: "#ddd" },
};

/** The "tableau10" palette (vega's categorical scheme of that name). */
const PALETTE = [
  "#4c78a8",
  "#f58518",
  "#e45756",
  "#72b7b2",
  "#54a24b",
  "#eeca3b",
  "#b279a2",
  "#ff9da6",
  "#9d755d",
  "#bab0ac",
];

/**
 * Colours for `shown`, taken by each optimizer's place in `all`, so an optimizer keeps its colour
 * in every chart of a report even when a chart shows only some optimizers.
 */
function colorScale(
  all: readonly string[],
  shown: readonly string[] = all,
): { domain: string[]; range: string[] } {
  return {
    domain: [...shown],
    range: shown.map((o) => PALETTE[Math.max(0, all.indexOf(o)) % PALETTE.length]),
  };
}

/** Curve data with bands, subsampled to at most ~200 points per series. */
function curveRows(
  groups: readonly GroupOutcome[],
  pick: (g: GroupOutcome) => readonly { mean: number; low: number; high: number }[],
  dt: number,
): Record<string, number | string>[] {
  const rows: Record<string, number | string>[] = [];
  for (const g of groups) {
    const c = pick(g);
    const stride = Math.max(1, Math.ceil(c.length / 200));
    for (let t = 0; t < c.length; t += stride) {
      const i = c[t];
      if (!Number.isFinite(i.mean)) continue;
      rows.push({
        optimizer: g.optimizer,
        time: (t + 1) * dt,
        mean: i.mean,
        low: i.low,
        high: i.high,
      });
    }
  }
  return rows;
}

/**
 * The y scale for curves: linear, unless the curves span more than a factor 20 (one optimizer far
 * worse than the others would flatten the rest), then logarithmic for positive data and
 * symmetric-logarithmic otherwise.
 */
function curveScale(rows: readonly Record<string, number | string>[]): {
  type: "linear" | "log" | "symlog";
  constant?: number;
  note: string;
} {
  const finals = new Map<string, number>();
  let min = Number.POSITIVE_INFINITY;
  for (const r of rows) {
    finals.set(r.optimizer as string, Math.abs(r.mean as number));
    min = Math.min(min, r.low as number, r.mean as number);
  }
  const values = [...finals.values()].filter((v) => v > 0);
  const spread = values.length > 1 ? Math.max(...values) / Math.min(...values) : 1;
  if (spread <= 20) return { type: "linear", note: "" };
  if (min > 0) return { type: "log", note: " (log scale)" };
  // Linear within ±1% of the largest value, logarithmic beyond.
  return { type: "symlog", constant: Math.max(...values) / 100, note: " (symmetric log scale)" };
}

function bandChart(
  title: string,
  subtitle: string,
  yTitle: string,
  rows: Record<string, number | string>[],
  optimizers: readonly string[],
  xTitle: string,
  shown: readonly string[] = optimizers,
): TopLevelSpec {
  const scale = curveScale(rows);
  const color = {
    field: "optimizer",
    type: "nominal" as const,
    title: "optimizer",
    scale: colorScale(optimizers, shown),
  };
  const y = {
    type: "quantitative" as const,
    title: `${yTitle}${scale.note}`,
    scale: scale.constant ? { type: scale.type, constant: scale.constant } : { type: scale.type },
  };
  return {
    $schema: SCHEMA,
    title: { text: title, subtitle },
    width: WIDTH,
    height: HEIGHT,
    data: { values: rows },
    encoding: { x: { field: "time", type: "quantitative", title: xTitle } },
    layer: [
      {
        mark: { type: "area", opacity: 0.18, clip: true },
        encoding: {
          y: { field: "low", ...y },
          y2: { field: "high" },
          color,
        },
      },
      {
        mark: { type: "line", strokeWidth: 2, clip: true },
        encoding: { y: { field: "mean", ...y }, color },
      },
    ],
    config: CONFIG,
  } as TopLevelSpec;
}

/** Cumulative cost per step, mean over seeds with a 95% band, one line per optimizer. */
export async function costCurveChart(
  problem: string,
  groups: readonly GroupOutcome[],
  dt: number,
  unit = "s",
): Promise<Chart> {
  const optimizers = groups.map((g) => g.optimizer);
  const spec = bandChart(
    `Cumulative cost — ${problem}`,
    "mean over seeds; shaded: 95% Student-t interval; lower is better",
    "cumulative cost",
    curveRows(groups, (g) => g.costCurve, dt),
    optimizers,
    `time (${unit})`,
  );
  return {
    file: `cost-${problem}.svg`,
    title: `Cost per step — ${problem}`,
    caption:
      "Cost accumulated along the closed loop. Steeper segments are where an optimizer pays; a flat end means the episode ended (landed) or the state sits at the goal.",
    svg: await renderSvg(spec),
  };
}

/** Regret against the best optimizer in hindsight (per seed), mean with a 95% band. */
export async function regretChart(
  problem: string,
  groups: readonly GroupOutcome[],
  dt: number,
): Promise<Chart> {
  const optimizers = groups.map((g) => g.optimizer);
  const spec = bandChart(
    `Regret against the best optimizer in hindsight — ${problem}`,
    "R_t = cumulative cost − that of the optimizer with least episode cost on the same seed",
    "regret (cost units)",
    curveRows(groups, (g) => g.regretCurve, dt),
    optimizers,
    "time (s)",
  );
  return {
    file: `regret-${problem}.svg`,
    title: `Regret — ${problem}`,
    caption:
      "For each seed, the comparator is the optimizer with the least episode cost on that seed (every optimizer meets the same gusts); a curve at 0 means that optimizer was the best one. Negative values mean it was ahead at that time.",
    svg: await renderSvg(spec),
  };
}

function formatMs(v: number): string {
  if (!Number.isFinite(v)) return "–";
  if (v >= 10) return `${v.toFixed(1)} ms`;
  if (v >= 0.1) return `${v.toFixed(2)} ms`;
  if (v >= 0.001) return `${(v * 1000).toFixed(0)} µs`;
  return "< 1 µs";
}

/** The learners' own tracked regret (see wrapController in optimizers/mpc.ts), mean with 95% band. */
export async function trackedRegretChart(
  problem: string,
  groups: readonly GroupOutcome[],
  dt: number,
): Promise<Chart> {
  const tracked = groups.filter((g) => g.trackedRegret && g.trackedRegret.length > 0);
  const spec = bandChart(
    `Tracked regret of the sampling controllers — ${problem}`,
    "R_t = Σ_{s≤t} (loss estimated at the played plan − cost of the round's best sample)",
    "tracked regret (cost units)",
    curveRows(tracked, (g) => g.trackedRegret ?? [], dt),
    groups.map((g) => g.optimizer),
    "time (s)",
    tracked.map((g) => g.optimizer),
  );
  return {
    file: `tracked-regret-${problem}.svg`,
    title: `Tracked regret — ${problem}`,
    caption:
      "Each sampling controller's own online-learning regret: at every control step, how much the loss at the plan it played exceeds the cost of the best sequence it sampled (dynamic regret against the per-round best sample). A flatter curve means the plan is closer to the best sampled sequence.",
    svg: await renderSvg(spec),
  };
}

/** Compute time per control step: median (bar) and 95th percentile (tick), per optimizer. */
export async function computeChart(
  problem: string,
  timing: readonly GroupTiming[],
): Promise<Chart> {
  const rows = timing.map((t) => ({
    optimizer: t.optimizer,
    median: t.computeMedianMs,
    p95: t.computeP95Ms,
    label: `median ${formatMs(t.computeMedianMs)} · p95 ${formatMs(t.computeP95Ms)}`,
  }));
  const optimizers = timing.map((t) => t.optimizer);
  const spec = {
    $schema: SCHEMA,
    title: {
      text: `Compute time per control step — ${problem}`,
      subtitle: "bar: median over steps (median over runs); black tick: 95th percentile",
    },
    width: WIDTH,
    height: Math.max(140, 44 * rows.length),
    data: { values: rows },
    encoding: {
      y: {
        field: "optimizer",
        type: "nominal",
        title: null,
        sort: optimizers,
        axis: { labelLimit: 320 },
      },
    },
    layer: [
      {
        mark: { type: "bar", height: 16 },
        encoding: {
          x: { field: "median", type: "quantitative", title: "milliseconds per control step" },
          color: {
            field: "optimizer",
            type: "nominal",
            scale: colorScale(optimizers),
            legend: null,
          },
        },
      },
      {
        mark: { type: "tick", color: "black", thickness: 2, size: 24 },
        encoding: { x: { field: "p95", type: "quantitative" } },
      },
      {
        mark: { type: "text", align: "left", dx: 4, dy: -13, fontSize: 11 },
        encoding: {
          x: { field: "median", type: "quantitative" },
          text: { field: "label", type: "nominal" },
        },
      },
    ],
    config: CONFIG,
  } as TopLevelSpec;
  return {
    file: `compute-${problem}.svg`,
    title: `Compute time per step — ${problem}`,
    caption:
      "Wall time of one call that chooses a control (sampling, rollouts and update for MPC; a forward pass for a policy), measured on this machine while other runs shared its cores. Controllers given a warm-up are compiled at setup (a few control steps, then reset), so their median and 95th percentile cover steady-state steps; for the others every step counts, including the first ones while the JavaScript engine compiles the hot loops.",
    svg: await renderSvg(spec),
  };
}

/** Samples per control step against mean episode cost (with 95% intervals). */
export async function samplesCostChart(
  problem: string,
  groups: readonly GroupOutcome[],
): Promise<Chart> {
  const rows = groups.map((g) => ({
    optimizer: g.optimizer,
    samples: Math.max(1, g.samplesPerStep),
    cost: g.cost.mean,
    low: g.cost.low,
    high: g.cost.high,
  }));
  const optimizers = groups.map((g) => g.optimizer);
  const costs = rows.map((r) => r.cost).filter((v) => Number.isFinite(v));
  const logY =
    costs.length > 1 && Math.min(...costs) > 0 && Math.max(...costs) / Math.min(...costs) > 20;
  const yScale = logY ? { type: "log" } : { zero: false };
  const x = {
    field: "samples",
    type: "quantitative",
    title: "model rollouts per control step (log scale; policies shown at 1)",
    scale: { type: "log" },
  };
  const spec = {
    $schema: SCHEMA,
    title: {
      text: `Samples per step against episode cost — ${problem}`,
      subtitle: "point: mean over seeds; bar: 95% Student-t interval; lower left is better",
    },
    width: WIDTH,
    height: HEIGHT,
    data: { values: rows },
    layer: [
      {
        mark: { type: "rule", strokeWidth: 2 },
        encoding: {
          x,
          y: {
            field: "low",
            type: "quantitative",
            title: `episode cost${logY ? " (log scale)" : ""}`,
            scale: yScale,
          },
          y2: { field: "high" },
          color: { field: "optimizer", type: "nominal", scale: colorScale(optimizers) },
        },
      },
      {
        mark: { type: "point", filled: true, size: 90 },
        encoding: {
          x,
          y: { field: "cost", type: "quantitative", scale: yScale },
          color: {
            field: "optimizer",
            type: "nominal",
            scale: colorScale(optimizers),
            title: "optimizer",
          },
          shape: { field: "optimizer", type: "nominal", title: "optimizer" },
        },
      },
    ],
    config: CONFIG,
  } as TopLevelSpec;
  return {
    file: `samples-cost-${problem}.svg`,
    title: `Samples vs cost — ${problem}`,
    caption:
      "Each point is one optimizer configuration: how many model rollouts it spends per control step, and the episode cost it reaches.",
    svg: await renderSvg(spec),
  };
}
