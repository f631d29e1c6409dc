import { describe, expect, it } from "vitest";
import { RecedeError } from "./errors.js";
import { createStream, type StreamState } from "./rng.js";

function next(s: ReturnType<typeof createStream>, n: number): number[] {
  return Array.from(s.fillNormal(new Float64Array(n), 0, n));
}

describe("Stream input validation", () => {
  it("createStream rejects non-finite and non-number/string seeds with a typed error", () => {
    expect(() => createStream(Number.NaN)).toThrowError(/createStream: seed must be/);
    expect(() => createStream(Number.POSITIVE_INFINITY)).toThrowError(RecedeError);
    expect(() => createStream({} as unknown as number)).toThrowError(/a number or a string/);
  });

  it("fork rejects negative and non-integer keys", () => {
    const s = createStream(1);
    expect(() => s.fork(-1)).toThrowError(/Stream.fork: key must be an integer >= 0 \(got -1\)/);
    expect(() => s.fork(1.5)).toThrowError(RecedeError);
  });

  const bad: [string, (st: StreamState) => unknown, RegExp][] = [
    ["another seed", (st) => ({ ...st, seed: "other" }), /state.seed must be "9"/],
    ["no prng", (st) => ({ seed: st.seed }), /state.prng.s must be an array of four int32/],
    [
      "short word list",
      (st) => ({ seed: st.seed, prng: { ...(st.prng as object), s: [1, 2, 3] } }),
      /state.prng.s must be an array of four int32 words \(got Array\(length 3\)\)/,
    ],
    [
      "non-int32 word",
      (st) => ({ seed: st.seed, prng: { ...(st.prng as object), aux: [1, 2, 3, 2 ** 40] } }),
      /state.prng.aux must be an array of four int32/,
    ],
    [
      "all-zero state",
      (st) => ({ seed: st.seed, prng: { ...(st.prng as object), s: [0, 0, 0, 0] } }),
      /state.prng.s must be not all zero/,
    ],
    [
      "nbits out of range",
      (st) => ({ seed: st.seed, prng: { ...(st.prng as object), nbits: 5 } }),
      /state.prng.nbits must be an integer in \[0, 4\] \(got 5\)/,
    ],
    [
      "bits not an integer",
      (st) => ({ seed: st.seed, prng: { ...(st.prng as object), bits: 0.5 } }),
      /state.prng.bits must be an int32/,
    ],
    ["null", () => null, /state must be a StreamState object/],
  ];

  for (const [name, mutate, message] of bad) {
    it(`setState rejects ${name} and leaves the stream untouched`, () => {
      const s = createStream(9);
      next(s, 5);
      const reference = createStream(9);
      next(reference, 5);
      const wrong = mutate(s.getState()) as StreamState;
      expect(() => s.setState(wrong)).toThrowError(message);
      expect(() => s.setState(wrong)).toThrowError(RecedeError);
      expect(next(s, 30)).toEqual(next(reference, 30));
      expect(s.uniform()).toBe(reference.uniform());
    });
  }

  it("getState returns a copy: mutating it does not change the stream", () => {
    const s = createStream(3);
    const st = s.getState() as { prng: { s: number[] } };
    const expected = next(createStream(3), 10);
    st.prng.s[0] = 12345;
    expect(next(s, 10)).toEqual(expected);
  });

  it("seed path of a fork is parent path + '/' + key", () => {
    expect(createStream(4).fork(2).fork(0).seed).toBe("4/2/0");
    expect(createStream("a").seed).toBe("a");
  });
});
