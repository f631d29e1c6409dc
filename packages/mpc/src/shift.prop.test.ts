import { catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { createController } from "./controller.js";
import { categoricalPlan } from "./distributions/categorical.js";
import { gaussianPlan } from "./distributions/gaussian.js";
import type { PlanConfig, PlanDistribution } from "./distributions/types.js";
import { exponentialUtility } from "./losses/exponentialUtility.js";
import { customShift, shiftPlan } from "./shift.js";

const cfg = (h: number): PlanConfig => ({
  horizon: h,
  controlSize: 1,
  samples: 1,
  lower: Float64Array.of(-Infinity),
  upper: Float64Array.of(Infinity),
  caller: "test",
});

/** Block-diagonal KL(p‖q) between two diagonal Gaussian plans (MATH.md §2.4, diagonal case). */
function kl(p: PlanDistribution, q: PlanDistribution): number {
  let s = 0;
  const mp = p.blocks[0].data;
  const vp = p.blocks[1].data;
  const mq = q.blocks[0].data;
  const vq = q.blocks[1].data;
  for (let i = 0; i < mp.length; i++)
    s += 0.5 * (vp[i] / vq[i] + (mq[i] - mp[i]) ** 2 / vq[i] - 1 + Math.log(vq[i] / vp[i]));
  return s;
}

const seq = (h: number, min: number, max: number) =>
  fc.array(fc.double({ min, max, noNaN: true }), { minLength: h, maxLength: h });

describe("shiftPlan", () => {
  it("moves every block one step forward and fills the tail as asked", () => {
    const dist = gaussianPlan({ mean: [1, 2, 3, 4], std: [1, 1, 1, 2] }).create(cfg(4));
    dist.blocks[0].data.set([5, 6, 7, 8]);
    dist.blocks[1].data.set([9, 9, 9, 9]);
    shiftPlan({ fill: "repeat", spreadFill: "repeat" }).apply(dist, 1);
    expect(Array.from(dist.mean)).toEqual([6, 7, 8, 8]);
    expect(Array.from(dist.blocks[1].data)).toEqual([9, 9, 9, 9]);
    shiftPlan({ fill: "zero" }).apply(dist, 2);
    expect(Array.from(dist.mean)).toEqual([7, 8, 8, 0]);
    expect(Array.from(dist.blocks[1].data)).toEqual([9, 9, 9, 4]);
    shiftPlan({ fill: "nominal", spreadFill: "reset" }).apply(dist, 3);
    expect(Array.from(dist.mean)).toEqual([8, 8, 0, 4]);
    expect(Array.from(dist.blocks[1].data)).toEqual([1, 1, 1, 4]);
  });

  it("with a fixed fill never increases the block-diagonal KL between two plans (MATH.md §3.7, §10 (e))", () => {
    const h = 6;
    fc.assert(
      fc.property(
        seq(h, -5, 5),
        seq(h, 0.1, 3),
        seq(h, -5, 5),
        seq(h, 0.1, 3),
        fc.constantFrom("zero", "nominal"),
        (m1, s1, m2, s2, fill) => {
          const p = gaussianPlan({ mean: 0, std: 1 }).create(cfg(h));
          const q = gaussianPlan({ mean: 0, std: 1 }).create(cfg(h));
          p.blocks[0].data.set(m1);
          q.blocks[0].data.set(m2);
          p.blocks[1].data.set(s1.map((s) => s * s));
          q.blocks[1].data.set(s2.map((s) => s * s));
          p.sync();
          q.sync();
          const before = kl(p, q);
          const shift = shiftPlan({ fill: fill as "zero" | "nominal", spreadFill: "initial" });
          shift.apply(p, 1);
          shift.apply(q, 1);
          expect(kl(p, q)).toBeLessThanOrEqual(before * (1 + 1e-12) + 1e-12);
        },
      ),
      { numRuns: 150 },
    );
  });

  it("refuses a zero fill for a categorical plan, at construction", () => {
    catchRecedeError(
      () =>
        createController({
          dynamics: { stateSize: 1, controlSize: 1, step() {} },
          cost: { stateSize: 1, controlSize: 1, running() {}, terminal() {} },
          horizon: 3,
          plan: categoricalPlan({ choices: [[0], [1]] }),
          loss: exponentialUtility({ temperature: 1 }),
          shift: shiftPlan({ fill: "zero" }),
        }),
      { fn: "createController", arg: "shift", code: "domain" },
    );
  });

  it("customShift runs the user map then resynchronizes derived values", () => {
    const dist = categoricalPlan({ choices: [[0], [1]] }).create(cfg(2));
    customShift({
      map: (plan) => {
        plan.blocks[0].data.set([0.1, 0.9, 0.8, 0.2]);
      },
    }).apply(dist, 1);
    expect(Array.from(dist.mean)).toEqual([1, 0]);
  });
});
