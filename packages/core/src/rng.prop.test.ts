import { createStream } from "@recede/core";
import { catchRecedeError, seed } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

// Determinism laws of seeded streams. They constrain behaviour, not the particular numbers, so the
// generator may be optimized as long as these hold.

function draws(s: ReturnType<typeof createStream>, n: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < n; i++) out.push(i % 3 === 0 ? s.uniform() : s.normal());
  return out;
}

describe("createStream determinism", () => {
  it("the same seed gives bit-identical uniform, normal and fill streams", () => {
    fc.assert(
      fc.property(fc.oneof(seed(), fc.string()), fc.integer({ min: 1, max: 200 }), (sd, n) => {
        expect(draws(createStream(sd), n)).toEqual(draws(createStream(sd), n));
        const a = new Float64Array(n);
        const b = new Float64Array(n);
        createStream(sd).fillNormal(a, 0, n);
        createStream(sd).fillNormal(b, 0, n);
        expect(a).toEqual(b);
        createStream(sd).fillUniform(a, 0, n);
        createStream(sd).fillUniform(b, 0, n);
        expect(a).toEqual(b);
      }),
      { numRuns: 100 },
    );
  });

  it("different seeds give different streams", () => {
    fc.assert(
      fc.property(seed(), seed(), (a, b) => {
        fc.pre(a !== b);
        expect(draws(createStream(a), 8)).not.toEqual(draws(createStream(b), 8));
      }),
      { numRuns: 100 },
    );
  });

  it("fillNormal over any split of a range equals one fill of the whole range", () => {
    fc.assert(
      fc.property(
        seed(),
        fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 1, maxLength: 12 }),
        (sd, parts) => {
          const total = parts.reduce((a, b) => a + b, 0);
          const whole = new Float64Array(total);
          createStream(sd).fillNormal(whole, 0, total);
          const split = new Float64Array(total);
          const s = createStream(sd);
          let off = 0;
          for (const p of parts) {
            s.fillNormal(split, off, p);
            off += p;
          }
          expect(split).toEqual(whole);
        },
      ),
      { numRuns: 100 },
    );
  });

  it("fill writes only its range", () => {
    const buf = new Float64Array(10).fill(-1);
    createStream(1).fillNormal(buf, 3, 4);
    createStream(1).fillUniform(buf, 3, 0);
    expect(Array.from(buf.subarray(0, 3))).toEqual([-1, -1, -1]);
    expect(Array.from(buf.subarray(7))).toEqual([-1, -1, -1]);
    expect(buf.subarray(3, 7).every((v) => v !== -1 && Number.isFinite(v))).toBe(true);
  });

  it("forks depend only on (seed, key): not on creation order nor on the parent's draws", () => {
    fc.assert(
      fc.property(
        seed(),
        fc.uniqueArray(fc.nat({ max: 1000 }), { minLength: 2, maxLength: 6 }),
        fc.nat({ max: 50 }),
        (sd, keys, burn) => {
          const p1 = createStream(sd);
          const forward = keys.map((k) => draws(p1.fork(k), 6));
          const p2 = createStream(sd);
          draws(p2, burn); // the parent has drawn
          const backward = [...keys].reverse().map((k) => draws(p2.fork(k), 6));
          expect(backward.reverse()).toEqual(forward);
          // distinct keys give distinct streams, and a fork differs from its parent
          for (let i = 1; i < forward.length; i++) expect(forward[i]).not.toEqual(forward[0]);
          expect(draws(createStream(sd), 6)).not.toEqual(forward[0]);
        },
      ),
      { numRuns: 60 },
    );
  });

  it("a fork does not disturb its parent", () => {
    const a = createStream(99);
    const b = createStream(99);
    a.normal();
    b.normal();
    a.fork(3).normal();
    expect(draws(a, 10)).toEqual(draws(b, 10));
  });

  it("getState/setState round-trips mid-stream, including a pending normal", () => {
    fc.assert(
      fc.property(seed(), fc.nat({ max: 40 }), (sd, k) => {
        const s = createStream(sd);
        draws(s, k);
        s.normal(); // may leave a spare normal pending
        const st = JSON.parse(JSON.stringify(s.getState()));
        const next = draws(s, 12);
        s.setState(st);
        expect(draws(s, 12)).toEqual(next);
        const t = createStream(sd);
        t.setState(st);
        expect(draws(t, 12)).toEqual(next);
      }),
      { numRuns: 100 },
    );
  });

  it("setState rejects a state from another seed; fork and createStream validate arguments", () => {
    catchRecedeError(() => createStream(1).setState(createStream(2).getState()), {
      code: "state",
      fn: "Stream.setState",
      arg: "state.seed",
    });
    catchRecedeError(() => createStream(1).fork(-1), {
      code: "range",
      fn: "Stream.fork",
      arg: "key",
    });
    catchRecedeError(() => createStream(1).fork(1.5), {
      code: "range",
      fn: "Stream.fork",
      arg: "key",
    });
    catchRecedeError(() => createStream(Number.NaN), {
      code: "non-finite",
      fn: "createStream",
      arg: "seed",
    });
    catchRecedeError(() => createStream({} as never), {
      code: "type",
      fn: "createStream",
      arg: "seed",
    });
  });

  it("uniforms lie in [0, 1) and normals have mean ≈ 0, variance ≈ 1 (5 standard errors, n = 200 000)", () => {
    // Moments of N(0,1): E z = 0, Var z = 1, Var z² = 2; tolerances are 5 standard errors (common practice).
    const n = 200_000;
    const s = createStream("moments");
    const buf = new Float64Array(n);
    s.fillNormal(buf, 0, n);
    let m = 0;
    let v = 0;
    for (const z of buf) {
      m += z;
      v += z * z;
    }
    m /= n;
    v /= n;
    expect(Math.abs(m)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(v - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
    s.fillUniform(buf, 0, n);
    let mu = 0;
    let outside = 0;
    for (const u of buf) {
      if (!(u >= 0 && u < 1)) outside++;
      mu += u;
    }
    expect(outside).toBe(0);
    expect(Math.abs(mu / n - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n));
  });
});
