// The closed-form linear minima over the simplex, a box and a ball (MATH.md §1.7) are attained at
// feasible points and are never beaten by any feasible point (a linear function's minimum over a
// compact convex set — R. T. Rockafellar, "Convex Analysis", 1970, §32).
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  ballDomain,
  boxDomain,
  type Domain,
  domainContains,
  domainDiameter,
  linearMinimum,
  simplexDomain,
} from "./domain.js";

const dot = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
};

const caseArb = fc.integer({ min: 1, max: 6 }).chain((d) => {
  const vec = (min: number, max: number) =>
    fc.array(fc.double({ min, max, noNaN: true }), { minLength: d, maxLength: d });
  return fc.record({
    d: fc.constant(d),
    gamma: vec(-10, 10),
    lo: vec(-3, 0),
    width: vec(0, 3),
    center: vec(-2, 2),
    radius: fc.double({ min: 0.01, max: 4, noNaN: true }),
    probes: fc.array(vec(0, 1), { minLength: 1, maxLength: 10 }),
  });
});

describe("linearMinimum", () => {
  it("argmin is feasible, attains the value, and beats random feasible points", () => {
    fc.assert(
      fc.property(caseArb, (c) => {
        const domains: Domain[] = [
          simplexDomain(c.d),
          boxDomain(
            Float64Array.from(c.lo),
            Float64Array.from(c.lo, (l, i) => l + c.width[i]),
          ),
          ballDomain(Float64Array.from(c.center), c.radius),
        ];
        const gamma = Float64Array.from(c.gamma);
        for (const dom of domains) {
          const u = new Float64Array(c.d);
          const v = linearMinimum(dom, gamma, 0, u);
          expect(domainContains(dom, u, 1e-12)).toBe(true);
          expect(Math.abs(v - dot(gamma, u))).toBeLessThanOrEqual(1e-12 * (1 + Math.abs(v)));
          for (const p of c.probes) {
            // Map the probe in [0,1]^d into the domain.
            const q = new Float64Array(c.d);
            if (dom.kind === "simplex") {
              const s = p.reduce((a, b) => a + b, 0) || 1;
              for (let i = 0; i < c.d; i++)
                q[i] = s === 1 && p.every((x) => x === 0) ? 1 / c.d : p[i] / s;
            } else if (dom.kind === "box") {
              for (let i = 0; i < c.d; i++)
                q[i] = dom.lower[i] + p[i] * (dom.upper[i] - dom.lower[i]);
            } else {
              let n = 0;
              for (let i = 0; i < c.d; i++) n += (p[i] - 0.5) ** 2;
              const s = n > 0 ? (dom.radius * p[0]) / Math.sqrt(n) : 0;
              for (let i = 0; i < c.d; i++) q[i] = dom.center[i] + s * (p[i] - 0.5);
            }
            expect(domainContains(dom, q, 1e-9)).toBe(true);
            expect(v).toBeLessThanOrEqual(dot(gamma, q) + 1e-10 * (1 + Math.abs(v)));
          }
        }
      }),
      { numRuns: 200, seed: 6 },
    );
  });

  it("diameters: √2 (simplex), ‖b − a‖ (box), 2r (ball)", () => {
    expect(domainDiameter(simplexDomain(4))).toBe(Math.SQRT2);
    expect(domainDiameter(boxDomain(new Float64Array([0, 0]), new Float64Array([3, 4])))).toBe(5);
    expect(domainDiameter(ballDomain(new Float64Array([1]), 2.5))).toBe(5);
  });
});
