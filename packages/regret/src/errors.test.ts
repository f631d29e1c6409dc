// Bad input gets a typed error naming the function, the argument, what was expected and what was
// given, and a failed round leaves the tracker unchanged (docs: common practice of this project,
// ARCHITECTURE.md "Rules every part follows").
import { RecedeError } from "@recede/core";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { boxDomain, simplexDomain } from "./domain.js";
import { seriesToJson, summaryToJson } from "./exportSeries.js";
import { linearLoss, quadraticLoss } from "./losses.js";
import { createRegretTracker, type RegretTracker, type RoundInput } from "./tracker.js";

function fingerprint(t: RegretTracker): string {
  return `${t.rounds}|${summaryToJson(t.summary())}|${seriesToJson(t.series())}|${t
    .retainedDecisions()
    .map((x) => Array.from(x).join(","))
    .join(";")}`;
}

function makeTracker(): RegretTracker {
  return createRegretTracker({
    dimension: 2,
    domain: boxDomain(-1, 1, 2),
    experts: [new Float64Array([0.5, 0.5]), (t, _lo, out) => out.fill(t % 2 === 0 ? 1 : -1)],
    comparator: (t, _lo, out) => out.fill(0.1 * t),
    dynamics: (_t, u, out) => {
      out.set(u);
      return out;
    },
    adaptiveWindow: 3,
  });
}

const good = (k: number): RoundInput => {
  const g = new Float64Array([Math.sin(k), Math.cos(k)]);
  return {
    decision: new Float64Array([0.1 * k, -0.2]),
    gradient: g,
    lossObject: linearLoss(g, 0.5),
  };
};

function expectTyped(
  f: () => void,
  code: RecedeError["code"],
  fn: string,
  arg: string | RegExp,
): void {
  let caught: unknown;
  try {
    f();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(RecedeError);
  const e = caught as RecedeError;
  expect(e.code).toBe(code);
  expect(e.fn).toBe(fn);
  if (typeof arg === "string") expect(e.arg).toBe(arg);
  else expect(e.arg).toMatch(arg);
  expect(e.message.startsWith(`${fn}: `)).toBe(true);
}

describe("typed errors leave the tracker unchanged", () => {
  const bad: Array<[string, (k: number) => RoundInput, RecedeError["code"], string | RegExp]> = [
    [
      "NaN in the decision",
      (k) => ({ ...good(k), decision: new Float64Array([Number.NaN, 0]) }),
      "non-finite",
      "decision[0]",
    ],
    [
      "∞ in the decision",
      (k) => ({ ...good(k), decision: new Float64Array([0, Number.POSITIVE_INFINITY]) }),
      "non-finite",
      "decision[1]",
    ],
    [
      "wrong-size decision",
      (k) => ({ ...good(k), decision: new Float64Array(3) }),
      "dimension",
      "decision",
    ],
    [
      "decision not a Float64Array",
      (k) => ({ ...good(k), decision: [0, 0] as unknown as Float64Array }),
      "type",
      "decision",
    ],
    ["NaN loss", (k) => ({ ...good(k), loss: Number.NaN }), "non-finite", "loss"],
    ["−∞ loss", (k) => ({ ...good(k), loss: Number.NEGATIVE_INFINITY }), "non-finite", "loss"],
    [
      "wrong-size gradient",
      (k) => ({ ...good(k), gradient: new Float64Array(1) }),
      "dimension",
      "gradient",
    ],
    [
      "NaN in the gradient",
      (k) => ({ ...good(k), gradient: new Float64Array([0, Number.NaN]) }),
      "non-finite",
      "gradient[1]",
    ],
    [
      "loss object returning NaN",
      (k) => ({
        ...good(k),
        loss: 1,
        lossObject: { value: () => Number.NaN, gradient: (_x, o) => o },
      }),
      "non-finite",
      /^lossObject\.value\(experts\[0\]\)$/,
    ],
    [
      "no loss object although experts need one",
      (k) => ({ decision: good(k).decision, gradient: good(k).gradient, loss: 1 }),
      "state",
      "lossObject",
    ],
  ];
  for (const [name, make, code, arg] of bad) {
    it(name, () => {
      const t = makeTracker();
      for (let k = 1; k <= 4; k++) t.record(good(k));
      const before = fingerprint(t);
      expectTyped(() => t.record(make(5)), code, "RegretTracker.record", arg);
      expect(fingerprint(t)).toBe(before);
      // The tracker still works and gives what a tracker fed only the good rounds gives.
      t.record(good(5));
      const ref = makeTracker();
      for (let k = 1; k <= 5; k++) ref.record(good(k));
      expect(fingerprint(t)).toBe(fingerprint(ref));
    });
  }

  it("comparator and expert policies returning bad points", () => {
    const t = createRegretTracker({
      dimension: 2,
      experts: [(_t, _lo, _out) => new Float64Array(3)],
    });
    expectTyped(() => t.record(good(1)), "dimension", "RegretTracker.record", "experts[0](round)");
    const u = createRegretTracker({
      dimension: 2,
      comparator: (_t, _lo, out) => out.fill(Number.NaN),
    });
    expectTyped(
      () => u.record(good(1)),
      "non-finite",
      "RegretTracker.record",
      "comparator(round)[0]",
    );
    const v = createRegretTracker({
      dimension: 2,
      comparator: (_t, _lo, out) => out.fill(0),
      dynamics: () => new Float64Array([1, Number.POSITIVE_INFINITY]),
    });
    v.record(good(1));
    const before = fingerprint(v);
    expectTyped(() => v.record(good(2)), "non-finite", "RegretTracker.record", "dynamics(u)[1]");
    expect(fingerprint(v)).toBe(before);
    expect(t.rounds + u.rounds).toBe(0);
  });

  it("quadratic comparator needs quadratic loss objects of the right size", () => {
    const t = createRegretTracker({ dimension: 2, quadratic: true });
    expectTyped(() => t.record(good(1)), "type", "RegretTracker.record", "lossObject");
    expectTyped(
      () =>
        t.record({
          decision: new Float64Array(2),
          lossObject: quadraticLoss(new Float64Array([1])),
        }),
      "dimension",
      "RegretTracker.record",
      "lossObject.dimension",
    );
    expect(t.rounds).toBe(0);
  });

  it("linear comparator needs a gradient or a loss object", () => {
    const t = createRegretTracker({ dimension: 2, domain: simplexDomain(2) });
    expectTyped(
      () => t.record({ decision: new Float64Array([0.5, 0.5]), loss: 1 }),
      "state",
      "RegretTracker.record",
      "gradient",
    );
    expect(t.rounds).toBe(0);
  });

  it("random interleavings of good and bad rounds equal the good rounds alone (fast-check)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.boolean(), fc.integer({ min: 0, max: bad.length - 1 })), {
          maxLength: 25,
        }),
        (plan) => {
          const a = makeTracker();
          const b = makeTracker();
          let k = 0;
          for (const [ok, which] of plan) {
            if (ok) {
              k++;
              a.record(good(k));
              b.record(good(k));
            } else {
              expect(() => a.record(bad[which][1](k + 1))).toThrow(RecedeError);
            }
          }
          expect(fingerprint(a)).toBe(fingerprint(b));
        },
      ),
      { numRuns: 100, seed: 3 },
    );
  });

  it("construction rejects bad options with named arguments", () => {
    const fn = "createRegretTracker";
    expectTyped(() => createRegretTracker({ dimension: 0 }), "range", fn, "dimension");
    expectTyped(
      () => createRegretTracker({ dimension: 2, domain: simplexDomain(3) }),
      "dimension",
      fn,
      "domain.dimension",
    );
    expectTyped(() => createRegretTracker({ dimension: 2, linear: true }), "state", fn, "domain");
    expectTyped(
      () => createRegretTracker({ dimension: 2, domain: simplexDomain(2), quadratic: true }),
      "domain",
      fn,
      "domain",
    );
    expectTyped(
      () => createRegretTracker({ dimension: 2, experts: [new Float64Array(3)] }),
      "dimension",
      fn,
      "experts[0]",
    );
    expectTyped(
      () => createRegretTracker({ dimension: 2, experts: [new Float64Array([0, Number.NaN])] }),
      "non-finite",
      fn,
      "experts[0][1]",
    );
    expectTyped(
      () => createRegretTracker({ dimension: 2, dynamics: (_t, u) => u }),
      "state",
      fn,
      "comparator",
    );
    expectTyped(
      () => createRegretTracker({ dimension: 2, history: "all" as "full" }),
      "range",
      fn,
      "history",
    );
    expectTyped(
      () => createRegretTracker({ dimension: 2, adaptiveWindow: 0 }),
      "range",
      fn,
      "adaptiveWindow",
    );
    expectTyped(() => createRegretTracker({ dimension: 2, window: 1.5 }), "range", fn, "window");
    expectTyped(
      () => createRegretTracker({ dimension: 2, pathNorm: "l3" as "l2" }),
      "range",
      fn,
      "pathNorm",
    );
  });

  it('invalidRounds: "skip" counts and keeps the error instead of throwing', () => {
    const t = createRegretTracker({ dimension: 2, invalidRounds: "skip" });
    t.record({ decision: new Float64Array([1, 2]), loss: 1 });
    t.record({ decision: new Float64Array([1, 2]), loss: Number.NaN });
    t.record({ decision: new Float64Array(5), loss: 1 });
    t.record({ decision: new Float64Array([1, 2]), loss: 2 });
    expect(t.rounds).toBe(2);
    expect(t.skippedRounds).toBe(2);
    expect(t.lastError).toBeInstanceOf(RecedeError);
    expect(t.lastError?.arg).toBe("decision");
    expect(t.summary().cumulativeLoss).toBe(3);
  });

  it("hindsight comparators need the full history", () => {
    const t = createRegretTracker({ dimension: 2, history: "window", window: 4 });
    t.record(good(1));
    expectTyped(
      () => t.regretAgainst(new Float64Array(2)),
      "state",
      "RegretTracker.regretAgainst",
      "history",
    );
  });
});
