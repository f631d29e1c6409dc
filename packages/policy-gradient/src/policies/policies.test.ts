import {
  linearGaussianPolicy,
  mlpGaussianPolicy,
  policyActor,
  softmaxPolicy,
} from "@recede/policy-gradient";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";

describe("policy families: layout, deployment, errors", () => {
  const families = [
    linearGaussianPolicy({ stateSize: 3, actionSize: 2 }),
    linearGaussianPolicy({ stateSize: 3, actionSize: 2, bias: false }),
    mlpGaussianPolicy({ stateSize: 3, actionSize: 2, hidden: [4, 5] }),
    softmaxPolicy({ stateSize: 3, actionCount: 4 }),
  ];

  it("parameter blocks tile θ contiguously", () => {
    for (const p of families) {
      let off = 0;
      for (const b of p.blocks) {
        expect(b.offset).toBe(off);
        expect(b.length).toBe(b.shape.reduce((a, c) => a * c, 1));
        off += b.length;
      }
      expect(off).toBe(p.parameterCount);
    }
  });

  it("same seed → same initial MLP weights; different seeds differ", () => {
    const a = mlpGaussianPolicy({ stateSize: 2, actionSize: 1, seed: 5 }).initialParameters();
    const b = mlpGaussianPolicy({ stateSize: 2, actionSize: 1, seed: 5 }).initialParameters();
    const c = mlpGaussianPolicy({ stateSize: 2, actionSize: 1, seed: 6 }).initialParameters();
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
  });

  it("MLP input normalization: the network sees (x − offset)/scale", () => {
    const a = mlpGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      hidden: [4],
      seed: 2,
      outputScale: 1,
      stateOffset: [1, -2],
      stateScale: [2, 4],
    });
    const b = mlpGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      hidden: [4],
      seed: 2,
      outputScale: 1,
    });
    const theta = a.initialParameters();
    const ua = new Float64Array(1);
    const ub = new Float64Array(1);
    a.mean(theta, new Float64Array([3, 6]), 0, ua, 0);
    b.mean(theta, new Float64Array([1, 2]), 0, ub, 0);
    expect(ua[0]).toBe(ub[0]);
    catchRecedeError(() => mlpGaussianPolicy({ stateSize: 2, actionSize: 1, stateScale: [1, 0] }), {
      arg: "stateScale[1]",
    });
  });

  it("policyActor acts with the mean (u = −Kx + b) and keeps its own copy of θ", () => {
    const p = linearGaussianPolicy({ stateSize: 2, actionSize: 1, initialGain: [[1, 2]] });
    const theta = p.initialParameters();
    theta[2] = 0.25;
    const actor = policyActor(p, theta);
    theta[0] = 100;
    expect(actor.act(new Float64Array([0.5, -1]))[0]).toBeCloseTo(-(0.5 - 2) + 0.25, 14);
  });

  it("policyActor maps a categorical arg-max to its control", () => {
    const p = softmaxPolicy({ stateSize: 1, actionCount: 3 });
    const theta = new Float64Array([0, 0, 0, 0, 0, 1]); // logits = (0, 0, 1)
    const actor = policyActor(p, theta, { controls: [[-1], [0], [2.5]] });
    expect(Array.from(actor.act(new Float64Array([0.3])))).toEqual([2.5]);
  });

  it("typed errors name the function, the option and the value", () => {
    catchRecedeError(() => linearGaussianPolicy({ stateSize: 0, actionSize: 1 }), {
      fn: "linearGaussianPolicy",
      arg: "stateSize",
    });
    catchRecedeError(() => linearGaussianPolicy({ stateSize: 2, actionSize: 1, initialStd: -1 }), {
      arg: "initialStd",
      message: "-1",
    });
    catchRecedeError(
      () => linearGaussianPolicy({ stateSize: 2, actionSize: 1, initialGain: [[1, 2, 3]] }),
      { arg: "initialGain" },
    );
    catchRecedeError(() => mlpGaussianPolicy({ stateSize: 2, actionSize: 1, hidden: [4, 0] }), {
      fn: "mlpGaussianPolicy",
      arg: "hidden[1]",
    });
    catchRecedeError(() => softmaxPolicy({ stateSize: 2, actionCount: 1 }), {
      fn: "softmaxPolicy",
      arg: "actionCount",
    });
    const p = linearGaussianPolicy({ stateSize: 2, actionSize: 1 });
    catchRecedeError(() => policyActor(p, new Float64Array(2)), {
      fn: "policyActor",
      arg: "theta",
    });
    catchRecedeError(() => policyActor(p, p.initialParameters()).act(new Float64Array(3)), {
      fn: "PolicyActor.act",
      arg: "state",
    });
  });
});
