import {
  euclidean,
  type Feedback,
  type Geometry,
  mirrorDescent,
  type OnlineLearner,
  RecedeError,
} from "@recede/core";
import { describe, expect, it } from "vitest";
import { boundedGradient, finiteVector } from "./arbitraries.js";
import { geometryLaws } from "./geometryLaws.js";
import { learnerLaws } from "./learnerLaws.js";

// The law suites must be able to fail: each broken implementation below violates one law, and
// the corresponding check must throw.

function brokenGeometry(flaw: "sign" | "divergence" | "mutates" | "alias"): Geometry {
  const base = euclidean({ dimension: 2 });
  return {
    name: `broken-${flaw}`,
    dimension: 2,
    potential: (x) => base.potential(x),
    divergence: (x, y) =>
      flaw === "divergence" ? 1.1 * base.divergence(x, y) : base.divergence(x, y),
    mirrorMap: (x, out) => base.mirrorMap(x, out),
    inverseMirrorMap: (t, out) => base.inverseMirrorMap(t, out),
    step: (xt, g, eta, out) => {
      if (flaw === "mutates") g[0] = 0;
      if (flaw === "alias") {
        out[0] = xt[0] - eta * g[0];
        out[1] = xt[1] - eta * g[0] - eta * (g[1] - g[0]) + (out === xt ? 1e-3 : 0);
        return out;
      }
      const s = flaw === "sign" ? -1 : 1;
      for (let i = 0; i < 2; i++) out[i] = xt[i] - s * eta * g[i];
      return out;
    },
    contains: (x) => base.contains(x),
  };
}

function lawNamed(laws: ReturnType<typeof geometryLaws>, part: string) {
  const l = laws.find((x) => x.name.includes(part));
  if (l === undefined) throw new Error(`no law matching ${part}`);
  return l;
}

describe("geometryLaws detect broken geometries", () => {
  const row = (flaw: "sign" | "divergence" | "mutates" | "alias") => ({
    name: `broken-${flaw}`,
    geometry: brokenGeometry(flaw),
    point: finiteVector(2),
    gradient: finiteVector(2, { min: 1, max: 5 }),
    firstOrder: "exact" as const,
  });
  it("a step in the wrong direction fails first-order optimality", () => {
    expect(() =>
      lawNamed(geometryLaws([row("sign")], { seed: 1 }), "mirror step").check(),
    ).toThrow();
  });
  it("a non-Bregman divergence fails D ≥ 0 / D(x‖x) or the three-point identity", () => {
    const laws = geometryLaws([row("divergence")], { seed: 1 });
    expect(() => lawNamed(laws, "three-point").check()).toThrow();
  });
  it("a step that writes into g fails the no-mutation law", () => {
    expect(() =>
      lawNamed(geometryLaws([row("mutates")], { seed: 1 }), "not mutated").check(),
    ).toThrow();
  });
  it("a step that depends on aliasing fails the aliasing law", () => {
    expect(() =>
      lawNamed(geometryLaws([row("alias")], { seed: 1 }), "out may alias").check(),
    ).toThrow();
  });
  it("the correct Euclidean geometry passes every law", () => {
    const laws = geometryLaws(
      [
        {
          name: "ok",
          geometry: euclidean({ dimension: 2 }),
          point: finiteVector(2),
          gradient: finiteVector(2),
          firstOrder: "exact",
        },
      ],
      { numRuns: 30 },
    );
    for (const l of laws) l.check();
  });
});

/** A learner that changes its state before validating (violates "failed update leaves state"). */
function leakyLearner(): OnlineLearner<Feedback, unknown> {
  const inner = mirrorDescent({
    geometry: euclidean({ dimension: 2 }),
    initial: [0, 0],
    stepSize: 0.1,
  });
  let round = 0;
  return {
    get dimension() {
      return inner.dimension;
    },
    get round() {
      return round;
    },
    decision: () => inner.decision(),
    update(f: Feedback) {
      inner.decision()[0] += 1e-9; // leak
      inner.update(f);
      round++;
    },
    reset: () => {
      inner.reset();
      round = 0;
    },
    snapshot: () => ({ s: inner.snapshot(), round }),
    restore: (s: unknown) => {
      const v = s as { s: ReturnType<typeof inner.snapshot>; round: number };
      inner.restore(v.s);
      round = v.round;
    },
    observe: (l) => inner.observe(l),
  };
}

describe("learnerLaws detect broken learners", () => {
  it("a learner that mutates state before failing is caught", () => {
    const laws = learnerLaws(
      [{ name: "leaky", create: leakyLearner, gradient: boundedGradient(2, 1) }],
      {
        seed: 3,
        numRuns: 20,
      },
    );
    const l = laws.find((x) => x.name.includes("failed update"));
    expect(l).toBeDefined();
    expect(() => l?.check()).toThrow();
  });
  it("a learner that does not converge fails the quadratic law", () => {
    const laws = learnerLaws(
      [
        {
          name: "too-slow",
          create: () =>
            mirrorDescent({ geometry: euclidean({ dimension: 1 }), initial: [0], stepSize: 1e-4 }),
          gradient: boundedGradient(1, 1),
          quadratic: { target: new Float64Array([1]), rounds: 10, tolerance: 1e-3 },
        },
      ],
      { numRuns: 5 },
    );
    expect(() => laws[laws.length - 1].check()).toThrow(/‖x_T − x\*‖∞/);
  });
  it("uses RecedeError as the typed error", () => {
    expect(new RecedeError("range", "f", "a", "> 0", -1).message).toBe("f: a must be > 0 (got -1)");
  });
});
