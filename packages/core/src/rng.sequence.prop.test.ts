import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { createStream, type Stream } from "./rng.js";

// Laws specific to the xoshiro128** + ziggurat implementation: single draws and fills are the same
// sequence, uniforms are exact 53-bit fractions, and fork paths compose. (The general determinism
// laws of streams live in rng.prop.test.ts.)

const seedArb = fc.oneof(fc.integer({ min: -1e9, max: 1e9 }), fc.string({ maxLength: 12 }));

function fill(s: Stream, n: number): number[] {
  return Array.from(s.fillNormal(new Float64Array(n), 0, n));
}

describe("Stream sequences (fast-check)", () => {
  it("n calls of normal() equal one fillNormal of length n, interleaved in any way", () => {
    fc.assert(
      fc.property(
        seedArb,
        fc.array(fc.integer({ min: 0, max: 40 }), { minLength: 1, maxLength: 8 }),
        (seed, parts) => {
          const n = parts.reduce((x, y) => x + y, 0);
          const whole = fill(createStream(seed), n);
          const single = createStream(seed);
          expect(Array.from({ length: n }, () => single.normal())).toEqual(whole);
          // Alternate single draws and fills.
          const mixed = createStream(seed);
          const got: number[] = [];
          parts.forEach((p, i) => {
            if (i % 2 === 0) for (let j = 0; j < p; j++) got.push(mixed.normal());
            else got.push(...fill(mixed, p));
          });
          expect(got).toEqual(whole);
        },
      ),
      { numRuns: 150 },
    );
  });

  it("fillUniform = repeated uniform(); every value is k·2⁻⁵³ with 0 ≤ k < 2⁵³", () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 0, max: 200 }), (seed, n) => {
        const a = createStream(seed).fillUniform(new Float64Array(n), 0, n);
        const b = createStream(seed);
        for (let i = 0; i < n; i++) {
          expect(a[i]).toBe(b.uniform());
          const k = a[i] * 2 ** 53;
          expect(Number.isInteger(k) && k >= 0 && k < 2 ** 53).toBe(true);
        }
      }),
      { numRuns: 100 },
    );
  });

  it("nested forks are keyed by their seed path", () => {
    fc.assert(
      fc.property(seedArb, fc.nat({ max: 1000 }), fc.nat({ max: 1000 }), (seed, a, b) => {
        const direct = fill(createStream(seed).fork(a).fork(b), 10);
        const root = createStream(seed);
        fill(root, 7);
        const child = root.fork(a);
        fill(child, 3);
        expect(fill(child.fork(b), 10)).toEqual(direct);
        expect(child.fork(b).seed).toBe(`${String(seed)}/${a}/${b}`);
      }),
      { numRuns: 100 },
    );
  });

  it("uniform and normal draws of one stream interleave reproducibly", () => {
    fc.assert(
      fc.property(seedArb, fc.array(fc.boolean(), { maxLength: 60 }), (seed, pattern) => {
        const run = (): number[] => {
          const s = createStream(seed);
          return pattern.map((u) => (u ? s.uniform() : s.normal()));
        };
        expect(run()).toEqual(run());
      }),
      { numRuns: 100 },
    );
  });
});
