/**
 * Seeded random streams: xoshiro128** generators seeded through `seedrandom`, with ziggurat
 * normals.
 *
 * **Seeding.** A stream's seed path (the root seed, then `/key` per fork) is hashed by
 * `seedrandom`'s Alea generator, whose first eight 32-bit outputs become the 128-bit states of two
 * xoshiro128** generators, the main one and an auxiliary one (Blackman & Vigna, "Scrambled Linear
 * Pseudorandom Number Generators", ACM Transactions on Mathematical Software 47(4), 2021). The same
 * seed gives bit-identical draws. {@link Stream.fork} derives a child from the *seed path* and an
 * integer key, not from the parent's current state, so children do not depend on the order in
 * which they are created or on how much the parent has drawn. Parallel slices of a batch use
 * `fork(sliceIndex)` so results do not depend on the worker count.
 *
 * **Generator.** xoshiro128** with state (s0, s1, s2, s3) of 32-bit words:
 * output = rotl(s1·5, 7)·9; t = s1 ≪ 9; s2 ^= s0; s3 ^= s1; s1 ^= s2; s0 ^= s3; s2 ^= t;
 * s3 = rotl(s3, 11) (all arithmetic mod 2³²). Period 2¹²⁸ − 1.
 *
 * **Uniforms.** A 53-bit double in [0, 1) from two main outputs a, b:
 * ((a ≫ 5)·2²⁶ + (b ≫ 6)) / 2⁵³ (unsigned shifts; MATH.md §8.3).
 *
 * **Normals.** The ziggurat method of Marsaglia & Tsang ("The Ziggurat Method for Generating Random
 * Variables", Journal of Statistical Software 5(8), 2000), here with 256 layers (r and v in the
 * constants below). Each draw takes one full 32-bit main output as the signed value h and its layer
 * index i from *separate* bits: one further main output is split into four bytes, each giving one
 * index. Marsaglia & Tsang take the index from the low bits of h itself, which correlates index
 * and value; Doornik ("An Improved Ziggurat Method to Generate Normal Random Samples", Nuffield
 * College working paper, 2005) points this out and draws them independently, as here. The fast
 * path (about 98.5% of draws) is x = h·w_i, accepted when |h| < k_i. Otherwise the draw is
 * finished from the auxiliary generator: the wedge test f_i + U·(f_{i−1} − f_i) < exp(−x²/2)
 * (with a fresh (h, i) on rejection), or for the base layer the tail method of Marsaglia
 * ("Generating a Variable from the Tail of the Normal Distribution", Technometrics 6(1), 1964):
 * repeat ξ = −ln(U₁)/r, y = −ln(U₂) until 2y ≥ ξ², return ±(r + ξ). So the main generator
 * advances by exactly 1.25 outputs per normal. The method was chosen by measurement against the
 * Marsaglia polar and Box–Muller methods on the same generator (bench/RESULTS.md).
 * `normal()` and `fillNormal` produce the same sequence: n calls of `normal()` equal one
 * `fillNormal` of length n, and fills may be split anywhere.
 *
 * @module
 */
import seedrandom from "seedrandom";
import { RecedeError } from "./errors.js";

/** A seedable source of uniform and normal variates. */
export interface Stream {
  /** The seed path this stream was created from (root seed, then fork keys). */
  readonly seed: string;
  /** Uniform double in [0, 1) with 53 random bits. */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
  /** Fill `out[offset .. offset+count)` with independent N(0, 1) draws; returns `out`. */
  fillNormal(out: Float64Array, offset: number, count: number): Float64Array;
  /** Fill `out[offset .. offset+count)` with uniforms in [0, 1); returns `out`. */
  fillUniform(out: Float64Array, offset: number, count: number): Float64Array;
  /** An independent stream keyed by the integer `key`, derived from this stream's seed path. */
  fork(key: number): Stream;
  /** Generator state, for snapshot/restore (a plain, JSON-serializable record). */
  getState(): StreamState;
  /** Restore a state captured by {@link Stream.getState} on a stream with the same seed. */
  setState(state: StreamState): void;
}

/**
 * Serializable state of a {@link Stream}: the seed path and the generator record
 * `{ s: [s0, s1, s2, s3], aux: [a0, a1, a2, a3], bits, nbits }` — main and auxiliary xoshiro128**
 * words as signed 32-bit integers, the unused ziggurat layer-index bytes of the last index word
 * and how many remain (0–4). A plain JSON-serializable record.
 */
export interface StreamState {
  readonly seed: string;
  readonly prng: object;
}

/** Number of ziggurat layers. */
const LAYERS = 256;
/**
 * Right edge r of the base layer and common layer area v for 256 layers under f(x) = exp(−x²/2),
 * solved with SciPy by scripts/reference/core_rng.py (which also reproduces Marsaglia & Tsang's
 * published 128-layer constants); checked in rng.ref.test.ts.
 */
const ZIG_R = 3.654152885361009;
const ZIG_V = 0.004928673233974658;
const INV_R = 1 / ZIG_R;
const TWO_POW_31 = 2147483648;
const TWO_POW_M32 = 2 ** -32;
const TWO_POW_M53 = 2 ** -53;
const TWO_POW_26 = 67108864;

/**
 * The ziggurat's parameters, exported for the reference tests (not part of the package's public
 * barrel).
 * @internal
 */
export const ZIGGURAT: { readonly layers: number; readonly r: number; readonly v: number } = {
  layers: LAYERS,
  r: ZIG_R,
  v: ZIG_V,
};

/** Fast-path bounds: layer i accepts h with |h| < ZIG_K[i]. */
const ZIG_K = new Int32Array(LAYERS);
/** Scale: x = h · ZIG_W[i]. */
const ZIG_W = new Float64Array(LAYERS);
/** f(x_i) = exp(−x_i²/2) at the layer edges; ZIG_F[0] = f(0) = 1. */
const ZIG_F = new Float64Array(LAYERS);

/**
 * Build the tables. Layer edges r = x₂₅₅ > x₂₅₄ > … > x₁ > x₀ = 0 satisfy
 * x_{i+1}·(f(x_i) − f(x_{i+1})) = v (equal areas). Layer i ≥ 1 is the box of width x_i between
 * heights f(x_i) and f(x_{i−1}); its part |x| < x_{i−1} lies under the curve. Layer 0 is the base
 * box [0, r]×[0, f(r)] plus the tail, drawn as a box of width q = v/f(r).
 */
function buildZigguratTables(): void {
  const q = ZIG_V / Math.exp(-0.5 * ZIG_R * ZIG_R);
  ZIG_K[0] = Math.floor((ZIG_R / q) * TWO_POW_31);
  ZIG_K[1] = 0;
  ZIG_W[0] = q / TWO_POW_31;
  ZIG_W[LAYERS - 1] = ZIG_R / TWO_POW_31;
  ZIG_F[0] = 1;
  ZIG_F[LAYERS - 1] = Math.exp(-0.5 * ZIG_R * ZIG_R);
  let upper = ZIG_R;
  for (let i = LAYERS - 2; i >= 1; i--) {
    const x = Math.sqrt(-2 * Math.log(ZIG_V / upper + Math.exp(-0.5 * upper * upper)));
    ZIG_K[i + 1] = Math.floor((x / upper) * TWO_POW_31);
    ZIG_W[i] = x / TWO_POW_31;
    ZIG_F[i] = Math.exp(-0.5 * x * x);
    upper = x;
  }
}
buildZigguratTables();

/**
 * Layout of the generator record (one Int32Array, so every word stays an untagged int32):
 * main xoshiro128** words, the layer-index reservoir and its count, the auxiliary xoshiro128**
 * words used only by the ziggurat's rare slow path, then scratch words (not part of the state):
 * the last generator output, and the value and layer of a draw handed to the slow path.
 * Helpers pass int32 values through these words rather than as arguments or return values: a
 * value crossing a call V8 does not inline must be tagged, and an int32 outside the small-integer
 * range (±2³⁰ where pointers are compressed, as in browsers) or a double is then allocated on
 * the heap. `pnpm bench alloc` traced 11 bytes per control step to the slow path's returned
 * uniform before this layout.
 */
const S0 = 0;
const S1 = 1;
const S2 = 2;
const S3 = 3;
const BITS = 4;
const NBITS = 5;
const A0 = 6;
const A1 = 7;
const A2 = 8;
const A3 = 9;
const OUT = 10;
const SLOW_H = 11;
const SLOW_I = 12;
const STATE_WORDS = 13;

class XoshiroStream implements Stream {
  readonly seed: string;
  private readonly st: Int32Array = new Int32Array(STATE_WORDS);
  /** One-element scratch for `normal()`'s slow path. */
  private readonly one: Float64Array = new Float64Array(1);

  constructor(seed: string) {
    this.seed = seed;
    const alea = (seedrandom.alea as unknown as (s: string) => { int32(): number })(seed);
    const st = this.st;
    for (const w of [S0, S1, S2, S3, A0, A1, A2, A3]) st[w] = alea.int32();
    // The all-zero state is the one fixed point of xoshiro; four zero Alea words have
    // probability 2⁻¹²⁸, but the guard costs nothing.
    if ((st[S0] | st[S1] | st[S2] | st[S3]) === 0) st[S0] = 1;
    if ((st[A0] | st[A1] | st[A2] | st[A3]) === 0) st[A0] = 1;
  }

  /** Advance the generator whose words start at `w` (S0 or A0); its output (signed) → st[OUT]. */
  private next32(w: number): void {
    const st = this.st;
    let s0 = st[w];
    let s1 = st[w + 1];
    let s2 = st[w + 2];
    let s3 = st[w + 3];
    let r = Math.imul(s1, 5);
    r = Math.imul((r << 7) | (r >>> 25), 9);
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    st[w] = s0;
    st[w + 1] = s1;
    st[w + 2] = s2;
    st[w + 3] = s3;
    st[OUT] = r;
  }

  /**
   * Finish a ziggurat draw whose fast-path test failed for value h = st[SLOW_H] in layer
   * i = st[SLOW_I], writing the normal to `out[j]`. Draws only from the auxiliary generator, so the
   * main generator advances by exactly 1.25 words per normal whatever happens here. Its uniforms
   * on (0, 1) are (u + ½)·2⁻³² from one auxiliary output u. It writes instead of returning, and
   * reads h and i from the record instead of arguments (see the layout notes above).
   */
  private normalSlow(out: Float64Array, j: number): void {
    const st = this.st;
    let h = st[SLOW_H];
    let i = st[SLOW_I];
    for (;;) {
      if (i === 0) {
        let xi = 0;
        let y = 0;
        do {
          this.next32(A0);
          xi = -Math.log(((st[OUT] >>> 0) + 0.5) * TWO_POW_M32) * INV_R;
          this.next32(A0);
          y = -Math.log(((st[OUT] >>> 0) + 0.5) * TWO_POW_M32);
        } while (y + y < xi * xi);
        out[j] = h > 0 ? ZIG_R + xi : -ZIG_R - xi;
        return;
      }
      const x = h * ZIG_W[i];
      const fi = ZIG_F[i];
      this.next32(A0);
      const u = ((st[OUT] >>> 0) + 0.5) * TWO_POW_M32;
      if (fi + u * (ZIG_F[i - 1] - fi) < Math.exp(-0.5 * x * x)) {
        out[j] = x;
        return;
      }
      this.next32(A0);
      h = st[OUT];
      this.next32(A0);
      i = st[OUT] & 255;
      const k = ZIG_K[i];
      if (h < k && h > -k) {
        out[j] = h * ZIG_W[i];
        return;
      }
    }
  }

  uniform(): number {
    const st = this.st;
    this.next32(S0);
    const a = st[OUT] >>> 5;
    this.next32(S0);
    const b = st[OUT] >>> 6;
    return (a * TWO_POW_26 + b) * TWO_POW_M53;
  }

  normal(): number {
    const st = this.st;
    this.next32(S0);
    const h = st[OUT];
    if (st[NBITS] === 0) {
      this.next32(S0);
      st[BITS] = st[OUT];
      st[NBITS] = 4;
    }
    const bits = st[BITS];
    const i = bits & 255;
    st[BITS] = bits >> 8;
    st[NBITS]--;
    const k = ZIG_K[i];
    if (h < k && h > -k) return h * ZIG_W[i];
    const one = this.one;
    st[SLOW_H] = h;
    st[SLOW_I] = i;
    this.normalSlow(one, 0);
    return one[0];
  }

  fillNormal(out: Float64Array, offset: number, count: number): Float64Array {
    // The main generator is inlined on locals: this loop is the sampling hot path of MPPI
    // (K·H·m draws per control step). The rare slow path uses only the auxiliary generator,
    // so nothing needs to be synced around the call.
    const st = this.st;
    let s0 = st[S0];
    let s1 = st[S1];
    let s2 = st[S2];
    let s3 = st[S3];
    let bits = st[BITS];
    let nbits = st[NBITS];
    const end = offset + count;
    for (let j = offset; j < end; j++) {
      let r = Math.imul(s1, 5);
      r = Math.imul((r << 7) | (r >>> 25), 9);
      let t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = (s3 << 11) | (s3 >>> 21);
      const h = r;
      if (nbits === 0) {
        r = Math.imul(s1, 5);
        r = Math.imul((r << 7) | (r >>> 25), 9);
        t = s1 << 9;
        s2 ^= s0;
        s3 ^= s1;
        s1 ^= s2;
        s0 ^= s3;
        s2 ^= t;
        s3 = (s3 << 11) | (s3 >>> 21);
        bits = r;
        nbits = 4;
      }
      const i = bits & 255;
      bits >>= 8;
      nbits--;
      const k = ZIG_K[i];
      if (h < k && h > -k) out[j] = h * ZIG_W[i];
      else {
        st[SLOW_H] = h;
        st[SLOW_I] = i;
        this.normalSlow(out, j);
      }
    }
    st[S0] = s0;
    st[S1] = s1;
    st[S2] = s2;
    st[S3] = s3;
    st[BITS] = bits;
    st[NBITS] = nbits;
    return out;
  }

  fillUniform(out: Float64Array, offset: number, count: number): Float64Array {
    const st = this.st;
    let s0 = st[S0];
    let s1 = st[S1];
    let s2 = st[S2];
    let s3 = st[S3];
    const end = offset + count;
    for (let j = offset; j < end; j++) {
      let r = Math.imul(s1, 5);
      r = Math.imul((r << 7) | (r >>> 25), 9);
      let t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = (s3 << 11) | (s3 >>> 21);
      const a = r >>> 5;
      r = Math.imul(s1, 5);
      r = Math.imul((r << 7) | (r >>> 25), 9);
      t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = (s3 << 11) | (s3 >>> 21);
      out[j] = (a * TWO_POW_26 + (r >>> 6)) * TWO_POW_M53;
    }
    st[S0] = s0;
    st[S1] = s1;
    st[S2] = s2;
    st[S3] = s3;
    return out;
  }

  fork(key: number): Stream {
    if (!Number.isInteger(key) || key < 0) {
      throw new RecedeError("range", "Stream.fork", "key", "an integer >= 0", key);
    }
    return new XoshiroStream(`${this.seed}/${key}`);
  }

  getState(): StreamState {
    const st = this.st;
    return {
      seed: this.seed,
      prng: {
        s: [st[S0], st[S1], st[S2], st[S3]],
        aux: [st[A0], st[A1], st[A2], st[A3]],
        bits: st[BITS],
        nbits: st[NBITS],
      },
    };
  }

  setState(state: StreamState): void {
    const fn = "Stream.setState";
    if (typeof state !== "object" || state === null) {
      throw new RecedeError("type", fn, "state", "a StreamState object", state);
    }
    if (state.seed !== this.seed) {
      throw new RecedeError("state", fn, "state.seed", JSON.stringify(this.seed), state.seed);
    }
    const p = state.prng as Record<string, unknown> | null | undefined;
    const isInt32 = (v: unknown): v is number => typeof v === "number" && (v | 0) === v;
    const words = (name: "s" | "aux"): number[] => {
      const w = p?.[name];
      if (!Array.isArray(w) || w.length !== 4 || !w.every(isInt32)) {
        throw new RecedeError("type", fn, `state.prng.${name}`, "an array of four int32 words", w);
      }
      if ((w[0] | w[1] | w[2] | w[3]) === 0) {
        throw new RecedeError("domain", fn, `state.prng.${name}`, "not all zero", w);
      }
      return w;
    };
    const s = words("s");
    const aux = words("aux");
    const nbits = p?.nbits;
    if (!isInt32(nbits) || nbits < 0 || nbits > 4) {
      throw new RecedeError("range", fn, "state.prng.nbits", "an integer in [0, 4]", nbits);
    }
    const bits = p?.bits;
    if (!isInt32(bits)) {
      throw new RecedeError("type", fn, "state.prng.bits", "an int32", bits);
    }
    const st = this.st;
    st.set(s, S0);
    st[BITS] = bits;
    st[NBITS] = nbits;
    st.set(aux, A0);
  }
}

/**
 * Run every statement of the hot paths once on a throwaway stream, at module load. V8 compiles a
 * long first `fillNormal` call while it is still inside its loop (on-stack replacement); code
 * after the loop that has never run has no type feedback and compiles to a deoptimization, which
 * then fires at the end of every call and left the fill about twice as slow in some processes
 * (measured: 8.5 instead of 4.4 ns per normal). Short calls here give every site its feedback
 * first, including both branches of the slow path. Draws of user streams are unaffected.
 */
function warmUp(): void {
  const s = new XoshiroStream("recede/rng/warm-up");
  const buf = new Float64Array(64);
  for (let r = 0; r < 4; r++) {
    s.fillNormal(buf, 0, 64);
    s.fillUniform(buf, 0, 64);
    s.normal();
    s.uniform();
  }
  const slow = s as unknown as {
    st: Int32Array;
    normalSlow(out: Float64Array, j: number): void;
  };
  const cases = [2147483647, 0, -2147483647, 0, 2147483647, 7, -2147483647, 200]; // tail, wedge
  for (let c = 0; c < 4; c++) {
    slow.st[SLOW_H] = cases[2 * c];
    slow.st[SLOW_I] = cases[2 * c + 1];
    slow.normalSlow(buf, c);
  }
}
warmUp();

/**
 * Create a seeded stream (xoshiro128** seeded through `seedrandom`; ziggurat normals — see the
 * module notes for the formulas and sources).
 *
 * @param seed - an integer or a string; the same seed always gives the same draws.
 * @example
 * ```ts
 * const s = createStream(42);
 * const buf = new Float64Array(8);
 * s.fillNormal(buf, 0, 8);
 * const child = s.fork(3); // same draws whenever it is created
 * ```
 */
export function createStream(seed: number | string): Stream {
  if (typeof seed === "number" && !Number.isFinite(seed)) {
    throw new RecedeError(
      "non-finite",
      "createStream",
      "seed",
      "a finite number or a string",
      seed,
    );
  }
  if (typeof seed !== "number" && typeof seed !== "string") {
    throw new RecedeError("type", "createStream", "seed", "a number or a string", seed);
  }
  return new XoshiroStream(String(seed));
}
