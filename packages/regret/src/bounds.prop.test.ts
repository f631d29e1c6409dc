// Measured regret of core's learners stays under the published bounds on fast-check-generated
// adversarial sequences (bounded gradients, bounded domain).
// Sources: OGD — M. Zinkevich, "Online Convex Programming and Generalized Infinitesimal Gradient
// Ascent", ICML 2003, Thm 1; E. Hazan, "Introduction to Online Convex Optimization", 2016,
// Thm 3.1; fixed-step and dynamic forms derived in MATH.md §1.3. Hedge — N. Cesa-Bianchi,
// G. Lugosi, "Prediction, Learning, and Games", 2006, Thm 2.2 and Thm 2.3 (anytime). Mirror
// descent — T. Lattimore, C. Szepesvári, "Bandit Algorithms", 2020, Thm 28.4. Dynamic mirror
// descent — E. C. Hall, R. M. Willett, IEEE JSTSP 2015, in the derived constant form of MATH.md §1.6.
import {
  constantStep,
  dynamicMirrorDescent,
  entropy,
  euclidean,
  inverseSqrtStep,
  mirrorDescent,
  scheduledStep,
} from "@recede/core";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { dynamicMirrorDescentRegretBound } from "./bounds/dynamicMirrorDescent.js";
import { hedgeAnytimeRegretBound, hedgeRegretBound, hedgeTunedStepSize } from "./bounds/hedge.js";
import { mirrorDescentRegretBound } from "./bounds/mirrorDescent.js";
import {
  ogdDynamicRegretBound,
  ogdRegretBoundFixedStep,
  ogdRegretBoundHazan,
  ogdRegretBoundZinkevich,
  ogdTunedStepSize,
} from "./bounds/ogd.js";
import { ballDomain, simplexDomain } from "./domain.js";
import { linearLoss } from "./losses.js";
import { createRegretTracker } from "./tracker.js";

const RUNS = { numRuns: 60, seed: 4242 };
/** Slack for round-off only (the bounds are exact inequalities). */
const EPS = 1e-9;

type Adversary = "oblivious" | "adaptive" | "alternating";

/** d, radius, G, the raw directions, and the adversary. */
const ogdCase = fc
  .record({
    d: fc.integer({ min: 1, max: 4 }),
    radius: fc.double({ min: 0.1, max: 5, noNaN: true }),
    G: fc.double({ min: 0.1, max: 10, noNaN: true }),
    adversary: fc.constantFrom<Adversary>("oblivious", "adaptive", "alternating"),
    T: fc.integer({ min: 1, max: 120 }),
  })
  .chain((c) =>
    fc.record({
      c: fc.constant(c),
      raw: fc.array(
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: c.d, maxLength: c.d }),
        {
          minLength: c.T,
          maxLength: c.T,
        },
      ),
    }),
  );

/** g_t with ‖g_t‖₂ ≤ G: oblivious (fixed list), adaptive (along x_t), or alternating ±v. */
function adversaryGradient(
  adversary: Adversary,
  raw: number[][],
  t: number,
  x: Float64Array,
  G: number,
): Float64Array {
  const d = x.length;
  const g = new Float64Array(d);
  let src: ArrayLike<number> = raw[t];
  if (adversary === "alternating") src = raw[0].map((v) => (t % 2 === 0 ? v : -v));
  if (adversary === "adaptive") {
    let nx = 0;
    for (let i = 0; i < d; i++) nx += x[i] * x[i];
    if (nx > 0) src = x; // push along the iterate: loss G‖x_t‖
  }
  // Scale to ‖g‖₂ = G with the norm computed after dividing by max|src_i| (no underflow).
  let m = 0;
  for (let i = 0; i < d; i++) m = Math.max(m, Math.abs(src[i]));
  if (m === 0) return g;
  let n = 0;
  for (let i = 0; i < d; i++) n += (src[i] / m) ** 2;
  n = Math.sqrt(n);
  for (let i = 0; i < d; i++) g[i] = (G * (src[i] / m)) / n;
  return g;
}

function runOgd(
  c: { d: number; radius: number; G: number; adversary: Adversary; T: number },
  raw: number[][],
  stepSize: ReturnType<typeof constantStep>,
): number {
  const learner = mirrorDescent({
    geometry: euclidean({ dimension: c.d, feasible: { kind: "ball", radius: c.radius } }),
    initial: new Float64Array(c.d),
    stepSize,
  });
  const tracker = createRegretTracker({
    dimension: c.d,
    domain: ballDomain(new Float64Array(c.d), c.radius),
    history: "summary",
  });
  tracker.attach(learner);
  for (let t = 0; t < c.T; t++) {
    const x = learner.decision();
    const g = adversaryGradient(c.adversary, raw, t, x, c.G);
    // Linear losses ℓ_t(x) = ⟨g_t, x⟩: the tracker's linear regret is the exact static regret.
    learner.update({ gradient: g, lossObject: linearLoss(g) });
  }
  const s = tracker.summary();
  expect(s.rounds).toBe(c.T);
  expect(s.gradients.maxL2).toBeLessThanOrEqual(c.G * (1 + 1e-12));
  return s.linear?.regret ?? Number.NaN;
}

describe("OGD regret under the published bounds (core mirrorDescent, Euclidean ball)", () => {
  it("η_t = D/(G√t): R_T ≤ (3/2)GD√T (Hazan 2016, Thm 3.1)", () => {
    fc.assert(
      fc.property(ogdCase, ({ c, raw }) => {
        const D = 2 * c.radius;
        const R = runOgd(c, raw, inverseSqrtStep(D / c.G));
        const B = ogdRegretBoundHazan({ diameter: D, gradientBound: c.G, rounds: c.T });
        expect(R).toBeLessThanOrEqual(B + EPS * (1 + B));
      }),
      RUNS,
    );
  });

  it("η_t = 1/√t: R_T ≤ D²√T/2 + (√T − ½)G² (Zinkevich 2003, Thm 1)", () => {
    fc.assert(
      fc.property(ogdCase, ({ c, raw }) => {
        const D = 2 * c.radius;
        const R = runOgd(c, raw, inverseSqrtStep(1));
        const B = ogdRegretBoundZinkevich({ diameter: D, gradientBound: c.G, rounds: c.T });
        expect(R).toBeLessThanOrEqual(B + EPS * (1 + B));
      }),
      RUNS,
    );
  });

  it("fixed η = D/(G√T): R_T ≤ D²/(2η) + ηTG²/2 = GD√T (MATH.md §1.3, derived)", () => {
    fc.assert(
      fc.property(ogdCase, ({ c, raw }) => {
        const D = 2 * c.radius;
        const p = { diameter: D, gradientBound: c.G, rounds: c.T };
        const eta = ogdTunedStepSize(p);
        const R = runOgd(c, raw, constantStep(eta));
        const B = ogdRegretBoundFixedStep({ ...p, stepSize: eta });
        expect(Math.abs(B - c.G * D * Math.sqrt(c.T))).toBeLessThan(1e-9 * B);
        expect(R).toBeLessThanOrEqual(B + EPS * (1 + B));
      }),
      RUNS,
    );
  });

  it("fixed η, dynamic regret vs a moving comparator: ≤ D²/(2η) + D·P_T/η + ηTG²/2 (MATH.md §1.3)", () => {
    fc.assert(
      fc.property(
        ogdCase,
        fc.double({ min: 0.01, max: 2, noNaN: true }),
        fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        ({ c, raw }, eta, seed) => {
          const D = 2 * c.radius;
          const learner = mirrorDescent({
            geometry: euclidean({ dimension: c.d, feasible: { kind: "ball", radius: c.radius } }),
            initial: new Float64Array(c.d),
            stepSize: eta,
          });
          // A comparator that wanders inside the ball: u_t = r·(cos, sin)-like walk from the seed.
          const comparator = (t: number, _lo: unknown, out: Float64Array): Float64Array => {
            for (let i = 0; i < c.d; i++) out[i] = Math.sin(seed * 1e-6 + 0.7 * t * (i + 1));
            let n = 0;
            for (let i = 0; i < c.d; i++) n += out[i] * out[i];
            const s = n > 0 ? (0.999 * c.radius) / Math.sqrt(Math.max(n, c.d)) : 0;
            for (let i = 0; i < c.d; i++) out[i] *= s;
            return out;
          };
          const tracker = createRegretTracker({
            dimension: c.d,
            comparator,
            history: "summary",
          });
          tracker.attach(learner);
          for (let t = 0; t < c.T; t++) {
            const g = adversaryGradient(c.adversary, raw, t, learner.decision(), c.G);
            learner.update({ gradient: g, lossObject: linearLoss(g) });
          }
          const dyn = tracker.summary().dynamic;
          expect(dyn).toBeDefined();
          if (!dyn) return;
          const B = ogdDynamicRegretBound({
            diameter: D,
            gradientBound: c.G,
            rounds: c.T,
            stepSize: eta,
            pathLength: dyn.pathLength,
          });
          expect(dyn.regret).toBeLessThanOrEqual(B + EPS * (1 + B));
        },
      ),
      { numRuns: 40, seed: 99 },
    );
  });
});

type HedgeAdversary = "oblivious" | "adaptive" | "switching";

const hedgeCase = fc
  .record({
    N: fc.integer({ min: 2, max: 8 }),
    T: fc.integer({ min: 1, max: 150 }),
    adversary: fc.constantFrom<HedgeAdversary>("oblivious", "adaptive", "switching"),
  })
  .chain((c) =>
    fc.record({
      c: fc.constant(c),
      raw: fc.array(
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: c.N, maxLength: c.N }),
        {
          minLength: c.T,
          maxLength: c.T,
        },
      ),
    }),
  );

/** ℓ_t ∈ [0,1]^N: oblivious list; adaptive (1 on the heaviest weight, 0 elsewhere); switching best expert. */
function hedgeLoss(adv: HedgeAdversary, raw: number[][], t: number, p: Float64Array): Float64Array {
  const N = p.length;
  const l = Float64Array.from(raw[t]);
  if (adv === "adaptive") {
    let k = 0;
    for (let i = 1; i < N; i++) if (p[i] > p[k]) k = i;
    l.fill(0);
    l[k] = 1;
  } else if (adv === "switching") {
    const best = Math.floor((t * N) / raw.length) % N;
    for (let i = 0; i < N; i++) l[i] = i === best ? 0.1 * raw[t][i] : 0.5 + 0.5 * raw[t][i];
  }
  return l;
}

function runHedge(
  c: { N: number; T: number; adversary: HedgeAdversary },
  raw: number[][],
  learner: ReturnType<typeof mirrorDescent>,
): { regret: number; sumSquaredLinf: number } {
  const tracker = createRegretTracker({
    dimension: c.N,
    domain: simplexDomain(c.N),
    history: "summary",
  });
  tracker.attach(learner);
  for (let t = 0; t < c.T; t++) {
    const p = learner.decision();
    const l = hedgeLoss(c.adversary, raw, t, p);
    learner.update({ gradient: l, lossObject: linearLoss(l) });
  }
  const s = tracker.summary();
  // Sanity: the linear comparator on the simplex is the best expert, Σ⟨p_t, ℓ_t⟩ − min_i L_{T,i}.
  expect(s.linear?.argmin.reduce((a, b) => a + b, 0)).toBe(1);
  return { regret: s.linear?.regret ?? Number.NaN, sumSquaredLinf: s.gradients.sumSquaredLinf };
}

describe("Hedge regret under the published bounds (core mirrorDescent, entropy geometry)", () => {
  it("fixed η = √(8 ln N/T): R_T ≤ ln N/η + ηT/8 = √((T/2) ln N) (Cesa-Bianchi & Lugosi 2006, Thm 2.2)", () => {
    fc.assert(
      fc.property(hedgeCase, ({ c, raw }) => {
        const eta = hedgeTunedStepSize({ experts: c.N, rounds: c.T });
        const learner = mirrorDescent({
          geometry: entropy({ dimension: c.N }),
          initial: new Float64Array(c.N).fill(1 / c.N),
          stepSize: constantStep(eta),
        });
        const { regret } = runHedge(c, raw, learner);
        const B = hedgeRegretBound({ experts: c.N, rounds: c.T, stepSize: eta });
        expect(Math.abs(B - Math.sqrt((c.T / 2) * Math.log(c.N)))).toBeLessThan(1e-12 * (1 + B));
        expect(regret).toBeLessThanOrEqual(B + EPS * (1 + B));
      }),
      RUNS,
    );
  });

  it("any fixed η: R_T ≤ ln N/η + (η/2)Σ‖g_t‖∞² (Lattimore & Szepesvári 2020, Thm 28.4, negentropy B = ln N)", () => {
    fc.assert(
      fc.property(hedgeCase, fc.double({ min: 0.01, max: 5, noNaN: true }), ({ c, raw }, eta) => {
        const learner = mirrorDescent({
          geometry: entropy({ dimension: c.N }),
          initial: new Float64Array(c.N).fill(1 / c.N),
          stepSize: eta,
        });
        const { regret, sumSquaredLinf } = runHedge(c, raw, learner);
        const B = mirrorDescentRegretBound({
          divergenceBound: Math.log(c.N),
          rounds: c.T,
          stepSize: eta,
          sumSquaredDualNorms: sumSquaredLinf,
        });
        expect(regret).toBeLessThanOrEqual(B + EPS * (1 + B));
      }),
      RUNS,
    );
  });

  it("anytime η_t = √(8 ln N/t): R_T ≤ 2√((T/2) ln N) + √(ln N/8) (Cesa-Bianchi & Lugosi 2006, Thm 2.3)", () => {
    // The anytime forecaster weighs p_t ∝ exp(−η_t L_{t−1}). As dynamic mirror descent: an entropic
    // step with η_t gives exp(−η_t L_t); Φ_t(p) ∝ p^{η_{t+1}/η_t} then gives exp(−η_{t+1} L_t).
    fc.assert(
      fc.property(hedgeCase, ({ c, raw }) => {
        const eta = (t: number): number => Math.sqrt((8 * Math.log(c.N)) / t);
        const learner = dynamicMirrorDescent({
          geometry: entropy({ dimension: c.N }),
          initial: new Float64Array(c.N).fill(1 / c.N),
          stepSize: scheduledStep(eta),
          dynamic: (p, t, out) => {
            const r = eta(t + 1) / eta(t);
            let m = Number.NEGATIVE_INFINITY;
            for (let i = 0; i < c.N; i++) m = Math.max(m, r * Math.log(p[i]));
            let s = 0;
            for (let i = 0; i < c.N; i++) {
              out[i] = Math.exp(r * Math.log(p[i]) - m);
              s += out[i];
            }
            for (let i = 0; i < c.N; i++) out[i] /= s;
          },
        });
        const { regret } = runHedge(c, raw, learner);
        const B = hedgeAnytimeRegretBound({ experts: c.N, rounds: c.T });
        expect(regret).toBeLessThanOrEqual(B + EPS * (1 + B));
      }),
      RUNS,
    );
  });
});

describe("dynamic mirror descent tracking bound (derived form, MATH.md §1.6)", () => {
  it("Euclidean ball, Φ = rotation: R_T(u) ≤ D_max/η + K·V_Φ/η + ηTG²/2 with D_max = D²/2, K = D", () => {
    fc.assert(
      fc.property(
        ogdCase.filter(({ c }) => c.d === 2 || c.d === 3),
        fc.double({ min: 0.05, max: 1.5, noNaN: true }),
        fc.double({ min: 0.01, max: 2, noNaN: true }),
        fc.double({ min: 0, max: 0.3, noNaN: true }),
        ({ c, raw }, eta, angle, drift) => {
          const D = 2 * c.radius;
          // Φ rotates the first two coordinates: an isometry mapping the centred ball onto itself.
          const rotate = (x: Float64Array, out: Float64Array): void => {
            for (let i = 0; i < x.length; i++) out[i] = x[i];
            out[0] = Math.cos(angle) * x[0] - Math.sin(angle) * x[1];
            out[1] = Math.sin(angle) * x[0] + Math.cos(angle) * x[1];
          };
          const learner = dynamicMirrorDescent({
            geometry: euclidean({ dimension: c.d, feasible: { kind: "ball", radius: c.radius } }),
            initial: new Float64Array(c.d),
            stepSize: eta,
            dynamic: (x, _t, out) => rotate(x, out),
          });
          // The comparator follows Φ, plus a drift of size `drift`·r per round (kept in the ball).
          const u = new Float64Array(c.d);
          u[0] = 0.8 * c.radius;
          const next = new Float64Array(c.d);
          const comparator = (t: number, _lo: unknown, out: Float64Array): Float64Array => {
            if (t > 1) {
              rotate(u, next);
              next[c.d - 1] += drift * c.radius * Math.sin(3 * t);
              let n = 0;
              for (let i = 0; i < c.d; i++) n += next[i] * next[i];
              const s = Math.sqrt(n) > c.radius ? c.radius / Math.sqrt(n) : 1;
              for (let i = 0; i < c.d; i++) u[i] = next[i] * s;
            }
            out.set(u);
            return out;
          };
          const tracker = createRegretTracker({
            dimension: c.d,
            comparator,
            dynamics: (_t, x, out) => {
              rotate(x, out);
              return out;
            },
            history: "summary",
          });
          tracker.attach(learner);
          for (let t = 0; t < c.T; t++) {
            const g = adversaryGradient(c.adversary, raw, t, learner.decision(), c.G);
            learner.update({ gradient: g, lossObject: linearLoss(g) });
          }
          const dyn = tracker.summary().dynamic;
          expect(dyn).toBeDefined();
          if (!dyn) return;
          if (drift === 0) expect(dyn.phiPathLength).toBeLessThan(1e-9 * (1 + c.radius) * c.T);
          const B = dynamicMirrorDescentRegretBound({
            maxDivergence: (D * D) / 2,
            lipschitz: D,
            gradientBound: c.G,
            rounds: c.T,
            phiPathLength: dyn.phiPathLength,
            schedule: { kind: "constant", stepSize: eta },
          });
          expect(dyn.regret).toBeLessThanOrEqual(B + EPS * (1 + B));
        },
      ),
      { numRuns: 60, seed: 7 },
    );
  });
});
