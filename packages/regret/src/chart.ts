/**
 * Line charts as SVG, rendered by Vega-Lite (compiled to a Vega spec) and Vega's headless view —
 * no hand-assembled SVG. Used for cumulative regret against its bound; reusable for any x/y
 * series (the benchmark report uses it too).
 *
 * Sources: A. Satyanarayan, D. Moritz, K. Wongsuphasawat, J. Heer, "Vega-Lite: A Grammar of
 * Interactive Graphics", IEEE TVCG 23(1), 2017; the vega 6.4.0 / vega-lite 6.5.0 packages.
 *
 * @module
 */

import { RecedeError } from "@recede/core";
import type { TopLevelSpec } from "vega-lite";
import type { RegretSeries } from "./tracker.js";

/** One named line: y against x. */
export interface ChartLine {
  /** Legend label. */
  readonly name: string;
  readonly x: ArrayLike<number>;
  readonly y: ArrayLike<number>;
  /** Draw dashed (e.g. a bound). @defaultValue false */
  readonly dashed?: boolean;
}

/** Options of {@link renderLineChartSvg}. */
export interface LineChartOptions {
  /** @defaultValue "" */
  readonly title?: string;
  /** @defaultValue "x" */
  readonly xLabel?: string;
  /** @defaultValue "y" */
  readonly yLabel?: string;
  /** Plot width in px. @defaultValue 560 */
  readonly width?: number;
  /** Plot height in px. @defaultValue 320 */
  readonly height?: number;
  /** Logarithmic x axis. @defaultValue false */
  readonly logX?: boolean;
  /** Logarithmic y axis. @defaultValue false */
  readonly logY?: boolean;
  /**
   * At most this many points per line: longer lines are thinned to an even stride that keeps the
   * first and last point. @defaultValue 2000
   */
  readonly maxPoints?: number;
}

interface Datum {
  readonly x: number;
  readonly y: number;
  readonly series: string;
}

/**
 * Build the Vega-Lite spec of a multi-line chart (exposed for users who want to restyle it).
 * Non-finite points are dropped.
 */
export function lineChartSpec(
  lines: readonly ChartLine[],
  options: LineChartOptions = {},
): TopLevelSpec {
  const fn = "lineChartSpec";
  if (!Array.isArray(lines) || lines.length === 0) {
    throw new RecedeError("type", fn, "lines", "a non-empty array of lines", lines);
  }
  const maxPoints = options.maxPoints ?? 2000;
  if (!Number.isInteger(maxPoints) || maxPoints < 2) {
    throw new RecedeError("range", fn, "maxPoints", "an integer >= 2", maxPoints);
  }
  const values: Datum[] = [];
  const dashed: string[] = [];
  lines.forEach((line, li) => {
    if (typeof line?.name !== "string") {
      throw new RecedeError("type", fn, `lines[${li}].name`, "a string", line?.name);
    }
    const n = line.x?.length;
    if (typeof n !== "number" || line.y?.length !== n) {
      throw new RecedeError(
        "dimension",
        fn,
        `lines[${li}].y`,
        `of the same length as lines[${li}].x (${n})`,
        line.y,
      );
    }
    if (line.dashed) dashed.push(line.name);
    const stride = n > maxPoints ? (n - 1) / (maxPoints - 1) : 1;
    const count = Math.min(n, maxPoints);
    for (let j = 0; j < count; j++) {
      const i = j === count - 1 ? n - 1 : Math.round(j * stride);
      const x = line.x[i];
      const y = line.y[i];
      if (Number.isFinite(x) && Number.isFinite(y)) values.push({ x, y, series: line.name });
    }
  });
  const names = lines.map((l) => l.name);
  return {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title: options.title ?? "",
    width: options.width ?? 560,
    height: options.height ?? 320,
    background: "white",
    data: { values },
    mark: { type: "line", strokeWidth: 1.6 },
    encoding: {
      x: {
        field: "x",
        type: "quantitative",
        title: options.xLabel ?? "x",
        scale: options.logX ? { type: "log" } : { zero: false },
      },
      y: {
        field: "y",
        type: "quantitative",
        title: options.yLabel ?? "y",
        scale: options.logY ? { type: "log" } : {},
      },
      color: { field: "series", type: "nominal", title: null, sort: names },
      strokeDash: {
        condition: { test: { field: "series", oneOf: dashed }, value: [6, 4] },
        value: [1, 0],
      },
    },
  } as TopLevelSpec;
}

/**
 * Render lines to an SVG string: Vega-Lite `compile` → `vega.parse` →
 * `new vega.View(…, { renderer: "none" }).toSVG()`. Vega and Vega-Lite are imported on the first
 * call, so programs that never draw do not load them.
 */
export async function renderLineChartSvg(
  lines: readonly ChartLine[],
  options: LineChartOptions = {},
): Promise<string> {
  const vlSpec = lineChartSpec(lines, options);
  const [vega, vegaLite] = await Promise.all([import("vega"), import("vega-lite")]);
  const spec = vegaLite.compile(vlSpec).spec;
  const view = new vega.View(vega.parse(spec), { renderer: "none" });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** Options of {@link renderRegretChartSvg}. */
export interface RegretChartOptions extends LineChartOptions {
  /** The series column to draw. @defaultValue the first regret column present */
  readonly column?: string;
  /** Legend label of the measured curve. @defaultValue the column name */
  readonly label?: string;
  /** Legend label of the bound. @defaultValue "bound" */
  readonly boundLabel?: string;
}

/**
 * Cumulative regret against its bound: draws `series.columns[column]` and `bound(t)` (dashed)
 * over the series' `round` column.
 */
export async function renderRegretChartSvg(
  series: RegretSeries,
  bound: (round: number) => number,
  options: RegretChartOptions = {},
): Promise<string> {
  const fn = "renderRegretChartSvg";
  const column =
    options.column ??
    series.names.find((n) => n.endsWith("Regret") && !n.startsWith("adaptive")) ??
    "";
  const y = series.columns[column];
  if (y === undefined) {
    throw new RecedeError("state", fn, "column", `one of ${series.names.join(", ")}`, column);
  }
  if (typeof bound !== "function") throw new RecedeError("type", fn, "bound", "a function", bound);
  const x = series.columns.round;
  const b = Float64Array.from(x, (t) => bound(t));
  return renderLineChartSvg(
    [
      { name: options.label ?? column, x, y },
      { name: options.boundLabel ?? "bound", x, y: b, dashed: true },
    ],
    {
      ...options,
      title: options.title ?? "Cumulative regret and its bound",
      xLabel: options.xLabel ?? "round t",
      yLabel: options.yLabel ?? "regret",
    },
  );
}
