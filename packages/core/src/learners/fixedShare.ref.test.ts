import { dynamicMirrorDescent, entropy, fixedShare, mirrorDescent } from "@recede/core";
import { bitEqual, catchRecedeError, lossSequence, simplexPoint } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

// Tracking regret of fixed share (Herbster & Warmuth, "Tracking the Best Expert", 1998;
// Cesa-Bianchi & Lugosi 2006, §5.2 — the bound's form is from memory): against every sequence of
// experts with k switches, regret ≤ [(k+1) ln N + k ln(1/α) + (T−k−1) ln(1/(1−α))]/η + ηT/8.
// The best compound expert with exactly k switches is found by dynamic programming.

function bestWithSwitches(losses: readonly Float64Array[], maxK: number): number[] {
  const n = losses[0].length;
  // f[k][i]: least cumulative loss of a path ending at expert i with exactly k switches.
  let f = Array.from({ length: maxK + 1 }, (_, k) =>
    Float64Array.from({ length: n }, (_, i) => (k === 0 ? losses[0][i] : Infinity)),
  );
  for (let t = 1; t < losses.length; t++) {
    const g = Array.from({ length: maxK + 1 }, () => new Float64Array(n).fill(Infinity));
    for (let k = 0; k <= maxK; k++) {
      let bestPrev = Infinity;
      if (k > 0) for (let j = 0; j < n; j++) bestPrev = Math.min(bestPrev, f[k - 1][j]);
      for (let i = 0; i < n; i++) g[k][i] = Math.min(f[k][i], bestPrev) + losses[t][i];
    }
    f = g;
  }
  return f.map((row) => Math.min(...row));
}

describe("fixedShare", () => {
  it("tracking regret against every compound expert with k ≤ 4 switches stays under the fixed-share bound", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 6 }).chain((n) =>
          fc.tuple(
            fc.integer({ min: 2, max: 200 }).chain((T) => lossSequence(T, n)),
            fc.double({ min: 0.001, max: 0.2, noNaN: true }),
            fc.double({ min: 0.05, max: 2, noNaN: true }),
          ),
        ),
        ([losses, alpha, eta]) => {
          const n = losses[0].length;
          const T = losses.length;
          const l = dynamicMirrorDescent({
            geometry: entropy({ dimension: n }),
            initial: new Array(n).fill(1 / n),
            stepSize: eta,
            dynamic: fixedShare(alpha),
          });
          let played = 0;
          for (const v of losses) {
            const p = l.decision();
            for (let i = 0; i < n; i++) played += p[i] * v[i];
            l.update({ gradient: v });
          }
          const maxK = Math.min(4, T - 1);
          const best = bestWithSwitches(losses, maxK);
          for (let k = 0; k <= maxK; k++) {
            const bound =
              ((k + 1) * Math.log(n) +
                k * Math.log(1 / alpha) +
                (T - k - 1) * Math.log(1 / (1 - alpha))) /
                eta +
              (eta * T) / 8;
            expect(played - best[k]).toBeLessThanOrEqual(bound + 1e-9);
          }
        },
      ),
      { numRuns: 120 },
    );
  });

  it("tracks a switch of the best expert that plain Hedge is slow to follow", () => {
    const n = 4;
    const T = 400;
    const losses: Float64Array[] = [];
    for (let t = 0; t < T; t++) {
      const v = new Float64Array(n).fill(1);
      v[t < T / 2 ? 0 : 3] = 0; // expert 0 is perfect, then expert 3
      losses.push(v);
    }
    const run = (dynamic: boolean) => {
      const opts = {
        geometry: entropy({ dimension: n }),
        initial: new Array(n).fill(1 / n),
        stepSize: 0.5,
      };
      const l = dynamic
        ? dynamicMirrorDescent({ ...opts, dynamic: fixedShare(0.01) })
        : mirrorDescent(opts);
      let loss = 0;
      for (const v of losses) {
        const p = l.decision();
        for (let i = 0; i < n; i++) loss += p[i] * v[i];
        l.update({ gradient: v });
      }
      return loss;
    };
    const best = bestWithSwitches(losses, 1)[1]; // 0: one switch is perfect
    expect(best).toBe(0);
    expect(run(true)).toBeLessThan(0.25 * run(false));
  });

  it("keeps iterates on the simplex with every weight ≥ α/N; α = 0 is the identity", () => {
    fc.assert(
      fc.property(simplexPoint(5), fc.double({ min: 0, max: 1, noNaN: true }), (x, alpha) => {
        const out = new Float64Array(5);
        fixedShare(alpha)(x, 1, out);
        let s = 0;
        for (const v of out) {
          expect(v).toBeGreaterThanOrEqual((alpha / 5) * (1 - 1e-12));
          s += v;
        }
        expect(Math.abs(s - 1)).toBeLessThanOrEqual(1e-12);
        fixedShare(0)(x, 1, out);
        expect(bitEqual(out, x)).toBe(true);
      }),
      { numRuns: 100 },
    );
  });

  it("rejects α outside [0, 1] with a typed error", () => {
    catchRecedeError(() => fixedShare(1.5), {
      code: "range",
      fn: "fixedShare",
      arg: "alpha",
      message: "in [0, 1] (got 1.5)",
    });
    catchRecedeError(() => fixedShare(Number.NaN), {
      code: "non-finite",
      fn: "fixedShare",
      arg: "alpha",
    });
  });
});
