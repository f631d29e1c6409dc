import {
  type DynamicStep,
  entropy,
  euclidean,
  type Feedback,
  type Geometry,
  type MirrorDescentLearner,
  type MirrorDescentSnapshot,
  mahalanobis,
  mirrorDescent,
  type OnlineLearner,
  type StepSize,
} from "@recede/core";
import { describe, expect, it } from "vitest";

// Type tests: what must compile and what must not (`pnpm typecheck` enforces the
// expect-error lines below: if one of them compiled, the typecheck would fail).

describe("public types", () => {
  it("compose as documented", () => {
    const geo: Geometry = euclidean({
      dimension: 2,
      feasible: { kind: "box", lower: 0, upper: 1 },
    });
    const learner: OnlineLearner<Feedback, MirrorDescentSnapshot> = mirrorDescent({
      geometry: geo,
      initial: new Float64Array([0.5, 0.5]),
      stepSize: 0.1,
    });
    const md: MirrorDescentLearner = mirrorDescent({
      geometry: entropy({ dimension: 2 }),
      initial: [0.5, 0.5],
      stepSize: (t) => 1 / t,
    });
    const s: StepSize = { kind: "custom", at: (t) => 1 / t };
    const phi: DynamicStep = (x, _t, out) => out.set(x);
    expect([learner.dimension, md.dimension, s.at(2, 0), typeof phi]).toEqual([
      2,
      2,
      0.5,
      "function",
    ]);

    if (false as boolean) {
      // @ts-expect-error: stepSize is required
      mirrorDescent({ geometry: geo, initial: [0, 0] });
      // @ts-expect-error: unknown feasible-set kind
      euclidean({ dimension: 2, feasible: { kind: "disc", radius: 1 } });
      // @ts-expect-error: a box needs both bounds
      euclidean({ dimension: 2, feasible: { kind: "box", lower: 0 } });
      // @ts-expect-error: the M-norm projection exists for balls only
      mahalanobis({ metric: [[1]], feasible: { kind: "box", lower: 0, upper: 1 } });
      // @ts-expect-error: a snapshot is not any object
      md.restore({ round: 1 });
      // @ts-expect-error: decisions are Float64Array, not number[]
      const arr: number[] = md.decision();
      void arr;
    }
  });
});
