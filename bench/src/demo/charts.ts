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

/**
 * Touchdowns against the success test: one point per seed that landed, miss distance against
 * touchdown speed, one panel per optimizer, with the success box (miss ≤ threshold, speed ≤
 * threshold) drawn in; the tilt test is shown by the marker (a cross when only the tilt failed is
 * still outside the thresholds).
 */
export async function touchdownChart(
  records: readonly RunRecord[],
  optimizers: readonly string[],
): Promise<Chart> {
  const th = DRONE_THRESHOLDS;
  const rows: Record<string, number | string>[] = [];
  for (const o of optimizers) {
    rows.push({ layer: "box", optimizer: o, miss: 0, speed: th.touchdownSpeed, step: 0 });
    rows.push({
      layer: "box",
      optimizer: o,
      miss: th.missDistance,
      speed: th.touchdownSpeed,
      step: 1,
    });
    rows.push({ layer: "box", optimizer: o, miss: th.missDistance, speed: 0, step: 2 });
  }
  let notLanded = 0;
  for (const r of records) {
    if (r.error) continue;
    if (r.metrics.landed !== 1) {
      notLanded++;
      continue;
    }
    rows.push({
      layer: "point",
      optimizer: r.optimizer,
      seed: r.seed,
      miss: r.metrics.missDistance,
      speed: r.metrics.touchdownSpeed,
      result: r.success ? "within thresholds" : "outside thresholds",
    });
  }
  const missScale = { domain: [0, 1.2], nice: false, clamp: true };
  const speedScale = { domain: [0, 1.6], nice: false, clamp: true };
  const spec = {
    $schema: "https://vega.github.io/schema/vega-lite/v6.json",
    title: {
      text: "Touchdowns against the success test",
      subtitle: [
        `one point per seed that landed; dashed box: miss ≤ ${th.missDistance} m and speed ≤ ${th.touchdownSpeed} m/s`,
        `(tilt ≤ ${Math.round((th.tilt * 180) / Math.PI)}° is also required); values beyond the axes are drawn at the edge`,
      ],
    },
    data: { values: rows },
    facet: { field: "optimizer", type: "nominal", title: null, sort: [...optimizers] },
    columns: 3,
    spec: {
      width: 220,
      height: 150,
      layer: [
        {
          transform: [{ filter: "datum.layer === 'box'" }],
          mark: { type: "line", strokeWidth: 1.5, color: "#2ca02c", strokeDash: [4, 3] },
          encoding: {
            x: { field: "miss", type: "quantitative", scale: missScale },
            y: { field: "speed", type: "quantitative", scale: speedScale },
            order: { field: "step", type: "quantitative" },
          },
        },
        {
          transform: [{ filter: "datum.layer === 'point'" }],
          mark: { type: "point", filled: true, size: 60, strokeWidth: 1, stroke: "white" },
          encoding: {
            x: {
              field: "miss",
              type: "quantitative",
              title: "miss distance (m)",
              scale: missScale,
            },
            y: {
              field: "speed",
              type: "quantitative",
              title: "touchdown speed (m/s)",
              scale: speedScale,
            },
            color: {
              field: "result",
              type: "nominal",
              title: "touchdown",
              scale: {
                domain: ["within thresholds", "outside thresholds"],
                range: ["#2ca02c", "#d62728"],
              },
            },
            shape: {
              field: "result",
              type: "nominal",
              title: "touchdown",
              scale: {
                domain: ["within thresholds", "outside thresholds"],
                range: ["circle", "cross"],
              },
            },
            tooltip: [
              { field: "seed", type: "nominal" },
              { field: "miss", type: "quantitative", format: ".2f" },
              { field: "speed", type: "quantitative", format: ".2f" },
            ],
          },
        },
      ],
    },
    resolve: { scale: { x: "shared", y: "shared" } },
    config: CONFIG,
  } as TopLevelSpec;
  return {
    file: "touchdowns.svg",
    title: "Touchdowns",
    caption: `Where each landing fell against the success test: inside the dashed box is within the miss-distance and speed thresholds (the tilt threshold is checked too; a red cross inside the box failed on tilt). ${notLanded === 0 ? "Every run landed." : `${notLanded} run${notLanded === 1 ? "" : "s"} did not land and ${notLanded === 1 ? "is" : "are"} not shown.`}`,
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
