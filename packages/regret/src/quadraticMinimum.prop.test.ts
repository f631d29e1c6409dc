// The box-constrained minimizer satisfies the Karush–Kuhn–Tucker conditions of
// min ½uᵀAu + bᵀu s.t. a ≤ u ≤ b (for a convex problem they are necessary and sufficient —
// S. Boyd, L. Vandenberghe, "Convex Optimization", Cambridge 2004, §5.5.3): with g = Au + b,
// g_i ≥ 0 where u_i = a_i, g_i ≤ 0 where u_i = b_i, g_i = 0 in between.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { minimizeQuadratic } from "./quadraticMinimum.js";

const problem = fc.integer({ min: 1, max: 7 }).chain((d) =>
  fc.record({
    d: fc.constant(d),
    m: fc.array(fc.double({ min: -2, max: 2, noNaN: true }), {
      minLength: d * d,
      maxLength: d * d,
    }),
    ridge: fc.double({ min: 1e-3, max: 2, noNaN: true }),
    b: fc.array(fc.double({ min: -20, max: 20, noNaN: true }), { minLength: d, maxLength: d }),
    lo: fc.array(fc.double({ min: -2, max: 0, noNaN: true }), { minLength: d, maxLength: d }),
    // Widths 0 (a fixed coordinate) or ≥ 1e-3: in a box of subnormal width "interior" and "at the
    // bound" are not distinguishable and the textbook KKT test below would not apply.
    width: fc.array(fc.oneof(fc.constant(0), fc.double({ min: 1e-3, max: 2, noNaN: true })), {
      minLength: d,
      maxLength: d,
    }),
  }),
);

function spd(d: number, m: number[], ridge: number): Float64Array {
  const A = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    for (let j = 0; j < d; j++) {
      let s = i === j ? ridge : 0;
      for (let k = 0; k < d; k++) s += m[i * d + k] * m[j * d + k];
      A[i * d + j] = s;
    }
  }
  return A;
}

describe("minimizeQuadratic", () => {
  it("box: KKT conditions hold at the returned point (projected Newton, Bertsekas 1982)", () => {
    fc.assert(
      fc.property(problem, ({ d, m, ridge, b, lo, width }) => {
        const A = spd(d, m, ridge);
        const lower = Float64Array.from(lo);
        const upper = Float64Array.from(lo, (l, i) => l + width[i]);
        const r = minimizeQuadratic(A, Float64Array.from(b), { lower, upper });
        expect(r.status).toBe("converged");
        let scale = 1;
        for (const v of b) scale = Math.max(scale, Math.abs(v));
        for (let i = 0; i < d; i++) {
          const u = r.argmin[i];
          expect(u).toBeGreaterThanOrEqual(lower[i]);
          expect(u).toBeLessThanOrEqual(upper[i]);
          let g = b[i];
          for (let j = 0; j < d; j++) g += A[i * d + j] * r.argmin[j];
          const tol = 1e-9 * scale;
          // The projected-gradient residual |u − Π(u − g)| vanishes at the KKT point.
          expect(Math.abs(u - Math.max(lower[i], Math.min(upper[i], u - g)))).toBeLessThanOrEqual(
            tol,
          );
          if (u > lower[i] && u < upper[i]) expect(Math.abs(g)).toBeLessThanOrEqual(tol);
          else if (u === lower[i] && u < upper[i]) expect(g).toBeGreaterThanOrEqual(-tol);
          else if (u === upper[i] && u > lower[i]) expect(g).toBeLessThanOrEqual(tol);
        }
      }),
      { numRuns: 200, seed: 8 },
    );
  });

  it("unconstrained: A u* = −b", () => {
    fc.assert(
      fc.property(problem, ({ d, m, ridge, b }) => {
        const A = spd(d, m, ridge);
        const r = minimizeQuadratic(A, Float64Array.from(b));
        expect(r.status).toBe("converged");
        for (let i = 0; i < d; i++) {
          let g = b[i];
          for (let j = 0; j < d; j++) g += A[i * d + j] * r.argmin[j];
          expect(Math.abs(g)).toBeLessThanOrEqual(1e-8 * (1 + Math.max(...b.map(Math.abs))));
        }
      }),
      { numRuns: 100, seed: 9 },
    );
  });

  it("reports not-spd (NaN value) for a singular sum instead of guessing", () => {
    const r = minimizeQuadratic(new Float64Array([1, 1, 1, 1]), new Float64Array([1, -1]));
    expect(r.status).toBe("not-spd");
    expect(r.value).toBeNaN();
  });
});
