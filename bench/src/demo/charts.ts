/**
 * Demo-only charts: the landing trajectories of the parcel drone, and the gusts it met.
 *
 * @module
 */
import type { TopLevelSpec } from "vega-lite";
import { type Chart, renderSvg } from "../charts.js";
import type { RunRecord } from "../run.js";
import { DRONE_THRESHOLDS } from "./drone.js";

const CONFIG = {
  font: "Helvetica, Arial, sans-serif",
  axis: { labelFontSize: 11, titleFontSize: 12, gridOpacity: 0.5 },
  header: { labelFontSize: 13, labelFontWeight: "bold" as const },
  legend: { labelFontSize: 12, titleFontSize: 12, labelLimit: 320 },
  title: { fontSize: 15, anchor: "start" as const, subtitleFontSize: 12, subtitleColor: "#555" },
  view: { stroke: "#ddd" },
};

/**
 * Landing trajectories in the vertical plane, one small panel per optimizer, one line per seed,
 * with the pad, the roof and the touchdown points (green: success, red: failure).
 */
export async function landingChart(
  records: readonly RunRecord[],
  optimizers: readonly string[],
): Promise<Chart> {
  const rows: Record<string, number | string>[] = [];
  const pad = DRONE_THRESHOLDS.missDistance;
  for (const o of optimizers) {
    rows.push({ layer: "pad", optimizer: o, x: -pad, z: 0, seed: -1, step: 0 });
    rows.push({ layer: "pad", optimizer: o, x: pad, z: 0, seed: -1, step: 1 });
  }
  for (const r of records) {
    if (!r.trajectory || r.error) continue;
    const traj = r.trajectory;
    const stride = Math.max(1, Math.floor(traj.length / 120));
    for (let i = 0; i < traj.length; i += stride)
      rows.push({
        layer: "path",
        optimizer: r.optimizer,
        seed: r.seed,
        step: i,
        x: traj[i][0],
        z: traj[i][1],
      });
    const last = traj[traj.length - 1];
    rows.push({
      layer: "end",
      optimizer: r.optimizer,
      seed: r.seed,
      step: traj.length - 1,
      x: last[0],
      z: last[1],
      result: r.success
        ? "landed within thresholds"
        : r.metrics.landed === 1
          ? "landed outside thresholds"
          : "did not land",
    });
  }
  const xScale = { domain: [-6, 2], nice: false };
  const zScale = { domain: [-0.5, 9.5], nice: false };
  const spec = {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title: {
      text: "Rooftop parcel drone in gusts: landing trajectories",
      subtitle: `one line per seed; thick black bar: landing pad (±${pad} m); marker: where the episode ended`,
    },
    data: { values: rows },
    facet: { field: "optimizer", type: "nominal", title: null, sort: [...optimizers] },
    columns: 3,
    spec: {
      width: 250,
      height: 210,
      layer: [
        {
          transform: [{ filter: "datum.layer === 'path'" }],
          mark: { type: "line", strokeWidth: 1.3, opacity: 0.8 },
          encoding: {
            x: {
              field: "x",
              type: "quantitative",
              title: "horizontal position p_x (m)",
              scale: xScale,
            },
            y: {
              field: "z",
              type: "quantitative",
              title: "height above roof p_z (m)",
              scale: zScale,
            },
            detail: { field: "seed", type: "nominal" },
            order: { field: "step", type: "quantitative" },
            color: { value: "#4c78a8" },
          },
        },
        {
          transform: [{ filter: "datum.layer === 'pad'" }],
          mark: { type: "line", strokeWidth: 6, color: "black" },
          encoding: {
            x: { field: "x", type: "quantitative", scale: xScale },
            y: { field: "z", type: "quantitative", scale: zScale },
            order: { field: "step", type: "quantitative" },
          },
        },
        {
          transform: [{ filter: "datum.layer === 'end'" }],
          mark: { type: "point", filled: true, size: 70, strokeWidth: 1, stroke: "white" },
          encoding: {
            x: { field: "x", type: "quantitative", scale: xScale },
            y: { field: "z", type: "quantitative", scale: zScale },
            color: {
              field: "result",
              type: "nominal",
              title: "episode end",
              scale: {
                domain: ["landed within thresholds", "landed outside thresholds", "did not land"],
                range: ["#2ca02c", "#d62728", "#ff7f0e"],
              },
            },
            shape: {
              field: "result",
              type: "nominal",
              title: "episode end",
              scale: {
                domain: ["landed within thresholds", "landed outside thresholds", "did not land"],
                range: ["circle", "cross", "triangle-up"],
              },
            },
          },
        },
      ],
    },
    resolve: { scale: { x: "shared", y: "shared" } },
    config: CONFIG,
  } as TopLevelSpec;
  return {
    file: "landing-trajectories.svg",
    title: "Landing trajectories",
    caption:
      "The drone starts up and to the left of the pad and descends while gusts push it sideways. A good controller brings every seed onto the pad (green markers inside the black bar).",
    svg: await renderSvg(spec),
  };
}

/** The side force the gusts exert over time, one line per seed (the same for every optimizer). */
export async function gustChart(
  series: readonly { seed: number; time: number; force: number }[],
): Promise<Chart> {
  const spec = {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title: {
      text: "Gusts (unknown to the controllers' model)",
      subtitle:
        "side force on the drone over time, one line per seed; the same for every optimizer",
    },
    width: 560,
    height: 180,
    data: { values: series },
    mark: { type: "line", strokeWidth: 1.5 },
    encoding: {
      x: { field: "time", type: "quantitative", title: "time (s)" },
      y: { field: "force", type: "quantitative", title: "side force (N)" },
      color: { field: "seed", type: "nominal", title: "seed" },
    },
    config: CONFIG,
  } as TopLevelSpec;
  return {
    file: "gusts.svg",
    title: "Gusts",
    caption:
      "A steady side wind plus '1 − cos' gusts drawn from each seed. For scale, the drone's weight is 17.7 N and its total thrust limit 30 N.",
    svg: await renderSvg(spec),
  };
}
