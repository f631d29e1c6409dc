// Dynamic regret against the per-round minimizer sequence u_t = argmin ℓ_t equals
// Σ_t (ℓ_t(x_t) − min ℓ_t) (the definition in M. Zinkevich, ICML 2003, and the "worst-case"
// dynamic regret of L. Zhang, S. Lu, Z.-H. Zhou, "Adaptive Online Learning in Dynamic
// Environments", NeurIPS 2018). Losses: ℓ_t(x) = ½ Σ_i a_{t,i}(x_i − c_{t,i})² + m_t with a_{t,i} > 0,
// whose minimizer c_t and minimum m_t are known in closed form. Path lengths are checked against
// their definitions P_T = Σ‖u_{t+1} − u_t‖ and V_Φ = Σ‖u_{t+1} − Φ_t(u_t)‖ (Hall & Willett 2015).
import { euclidean, mirrorDescent } from "@recede/core";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { isQuadraticLoss, quadraticLoss } from "./losses.js";
import { type ComparatorSequence, createRegretTracker } from "./tracker.js";

interface Round {
  a: number[];
  c: number[];
  m: number;
}

const caseArb = fc.integer({ min: 1, max: 4 }).chain((d) =>
  fc.record({
    d: fc.constant(d),
    drift: fc.array(fc.double({ min: -0.5, max: 0.5, noNaN: true }), {
      minLength: d,
      maxLength: d,
    }),
    eta: fc.double({ min: 0.01, max: 1, noNaN: true }),
    rounds: fc.array(
      fc.record({
        a: fc.array(fc.double({ min: 0.05, max: 5, noNaN: true }), { minLength: d, maxLength: d }),
        c: fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: d, maxLength: d }),
        m: fc.double({ min: -2, max: 2, noNaN: true }),
      }),
      { minLength: 1, maxLength: 60 },
    ),
  }),
);

/** ℓ(x) = ½ Σ a_i (x_i − c_i)² + m as ½xᵀAx + bᵀx + const with A = diag(a), b = −a∘c. */
function loss(r: Round) {
  const d = r.a.length;
  const A = new Float64Array(d * d);
  const b = new Float64Array(d);
  let k = r.m;
  for (let i = 0; i < d; i++) {
    A[i * d + i] = r.a[i];
    b[i] = -r.a[i] * r.c[i];
    k += 0.5 * r.a[i] * r.c[i] * r.c[i];
  }
  return quadraticLoss(A, { linear: b, constant: k });
}

/** The per-round minimizer from the loss object alone: u = −A⁻¹b for diagonal A. */
const perRoundMinimizer: ComparatorSequence = (_t, lo, out) => {
  if (!isQuadraticLoss(lo)) throw new Error("quadratic loss expected");
  const d = lo.dimension;
  for (let i = 0; i < d; i++) out[i] = -lo.linear[i] / lo.hessian[i * d + i];
  return out;
};

describe("dynamic regret against the per-round minimizer", () => {
  it("equals Σ(ℓ_t(x_t) − min ℓ_t); P_T and V_Φ match their definitions", () => {
    fc.assert(
      fc.property(caseArb, ({ d, drift, eta, rounds }) => {
        // Shift the centres so that they drift: c_t ← c_t + t·v (Φ(u) = u + v predicts the drift).
        const shifted = rounds.map((r, t) => ({ ...r, c: r.c.map((ci, i) => ci + t * drift[i]) }));
        const learner = mirrorDescent({
          geometry: euclidean({ dimension: d }),
          initial: new Float64Array(d),
          stepSize: eta,
        });
        const tracker = createRegretTracker({
          dimension: d,
          comparator: perRoundMinimizer,
          dynamics: (_t, u, out) => {
            for (let i = 0; i < d; i++) out[i] = u[i] + drift[i];
            return out;
          },
          history: "summary",
        });
        const detach = tracker.attach(learner);
        let expected = 0;
        for (const r of shifted) {
          const x = learner.decision();
          let gap = 0;
          for (let i = 0; i < d; i++) gap += 0.5 * r.a[i] * (x[i] - r.c[i]) ** 2;
          expected += gap; // ℓ_t(x_t) − min ℓ_t = ½ Σ a_i (x_i − c_i)²
          learner.update({ lossObject: loss(r) });
        }
        detach();
        let P = 0;
        let V = 0;
        for (let t = 1; t < shifted.length; t++) {
          let s = 0;
          let v = 0;
          for (let i = 0; i < d; i++) {
            s += (shifted[t].c[i] - shifted[t - 1].c[i]) ** 2;
            v += (shifted[t].c[i] - shifted[t - 1].c[i] - drift[i]) ** 2;
          }
          P += Math.sqrt(s);
          V += Math.sqrt(v);
        }
        const dyn = tracker.summary().dynamic;
        expect(dyn).toBeDefined();
        if (!dyn) return;
        const scale = 1 + Math.abs(expected) + shifted.reduce((a, r) => a + Math.abs(r.m), 0);
        expect(Math.abs(dyn.regret - expected)).toBeLessThanOrEqual(1e-10 * scale);
        expect(dyn.regret).toBeGreaterThanOrEqual(-1e-10 * scale);
        expect(Math.abs(dyn.pathLength - P)).toBeLessThanOrEqual(1e-10 * (1 + P));
        expect(Math.abs(dyn.phiPathLength - V)).toBeLessThanOrEqual(1e-9 * (1 + V));
        // The comparator's loss is Σ min ℓ_t = Σ m_t.
        const M = shifted.reduce((a, r) => a + r.m, 0);
        expect(Math.abs(dyn.comparatorLoss - M)).toBeLessThanOrEqual(1e-10 * scale);
      }),
      { numRuns: 150, seed: 17 },
    );
  });

  it("a comparator that moves exactly as Φ predicts has V_Φ = 0 and P_T = (T−1)‖v‖", () => {
    const d = 2;
    const v = [0.3, -0.4];
    const tracker = createRegretTracker({
      dimension: d,
      comparator: (t, _lo, out) => {
        out[0] = 1 + (t - 1) * v[0];
        out[1] = -2 + (t - 1) * v[1];
        return out;
      },
      dynamics: (_t, u, out) => {
        out[0] = u[0] + v[0];
        out[1] = u[1] + v[1];
        return out;
      },
    });
    for (let t = 0; t < 10; t++) {
      tracker.record({
        decision: new Float64Array(d),
        lossObject: loss({ a: [1, 1], c: [0, 0], m: 0 }),
      });
    }
    const dyn = tracker.summary().dynamic;
    expect(dyn?.phiPathLength).toBeLessThan(1e-14);
    expect(dyn?.pathLength).toBeCloseTo(9 * 0.5, 12);
    const series = tracker.series();
    expect(series.columns.pathLength[9]).toBeCloseTo(4.5, 12);
    expect(series.columns.phiPathLength[0]).toBe(0);
  });
});
