// Closed-form identities of the published bounds (values at the tuned step sizes, reductions
// between bounds) and their typed argument errors.
// Sources as in the bound functions: Zinkevich 2003; Hazan 2016 Thm 3.1; Cesa-Bianchi & Lugosi
// 2006 Thm 2.2/2.3; Lattimore & Szepesvári 2020 Thm 28.4; Hall & Willett 2015 / MATH.md §1.6.
import { RecedeError } from "@recede/core";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { dynamicMirrorDescentRegretBound } from "./bounds/dynamicMirrorDescent.js";
import { hedgeAnytimeRegretBound, hedgeRegretBound, hedgeTunedStepSize } from "./bounds/hedge.js";
import { mirrorDescentRegretBound, mirrorDescentTunedStepSize } from "./bounds/mirrorDescent.js";
import {
  ogdDynamicRegretBound,
  ogdRegretBoundFixedStep,
  ogdRegretBoundHazan,
  ogdRegretBoundZinkevich,
  ogdTunedStepSize,
} from "./bounds/ogd.js";

const pos = (min = 1e-3, max = 1e3) => fc.double({ min, max, noNaN: true });
const rel = (a: number, b: number) => Math.abs(a - b) / (1 + Math.abs(b));

describe("bound identities", () => {
  it("values at hand-computed points", () => {
    // D = 2, G = 3, T = 16: Zinkevich 4·4/2 + (4 − ½)·9 = 39.5; Hazan 1.5·3·2·4 = 36.
    expect(ogdRegretBoundZinkevich({ diameter: 2, gradientBound: 3, rounds: 16 })).toBe(39.5);
    expect(ogdRegretBoundHazan({ diameter: 2, gradientBound: 3, rounds: 16 })).toBe(36);
    // Hedge N = e², η = 1, T = 8: ln N/η + ηT/8 = 2 + 1 = 3; anytime: 2√(4·2) + √(2/8) = 4√2 + ½.
    expect(hedgeRegretBound({ experts: 7, rounds: 8, stepSize: 1 })).toBeCloseTo(
      Math.log(7) + 1,
      14,
    );
    expect(hedgeAnytimeRegretBound({ experts: 2, rounds: 2 })).toBeCloseTo(
      2 * Math.sqrt(Math.log(2)) + Math.sqrt(Math.log(2) / 8),
      14,
    );
  });

  it("tuned steps minimize the fixed-step forms and give GD√T, √((T/2) ln N), G√(2BT/σ)", () => {
    fc.assert(
      fc.property(
        pos(),
        pos(),
        fc.integer({ min: 1, max: 1e6 }),
        pos(0.1, 10),
        (D, G, T, factor) => {
          const p = { diameter: D, gradientBound: G, rounds: T };
          const eta = ogdTunedStepSize(p);
          const best = ogdRegretBoundFixedStep({ ...p, stepSize: eta });
          expect(rel(best, G * D * Math.sqrt(T))).toBeLessThan(1e-12);
          expect(ogdRegretBoundFixedStep({ ...p, stepSize: eta * factor })).toBeGreaterThanOrEqual(
            best * (1 - 1e-12),
          );
          // Hazan's anytime bound is at most 1.5× the tuned fixed-horizon bound, exactly.
          expect(rel(ogdRegretBoundHazan(p), 1.5 * best)).toBeLessThan(1e-12);
          const B = (D * D) / 2;
          const etaMd = mirrorDescentTunedStepSize({
            divergenceBound: B,
            gradientBound: G,
            rounds: T,
            strongConvexity: factor,
          });
          const md = mirrorDescentRegretBound({
            divergenceBound: B,
            gradientBound: G,
            rounds: T,
            stepSize: etaMd,
            strongConvexity: factor,
          });
          expect(rel(md, G * Math.sqrt((2 * B * T) / factor))).toBeLessThan(1e-12);
          // Euclidean OMD (σ = 1, B = D²/2) is the fixed-step OGD bound.
          expect(
            rel(
              mirrorDescentRegretBound({
                divergenceBound: B,
                gradientBound: G,
                rounds: T,
                stepSize: eta,
              }),
              best,
            ),
          ).toBeLessThan(1e-12);
        },
      ),
      { numRuns: 200, seed: 1 },
    );
  });

  it("Hedge at η* = √(8 ln N/T)/ρ equals ρ√((T/2) ln N)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 1000 }),
        fc.integer({ min: 1, max: 1e6 }),
        pos(0.1, 10),
        (N, T, rho) => {
          const eta = hedgeTunedStepSize({ experts: N, rounds: T, lossRange: rho });
          const v = hedgeRegretBound({ experts: N, rounds: T, stepSize: eta, lossRange: rho });
          expect(rel(v, rho * Math.sqrt((T / 2) * Math.log(N)))).toBeLessThan(1e-12);
        },
      ),
      { numRuns: 200, seed: 2 },
    );
  });

  it("DMD derived form with ψ = ½‖·‖², Φ = id (K = D, D_max = D²/2) is the OGD dynamic bound (MATH.md §1.6)", () => {
    fc.assert(
      fc.property(
        pos(),
        pos(),
        fc.integer({ min: 1, max: 1e5 }),
        pos(),
        pos(0, 100),
        (D, G, T, eta, P) => {
          const dmd = dynamicMirrorDescentRegretBound({
            maxDivergence: (D * D) / 2,
            lipschitz: D,
            gradientBound: G,
            rounds: T,
            phiPathLength: P,
            schedule: { kind: "constant", stepSize: eta },
          });
          const ogd = ogdDynamicRegretBound({
            diameter: D,
            gradientBound: G,
            rounds: T,
            stepSize: eta,
            pathLength: P,
          });
          expect(rel(dmd, ogd)).toBeLessThan(1e-12);
        },
      ),
      { numRuns: 200, seed: 3 },
    );
  });

  it("DMD inverse-sqrt schedule and the Hall–Willett form", () => {
    const common = { maxDivergence: 2, gradientBound: 3, rounds: 100, phiPathLength: 5 };
    const c = 0.5;
    const derived = dynamicMirrorDescentRegretBound({
      ...common,
      lipschitz: 4,
      schedule: { kind: "inverse-sqrt", scale: c },
    });
    // 2/(c/10) + 4·5/(c/10) + 9/2 · c(2·10 − 1)
    expect(derived).toBeCloseTo(40 + 400 + 4.5 * 0.5 * 19, 10);
    const hw = dynamicMirrorDescentRegretBound({
      ...common,
      mirrorBound: 1,
      form: "hall-willett",
      schedule: { kind: "inverse-sqrt", scale: c },
    });
    expect(hw).toBeCloseTo(2 / (c / Math.sqrt(101)) + (4 * 5) / (c / 10) + 4.5 * 0.5 * 19, 10);
  });

  it("bad arguments are typed errors naming the function and argument", () => {
    const cases: Array<[() => number, string, string]> = [
      [
        () => ogdRegretBoundHazan({ diameter: -1, gradientBound: 1, rounds: 1 }),
        "ogdRegretBoundHazan",
        "diameter",
      ],
      [
        () => ogdRegretBoundZinkevich({ diameter: 1, gradientBound: 1, rounds: 0 }),
        "ogdRegretBoundZinkevich",
        "rounds",
      ],
      [
        () => ogdRegretBoundFixedStep({ diameter: 1, gradientBound: 1, rounds: 1, stepSize: 0 }),
        "ogdRegretBoundFixedStep",
        "stepSize",
      ],
      [
        () => hedgeRegretBound({ experts: 1, rounds: 1, stepSize: 1 }),
        "hedgeRegretBound",
        "experts",
      ],
      [
        () => hedgeRegretBound({ experts: 2, rounds: 1, stepSize: Number.NaN }),
        "hedgeRegretBound",
        "stepSize",
      ],
      [
        () => mirrorDescentRegretBound({ divergenceBound: 1, rounds: 1, stepSize: 1 }),
        "mirrorDescentRegretBound",
        "gradientBound",
      ],
      [
        () =>
          dynamicMirrorDescentRegretBound({
            maxDivergence: 1,
            gradientBound: 1,
            rounds: 1,
            phiPathLength: 0,
            schedule: { kind: "constant", stepSize: 1 },
          }),
        "dynamicMirrorDescentRegretBound",
        "lipschitz",
      ],
    ];
    for (const [f, fn, arg] of cases) {
      try {
        f();
        expect.unreachable();
      } catch (e) {
        expect(e).toBeInstanceOf(RecedeError);
        expect((e as RecedeError).fn).toBe(fn);
        expect((e as RecedeError).arg).toBe(arg);
      }
    }
  });
});
