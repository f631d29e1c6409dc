/**
 * The shape of a law and the small assertion helpers the suites use (framework-agnostic: a law
 * throws on failure, so any runner can call it — `for (const l of laws) it(l.name, l.check)`).
 *
 * @module
 */

/** One named, runnable property. `check` throws an Error describing the first counterexample. */
export interface Law {
  readonly name: string;
  check(): void;
}

/** fast-check run parameters shared by the suites. */
export interface LawRunOptions {
  /** Number of generated cases per law. @defaultValue 100 */
  readonly numRuns?: number;
  /** fast-check seed, to replay a failure. @defaultValue random */
  readonly seed?: number;
}

/** Throw `message` unless `cond`. */
export function assertThat(cond: boolean, message: string): asserts cond {
  if (!cond) throw new Error(message);
}

/** Throw unless |a − b| ≤ atol + rtol·scale. */
export function assertClose(
  a: number,
  b: number,
  atol: number,
  rtol: number,
  scale: number,
  what: string,
): void {
  const err = Math.abs(a - b);
  if (!(err <= atol + rtol * scale)) {
    throw new Error(`${what}: |${a} − ${b}| = ${err} > ${atol} + ${rtol}·${scale}`);
  }
}

/** True when a and b hold the same doubles bit for bit (−0 ≠ +0; NaN = NaN). */
export function bitEqual(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
}

/** Throw unless every entry of `x` is finite. */
export function assertFinite(x: Float64Array, what: string): void {
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i])) throw new Error(`${what}[${i}] = ${x[i]} is not finite`);
  }
}
