import { readFileSync } from "node:fs";
import { kernels } from "@recede/core";
import { describe, expect, it } from "vitest";

// The kernel example matrix (offsets, n = 0, sentinels around the indexed range) and reference
// values from numpy/scipy: scripts/reference/core_kernels.py → fixtures/kernels.json
// (numpy.linalg.cholesky / solve / slogdet, scipy.linalg.solve_triangular,
// scipy.special.logsumexp / softmax).
const ref = JSON.parse(
  readFileSync(new URL("../../fixtures/kernels.json", import.meta.url), "utf8"),
) as {
  n: number;
  spd: number[];
  b: number[];
  cholesky: number[];
  forward: number[];
  backTransposed: number[];
  solve: number[];
  logdet: number;
  symv: number[];
  gemm: {
    r: number;
    k: number;
    c: number;
    a: number[];
    b: number[];
    ab: number[];
    x: number[];
    ax: number[];
  };
  scores: (number | null)[];
  logsumexp: number;
  softmax: number[];
};

const PAD = 3;
const SENTINEL = -7777.25;

/** values placed at offset PAD in a buffer padded with `fill` (NaN for inputs: any stray read poisons). */
function padded(values: ArrayLike<number>, fill = Number.NaN): Float64Array {
  const buf = new Float64Array(values.length + 2 * PAD).fill(fill);
  for (let i = 0; i < values.length; i++) buf[PAD + i] = values[i];
  return buf;
}

function expectPadIntact(buf: Float64Array, len: number, fill = SENTINEL): void {
  for (let i = 0; i < PAD; i++) {
    expect(buf[i]).toBe(fill);
    expect(buf[PAD + len + i]).toBe(fill);
  }
}

function expectClose(
  actual: ArrayLike<number>,
  off: number,
  expected: readonly number[],
  tol: number,
): void {
  for (let i = 0; i < expected.length; i++) {
    expect(Math.abs(actual[off + i] - expected[i])).toBeLessThanOrEqual(
      tol * (1 + Math.abs(expected[i])),
    );
  }
}

describe("level-1 kernels", () => {
  const x = [1, -2, 3.5, 4];
  const y = [0.5, 0.25, -1, 2];
  it("dot reads only its range; n = 0 gives 0", () => {
    expect(kernels.dot(4, padded(x), PAD, padded(y), PAD)).toBe(0.5 - 0.5 - 3.5 + 8);
    expect(kernels.dot(2, padded(x), PAD + 1, padded(y), PAD + 2)).toBe(-2 * -1 + 3.5 * 2);
    expect(kernels.dot(0, padded(x), PAD, padded(y), PAD)).toBe(0);
  });
  it("axpy writes only its range; n = 0 writes nothing", () => {
    const out = padded(y, SENTINEL);
    expect(kernels.axpy(4, 2, padded(x), PAD, out, PAD)).toBe(out);
    expectClose(out, PAD, [2.5, -3.75, 6, 10], 0);
    expectPadIntact(out, 4);
    const out0 = padded(y, SENTINEL);
    kernels.axpy(0, 2, padded(x), PAD, out0, PAD);
    expect(Array.from(out0)).toEqual(Array.from(padded(y, SENTINEL)));
  });
  it("scale, copy and fill write only their range", () => {
    const s = padded(x, SENTINEL);
    kernels.scale(4, -0.5, s, PAD);
    expectClose(s, PAD, [-0.5, 1, -1.75, -2], 0);
    expectPadIntact(s, 4);
    const c = padded([0, 0, 0, 0], SENTINEL);
    kernels.copy(4, padded(x), PAD, c, PAD);
    expectClose(c, PAD, x, 0);
    expectPadIntact(c, 4);
    const f = padded([0, 0, 0, 0], SENTINEL);
    kernels.fill(3, 9, f, PAD + 1);
    expect(Array.from(f.subarray(PAD, PAD + 4))).toEqual([0, 9, 9, 9]);
    expectPadIntact(f, 4);
    kernels.scale(0, 2, s, PAD);
    kernels.fill(0, 1, f, PAD);
    expectPadIntact(s, 4);
  });
  it("nrm2 neither overflows nor underflows and reads only its range", () => {
    expect(kernels.nrm2(2, padded([3, 4]), PAD)).toBe(5);
    expect(kernels.nrm2(2, padded([3e200, 4e200]), PAD)).toBeCloseTo(5e200, -186);
    expect(kernels.nrm2(2, padded([3e-200, 4e-200]), PAD) / 5e-200).toBeCloseTo(1, 14);
    expect(kernels.nrm2(0, padded([]), PAD)).toBe(0);
  });
});

describe("log-domain kernels vs scipy.special", () => {
  const scores = ref.scores.map((v) => (v === null ? Number.NEGATIVE_INFINITY : v));
  it("logSumExp matches scipy.special.logsumexp on scores near −800 (no underflow)", () => {
    const v = kernels.logSumExp(scores.length, padded(scores), PAD);
    expect(Math.abs(v - ref.logsumexp)).toBeLessThanOrEqual(1e-12 * Math.abs(ref.logsumexp));
    expect(kernels.logSumExp(0, padded([]), PAD)).toBe(Number.NEGATIVE_INFINITY);
  });
  it("expWeights matches scipy.special.softmax, writes only its range, sums to 1", () => {
    const w = padded(new Array(scores.length).fill(0), SENTINEL);
    kernels.expWeights(scores.length, padded(scores), PAD, w, PAD);
    expectClose(w, PAD, ref.softmax, 1e-12);
    expectPadIntact(w, scores.length);
    let s = 0;
    for (let i = 0; i < scores.length; i++) s += w[PAD + i];
    expect(Math.abs(s - 1)).toBeLessThanOrEqual(1e-15);
  });
  it("all −∞ (or NaN): returns −∞ and leaves w untouched; +∞ entries share the weight", () => {
    const w = padded([5, 5], SENTINEL);
    expect(kernels.expWeights(2, padded([Number.NEGATIVE_INFINITY, Number.NaN]), PAD, w, PAD)).toBe(
      Number.NEGATIVE_INFINITY,
    );
    expect(Array.from(w.subarray(PAD, PAD + 2))).toEqual([5, 5]);
    kernels.expWeights(
      3,
      padded([Number.POSITIVE_INFINITY, 0, Number.POSITIVE_INFINITY]),
      PAD,
      w,
      PAD,
    );
    expect(Array.from(w.subarray(PAD, PAD + 3))).toEqual([0.5, 0, 0.5]);
  });
});

describe("matrix kernels vs numpy / scipy.linalg", () => {
  const n = ref.n;
  const nn = n * n;
  it("cholesky matches numpy.linalg.cholesky, writes only its range, may alias", () => {
    const l = padded(new Array(nn).fill(0), SENTINEL);
    expect(kernels.cholesky(n, padded(ref.spd), PAD, l, PAD)).toBe(true);
    expectClose(l, PAD, ref.cholesky, 1e-13);
    expectPadIntact(l, nn);
    const inPlace = padded(ref.spd, SENTINEL);
    expect(kernels.cholesky(n, inPlace, PAD, inPlace, PAD)).toBe(true);
    expectClose(inPlace, PAD, ref.cholesky, 1e-13);
    expectPadIntact(inPlace, nn);
    expect(kernels.cholesky(0, padded([]), PAD, padded([]), PAD)).toBe(true);
  });
  it("cholesky returns false on non-SPD input (indefinite, singular, NaN)", () => {
    const out = new Float64Array(4);
    expect(kernels.cholesky(2, new Float64Array([1, 2, 2, 1]), 0, out, 0)).toBe(false);
    expect(kernels.cholesky(2, new Float64Array([1, 1, 1, 1]), 0, out, 0)).toBe(false);
    expect(kernels.cholesky(2, new Float64Array([Number.NaN, 0, 0, 1]), 0, out, 0)).toBe(false);
    expect(kernels.cholesky(1, new Float64Array([-1]), 0, out, 0)).toBe(false);
  });
  it("triangular solves and choleskySolve match scipy.linalg.solve_triangular / numpy.linalg.solve", () => {
    const l = padded(ref.cholesky);
    const f = padded(ref.b, SENTINEL);
    kernels.forwardSubstitute(n, l, PAD, f, PAD);
    expectClose(f, PAD, ref.forward, 1e-12);
    expectPadIntact(f, n);
    const bt = padded(ref.b, SENTINEL);
    kernels.backSubstituteTransposed(n, l, PAD, bt, PAD);
    expectClose(bt, PAD, ref.backTransposed, 1e-12);
    expectPadIntact(bt, n);
    const s = padded(ref.b, SENTINEL);
    expect(kernels.choleskySolve(n, l, PAD, s, PAD)).toBe(s);
    expectClose(s, PAD, ref.solve, 1e-12);
    expectPadIntact(s, n);
    const e = padded([], SENTINEL);
    kernels.choleskySolve(0, l, PAD, e, PAD);
    expectPadIntact(e, 0);
  });
  it("choleskyLogDet matches numpy.linalg.slogdet", () => {
    expect(
      Math.abs(kernels.choleskyLogDet(n, padded(ref.cholesky), PAD) - ref.logdet),
    ).toBeLessThanOrEqual(1e-12);
    expect(kernels.choleskyLogDet(0, padded([]), PAD)).toBe(0);
  });
  it("symv, gemv and gemm match numpy products and write only their range", () => {
    const y = padded(new Array(n).fill(0), SENTINEL);
    kernels.symv(n, padded(ref.spd), PAD, padded(ref.b), PAD, y, PAD);
    expectClose(y, PAD, ref.symv, 1e-13);
    expectPadIntact(y, n);
    const { r, k, c } = ref.gemm;
    const ax = padded(new Array(r).fill(0), SENTINEL);
    kernels.gemv(r, k, padded(ref.gemm.a), PAD, padded(ref.gemm.x), PAD, ax, PAD);
    expectClose(ax, PAD, ref.gemm.ax, 1e-13);
    expectPadIntact(ax, r);
    const ab = padded(new Array(r * c).fill(0), SENTINEL);
    kernels.gemm(r, k, c, padded(ref.gemm.a), PAD, padded(ref.gemm.b), PAD, ab, PAD);
    expectClose(ab, PAD, ref.gemm.ab, 1e-13);
    expectPadIntact(ab, r * c);
    const z = padded([], SENTINEL);
    kernels.symv(0, padded([]), PAD, padded([]), PAD, z, PAD);
    kernels.gemv(0, 3, padded([]), PAD, padded([1, 2, 3]), PAD, z, PAD);
    kernels.gemm(0, 2, 0, padded([]), PAD, padded([]), PAD, z, PAD);
    expectPadIntact(z, 0);
  });
});
