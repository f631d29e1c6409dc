/**
 * Seeded random streams built on `seedrandom` (Alea generator).
 *
 * A {@link Stream} draws uniforms and standard normals and fills Float64Array ranges. Streams are
 * reproducible: the same seed gives bit-identical draws. {@link Stream.fork} derives an independent
 * child stream from the *root seed* and an integer key (not from the parent's current state), so
 * children do not depend on the order in which they are created or on how much the parent has drawn.
 * Parallel slices of a batch use `fork(sliceIndex)` so results do not depend on the worker count.
 *
 * Normals use the Marsaglia polar method (Marsaglia & Bray, "A Convenient Method for Generating
 * Normal Variables", SIAM Review, 1964), which needs no trigonometric calls.
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
  /** Opaque generator state, for snapshot/restore. */
  getState(): StreamState;
  /** Restore a state captured by {@link Stream.getState} on a stream with the same seed. */
  setState(state: StreamState): void;
}

/** Serializable state of a {@link Stream}. */
export interface StreamState {
  readonly seed: string;
  readonly prng: object;
  readonly spare: number;
  readonly hasSpare: boolean;
}

interface AleaPrng {
  (): number;
  double(): number;
  int32(): number;
  state(): object;
}

class AleaStream implements Stream {
  readonly seed: string;
  private prng: AleaPrng;
  private spare = 0;
  private hasSpare = false;

  constructor(seed: string, state?: object) {
    this.seed = seed;
    this.prng = (
      seedrandom.alea as unknown as (s: string, o: { state: boolean | object }) => AleaPrng
    )(seed, { state: state ?? true });
  }

  uniform(): number {
    return this.prng.double();
  }

  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    const p = this.prng;
    let u = 0;
    let v = 0;
    let s = 0;
    do {
      u = 2 * p() - 1;
      v = 2 * p() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * f;
    this.hasSpare = true;
    return u * f;
  }

  fillNormal(out: Float64Array, offset: number, count: number): Float64Array {
    const end = offset + count;
    let i = offset;
    if (this.hasSpare && i < end) {
      out[i++] = this.spare;
      this.hasSpare = false;
    }
    const p = this.prng;
    while (i < end) {
      let u = 0;
      let v = 0;
      let s = 0;
      do {
        u = 2 * p() - 1;
        v = 2 * p() - 1;
        s = u * u + v * v;
      } while (s >= 1 || s === 0);
      const f = Math.sqrt((-2 * Math.log(s)) / s);
      out[i++] = u * f;
      if (i < end) out[i++] = v * f;
      else {
        this.spare = v * f;
        this.hasSpare = true;
      }
    }
    return out;
  }

  fillUniform(out: Float64Array, offset: number, count: number): Float64Array {
    const p = this.prng;
    const end = offset + count;
    for (let i = offset; i < end; i++) out[i] = p.double();
    return out;
  }

  fork(key: number): Stream {
    if (!Number.isInteger(key) || key < 0) {
      throw new RecedeError("range", "Stream.fork", "key", "an integer >= 0", key);
    }
    return new AleaStream(`${this.seed}/${key}`);
  }

  getState(): StreamState {
    return { seed: this.seed, prng: this.prng.state(), spare: this.spare, hasSpare: this.hasSpare };
  }

  setState(state: StreamState): void {
    if (state.seed !== this.seed) {
      throw new RecedeError(
        "state",
        "Stream.setState",
        "state.seed",
        JSON.stringify(this.seed),
        state.seed,
      );
    }
    this.prng = (
      seedrandom.alea as unknown as (s: string, o: { state: boolean | object }) => AleaPrng
    )(this.seed, { state: state.prng });
    this.spare = state.spare;
    this.hasSpare = state.hasSpare;
  }
}

/**
 * Create a seeded stream.
 *
 * @param seed - an integer or a string; the same seed always gives the same draws.
 * @example
 * ```ts
 * const s = createStream(42);
 * const buf = new Float64Array(8);
 * s.fillNormal(buf, 0, 8);
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
  return new AleaStream(String(seed));
}
