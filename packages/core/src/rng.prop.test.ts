import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { createStream, type Stream } from "./rng.js";

const seedArb = fc.oneof(fc.integer({ min: -1e9, max: 1e9 }), fc.string({ maxLength: 12 }));

function draws(s: Stream, n: number): number[] {
  return Array.from(s.fillNormal(new Float64Array(n), 0, n));
}

describe("Stream laws (fast-check)", () => {
  it("same seed → bit-identical normals and uniforms", () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 0, max: 300 }), (seed, n) => {
        const a = createStream(seed);
        const b = createStream(seed);
        expect(draws(a, n)).toEqual(draws(b, n));
        expect(Array.from(a.fillUniform(new Float64Array(n), 0, n))).toEqual(
          Array.from(b.fillUniform(new Float64Array(n), 0, n)),
        );
        expect(a.uniform()).toBe(b.uniform());
        expect(a.normal()).toBe(b.normal());
      }),
      { numRuns: 100 },
    );
  });

  it("fillNormal split at any points = one fill = repeated normal()", () => {
    fc.assert(
      fc.property(
        seedArb,
        fc.array(fc.integer({ min: 0, max: 40 }), { minLength: 1, maxLength: 8 }),
        (seed, parts) => {
          const n = parts.reduce((x, y) => x + y, 0);
          const whole = draws(createStream(seed), n);
          const split = createStream(seed);
          const buf = new Float64Array(n);
          let o = 0;
          for (const p of parts) {
            split.fillNormal(buf, o, p);
            o += p;
          }
          expect(Array.from(buf)).toEqual(whole);
          const single = createStream(seed);
          expect(Array.from({ length: n }, () => single.normal())).toEqual(whole);
        },
      ),
      { numRuns: 150 },
    );
  });

  it("fillUniform = repeated uniform(); values are k·2⁻⁵³ in [0, 1)", () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 0, max: 200 }), (seed, n) => {
        const a = createStream(seed).fillUniform(new Float64Array(n), 0, n);
        const b = createStream(seed);
        for (let i = 0; i < n; i++) {
          expect(a[i]).toBe(b.uniform());
          expect(a[i] >= 0 && a[i] < 1).toBe(true);
          expect(Number.isInteger(a[i] * 2 ** 53)).toBe(true);
        }
      }),
      { numRuns: 100 },
    );
  });

  it("fills touch only the indexed range (sentinels around it)", () => {
    fc.assert(
      fc.property(
        seedArb,
        fc.integer({ min: 0, max: 10 }),
        fc.integer({ min: 0, max: 50 }),
        fc.integer({ min: 0, max: 10 }),
        (seed, before, n, after) => {
          const buf = new Float64Array(before + n + after).fill(-7.5);
          const s = createStream(seed);
          s.fillNormal(buf, before, n);
          const u = new Float64Array(before + n + after).fill(-7.5);
          s.fillUniform(u, before, n);
          for (const b of [buf, u]) {
            for (let i = 0; i < before; i++) expect(b[i]).toBe(-7.5);
            for (let i = before + n; i < b.length; i++) expect(b[i]).toBe(-7.5);
            for (let i = before; i < before + n; i++) expect(b[i]).not.toBe(-7.5);
          }
        },
      ),
      { numRuns: 100 },
    );
  });

  it("forks depend only on the seed path and key: not on creation order or parent draws", () => {
    fc.assert(
      fc.property(
        seedArb,
        fc.uniqueArray(fc.integer({ min: 0, max: 1000 }), { minLength: 1, maxLength: 5 }),
        fc.integer({ min: 0, max: 100 }),
        (seed, keys, parentDraws) => {
          const p1 = createStream(seed);
          const first = keys.map((k) => draws(p1.fork(k), 20));
          const p2 = createStream(seed);
          draws(p2, parentDraws);
          p2.uniform();
          const reversed = [...keys].reverse().map((k) => draws(p2.fork(k), 20));
          expect(reversed.reverse()).toEqual(first);
          // Nested forks are keyed by path too.
          expect(draws(p1.fork(keys[0]).fork(3), 10)).toEqual(
            draws(createStream(seed).fork(keys[0]).fork(3), 10),
          );
        },
      ),
      { numRuns: 100 },
    );
  });

  it("distinct keys and the parent give distinct streams", () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 0, max: 1e6 }), (seed, k) => {
        const root = createStream(seed);
        const a = draws(root.fork(k), 8);
        const b = draws(root.fork(k + 1), 8);
        const p = draws(createStream(seed), 8);
        expect(a).not.toEqual(b);
        expect(a).not.toEqual(p);
      }),
      { numRuns: 100 },
    );
  });

  it("getState/setState round-trips through JSON and replays the same draws", () => {
    fc.assert(
      fc.property(
        seedArb,
        fc.integer({ min: 0, max: 50 }),
        fc.integer({ min: 1, max: 50 }),
        (seed, skip, n) => {
          const s = createStream(seed);
          draws(s, skip);
          if (skip % 3 === 0) s.uniform();
          const saved = JSON.parse(JSON.stringify(s.getState()));
          const ahead = draws(s, n);
          const u = s.uniform();
          s.setState(saved);
          expect(draws(s, n)).toEqual(ahead);
          expect(s.uniform()).toBe(u);
          // A fresh stream with the same seed can adopt the state too.
          const t = createStream(seed);
          t.setState(saved);
          expect(draws(t, n)).toEqual(ahead);
        },
      ),
      { numRuns: 100 },
    );
  });
});
