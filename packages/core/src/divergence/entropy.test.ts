import { entropy } from "@recede/core";
import { catchRecedeError, finiteVector, simplexPoint } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

function sum(x: Float64Array): number {
  let s = 0;
  for (const v of x) s += v;
  return s;
}

describe("entropy (simplex)", () => {
  it("one step is the Hedge update p_i e^{−ηℓ_i} / Σ_j p_j e^{−ηℓ_j} (Cesa-Bianchi & Lugosi 2006, §2.1)", () => {
    fc.assert(
      fc.property(
        simplexPoint(6, 1e-3),
        finiteVector(6, { min: 0, max: 1 }),
        fc.double({ min: 0, max: 5, noNaN: true }),
        (p, l, eta) => {
          const out = entropy({ dimension: 6 }).step(p, l, eta, new Float64Array(6));
          let z = 0;
          for (let i = 0; i < 6; i++) z += p[i] * Math.exp(-eta * l[i]);
          for (let i = 0; i < 6; i++)
            expect(out[i]).toBeCloseTo((p[i] * Math.exp(-eta * l[i])) / z, 14);
        },
      ),
      { numRuns: 100 },
    );
  });

  it("T steps from uniform give p_{T+1,i} ∝ exp(−η Σ_t ℓ_{t,i}) (Hedge's closed form)", () => {
    const n = 4;
    const geo = entropy({ dimension: n });
    const p = new Float64Array(n).fill(1 / n);
    const cum = new Float64Array(n);
    const losses = fc.sample(finiteVector(n, { min: 0, max: 1 }), { seed: 5, numRuns: 300 });
    for (const l of losses) {
      geo.step(p, l, 0.1, p);
      for (let i = 0; i < n; i++) cum[i] += l[i];
    }
    let m = Number.POSITIVE_INFINITY;
    for (const c of cum) m = Math.min(m, c);
    let z = 0;
    for (let i = 0; i < n; i++) z += Math.exp(-0.1 * (cum[i] - m));
    for (let i = 0; i < n; i++) expect(p[i]).toBeCloseTo(Math.exp(-0.1 * (cum[i] - m)) / z, 12);
  });

  it("gradients of ±1e6 (and ±1e300) neither overflow nor leave the simplex", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 40 }).chain((n) =>
          fc.tuple(
            simplexPoint(n, 1e-12),
            fc.array(fc.constantFrom(1e6, -1e6, 0, 1e300, -1e300, 3.5), {
              minLength: n,
              maxLength: n,
            }),
            fc.double({ min: 1e-3, max: 100, noNaN: true }),
          ),
        ),
        ([p, g, eta]) => {
          const n = p.length;
          const out = entropy({ dimension: n }).step(
            p,
            Float64Array.from(g),
            eta,
            new Float64Array(n),
          );
          for (const v of out) {
            expect(Number.isFinite(v)).toBe(true);
            expect(v).toBeGreaterThanOrEqual(0);
          }
          expect(Math.abs(sum(out) - 1)).toBeLessThanOrEqual(1e-12);
        },
      ),
      { numRuns: 200 },
    );
    const out = entropy({ dimension: 3 }).step(
      new Float64Array([1 / 3, 1 / 3, 1 / 3]),
      new Float64Array([1e6, 0, -1e6]),
      1,
      new Float64Array(3),
    );
    expect(Array.from(out)).toEqual([0, 0, 1]);
  });

  it("stays on the simplex within 1e-12 over 20 000 rounds of adversarial losses", () => {
    const n = 64;
    const geo = entropy({ dimension: n });
    const p = new Float64Array(n).fill(1 / n);
    const g = new Float64Array(n);
    let worst = 0;
    let negative = 0;
    for (let t = 0; t < 20_000; t++) {
      for (let i = 0; i < n; i++)
        g[i] = ((i * 7919 + t * 104_729) % 1000) / 1000 - (i === t % n ? 50 : 0);
      geo.step(p, g, 0.5, p);
      worst = Math.max(worst, Math.abs(sum(p) - 1));
      for (const v of p) if (!(v >= 0)) negative++;
    }
    expect(worst).toBeLessThanOrEqual(1e-12);
    expect(negative).toBe(0);
  });

  it("D is KL on the simplex; +∞ when y has a zero where x has mass", () => {
    const geo = entropy({ dimension: 2 });
    const kl = 0.25 * Math.log(0.25 / 0.5) + 0.75 * Math.log(0.75 / 0.5);
    expect(
      geo.divergence(new Float64Array([0.25, 0.75]), new Float64Array([0.5, 0.5])),
    ).toBeCloseTo(kl, 15);
    expect(geo.divergence(new Float64Array([0.5, 0.5]), new Float64Array([1, 0]))).toBe(
      Number.POSITIVE_INFINITY,
    );
    expect(geo.divergence(new Float64Array([1, 0]), new Float64Array([0.5, 0.5]))).toBeCloseTo(
      Math.log(2),
      15,
    );
    expect(geo.contains(new Float64Array([0.5, 0.6]))).toBe(false);
    expect(geo.contains(new Float64Array([-0.1, 1.1]))).toBe(false);
    expect(geo.contains(new Float64Array([1, 0]))).toBe(true);
  });

  it("rejects bad options with typed errors", () => {
    catchRecedeError(() => entropy({ dimension: 0 }), {
      code: "range",
      fn: "entropy",
      arg: "dimension",
    });
    catchRecedeError(() => entropy({ dimension: Number.NaN }), {
      code: "range",
      fn: "entropy",
      arg: "dimension",
      message: "NaN",
    });
    catchRecedeError(() => entropy({ dimension: 3, tolerance: Number.POSITIVE_INFINITY }), {
      code: "range",
      arg: "tolerance",
    });
    catchRecedeError(() => entropy(null as never), { code: "type", arg: "options" });
  });
});
