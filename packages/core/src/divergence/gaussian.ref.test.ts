import { readFileSync } from "node:fs";
import { diagonalGaussian, klDiagonalGaussian, klGaussian } from "@recede/core";
import ndarray from "ndarray";
import { describe, expect, it } from "vitest";

interface Case {
  name: string;
  k: number;
  diagonal: boolean;
  mean0: number[];
  cov0: number[][];
  mean1: number[];
  cov1: number[][];
  method: "quad" | "dblquad" | "monte-carlo";
  value: number;
  error: number;
}

// Reference: scripts/reference/core_gaussian_kl.py — scipy.integrate.quad / dblquad of
// ∫ p0 (ln p0 − ln p1) for k = 1, 2 and a 2·10⁶-draw numpy Monte Carlo mean of ln p0 − ln p1 for
// k = 3…8 (densities from scipy.stats), none of which uses the closed form.
const fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/gaussian_kl.json", import.meta.url), "utf8"),
) as { cases: Case[] };

// Tolerances. Quadrature: 1e-9 relative plus 10× scipy's own error estimate (the integrand is
// smooth and the box covers ±14σ, so truncation is below 1e-40). Monte Carlo: 5 standard errors —
// by the central limit theorem a correct closed form lands outside with probability < 1e-6, and the
// fixture is fixed, so the check is deterministic.
function tolerance(c: Case): number {
  return c.method === "monte-carlo" ? 5 * c.error : 1e-9 * (1 + Math.abs(c.value)) + 10 * c.error;
}

describe("Gaussian KL closed forms vs scipy quadrature and Monte Carlo", () => {
  it("the fixture has quadrature and Monte Carlo cases", () => {
    expect(fixture.cases.filter((c) => c.method === "monte-carlo").length).toBeGreaterThanOrEqual(
      4,
    );
    expect(fixture.cases.filter((c) => c.method !== "monte-carlo").length).toBeGreaterThanOrEqual(
      8,
    );
  });
  for (const c of fixture.cases) {
    it(`klGaussian: ${c.name}`, () => {
      const kl = klGaussian(c.mean0, c.cov0, c.mean1, c.cov1);
      expect(Math.abs(kl - c.value)).toBeLessThanOrEqual(tolerance(c));
    });
    if (c.diagonal) {
      it(`klDiagonalGaussian and the diagonalGaussian geometry: ${c.name}`, () => {
        const v0 = c.cov0.map((r, i) => r[i]);
        const v1 = c.cov1.map((r, i) => r[i]);
        const kl = klDiagonalGaussian(c.mean0, v0, c.mean1, v1);
        expect(Math.abs(kl - c.value)).toBeLessThanOrEqual(tolerance(c));
        const geo = diagonalGaussian({ dimension: c.k });
        const x = geo.fromMeanVariance(
          Float64Array.from(c.mean0),
          Float64Array.from(v0),
          new Float64Array(2 * c.k),
        );
        const y = geo.fromMeanVariance(
          Float64Array.from(c.mean1),
          Float64Array.from(v1),
          new Float64Array(2 * c.k),
        );
        expect(Math.abs(geo.divergence(x, y) - c.value)).toBeLessThanOrEqual(tolerance(c) + 1e-12);
      });
    }
  }

  it("accepts ndarray views (incl. a transposed one) and row-major Float64Array", () => {
    const c = fixture.cases.find((x) => x.name.startsWith("2-D full, correlated")) as Case;
    const flat0 = Float64Array.from(c.cov0.flat());
    const flat1 = Float64Array.from(c.cov1.flat());
    const ref = klGaussian(c.mean0, c.cov0, c.mean1, c.cov1);
    expect(klGaussian(c.mean0, flat0, c.mean1, flat1)).toBe(ref);
    expect(
      klGaussian(c.mean0, ndarray(flat0, [2, 2]), c.mean1, ndarray(flat1, [2, 2]).transpose(1, 0)),
    ).toBeCloseTo(ref, 14);
    expect(
      klGaussian(c.mean0, { data: flat0, rows: 2, cols: 2 }, c.mean1, {
        data: flat1,
        rows: 2,
        cols: 2,
      }),
    ).toBe(ref);
  });
});
