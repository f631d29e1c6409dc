import { entropy, mirrorDescent, ObserverList, type RoundRecord } from "@recede/core";
import { describe, expect, it } from "vitest";
import { ballDomain, simplexDomain } from "./domain.js";
import { seriesToCsv, seriesToJson, summaryToJson } from "./exportSeries.js";
import { linearLoss } from "./losses.js";
import { createRegretTracker, trackRegret } from "./tracker.js";

describe("attaching to an Observable", () => {
  it("records every update of a core learner until detached", () => {
    const learner = mirrorDescent({
      geometry: entropy({ dimension: 3 }),
      initial: [1 / 3, 1 / 3, 1 / 3],
      stepSize: 0.5,
    });
    const tracker = createRegretTracker({ dimension: 3, domain: simplexDomain(3) });
    const detach = tracker.attach(learner);
    const played: Float64Array[] = [];
    const losses = [
      [1, 0, 0.5],
      [0, 1, 0.5],
      [0.2, 0.1, 0.9],
      [1, 1, 0],
    ];
    for (const l of losses.slice(0, 3)) {
      played.push(learner.decision().slice());
      const g = Float64Array.from(l);
      learner.update({
        gradient: g,
        loss: g.reduce((a, v, i) => a + v * learner.decision()[i], 0),
      });
    }
    detach();
    learner.update({ gradient: Float64Array.from(losses[3]), loss: 0 });
    expect(tracker.rounds).toBe(3);
    const kept = tracker.retainedDecisions();
    for (let t = 0; t < 3; t++) expect(Array.from(kept[t])).toEqual(Array.from(played[t]));
    // Σ⟨p_t, ℓ_t⟩ − min_i Σ ℓ_{t,i}, computed by hand from the played weights.
    let mine = 0;
    const cum = [0, 0, 0];
    for (let t = 0; t < 3; t++) {
      for (let i = 0; i < 3; i++) {
        mine += played[t][i] * losses[t][i];
        cum[i] += losses[t][i];
      }
    }
    const s = tracker.summary();
    expect(s.linear?.regret).toBeCloseTo(mine - Math.min(...cum), 14);
    expect(s.cumulativeLoss).toBeCloseTo(mine, 14);
  });

  it('lossWhenAbsent: "linear" tracks a learner fed gradients only (core emits loss NaN)', () => {
    const make = () =>
      mirrorDescent({ geometry: entropy({ dimension: 2 }), initial: [0.5, 0.5], stepSize: 0.3 });
    const a = make();
    const b = make();
    const ta = createRegretTracker({
      dimension: 2,
      domain: simplexDomain(2),
      lossWhenAbsent: "linear",
    });
    const tb = createRegretTracker({ dimension: 2, domain: simplexDomain(2) });
    ta.attach(a);
    tb.attach(b);
    for (let t = 0; t < 20; t++) {
      const g = new Float64Array([t % 3 === 0 ? 1 : 0, 0.4]);
      a.update({ gradient: g });
      const x = b.decision();
      b.update({ gradient: g, loss: g[0] * x[0] + g[1] * x[1] });
    }
    expect(ta.rounds).toBe(20);
    expect(summaryToJson(ta.summary())).toBe(summaryToJson(tb.summary()));
    const strict = createRegretTracker({ dimension: 2, domain: simplexDomain(2) });
    expect(() =>
      strict.record({
        decision: new Float64Array([0.5, 0.5]),
        loss: Number.NaN,
        gradient: new Float64Array(2),
      }),
    ).toThrow(/loss must be a finite number/);
  });

  it("trackRegret attaches in one call; detachAll removes every subscription", () => {
    const list = new ObserverList();
    const source = { observe: (l: (r: RoundRecord) => void) => list.add(l) };
    const tracker = trackRegret(source, { dimension: 1, history: "summary" });
    const rec: RoundRecord = {
      round: 1,
      decision: new Float64Array([2]),
      loss: 3,
      gradient: undefined,
      lossObject: undefined,
    };
    list.emit(rec);
    list.emit(rec);
    tracker.detachAll();
    list.emit(rec);
    expect(tracker.rounds).toBe(2);
    expect(tracker.summary().cumulativeLoss).toBe(6);
    expect(list.active).toBe(false);
  });
});

describe("per-round series and export", () => {
  const make = () => {
    const tracker = createRegretTracker({
      dimension: 2,
      domain: ballDomain(new Float64Array([0, 0]), 2),
      experts: [new Float64Array([1, 0]), new Float64Array([0, 1])],
    });
    const gs = [
      [1, 2],
      [-3, 0.5],
      [0.25, -1],
    ];
    const xs = [
      [0, 0],
      [1, -1],
      [0.5, 0.5],
    ];
    for (let t = 0; t < 3; t++) {
      tracker.record({
        decision: Float64Array.from(xs[t]),
        lossObject: linearLoss(Float64Array.from(gs[t])),
      });
    }
    return { tracker, gs, xs };
  };

  it("row t holds the regret of rounds 1..t against the best comparator of rounds 1..t", () => {
    const { tracker, gs, xs } = make();
    const s = tracker.series();
    expect(s.names).toEqual(["round", "loss", "cumulativeLoss", "linearRegret", "expertRegret"]);
    let played = 0;
    const G = [0, 0];
    for (let t = 0; t < 3; t++) {
      played += gs[t][0] * xs[t][0] + gs[t][1] * xs[t][1];
      G[0] += gs[t][0];
      G[1] += gs[t][1];
      // Ball of radius 2 about 0: min ⟨Γ, u⟩ = −2‖Γ‖; experts e₁, e₂: min(Γ₁, Γ₂).
      expect(s.columns.round[t]).toBe(t + 1);
      expect(s.columns.cumulativeLoss[t]).toBeCloseTo(played, 14);
      expect(s.columns.linearRegret[t]).toBeCloseTo(played + 2 * Math.hypot(G[0], G[1]), 13);
      expect(s.columns.expertRegret[t]).toBeCloseTo(played - Math.min(G[0], G[1]), 13);
    }
  });

  it("CSV and JSON carry every column and round-trip exactly", () => {
    const { tracker } = make();
    const s = tracker.series();
    const csv = seriesToCsv(s);
    const lines = csv.trimEnd().split("\n");
    expect(lines[0]).toBe(s.names.join(","));
    expect(lines.length).toBe(s.length + 1);
    for (let r = 0; r < s.length; r++) {
      const cells = lines[r + 1].split(",").map(Number);
      s.names.forEach((n, c) => {
        expect(cells[c]).toBe(s.columns[n][r]);
      });
    }
    const parsed = JSON.parse(seriesToJson(s)) as {
      names: string[];
      length: number;
      columns: Record<string, number[]>;
    };
    expect(parsed.length).toBe(3);
    for (const n of s.names) expect(parsed.columns[n]).toEqual(Array.from(s.columns[n]));
    const summary = JSON.parse(summaryToJson(tracker.summary()));
    expect(summary.linear.argmin.length).toBe(2);
    expect(summary.dynamic).toBeUndefined();
  });

  it("user-supplied comparators in hindsight: regretAgainst and regretAgainstSequence", () => {
    const { tracker, gs, xs } = make();
    const u = new Float64Array([0.3, -0.7]);
    let expected = 0;
    for (let t = 0; t < 3; t++)
      expected += gs[t][0] * (xs[t][0] - u[0]) + gs[t][1] * (xs[t][1] - u[1]);
    expect(tracker.regretAgainst(u)).toBeCloseTo(expected, 14);
    const seq = tracker.regretAgainstSequence((t, _lo, out) => out.fill(t));
    let e2 = 0;
    for (let t = 0; t < 3; t++)
      e2 += gs[t][0] * (xs[t][0] - (t + 1)) + gs[t][1] * (xs[t][1] - (t + 1));
    expect(seq).toBeCloseTo(e2, 13);
  });

  it("bestOfExperts in hindsight equals the streamed expert summary", () => {
    const { tracker } = make();
    const h = tracker.bestOfExperts([
      new Float64Array([1, 0]),
      (_t, _lo, out) => out.fill(0).fill(1, 1),
    ]);
    const s = tracker.summary().experts;
    expect(h.bestIndex).toBe(s?.bestIndex);
    expect(h.regret).toBeCloseTo(s?.regret ?? Number.NaN, 13);
    expect(Array.from(h.losses).map((v) => v.toFixed(12))).toEqual(
      Array.from(s?.losses ?? []).map((v) => v.toFixed(12)),
    );
  });

  it("reset forgets every round and keeps the options", () => {
    const { tracker } = make();
    tracker.reset();
    expect(tracker.rounds).toBe(0);
    expect(tracker.series().length).toBe(0);
    expect(tracker.summary().linear?.regret).toBe(0);
    tracker.record({
      decision: new Float64Array(2),
      lossObject: linearLoss(new Float64Array([1, 0])),
    });
    expect(tracker.summary().linear?.regret).toBe(2);
  });
});
