import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { sinCos, trigReductionLimit } from "./trig.js";

// Laws of the core trig kernel: symmetry bit for bit, the Pythagorean identity, closeness to the
// engine's Math.sin/Math.cos (ECMAScript leaves their accuracy to the implementation; V8's are
// fdlibm ports, within 1 ulp), NaN for NaN and ±∞, and the documented fallback beyond the
// reduction limit.

const EPS = 2 ** -52;

/** Unit in the last place of a double; the smallest subnormal below 2⁻¹⁰²². */
function ulp(v: number): number {
  const a = Math.abs(v);
  if (a < 2.2250738585072014e-308) return 5e-324;
  let e = Math.floor(Math.log2(a));
  if (2 ** e > a) e -= 1;
  if (2 ** (e + 1) <= a) e += 1;
  return 2 ** (e - 52);
}

/** Doubles in ±1e6: every exponent, not only the large ones a uniform draw would give. */
const wideDouble = fc.double({ min: -1e6, max: 1e6, noNaN: true });
/** Angles of the size models see (|x| ≤ 20), uniform. */
const angle = fc.double({ min: -20, max: 20, noNaN: true });
const anyArgument = fc.oneof(wideDouble, angle);

function sc(x: number): [number, number] {
  const out = new Float64Array(2);
  sinCos(x, out, 0);
  return [out[0], out[1]];
}

describe("kernels.sinCos laws", () => {
  it("odd/even symmetry holds bit for bit: sin(−x) = −sin x, cos(−x) = cos x", () => {
    fc.assert(
      fc.property(anyArgument, (x) => {
        const [s, c] = sc(x);
        const [sm, cm] = sc(-x);
        expect(Object.is(sm, -s)).toBe(true);
        expect(Object.is(cm, c)).toBe(true);
      }),
      { numRuns: 200 },
    );
  });

  it("sin² x + cos² x is within 4·eps of 1", () => {
    fc.assert(
      fc.property(anyArgument, (x) => {
        const [s, c] = sc(x);
        expect(Math.abs(s * s + c * c - 1)).toBeLessThanOrEqual(4 * EPS);
      }),
      { numRuns: 200 },
    );
  });

  it("agrees with Math.sin/Math.cos within 2 ulp over doubles in ±1e6", () => {
    fc.assert(
      fc.property(anyArgument, (x) => {
        const [s, c] = sc(x);
        const ms = Math.sin(x);
        const mc = Math.cos(x);
        expect(Math.abs(s - ms)).toBeLessThanOrEqual(2 * ulp(ms));
        expect(Math.abs(c - mc)).toBeLessThanOrEqual(2 * ulp(mc));
      }),
      { numRuns: 300 },
    );
  });

  it("the pair is the same as the kernel run twice (a pure function of x)", () => {
    fc.assert(
      fc.property(anyArgument, fc.integer({ min: 0, max: 6 }), (x, offset) => {
        const out = new Float64Array(8).fill(7);
        sinCos(x, out, offset);
        const [s, c] = sc(x);
        expect(Object.is(out[offset], s) && Object.is(out[offset + 1], c)).toBe(true);
        // nothing outside the two slots is written
        for (let i = 0; i < 8; i++) if (i !== offset && i !== offset + 1) expect(out[i]).toBe(7);
      }),
      { numRuns: 100 },
    );
  });

  it("NaN and ±∞ give NaN for both", () => {
    for (const x of [Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) {
      const [s, c] = sc(x);
      expect(Number.isNaN(s) && Number.isNaN(c)).toBe(true);
    }
  });

  it("at and beyond the reduction limit the result is exactly Math's", () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.double({ min: trigReductionLimit, max: 1e12, noNaN: true }),
          fc.double({ min: 1e12, max: Number.MAX_VALUE, noNaN: true }),
        ),
        fc.boolean(),
        (a, negative) => {
          const x = negative ? -a : a;
          const [s, c] = sc(x);
          expect(Object.is(s, Math.sin(x))).toBe(true);
          expect(Object.is(c, Math.cos(x))).toBe(true);
        },
      ),
      { numRuns: 100 },
    );
    const [s, c] = sc(trigReductionLimit);
    expect(s).toBe(Math.sin(trigReductionLimit));
    expect(c).toBe(Math.cos(trigReductionLimit));
  });

  it("just below the limit the kernel still reduces: within 2 ulp of Math", () => {
    // A double where the reduction and V8's Math differ in the last bit (found by a scan below
    // the limit): equal bits there would mean the kernel fell back to Math.
    const pinned = 823549.6645826212;
    expect(pinned).toBeLessThan(trigReductionLimit);
    const [ps] = sc(pinned);
    expect(ps).not.toBe(Math.sin(pinned));
    expect(Math.abs(ps - Math.sin(pinned))).toBeLessThanOrEqual(2 * ulp(Math.sin(pinned)));
    let x = trigReductionLimit;
    for (let i = 0; i < 50; i++) {
      x = x - ulp(x); // the 50 doubles just below the limit
      const [s, c] = sc(x);
      expect(Math.abs(s - Math.sin(x))).toBeLessThanOrEqual(2 * ulp(Math.sin(x)));
      expect(Math.abs(c - Math.cos(x))).toBeLessThanOrEqual(2 * ulp(Math.cos(x)));
    }
  });
});
