// Streaming summaries (history "summary", O(1) memory in T) equal the full-history computation
// done here from scratch: plain sums over the stored rounds, brute force over the box's 2^d
// vertices (a linear function attains its minimum over a polytope at a vertex — R. T. Rockafellar,
// "Convex Analysis", 1970, Cor. 32.3.2), and brute force over every window for adaptive regret.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { boxDomain } from "./domain.js";
import { summaryToJson } from "./exportSeries.js";
import { linearLoss, quadraticLoss } from "./losses.js";
import { minimizeQuadratic } from "./quadraticMinimum.js";
import { createRegretTracker, type RegretTrackerOptions } from "./tracker.js";

interface Gen {
  d: number;
  w: number;
  lo: number[];
  width: number[];
  experts: number[][];
  rounds: { x: number[]; g: number[]; c: number; u: number[] }[];
}

const genArb = fc.integer({ min: 1, max: 3 }).chain((d) => {
  const vec = (min: number, max: number) =>
    fc.array(fc.double({ min, max, noNaN: true }), { minLength: d, maxLength: d });
  return fc.record({
    d: fc.constant(d),
    w: fc.integer({ min: 1, max: 12 }),
    lo: vec(-2, 0),
    width: vec(0.1, 3),
    experts: fc.array(vec(-1, 1), { minLength: 1, maxLength: 4 }),
    rounds: fc.array(
      fc.record({
        x: vec(-2, 3),
        g: vec(-5, 5),
        c: fc.double({ min: -3, max: 3, noNaN: true }),
        u: vec(-1, 1),
      }),
      { minLength: 1, maxLength: 50 },
    ),
  });
});

function vertexMin(gamma: number[], lo: number[], hi: number[]): number {
  const d = gamma.length;
  let best = Number.POSITIVE_INFINITY;
  for (let mask = 0; mask < 1 << d; mask++) {
    let v = 0;
    for (let i = 0; i < d; i++) v += gamma[i] * ((mask >> i) & 1 ? hi[i] : lo[i]);
    best = Math.min(best, v);
  }
  return best;
}

const dot = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
};

/** Window [s, e) regret of both kinds, from scratch. */
function windowRegret(g: Gen, hi: number[], s: number, e: number): [number, number] {
  const gamma = new Array(g.d).fill(0);
  let played = 0;
  let L = 0;
  const E = new Array(g.experts.length).fill(0);
  for (let t = s; t < e; t++) {
    const r = g.rounds[t];
    for (let i = 0; i < g.d; i++) gamma[i] += r.g[i];
    played += dot(r.g, r.x);
    L += dot(r.g, r.x) + r.c;
    g.experts.forEach((ex, j) => {
      E[j] += dot(r.g, ex) + r.c;
    });
  }
  return [played - vertexMin(gamma, g.lo, hi), L - Math.min(...E)];
}

function options(g: Gen, history: "summary" | "full" | "window" | "thinned"): RegretTrackerOptions {
  const hi = g.lo.map((l, i) => l + g.width[i]);
  return {
    dimension: g.d,
    domain: boxDomain(Float64Array.from(g.lo), Float64Array.from(hi)),
    experts: g.experts.map((e) => Float64Array.from(e)),
    comparator: (t, _lo, out) => {
      out.set(g.rounds[t - 1].u);
      return out;
    },
    dynamics: (_t, u, out) => {
      for (let i = 0; i < u.length; i++) out[i] = 0.5 * u[i];
      return out;
    },
    adaptiveWindow: g.w,
    history,
    window: 5,
    maxRows: 4,
  };
}

describe("streaming summaries equal the full-history computation", () => {
  it("linear, experts, dynamic, path lengths and adaptive regret", () => {
    fc.assert(
      fc.property(genArb, (g) => {
        const hi = g.lo.map((l, i) => l + g.width[i]);
        const tracker = createRegretTracker(options(g, "summary"));
        for (const r of g.rounds) {
          tracker.record({
            decision: Float64Array.from(r.x),
            lossObject: linearLoss(Float64Array.from(r.g), r.c),
          });
        }
        const s = tracker.summary();
        const T = g.rounds.length;
        const tol = (v: number) => 1e-10 * (1 + Math.abs(v)) * (1 + T);

        // Full-history recomputation.
        const [linR, expR] = windowRegret(g, hi, 0, T);
        let L = 0;
        let U = 0;
        let P = 0;
        let V = 0;
        for (let t = 0; t < T; t++) {
          const r = g.rounds[t];
          L += dot(r.g, r.x) + r.c;
          U += dot(r.g, r.u) + r.c;
          if (t > 0) {
            const prev = g.rounds[t - 1].u;
            P += Math.hypot(...r.u.map((v, i) => v - prev[i]));
            V += Math.hypot(...r.u.map((v, i) => v - 0.5 * prev[i]));
          }
        }
        expect(s.rounds).toBe(T);
        expect(Math.abs(s.cumulativeLoss - L)).toBeLessThanOrEqual(tol(L));
        expect(Math.abs((s.linear?.regret ?? Number.NaN) - linR)).toBeLessThanOrEqual(tol(linR));
        expect(Math.abs((s.experts?.regret ?? Number.NaN) - expR)).toBeLessThanOrEqual(tol(expR));
        expect(Math.abs((s.dynamic?.regret ?? Number.NaN) - (L - U))).toBeLessThanOrEqual(
          tol(L - U),
        );
        expect(Math.abs((s.dynamic?.pathLength ?? Number.NaN) - P)).toBeLessThanOrEqual(tol(P));
        expect(Math.abs((s.dynamic?.phiPathLength ?? Number.NaN) - V)).toBeLessThanOrEqual(tol(V));

        // Adaptive regret by brute force over every window of length w (or [1, T] when T < w).
        let aLin = Number.NEGATIVE_INFINITY;
        let aExp = Number.NEGATIVE_INFINITY;
        let sLin = 1;
        if (T < g.w) [aLin, aExp] = windowRegret(g, hi, 0, T);
        else {
          for (let st = 0; st + g.w <= T; st++) {
            const [a, b] = windowRegret(g, hi, st, st + g.w);
            if (a > aLin) {
              aLin = a;
              sLin = st + 1;
            }
            aExp = Math.max(aExp, b);
          }
        }
        expect(s.adaptive?.window).toBe(g.w);
        expect(Math.abs((s.adaptive?.linear?.regret ?? Number.NaN) - aLin)).toBeLessThanOrEqual(
          tol(aLin),
        );
        expect(Math.abs((s.adaptive?.experts?.regret ?? Number.NaN) - aExp)).toBeLessThanOrEqual(
          tol(aExp),
        );
        // The reported start attains the maximum (ties may pick another start of equal value).
        const st = s.adaptive?.linear?.start ?? 0;
        const [atStart] = T < g.w ? [aLin] : windowRegret(g, hi, st - 1, st - 1 + g.w);
        expect(Math.abs(atStart - aLin)).toBeLessThanOrEqual(tol(aLin));
        void sLin;
      }),
      { numRuns: 150, seed: 2024 },
    );
  });

  it("summary, window and full histories give identical summaries; the full series ends at them", () => {
    fc.assert(
      fc.property(genArb, (g) => {
        const trackers = (["summary", "window", "full", "thinned"] as const).map((h) =>
          createRegretTracker(options(g, h)),
        );
        for (const r of g.rounds) {
          const input = {
            decision: Float64Array.from(r.x),
            lossObject: linearLoss(Float64Array.from(r.g), r.c),
          };
          for (const t of trackers) t.record(input);
        }
        const json = trackers.map((t) => summaryToJson(t.summary()));
        expect(json[1]).toBe(json[0]);
        expect(json[2]).toBe(json[0]);
        expect(json[3]).toBe(json[0]);
        const s = trackers[2].summary();
        const series = trackers[2].series();
        const last = series.length - 1;
        expect(series.length).toBe(g.rounds.length);
        expect(trackers[1].retainedRows).toBe(Math.min(5, g.rounds.length));
        expect(series.columns.linearRegret[last]).toBe(s.linear?.regret);
        expect(series.columns.expertRegret[last]).toBe(s.experts?.regret);
        expect(series.columns.dynamicRegret[last]).toBe(s.dynamic?.regret);
        expect(series.columns.adaptiveLinear[last]).toBe(s.adaptive?.linear?.regret);
        // Thinned: at most maxRows = 4 rows, at rounds s, 2s, 3s, … (s a power of two), each equal
        // to the full series' row of that round.
        const th = trackers[3].series();
        expect(th.length).toBeLessThanOrEqual(4);
        if (th.length > 0) {
          const stride = th.columns.round[0];
          expect(Math.log2(stride) % 1).toBe(0);
          for (let r = 0; r < th.length; r++) {
            const round = th.columns.round[r];
            expect(round).toBe((r + 1) * stride);
            for (const n of th.names) expect(th.columns[n][r]).toBe(series.columns[n][round - 1]);
          }
          expect(g.rounds.length - th.columns.round[th.length - 1]).toBeLessThan(2 * stride);
        }
        // The window keeps the last rows of the full series, oldest first.
        const ws = trackers[1].series();
        for (let r = 0; r < ws.length; r++) {
          expect(ws.columns.round[r]).toBe(series.columns.round[series.length - ws.length + r]);
          expect(ws.columns.linearRegret[r]).toBe(
            series.columns.linearRegret[series.length - ws.length + r],
          );
        }
      }),
      { numRuns: 100, seed: 5 },
    );
  });

  it("summed quadratics: streamed minimum and adaptive regret equal the full-history computation", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 3 }).chain((d) =>
          fc.record({
            d: fc.constant(d),
            rounds: fc.array(
              fc.record({
                m: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), {
                  minLength: d * d,
                  maxLength: d * d,
                }),
                b: fc.array(fc.double({ min: -2, max: 2, noNaN: true }), {
                  minLength: d,
                  maxLength: d,
                }),
                c: fc.double({ min: -1, max: 1, noNaN: true }),
                x: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), {
                  minLength: d,
                  maxLength: d,
                }),
              }),
              { minLength: 1, maxLength: 30 },
            ),
          }),
        ),
        fc.boolean(),
        fc.integer({ min: 1, max: 8 }),
        ({ d, rounds }, boxed, w) => {
          const mk = (r: (typeof rounds)[number]) => {
            // A_t = M Mᵀ + 0.1 I (SPD).
            const A = new Float64Array(d * d);
            for (let i = 0; i < d; i++) {
              for (let j = 0; j < d; j++) {
                let s = i === j ? 0.1 : 0;
                for (let k = 0; k < d; k++) s += r.m[i * d + k] * r.m[j * d + k];
                A[i * d + j] = s;
              }
            }
            return quadraticLoss(A, { linear: Float64Array.from(r.b), constant: r.c });
          };
          const domain = boxed ? boxDomain(-0.3, 0.2, d) : undefined;
          const summary = createRegretTracker({
            dimension: d,
            domain,
            linear: false,
            quadratic: true,
            history: "summary",
            adaptiveWindow: w,
          });
          const full = createRegretTracker({
            dimension: d,
            domain,
            linear: false,
            quadratic: true,
            history: "full",
          });
          const losses = rounds.map(mk);
          rounds.forEach((r, t) => {
            const input = { decision: Float64Array.from(r.x), lossObject: losses[t] };
            summary.record(input);
            full.record(input);
          });
          // Adaptive regret by brute force: every window's summed quadratic, minimized afresh.
          const T = rounds.length;
          let best = Number.NEGATIVE_INFINITY;
          for (let st = 0; st + Math.min(w, T) <= T; st++) {
            const e = st + Math.min(w, T);
            const A = new Float64Array(d * d);
            const b = new Float64Array(d);
            let c = 0;
            let L = 0;
            for (let t = st; t < e; t++) {
              for (let i = 0; i < d * d; i++) A[i] += losses[t].hessian[i];
              for (let i = 0; i < d; i++) b[i] += losses[t].linear[i];
              c += losses[t].constant;
              L += losses[t].value(Float64Array.from(rounds[t].x));
            }
            const m = minimizeQuadratic(A, b, {
              constant: c,
              ...(boxed
                ? { lower: new Float64Array(d).fill(-0.3), upper: new Float64Array(d).fill(0.2) }
                : {}),
            });
            best = Math.max(best, L - m.value);
          }
          const ad = summary.summary().adaptive?.quadratic?.regret ?? Number.NaN;
          expect(Math.abs(ad - best)).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(best)) * T);
          const q = summary.summary().quadratic;
          expect(q?.status).toBe("converged");
          if (!q) return;
          const direct = full.regretAgainst(q.argmin);
          expect(Math.abs(q.regret - direct)).toBeLessThanOrEqual(
            1e-10 * (1 + Math.abs(direct)) * rounds.length,
          );
          // Optimality from the history side: no other feasible point does better.
          for (const probe of [
            new Float64Array(d),
            Float64Array.from(rounds[0].x, (v) => (boxed ? Math.max(-0.3, Math.min(0.2, v)) : v)),
          ]) {
            expect(full.regretAgainst(probe)).toBeLessThanOrEqual(
              q.regret + 1e-9 * (1 + Math.abs(q.regret)),
            );
          }
        },
      ),
      { numRuns: 100, seed: 11 },
    );
  });
});

describe("bounded memory", () => {
  it("a million-round run: summary keeps no rows, window ≤ w rows, thinned ≤ maxRows rows", () => {
    const d = 2;
    const make = (history: "summary" | "window" | "thinned") =>
      createRegretTracker({
        dimension: d,
        domain: boxDomain(-1, 1, d),
        experts: [new Float64Array([1, 0]), new Float64Array([0, -1])],
        adaptiveWindow: 100,
        history,
        window: 256,
        maxRows: 512,
      });
    const summary = make("summary");
    const windowed = make("window");
    const thinned = make("thinned");
    const x = new Float64Array(d);
    const g = new Float64Array(d);
    const lo = {
      value: (u: Float64Array) => g[0] * u[0] + g[1] * u[1],
      gradient: (_u: Float64Array, out: Float64Array) => out.set(g) ?? out,
    };
    const input = { decision: x, gradient: g, loss: 0, lossObject: lo };
    let bytesAt1000 = [0, 0, 0];
    const T = 1_000_000;
    for (let t = 1; t <= T; t++) {
      g[0] = Math.sin(t);
      g[1] = Math.cos(0.5 * t);
      x[0] = Math.cos(t) * 0.5;
      x[1] = Math.sin(0.3 * t) * 0.5;
      (input as { loss: number }).loss = g[0] * x[0] + g[1] * x[1];
      summary.record(input);
      windowed.record(input);
      thinned.record(input);
      if (t === 1000) {
        bytesAt1000 = [summary.retainedBytes, windowed.retainedBytes, thinned.retainedBytes];
      }
    }
    expect(summary.rounds).toBe(T);
    expect(summary.retainedRows).toBe(0);
    expect(summary.series().length).toBe(0);
    expect(windowed.retainedRows).toBe(256);
    expect(windowed.series().length).toBe(256);
    expect(windowed.series().columns.round[255]).toBe(T);
    expect(summary.retainedBytes).toBe(bytesAt1000[0]);
    expect(windowed.retainedBytes).toBe(bytesAt1000[1]);
    expect(thinned.retainedBytes).toBe(bytesAt1000[2]);
    // Thinned: ≤ 512 rows spanning the whole run at an even stride.
    const th = thinned.series();
    expect(thinned.retainedRows).toBeLessThanOrEqual(512);
    expect(th.length).toBeGreaterThanOrEqual(256);
    const stride = th.columns.round[0];
    expect(th.columns.round[th.length - 1]).toBe(th.length * stride);
    expect(T - th.columns.round[th.length - 1]).toBeLessThan(2 * stride);
    expect(summaryToJson(summary.summary())).toBe(summaryToJson(windowed.summary()));
  });
});
