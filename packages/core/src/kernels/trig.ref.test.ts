import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { sinCos, sinCosInPlace, trigReductionLimit } from "./trig.js";

/**
 * Reference checks of the core trig kernel against NumPy 2.4 numpy.sin/numpy.cos (C library,
 * glibc 2.36), 2026: scripts/reference/core_trig.py writes the fixture
 * packages/core/fixtures/trig.json. Errors are counted in ulps of the reference value. The C
 * library is itself within 1 ulp of the exact value, so these bounds mix both errors.
 */
interface Group {
  x: number[];
  sin: number[];
  cos: number[];
}
interface Fixture {
  source: string;
  reductionLimit: number;
  groups: Record<
    "uniform" | "logSpread" | "beyondLimit" | "nearMultiplesOfHalfPi" | "tiny" | "zeros",
    Group
  >;
  constants: {
    P1: number;
    P2: number;
    P3: number;
    twoOverPi: number;
    sinCoefficients: number[];
    cosCoefficients: number[];
  };
}
const fx: Fixture = JSON.parse(
  readFileSync(new URL("../../fixtures/trig.json", import.meta.url), "utf8"),
);

/** Unit in the last place of a double (its spacing at |v|); the smallest subnormal below 2⁻¹⁰²². */
function ulp(v: number): number {
  const a = Math.abs(v);
  if (a < 2.2250738585072014e-308) return 5e-324;
  let e = Math.floor(Math.log2(a));
  if (2 ** e > a) e -= 1; // log2 rounding near powers of two
  if (2 ** (e + 1) <= a) e += 1;
  return 2 ** (e - 52);
}

/** Max error in ulps of the reference over a group, for sin and cos (exact zeros must match). */
function maxUlps(g: Group): { sin: number; cos: number; worstX: number } {
  const out = new Float64Array(2);
  let s = 0;
  let c = 0;
  let worstX = 0;
  for (let i = 0; i < g.x.length; i++) {
    sinCos(g.x[i], out, 0);
    const es =
      g.sin[i] === 0 ? (out[0] === 0 ? 0 : Infinity) : Math.abs(out[0] - g.sin[i]) / ulp(g.sin[i]);
    const ec =
      g.cos[i] === 0 ? (out[1] === 0 ? 0 : Infinity) : Math.abs(out[1] - g.cos[i]) / ulp(g.cos[i]);
    if (es > s || ec > c) worstX = g.x[i];
    s = Math.max(s, es);
    c = Math.max(c, ec);
  }
  return { sin: s, cos: c, worstX };
}

describe("kernels.sinCos against NumPy 2.4 numpy.sin/numpy.cos (C library), 2026", () => {
  it("the fixture is the documented one", () => {
    expect(fx.source).toMatch(/NumPy 2\.4 numpy\.sin\/numpy\.cos/);
    expect(fx.reductionLimit).toBe(trigReductionLimit);
    expect(fx.groups.uniform.x.length).toBe(2000);
  });

  it("uniform in [−10, 10]: ≤ 1 ulp (measured max: 1)", () => {
    const e = maxUlps(fx.groups.uniform);
    expect(e.sin).toBeLessThanOrEqual(1);
    expect(e.cos).toBeLessThanOrEqual(1);
  });

  it("magnitudes 1e−8 … 1e6 (log-spread): ≤ 2 ulp (measured max: 2)", () => {
    const e = maxUlps(fx.groups.logSpread);
    expect(e.sin).toBeLessThanOrEqual(2);
    expect(e.cos).toBeLessThanOrEqual(2);
    // below 10³ the bound is 1 ulp
    const small: Group = { x: [], sin: [], cos: [] };
    fx.groups.logSpread.x.forEach((x, i) => {
      if (Math.abs(x) <= 1e3) {
        small.x.push(x);
        small.sin.push(fx.groups.logSpread.sin[i]);
        small.cos.push(fx.groups.logSpread.cos[i]);
      }
    });
    expect(small.x.length).toBeGreaterThan(300);
    const es = maxUlps(small);
    expect(Math.max(es.sin, es.cos)).toBeLessThanOrEqual(1);
  });

  it("doubles nearest to k·π/2 and their neighbours, |k| ≤ 5·10⁵: ≤ 2 ulp (measured max: 1)", () => {
    // here the result is a tiny sin r or cos r: the three-part reduction must carry π/2 well past
    // 53 bits, or the relative error explodes
    const e = maxUlps(fx.groups.nearMultiplesOfHalfPi);
    expect(e.sin).toBeLessThanOrEqual(2);
    expect(e.cos).toBeLessThanOrEqual(2);
  });

  it("beyond the reduction limit (Math fallback) and up to 1e300: ≤ 1 ulp (measured max: 1)", () => {
    const e = maxUlps(fx.groups.beyondLimit);
    expect(e.sin).toBeLessThanOrEqual(1);
    expect(e.cos).toBeLessThanOrEqual(1);
  });

  it("tiny and subnormal arguments: exactly sin x = x, cos x = 1, as NumPy", () => {
    const g = fx.groups.tiny;
    const out = new Float64Array(2);
    for (let i = 0; i < g.x.length; i++) {
      sinCos(g.x[i], out, 0);
      expect(out[0]).toBe(g.sin[i]);
      expect(out[1]).toBe(g.cos[i]);
    }
  });

  it("±0: sin(±0) = ±0 (sign kept), cos(±0) = 1, as NumPy", () => {
    const g = fx.groups.zeros;
    const out = new Float64Array(2);
    for (let i = 0; i < g.x.length; i++) {
      sinCos(g.x[i], out, 0);
      expect(Object.is(out[0], g.sin[i])).toBe(true);
      expect(out[1]).toBe(g.cos[i]);
    }
    expect(Object.is(g.sin[1], -0)).toBe(true); // the fixture really holds −0
  });

  it("sinCosInPlace gives the same bits as sinCos", () => {
    const a = new Float64Array(2);
    const b = new Float64Array(4);
    for (const g of Object.values(fx.groups)) {
      for (const x of g.x) {
        sinCos(x, a, 0);
        b[1] = x;
        sinCosInPlace(b, 1);
        expect(Object.is(b[1], a[0]) && Object.is(b[2], a[1])).toBe(true);
      }
    }
  });

  it("the constants in trig.ts are those derived by the reference script", () => {
    // π/2 in three parts from 80 digits of π (Machin's formula, exact rationals) and Chebyshev
    // coefficients from 50-digit arithmetic: every one must appear as a literal in the kernel
    const src = readFileSync(new URL("./trig.ts", import.meta.url), "utf8");
    const literals = new Set(
      (src.match(/\d+\.\d+(?:e[-+]?\d+)?/g) ?? []).map((t) => Number.parseFloat(t)),
    );
    const c = fx.constants;
    const all = [c.P1, c.P2, c.P3, c.twoOverPi, ...c.sinCoefficients, ...c.cosCoefficients];
    for (const v of all) expect(literals.has(Math.abs(v))).toBe(true);
  });
});
