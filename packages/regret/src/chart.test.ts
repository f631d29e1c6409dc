// The SVG is produced by Vega (A. Satyanarayan et al., "Vega-Lite: A Grammar of Interactive
// Graphics", IEEE TVCG 2017) from our Vega-Lite spec; the checks read the SVG back: it is
// well-formed XML, its line marks carry one path per series with one vertex per data point, and
// the legend names the series.
import { describe, expect, it } from "vitest";
import { hedgeRegretBound } from "./bounds/hedge.js";
import { lineChartSpec, renderLineChartSvg, renderRegretChartSvg } from "./chart.js";
import { simplexDomain } from "./domain.js";
import { linearLoss } from "./losses.js";
import { createRegretTracker } from "./tracker.js";

/** Minimal well-formedness check: every element opened is closed, in order. */
function wellFormed(svg: string): boolean {
  const stack: string[] = [];
  const re = /<(\/?)([A-Za-z][\w:.-]*)((?:[^>"']|"[^"]*"|'[^']*')*?)(\/?)>/g;
  for (let m = re.exec(svg); m !== null; m = re.exec(svg)) {
    const [, close, name, , self] = m;
    if (self) continue;
    if (close) {
      if (stack.pop() !== name) return false;
    } else stack.push(name);
  }
  return stack.length === 0;
}

/** The vertex count of an SVG path "M…L…L…" (Vega's line marks use M/L commands). */
function vertices(d: string): number {
  return (d.match(/[ML]/g) ?? []).length;
}

function linePaths(svg: string): string[] {
  const group = svg.split('class="mark-line role-mark').slice(1);
  const out: string[] = [];
  for (const g of group) {
    const m = /<path[^>]*\sd="([^"]*)"/.exec(g);
    if (m) out.push(m[1]);
  }
  return out;
}

describe("SVG charts via Vega", () => {
  it("renderLineChartSvg: well-formed, one line mark per series, one vertex per point, legend", async () => {
    const x = Float64Array.from({ length: 40 }, (_, i) => i + 1);
    const svg = await renderLineChartSvg(
      [
        { name: "measured", x, y: x.map((t) => Math.sqrt(t) * 0.7) },
        { name: "published bound", x, y: x.map((t) => Math.sqrt(t)), dashed: true },
      ],
      { title: "demo chart", xLabel: "round", yLabel: "regret" },
    );
    expect(svg.startsWith("<svg")).toBe(true);
    expect(wellFormed(svg)).toBe(true);
    const paths = linePaths(svg);
    expect(paths.length).toBe(2);
    for (const d of paths) expect(vertices(d)).toBe(40);
    expect(svg).toContain(">measured<");
    expect(svg).toContain(">published bound<");
    expect(svg).toContain(">demo chart<");
    expect(svg).toContain('stroke-dasharray="6,4"');
  });

  it("thins long series to maxPoints and drops non-finite points", () => {
    const n = 10_000;
    const x = Float64Array.from({ length: n }, (_, i) => i);
    const y = x.map((v) => (v === 5 ? Number.NaN : v));
    const spec = lineChartSpec([{ name: "a", x, y }], { maxPoints: 500 }) as unknown as {
      data: { values: { x: number }[] };
    };
    const vals = spec.data.values;
    expect(vals.length).toBeLessThanOrEqual(500);
    expect(vals[0].x).toBe(0);
    expect(vals[vals.length - 1].x).toBe(n - 1);
  });

  it("renderRegretChartSvg draws a tracker's cumulative regret and its bound", async () => {
    const N = 3;
    const T = 60;
    const tracker = createRegretTracker({ dimension: N, domain: simplexDomain(N) });
    const p = new Float64Array([0.2, 0.3, 0.5]);
    for (let t = 1; t <= T; t++) {
      tracker.record({
        decision: p,
        lossObject: linearLoss(new Float64Array([t % 2, (t + 1) % 2, 0.6])),
      });
    }
    const series = tracker.series();
    const svg = await renderRegretChartSvg(series, (t) =>
      hedgeRegretBound({ experts: N, rounds: t, stepSize: 0.3 }),
    );
    expect(wellFormed(svg)).toBe(true);
    const paths = linePaths(svg);
    expect(paths.length).toBe(2);
    for (const d of paths) expect(vertices(d)).toBe(T);
    expect(svg).toContain(">linearRegret<");
    expect(svg).toContain(">bound<");
  });
});
