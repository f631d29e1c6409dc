import {
  adaGradStep,
  affineDynamic,
  constantStep,
  dynamicMirrorDescent,
  entropy,
  euclidean,
  hedge,
  inverseSqrtStep,
  mirrorDescent,
  onlineGradientDescent,
  positiveEntropy,
  type RoundRecord,
  scheduledStep,
} from "@recede/core";
import { catchRecedeError } from "@recede/testkit";
import ndarray from "ndarray";
import { describe, expect, it } from "vitest";

const g = (...v: number[]) => Float64Array.from(v);

describe("mirrorDescent", () => {
  it("updates x ← Π(x − η_t g) with the schedule's η_t (constant, 1/√t, AdaGrad, user)", () => {
    const cases = [
      { s: 0.5 as const, eta: [0.5, 0.5, 0.5] },
      { s: constantStep(0.25), eta: [0.25, 0.25, 0.25] },
      { s: inverseSqrtStep(2), eta: [2, 2 / Math.SQRT2, 2 / Math.sqrt(3)] },
      // ‖g‖² = 25 per round: η_t = 1/√(1e-8 + 25 t)
      { s: adaGradStep(1), eta: [1, 2, 3].map((t) => 1 / Math.sqrt(1e-8 + 25 * t)) },
      { s: scheduledStep((t) => 1 / t), eta: [1, 1 / 2, 1 / 3] },
      { s: (t: number) => 0.1 * t, eta: [0.1, 0.2, 0.30000000000000004] },
    ];
    for (const c of cases) {
      const l = mirrorDescent({
        geometry: euclidean({ dimension: 2 }),
        initial: [1, 1],
        stepSize: c.s,
      });
      let x = [1, 1];
      for (let t = 0; t < 3; t++) {
        l.update({ gradient: g(3, 4), loss: 1 });
        expect(l.lastStepSize).toBe(c.eta[t]);
        x = [x[0] - c.eta[t] * 3, x[1] - c.eta[t] * 4];
        expect(Array.from(l.decision())).toEqual(x);
      }
      expect(l.round).toBe(3);
      expect(l.sumSquaredGradients).toBe(75);
    }
  });

  it("computes the gradient and loss from a loss object and reports them to observers", () => {
    const l = mirrorDescent({
      geometry: euclidean({ dimension: 2 }),
      initial: [2, 0],
      stepSize: 0.5,
    });
    const seen: { round: number; decision: number[]; loss: number; gradient: number[] }[] = [];
    const off = l.observe((r: RoundRecord) =>
      seen.push({
        round: r.round,
        decision: Array.from(r.decision),
        loss: r.loss,
        gradient: Array.from(r.gradient ?? []),
      }),
    );
    const lossObject = {
      value: (x: Float64Array) => x[0] * x[0] + x[1] * x[1],
      gradient: (x: Float64Array, out: Float64Array) => {
        out[0] = 2 * x[0];
        out[1] = 2 * x[1];
        return out;
      },
    };
    l.update({ lossObject });
    l.update({ lossObject, loss: 7 });
    off();
    l.update({ lossObject });
    expect(seen).toEqual([
      { round: 1, decision: [2, 0], loss: 4, gradient: [4, 0] },
      { round: 2, decision: [0, 0], loss: 7, gradient: [0, 0] },
    ]);
    const l2 = mirrorDescent({ geometry: euclidean({ dimension: 1 }), initial: [0], stepSize: 1 });
    let rec: RoundRecord | undefined;
    l2.observe((r) => {
      rec = r;
    });
    l2.update({ gradient: g(1) });
    expect(Number.isNaN(rec?.loss)).toBe(true); // no loss given and no loss object
  });

  it("copies `initial`, so later changes to it do not move the learner", () => {
    const init = g(0.2, 0.8);
    const l = mirrorDescent({ geometry: entropy({ dimension: 2 }), initial: init, stepSize: 1 });
    init[0] = 0.9;
    expect(Array.from(l.decision())).toEqual([0.2, 0.8]);
    l.update({ gradient: g(1, 0) });
    l.reset();
    expect(Array.from(l.decision())).toEqual([0.2, 0.8]);
  });

  it("rejects bad options with typed errors naming function, option, expected and given", () => {
    const fn = "mirrorDescent";
    const geometry = euclidean({ dimension: 2 });
    catchRecedeError(() => mirrorDescent({ geometry, initial: [0, 0], stepSize: 0 }), {
      code: "range",
      fn,
      arg: "stepSize",
      message: "> 0 (got 0)",
    });
    catchRecedeError(() => mirrorDescent({ geometry, initial: [0, 0], stepSize: -0.5 }), {
      code: "range",
      fn,
      arg: "stepSize",
    });
    catchRecedeError(() => mirrorDescent({ geometry, initial: [0, 0], stepSize: Number.NaN }), {
      code: "non-finite",
      fn,
      arg: "stepSize",
    });
    catchRecedeError(() => mirrorDescent({ geometry, initial: [0, 0], stepSize: "0.1" as never }), {
      code: "type",
      fn,
      arg: "stepSize",
    });
    catchRecedeError(() => mirrorDescent({ geometry, initial: [0, 0, 0], stepSize: 1 }), {
      code: "dimension",
      fn,
      arg: "initial",
      message: "of length 2",
    });
    catchRecedeError(
      () => mirrorDescent({ geometry, initial: [0, Number.POSITIVE_INFINITY], stepSize: 1 }),
      {
        code: "non-finite",
        fn,
        arg: "initial[1]",
      },
    );
    catchRecedeError(
      () =>
        mirrorDescent({ geometry: entropy({ dimension: 2 }), initial: [0.5, 0.6], stepSize: 1 }),
      {
        code: "domain",
        fn,
        arg: "initial",
      },
    );
    catchRecedeError(() => mirrorDescent({ geometry: {} as never, initial: [0], stepSize: 1 }), {
      code: "type",
      fn,
      arg: "geometry",
    });
    catchRecedeError(() => mirrorDescent(undefined as never), { code: "type", fn, arg: "options" });
    catchRecedeError(() => constantStep(0), { code: "range", fn: "constantStep", arg: "eta" });
    catchRecedeError(() => inverseSqrtStep(-1), {
      code: "range",
      fn: "inverseSqrtStep",
      arg: "eta0",
    });
    catchRecedeError(() => adaGradStep(1, 0), { code: "range", fn: "adaGradStep", arg: "delta" });
    catchRecedeError(() => adaGradStep(Number.NaN), {
      code: "non-finite",
      fn: "adaGradStep",
      arg: "eta0",
    });
    catchRecedeError(() => scheduledStep(3 as never), {
      code: "type",
      fn: "scheduledStep",
      arg: "fn",
    });
  });

  it("a user schedule returning NaN, 0, a negative number or throwing fails with the state untouched", () => {
    for (const bad of [Number.NaN, 0, -1, Number.POSITIVE_INFINITY, "1" as unknown as number]) {
      const l = mirrorDescent({
        geometry: euclidean({ dimension: 1 }),
        initial: [1],
        stepSize: (t) => (t === 2 ? bad : 1),
      });
      l.update({ gradient: g(0.5) });
      const snap = l.snapshot();
      catchRecedeError(() => l.update({ gradient: g(0.5) }), {
        code: "range",
        fn: "mirrorDescent.update",
        arg: "stepSize",
      });
      expect(l.snapshot()).toEqual(snap);
    }
    const l = mirrorDescent({
      geometry: euclidean({ dimension: 1 }),
      initial: [1],
      stepSize: () => {
        throw new Error("boom");
      },
    });
    const e = catchRecedeError(() => l.update({ gradient: g(1) }), {
      code: "callback",
      arg: "stepSize",
      message: "boom",
    });
    expect((e.cause as Error).message).toBe("boom");
    expect(l.round).toBe(0);
  });

  it("rejects bad feedback with typed errors and leaves the state untouched", () => {
    const l = mirrorDescent({
      geometry: euclidean({ dimension: 2 }),
      initial: [1, 2],
      stepSize: 1,
    });
    const fn = "mirrorDescent.update";
    catchRecedeError(() => l.update({ gradient: g(1, Number.NaN) }), {
      code: "non-finite",
      fn,
      arg: "feedback.gradient[1]",
    });
    catchRecedeError(() => l.update({ gradient: g(1) }), {
      code: "dimension",
      fn,
      arg: "feedback.gradient",
    });
    catchRecedeError(() => l.update({ gradient: [1, 2] as never }), {
      code: "type",
      fn,
      arg: "feedback.gradient",
    });
    catchRecedeError(() => l.update({ gradient: g(1, 1), loss: Number.NaN }), {
      code: "non-finite",
      fn,
      arg: "feedback.loss",
    });
    catchRecedeError(() => l.update({}), { code: "type", fn, arg: "feedback" });
    catchRecedeError(() => l.update(null as never), { code: "type", fn, arg: "feedback" });
    catchRecedeError(() => l.update({ lossObject: { value: () => 0 } as never }), {
      code: "type",
      fn,
      arg: "feedback.lossObject",
    });
    catchRecedeError(
      () =>
        l.update({
          lossObject: {
            value: () => Number.NaN,
            gradient: (_x: Float64Array, o: Float64Array) => o.fill(1),
          },
        }),
      { code: "non-finite", fn, arg: "feedback.lossObject.value(x)" },
    );
    catchRecedeError(
      () =>
        l.update({
          lossObject: {
            value: () => 0,
            gradient: (_x: Float64Array, o: Float64Array) => o.fill(Number.NaN),
          },
        }),
      { code: "non-finite", fn, arg: "feedback.lossObject.gradient(x)[0]" },
    );
    catchRecedeError(
      () =>
        l.update({
          lossObject: {
            value: () => 0,
            gradient: (x: Float64Array, _o: Float64Array) => {
              x[0] = 1e9; // a loss object that scribbles on its input cannot touch the learner
              throw new Error("oops");
            },
          },
        }),
      { code: "callback", fn, arg: "feedback.lossObject.gradient" },
    );
    expect(Array.from(l.decision())).toEqual([1, 2]);
    expect(l.round).toBe(0);
    catchRecedeError(
      () => l.restore({ round: -1, decision: g(0, 0), sumSquaredGradients: 0, lastStepSize: 1 }),
      {
        code: "range",
        arg: "snapshot.round",
      },
    );
    catchRecedeError(
      () => l.restore({ round: 1, decision: g(0), sumSquaredGradients: 0, lastStepSize: 1 }),
      {
        code: "dimension",
        arg: "snapshot.decision",
      },
    );
  });

  it("extreme gradients on the simplex are absorbed by the log-domain step", () => {
    const l = mirrorDescent({
      geometry: entropy({ dimension: 2 }),
      initial: [0.5, 0.5],
      stepSize: 1,
    });
    l.update({ gradient: g(1e308, -1e308) });
    expect(Array.from(l.decision())).toEqual([0, 1]);
  });

  it("a user geometry whose step throws fails as a typed callback error, state untouched", () => {
    const base = euclidean({ dimension: 2 });
    const geometry = {
      ...base,
      name: "fragile",
      dimension: 2,
      potential: (x: Float64Array) => base.potential(x),
      divergence: (x: Float64Array, y: Float64Array) => base.divergence(x, y),
      mirrorMap: (x: Float64Array, o: Float64Array) => base.mirrorMap(x, o),
      inverseMirrorMap: (x: Float64Array, o: Float64Array) => base.inverseMirrorMap(x, o),
      contains: (x: Float64Array) => base.contains(x),
      step: (xt: Float64Array, g: Float64Array, eta: number, out: Float64Array) => {
        if (g[0] > 100) throw new Error("solver diverged");
        return base.step(xt, g, eta, out);
      },
    };
    const l = mirrorDescent({ geometry, initial: [1, 1], stepSize: 0.5 });
    l.update({ gradient: g(1, 1) });
    catchRecedeError(() => l.update({ gradient: g(1000, 0) }), {
      code: "callback",
      fn: "mirrorDescent.update",
      arg: "geometry.step (fragile)",
      message: "solver diverged",
    });
    expect(Array.from(l.decision())).toEqual([0.5, 0.5]);
    expect(l.round).toBe(1);
  });

  it("a mirror step that leaves the domain is refused with the state untouched", () => {
    // On the positive orthant x·e^{1e6} overflows to +∞: the step is rejected, not committed.
    const l = mirrorDescent({
      geometry: positiveEntropy({ dimension: 2 }),
      initial: [1, 1],
      stepSize: 1,
    });
    catchRecedeError(() => l.update({ gradient: g(0, -1e6) }), {
      code: "non-finite",
      fn: "mirrorDescent.update",
    });
    catchRecedeError(() => l.update({ gradient: g(1e6, 0) }), {
      code: "domain",
      fn: "mirrorDescent.update",
    });
    expect(Array.from(l.decision())).toEqual([1, 1]);
    expect(l.round).toBe(0);
  });
});

describe("dynamicMirrorDescent", () => {
  it("applies Φ_t after the mirror step, with the completed round's index (Hall & Willett 2015)", () => {
    const rounds: number[] = [];
    const l = dynamicMirrorDescent({
      geometry: euclidean({ dimension: 1 }),
      initial: [0],
      stepSize: 0.5,
      dynamic: (x, t, out) => {
        rounds.push(t);
        out[0] = x[0] + 0.1;
      },
    });
    l.update({ gradient: g(-1) });
    expect(l.decision()[0]).toBeCloseTo(0.6, 15);
    l.update({ gradient: g(0) });
    expect(l.decision()[0]).toBeCloseTo(0.7, 15);
    expect(rounds).toEqual([1, 2]);
  });

  it("affineDynamic applies A x + b (ndarray or rows), bit for bit like a hand-written Φ", () => {
    const A = [
      [0.9, -0.2],
      [0.3, 0.8],
    ];
    const b = [0.05, -0.1];
    const hand = dynamicMirrorDescent({
      geometry: euclidean({ dimension: 2 }),
      initial: [1, 2],
      stepSize: 0.3,
      dynamic: (x, _t, out) => {
        out[0] = b[0] + A[0][0] * x[0] + A[0][1] * x[1];
        out[1] = b[1] + A[1][0] * x[0] + A[1][1] * x[1];
      },
    });
    const viaNd = dynamicMirrorDescent({
      geometry: euclidean({ dimension: 2 }),
      initial: [1, 2],
      stepSize: 0.3,
      dynamic: affineDynamic({
        matrix: ndarray(new Float64Array([0.9, 0.3, -0.2, 0.8]), [2, 2]).transpose(1, 0),
        offset: b,
      }),
    });
    for (const gr of [g(1, 0), g(-0.5, 2), g(0, 0)]) {
      hand.update({ gradient: gr });
      viaNd.update({ gradient: gr });
      expect(Array.from(viaNd.decision())).toEqual(Array.from(hand.decision()));
    }
    const fn = "affineDynamic";
    catchRecedeError(() => affineDynamic({ matrix: [[1, 2, 3]] }), {
      code: "dimension",
      fn,
      arg: "matrix",
    });
    catchRecedeError(() => affineDynamic({ matrix: A, offset: [1] }), {
      code: "dimension",
      fn,
      arg: "offset",
    });
    catchRecedeError(() => affineDynamic(undefined as never), { code: "type", fn, arg: "options" });
    const wrongSize = dynamicMirrorDescent({
      geometry: euclidean({ dimension: 3 }),
      initial: [0, 0, 0],
      stepSize: 1,
      dynamic: affineDynamic({ matrix: A }),
    });
    catchRecedeError(() => wrongSize.update({ gradient: g(1, 1, 1) }), {
      code: "dimension",
      fn,
      arg: "x",
    });
    expect(wrongSize.round).toBe(0);
  });

  it("a Φ that throws, forgets to write, or leaves the domain fails with the state untouched", () => {
    const fn = "dynamicMirrorDescent.update";
    const make = (dynamic: (x: Float64Array, t: number, out: Float64Array) => void) =>
      dynamicMirrorDescent({
        geometry: entropy({ dimension: 2 }),
        initial: [0.5, 0.5],
        stepSize: 1,
        dynamic,
      });
    const throwing = make(() => {
      throw new Error("model failed");
    });
    catchRecedeError(() => throwing.update({ gradient: g(1, 0) }), {
      code: "callback",
      fn,
      arg: "dynamic",
      message: "model failed",
    });
    const lazy = make((_x, _t, out) => {
      out[0] = 0.5;
    });
    catchRecedeError(() => lazy.update({ gradient: g(1, 0) }), { code: "non-finite", fn });
    const leaving = make((_x, _t, out) => {
      out[0] = 0.9;
      out[1] = 0.9;
    });
    catchRecedeError(() => leaving.update({ gradient: g(1, 0) }), { code: "domain", fn });
    for (const l of [throwing, lazy, leaving]) {
      expect(l.round).toBe(0);
      expect(Array.from(l.decision())).toEqual([0.5, 0.5]);
    }
    catchRecedeError(
      () =>
        dynamicMirrorDescent({
          geometry: euclidean({ dimension: 1 }),
          initial: [0],
          stepSize: 1,
          dynamic: 5 as never,
        }),
      { code: "type", fn: "dynamicMirrorDescent", arg: "dynamic" },
    );
    catchRecedeError(
      () =>
        dynamicMirrorDescent({
          geometry: euclidean({ dimension: 1 }),
          initial: [0],
          stepSize: 0,
          dynamic: () => {},
        }),
      { code: "range", fn: "dynamicMirrorDescent", arg: "stepSize" },
    );
  });
});

describe("presets: hedge and onlineGradientDescent", () => {
  it("equal their compositions bit for bit", () => {
    const gs = [g(0.2, 1, 0.5), g(1, 0, 0), g(0.3, 0.3, 0.9)];
    const a = hedge({ experts: 3, stepSize: 0.7 });
    const b = mirrorDescent({
      geometry: entropy({ dimension: 3 }),
      initial: [1 / 3, 1 / 3, 1 / 3],
      stepSize: 0.7,
    });
    const c = onlineGradientDescent({
      initial: [0, 0, 0],
      stepSize: inverseSqrtStep(0.4),
      feasible: { kind: "ball", radius: 1 },
    });
    const d = mirrorDescent({
      geometry: euclidean({ dimension: 3, feasible: { kind: "ball", radius: 1 } }),
      initial: [0, 0, 0],
      stepSize: inverseSqrtStep(0.4),
    });
    for (const gr of gs) {
      for (const l of [a, b, c, d]) l.update({ gradient: gr });
      expect(Array.from(a.decision())).toEqual(Array.from(b.decision()));
      expect(Array.from(c.decision())).toEqual(Array.from(d.decision()));
    }
  });
  it("reject bad options with typed errors naming the preset", () => {
    catchRecedeError(() => hedge({ experts: 0, stepSize: 1 }), {
      code: "range",
      fn: "hedge",
      arg: "experts",
    });
    catchRecedeError(() => hedge({ experts: 2, stepSize: 1, initial: [0.9, 0.9] }), {
      code: "domain",
      fn: "hedge",
      arg: "initial",
    });
    catchRecedeError(() => hedge({ experts: 2, stepSize: 1, initial: [1] }), {
      code: "dimension",
      fn: "hedge",
      arg: "initial",
    });
    catchRecedeError(() => hedge({ experts: 2, stepSize: -1 }), {
      code: "range",
      fn: "mirrorDescent",
      arg: "stepSize",
    });
    catchRecedeError(() => onlineGradientDescent({ initial: [], stepSize: 1 }), {
      code: "dimension",
      fn: "onlineGradientDescent",
      arg: "initial",
    });
    catchRecedeError(
      () =>
        onlineGradientDescent({
          initial: [2, 0],
          stepSize: 1,
          feasible: { kind: "ball", radius: 1 },
        }),
      {
        code: "domain",
        fn: "onlineGradientDescent",
        arg: "initial",
        message: "feasible ball",
      },
    );
    catchRecedeError(() => onlineGradientDescent({ initial: "x" as never, stepSize: 1 }), {
      code: "type",
      fn: "onlineGradientDescent",
      arg: "initial",
    });
  });
});
