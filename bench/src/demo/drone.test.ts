import { createStream } from "@recede/core";
import { describe, expect, it } from "vitest";
import { lqrDefinition, mppiDefinition } from "../optimizers/mpc.js";
import { validateParams } from "../params.js";
import type { FactoryContext } from "../registry.js";
import { Registry } from "../registry.js";
import { simulate } from "../run.js";
import {
  DRONE_THRESHOLDS,
  DRONE_WEIGHTS,
  droneCost,
  droneGlidePath,
  droneModel,
  HOVER_THRUST,
  parcelDrone,
} from "./drone.js";

const DT = 0.05;
const ctx = (seed: number): FactoryContext => ({
  seed,
  quick: false,
  registry: new Registry(),
  optimizerEntry: () => undefined,
});

describe("parcel drone model with the roof", () => {
  it("cuts the touchdown step at p_z = 0 and then holds the landed state", () => {
    const model = droneModel(DT);
    const x = new Float64Array([0.3, 0.2, 0.05, 0.4, -1.2, 0.1]);
    const u = new Float64Array([HOVER_THRUST * 0.5, HOVER_THRUST * 0.5]);
    let steps = 0;
    while (x[1] > 0 && steps < 100) {
      model.step(x, 0, u, 0, 1, steps);
      steps++;
    }
    expect(x[1]).toBe(0);
    expect(steps).toBeLessThan(10);
    const landed = Float64Array.from(x);
    for (let t = 0; t < 5; t++) model.step(x, 0, u, 0, 1, steps + t);
    expect(Array.from(x)).toEqual(Array.from(landed));
  });

  it("lands where the wind-free plant lands (same touchdown state)", () => {
    // Plant without gusts vs the planning model: the same controls give the same touchdown.
    const problem = parcelDrone({ gustSteady: 0, gustMin: 0, gustMax: 0, gusts: 0 });
    const plant = problem.initialState(createStream("touchdown"));
    const model = droneModel(DT);
    const xm = Float64Array.from(plant);
    const u = new Float64Array([HOVER_THRUST * 0.8, HOVER_THRUST * 0.78]);
    const rng = createStream("unused");
    for (let t = 0; t < 400 && !problem.finished(plant, t); t++) {
      problem.plantStep(plant, u, t, rng);
      model.step(xm, 0, u, 0, 1, t);
    }
    expect(plant[1]).toBe(0);
    for (let i = 0; i < 6; i++) expect(xm[i]).toBeCloseTo(plant[i], 12);
  });

  it("scores the landed state against the thresholds, steeply beyond the margin", () => {
    const w = DRONE_WEIGHTS;
    const th = DRONE_THRESHOLDS;
    const cost = (x: number[]): number => {
      const out = new Float64Array(1);
      droneCost.running(Float64Array.from(x), 0, new Float64Array(2), 0, 1, 0, out, 0);
      return out[0];
    };
    // Inside the margin: only the soft part, w_L Σ a_i².
    const soft = [0.2, 0, 0.05, 0.3, -0.4, 0];
    const a = [0.2 / th.missDistance, 0.5 / th.touchdownSpeed, 0.05 / th.tilt];
    expect(cost(soft)).toBeCloseTo(w.touchdown * (a[0] ** 2 + a[1] ** 2 + a[2] ** 2), 12);
    // 0.9 m/s touchdown: beyond ρ = 0.7 of the 1 m/s threshold, the steep part adds w_F (0.9 − ρ)².
    const hard = [0, 0, 0, 0, -0.9, 0];
    expect(cost(hard)).toBeCloseTo(
      w.touchdown * 0.81 + w.touchdownExcess * (0.9 - w.touchdownMargin) ** 2,
      12,
    );
    // Terminal cost of a landed state: w_H times the same.
    const out = new Float64Array(1);
    droneCost.terminal(Float64Array.from(hard), 0, 1, out, 0);
    expect(out[0]).toBeCloseTo(w.terminal * cost(hard), 12);
  });
});

describe("glide path (moving setpoint)", () => {
  it("reaches the gate at the approach speed, then descends at the descent speed", () => {
    const ref = droneGlidePath(DT);
    const x0 = new Float64Array([-4, 8, 0, 0, 0, 0]);
    ref.reset(x0);
    const r = new Float64Array(6);
    const x = Float64Array.from(x0);
    const gateTime = Math.hypot(4, 7) / 1.2;
    let atGate = -1;
    for (let t = 1; t <= 400; t++) {
      ref.next(x, r);
      x.set(r); // a perfect tracker
      if (atGate < 0 && r[0] === 0 && Math.abs(r[1] - 1) < 1e-9) atGate = t * DT;
      if (atGate < 0) expect(Math.hypot(r[3], r[4])).toBeLessThanOrEqual(1.2 + 1e-12);
    }
    expect(atGate).toBeGreaterThan(gateTime - DT);
    expect(atGate).toBeLessThan(gateTime + 2 * DT);
    expect(r[1]).toBeCloseTo(DRONE_WEIGHTS.aimHeight, 12);
    expect(r[4]).toBe(0);
  });

  it("waits while the drone lags more than the allowed distance", () => {
    const ref = droneGlidePath(DT, { maxLag: 0.6 });
    const x0 = new Float64Array([-4, 8, 0, 0, 0, 0]);
    ref.reset(x0);
    const r = new Float64Array(6);
    for (let t = 0; t < 200; t++) ref.next(x0, r); // the drone never moves
    expect(Math.hypot(r[0] + 4, r[1] - 8)).toBeGreaterThan(0.6);
    expect(Math.hypot(r[0] + 4, r[1] - 8)).toBeLessThan(0.6 + 1.2 * DT + 1e-12);
    expect(r[3]).toBe(0);
    expect(r[4]).toBe(0);
  });
});

describe("demo controllers", () => {
  it("warm-up changes timing only: the flight is bit-identical", async () => {
    const problem = parcelDrone({ steps: 30 });
    const run = async (warmup: number) => {
      const params = validateParams(
        { samples: 64, horizon: 10, temperature: 10, noise: [2, 2], warmup },
        mppiDefinition.params,
        "mppi",
        [],
      );
      const c = await mppiDefinition.create(params, problem, ctx(3));
      return simulate(problem, c, { seed: 3, episode: 0 }, { keepTrajectory: true });
    };
    const cold = await run(0);
    const warm = await run(3);
    expect(warm.trajectory).toEqual(cold.trajectory);
    expect(warm.cost).toBe(cold.cost);
  });

  it("LQR about hover lands within the thresholds when it tracks the glide path, and crashes without", async () => {
    const problem = parcelDrone();
    const fly = async (track: boolean) => {
      const params = validateParams({ track }, lqrDefinition.params, "lqr", []);
      const c = await lqrDefinition.create(params, problem, ctx(1));
      return simulate(problem, c, { seed: 1, episode: 0 });
    };
    const glide = await fly(true);
    expect(glide.success).toBe(true);
    expect(glide.metrics.touchdownSpeed).toBeLessThan(DRONE_THRESHOLDS.touchdownSpeed);
    const straight = await fly(false);
    expect(straight.success).toBe(false);
    expect(straight.metrics.touchdownSpeed).toBeGreaterThan(5);
  });
});
