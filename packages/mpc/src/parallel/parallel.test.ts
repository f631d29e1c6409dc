import { RecedeError } from "@recede/core";
import { bicycle, cartPole } from "@recede/problems";
import { afterAll, describe, expect, it } from "vitest";
import {
  categoricalPlan,
  cem,
  createController,
  exponentialUtility,
  mppi,
  startRolloutWorkers,
} from "../index.js";

const pools: { close(): Promise<void> }[] = [];
afterAll(async () => {
  for (const p of pools) await p.close();
});

const BICYCLE = { module: "@recede/problems", factory: "bicycle", args: [{ goal: [3, 2] }] };

async function trace(workers: number, steps: number) {
  const pool = await startRolloutWorkers({ model: BICYCLE, workers, minWork: 0 });
  pools.push(pool);
  const bounds = bicycle().bounds;
  const ctrl = mppi({
    dynamics: pool.dynamics,
    cost: pool.cost,
    workers: pool,
    horizon: 15,
    samples: 300,
    sliceSize: 32,
    noise: [0.75, 0.3],
    seed: 5,
    bounds,
  });
  const x = bicycle().initialState();
  const controls: number[] = [];
  const plans: number[] = [];
  for (let s = 0; s < steps; s++) {
    const { control } = ctrl.act(x);
    controls.push(...control);
    plans.push(...ctrl.plan());
    pool.dynamics.step(x, 0, control, 0, 1, 0);
  }
  return { pool, ctrl, controls, plans, x };
}

describe("startRolloutWorkers", () => {
  it("gives bit-identical plans and controls for 0, 1, 2 and 3 workers", async () => {
    const base = await trace(0, 4);
    // and the same as a controller without any pool
    const p = bicycle({ goal: [3, 2] });
    const plain = mppi({
      dynamics: p.dynamics,
      cost: p.cost,
      horizon: 15,
      samples: 300,
      sliceSize: 32,
      noise: [0.75, 0.3],
      seed: 5,
      bounds: p.bounds,
    });
    const x = p.initialState();
    const plainControls: number[] = [];
    for (let s = 0; s < 4; s++) {
      const { control } = plain.act(x);
      plainControls.push(...control);
      p.dynamics.step(x, 0, control, 0, 1, 0);
    }
    expect(base.controls).toEqual(plainControls);
    for (const w of [1, 2, 3]) {
      const r = await trace(w, 4);
      expect(r.controls).toEqual(base.controls);
      expect(r.plans).toEqual(base.plans);
      expect(Array.from(r.ctrl.costs)).toEqual(Array.from(base.ctrl.costs));
    }
  });

  it("CEM (σ adapted on shared memory) is bit-identical with 2 workers", async () => {
    const run = async (workers: number) => {
      const pool = await startRolloutWorkers({
        model: { module: "@recede/problems", factory: "cartPole", args: [] },
        workers,
        minWork: 0,
      });
      pools.push(pool);
      const ctrl = cem({
        dynamics: pool.dynamics,
        cost: pool.cost,
        workers: pool,
        horizon: 10,
        samples: 200,
        sliceSize: 25,
        std: 4,
        seed: 2,
        bounds: cartPole().bounds,
      });
      const x = cartPole().initialState();
      const out: number[] = [];
      for (let s = 0; s < 3; s++)
        out.push(...ctrl.act(x).control, ...ctrl.distribution.blocks[1].data);
      await pool.close();
      return out;
    };
    expect(await run(2)).toEqual(await run(0));
  });

  it("plans without a worker sampler (categorical) are sampled on the main thread, same results", async () => {
    const run = async (workers: number) => {
      const pool = await startRolloutWorkers({
        model: { module: "@recede/problems", factory: "cartPole", args: [] },
        workers,
        minWork: 0,
      });
      pools.push(pool);
      const ctrl = createController({
        dynamics: pool.dynamics,
        cost: pool.cost,
        workers: pool,
        horizon: 10,
        samples: 200,
        sliceSize: 20,
        plan: categoricalPlan({ choices: [[-10], [0], [10]] }),
        loss: exponentialUtility({ temperature: 1 }),
        seed: 4,
      });
      const x = cartPole().initialState();
      const out: number[] = [];
      for (let s = 0; s < 3; s++)
        out.push(...ctrl.act(x).control, ...ctrl.distribution.blocks[0].data);
      const snap = ctrl.snapshot();
      await pool.close();
      return { out, streams: JSON.stringify(snap.streams) };
    };
    expect(await run(2)).toEqual(await run(0));
  });

  it("snapshot, restore and reset reach the worker-owned streams", async () => {
    const r = await trace(2, 2);
    const snap = r.ctrl.snapshot();
    const a = Array.from(r.ctrl.act(r.x).control);
    r.ctrl.restore(snap);
    expect(Array.from(r.ctrl.act(r.x).control)).toEqual(a);
    r.ctrl.reset();
    const first = Array.from(r.ctrl.act(bicycle().initialState()).control);
    const ref = await trace(0, 1);
    expect(first).toEqual(ref.controls);
  });

  it("stays on the main thread below minWork, and rejects a second controller or a foreign model", async () => {
    const pool = await startRolloutWorkers({ model: BICYCLE, workers: 1, minWork: 1e9 });
    pools.push(pool);
    const ctrl = mppi({
      dynamics: pool.dynamics,
      cost: pool.cost,
      workers: pool,
      horizon: 5,
      samples: 64,
    });
    expect(ctrl.act(new Float64Array(4)).control.length).toBe(2);
    expect(() =>
      mppi({ dynamics: pool.dynamics, cost: pool.cost, workers: pool, horizon: 5 }),
    ).toThrow(RecedeError);
    const other = bicycle();
    expect(() =>
      mppi({ dynamics: other.dynamics, cost: other.cost, workers: pool, horizon: 5 }),
    ).toThrow(/pool's own dynamics/);
  });

  it("throws typed errors for bad recipes and options", async () => {
    await expect(
      startRolloutWorkers({ model: { module: "@recede/problems", factory: "noSuchModel" } }),
    ).rejects.toThrow(RecedeError);
    await expect(startRolloutWorkers({ model: BICYCLE, workers: -1 })).rejects.toThrow(/workers/);
  });

  it("a failing worker fails act with a typed error and leaves the plan untouched; close() ends it", async () => {
    const pool = await startRolloutWorkers({
      model: {
        module: new URL("./faultyModel.fixture.ts", import.meta.url).href,
        factory: "faulty",
        args: [],
      },
      workers: 1,
      minWork: 0,
      timeoutMs: 1500,
    });
    const ctrl = mppi({
      dynamics: pool.dynamics,
      cost: pool.cost,
      workers: pool,
      horizon: 4,
      samples: 64,
      sliceSize: 16,
    });
    const x = new Float64Array(1);
    ctrl.act(x); // fine on the first step
    const before = Array.from(ctrl.plan());
    const round = ctrl.round;
    x[0] = 7; // the fixture's worker copy hangs at this state: the step times out
    expect(() => ctrl.act(x)).toThrow(RecedeError);
    expect(Array.from(ctrl.plan())).toEqual(before);
    expect(ctrl.round).toBe(round);
    expect(pool.closed).toBe(true);
    await pool.close();
    expect(() => ctrl.act(new Float64Array(1))).toThrow(/closed|pool/);
  });
});
