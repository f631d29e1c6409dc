import {
  adaGradStep,
  dynamicMirrorDescent,
  entropy,
  euclidean,
  inverseSqrtStep,
  type MirrorDescentLearner,
  mirrorDescent,
} from "@recede/core";
import { boundedGradient, lossSequence } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

// Regret bounds from the literature, checked on fast-check-generated (and adaptive) adversarial
// loss sequences. Linear losses ℓ_t(x) = ⟨g_t, x⟩ are the worst case for convex losses with
// subgradients g_t (Zinkevich 2003, linearization), and their best fixed comparator on a ball of
// radius R centred at 0 is closed form: min_u Σ_t⟨g_t, u⟩ = −R‖Σ_t g_t‖.

/** Σ_t ⟨g_t, x_t⟩ for the decisions x_t the learner played (read from its RoundRecords). */
function play(learner: MirrorDescentLearner, gs: readonly Float64Array[]): number {
  let loss = 0;
  const off = learner.observe((r) => {
    let s = 0;
    for (let i = 0; i < r.decision.length; i++)
      s += (r.gradient as Float64Array)[i] * r.decision[i];
    loss += s;
  });
  for (const g of gs) learner.update({ gradient: g });
  off();
  return loss;
}

function ogdRegret(
  learner: MirrorDescentLearner,
  gs: readonly Float64Array[],
  radius: number,
): number {
  const loss = play(learner, gs);
  const n = learner.dimension;
  const cum = new Float64Array(n);
  for (const g of gs) for (let i = 0; i < n; i++) cum[i] += g[i];
  return loss + radius * Math.hypot(...cum);
}

/** An adaptive adversary: g_t = G·x_t/‖x_t‖ (or G·e₁ at the origin), pushing against the learner. */
function adaptiveGradients(learner: MirrorDescentLearner, T: number, G: number): Float64Array[] {
  const out: Float64Array[] = [];
  for (let t = 0; t < T; t++) {
    const x = learner.decision();
    const nx = Math.hypot(...x);
    const g = new Float64Array(x.length);
    if (nx === 0) g[0] = G;
    else for (let i = 0; i < x.length; i++) g[i] = ((-1) ** t * G * x[i]) / nx;
    out.push(g);
    learner.update({ gradient: g });
  }
  learner.reset();
  return out;
}

const R = 1.5;
const D = 2 * R;
const G = 4;
const d = 3;
const ball = () => euclidean({ dimension: d, feasible: { kind: "ball", radius: R } });
const sequences = fc.array(boundedGradient(d, G), { minLength: 1, maxLength: 250 });

describe("online gradient descent on a ball: regret bounds (Zinkevich 2003; Hazan 2016, Thm 3.1)", () => {
  it("η_t = D/(G√t): R_T ≤ (3/2)·G·D·√T (Hazan 2016, Thm 3.1)", () => {
    fc.assert(
      fc.property(sequences, (gs) => {
        const l = mirrorDescent({
          geometry: ball(),
          initial: [0, 0, 0],
          stepSize: inverseSqrtStep(D / G),
        });
        expect(ogdRegret(l, gs, R)).toBeLessThanOrEqual(1.5 * G * D * Math.sqrt(gs.length));
      }),
      { numRuns: 150 },
    );
  });

  it("fixed η = D/(G√T) with T known: R_T ≤ G·D·√T (from D²/(2η) + ηTG²/2)", () => {
    fc.assert(
      fc.property(sequences, (gs) => {
        const T = gs.length;
        const l = mirrorDescent({
          geometry: ball(),
          initial: [0.5, -0.5, 1],
          stepSize: D / (G * Math.sqrt(T)),
        });
        expect(ogdRegret(l, gs, R)).toBeLessThanOrEqual(G * D * Math.sqrt(T));
      }),
      { numRuns: 150 },
    );
  });

  it("AdaGrad-style η_t = (D/√2)/√(δ + Σ‖g_s‖²): R_T ≤ √2·D·√(δ + Σ‖g_t‖²) (Duchi, Hazan & Singer 2011, scalar case)", () => {
    fc.assert(
      fc.property(sequences, (gs) => {
        const l = mirrorDescent({
          geometry: ball(),
          initial: [0, 0, 0],
          stepSize: adaGradStep(D / Math.SQRT2),
        });
        let s = 1e-8;
        for (const g of gs) for (const v of g) s += v * v;
        expect(ogdRegret(l, gs, R)).toBeLessThanOrEqual(Math.SQRT2 * D * Math.sqrt(s));
      }),
      { numRuns: 150 },
    );
  });

  it("the bounds hold against an adaptive adversary that pushes on the current decision, whose regret is Θ(√T)", () => {
    for (const T of [10, 100, 1000, 4000]) {
      const l = mirrorDescent({
        geometry: ball(),
        initial: [0, 0, 0],
        stepSize: inverseSqrtStep(D / G),
      });
      const gs = adaptiveGradients(l, T, G);
      const regret = ogdRegret(l, gs, R);
      expect(regret).toBeLessThanOrEqual(1.5 * G * D * Math.sqrt(T));
      expect(regret).toBeGreaterThan(0); // the adversary does extract positive regret
    }
  });
});

describe("Hedge over N experts: R_T ≤ √(T ln N / 2) with η = √(8 ln N / T) (Cesa-Bianchi & Lugosi 2006, Thm 2.2)", () => {
  function hedgeRegret(
    n: number,
    losses: readonly Float64Array[],
  ): { regret: number; bound: number } {
    const T = losses.length;
    const eta = Math.sqrt((8 * Math.log(n)) / T);
    const l = mirrorDescent({
      geometry: entropy({ dimension: n }),
      initial: new Array(n).fill(1 / n),
      stepSize: eta,
    });
    const loss = play(l, losses);
    const cum = new Float64Array(n);
    for (const v of losses) for (let i = 0; i < n; i++) cum[i] += v[i];
    return { regret: loss - Math.min(...cum), bound: Math.sqrt((T * Math.log(n)) / 2) };
  }

  it("on fast-check-generated loss sequences in [0, 1]ᴺ", () => {
    fc.assert(
      fc.property(
        fc
          .integer({ min: 2, max: 12 })
          .chain((n) => fc.integer({ min: 1, max: 300 }).chain((T) => lossSequence(T, n))),
        (losses) => {
          const { regret, bound } = hedgeRegret(losses[0].length, losses);
          expect(regret).toBeLessThanOrEqual(bound);
        },
      ),
      { numRuns: 150 },
    );
  });

  it("against the adaptive adversary that puts loss 1 on the heaviest expert", () => {
    for (const [n, T] of [
      [2, 50],
      [5, 500],
      [16, 2000],
    ]) {
      const eta = Math.sqrt((8 * Math.log(n)) / T);
      const l = mirrorDescent({
        geometry: entropy({ dimension: n }),
        initial: new Array(n).fill(1 / n),
        stepSize: eta,
      });
      const losses: Float64Array[] = [];
      for (let t = 0; t < T; t++) {
        const p = l.decision();
        let k = 0;
        for (let i = 1; i < n; i++) if (p[i] > p[k]) k = i;
        const v = new Float64Array(n);
        v[k] = 1;
        losses.push(v);
        l.update({ gradient: v });
      }
      const { regret, bound } = hedgeRegret(n, losses);
      expect(regret).toBeLessThanOrEqual(bound);
      expect(regret).toBeGreaterThan(0.1 * bound); // the adversary extracts a sizeable share of the bound
    }
  });
});

describe("dynamic mirror descent tracking a comparator that moves as Φ predicts (Hall & Willett 2015)", () => {
  // Φ = rotation by ω in the plane: an isometry of the ball, so D_ψ(Φx‖Φy) = D_ψ(x‖y). For the
  // comparator u_{t+1} = Φ(u_t), V_Φ = 0 and the bound of MATH.md §1.6 (fixed η, ψ = ½‖·‖²,
  // D_max = D²/2, σ = 1) reads R_T(u_{1:T}) ≤ D²/(2η) + ηTG²/2; the worst such comparator is
  // closed form: min_{‖u₁‖≤R} Σ_t⟨g_t, Φ^{t−1}u₁⟩ = −R‖Σ_t Φ^{−(t−1)} g_t‖.
  const omega = 0.3;
  const c = Math.cos(omega);
  const s = Math.sin(omega);
  it("dynamic regret against the rotating comparator ≤ D²/(2η) + ηTG²/2", () => {
    fc.assert(
      fc.property(fc.array(boundedGradient(2, G), { minLength: 1, maxLength: 300 }), (gs) => {
        const T = gs.length;
        const eta = D / (G * Math.sqrt(T));
        const l = dynamicMirrorDescent({
          geometry: euclidean({ dimension: 2, feasible: { kind: "ball", radius: R } }),
          initial: [0, 0],
          stepSize: eta,
          dynamic: (x, _t, out) => {
            out[0] = c * x[0] - s * x[1];
            out[1] = s * x[0] + c * x[1];
          },
        });
        const loss = play(l, gs);
        // Σ_t Φ^{−(t−1)} g_t: rotate g_t back by (t−1)ω.
        let a0 = 0;
        let a1 = 0;
        for (let t = 0; t < T; t++) {
          const ct = Math.cos(-t * omega);
          const st = Math.sin(-t * omega);
          a0 += ct * gs[t][0] - st * gs[t][1];
          a1 += st * gs[t][0] + ct * gs[t][1];
        }
        const regret = loss + R * Math.hypot(a0, a1);
        expect(regret).toBeLessThanOrEqual((D * D) / (2 * eta) + (eta * T * G * G) / 2);
      }),
      { numRuns: 150 },
    );
  });
});
