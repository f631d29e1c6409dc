/**
 * Helpers to build and run the hand-written C reference of one MPPI control step
 * (bench/native/mppi.c) and the libm timing program (bench/native/libm.c) from the benchmark
 * suites.
 *
 * `buildNative()` compiles the C with `gcc -O2 -ffp-contract=off` into bench/native/build/
 * (gitignored) when a compiler is present, and otherwise returns a clear reason to skip.
 * `-ffp-contract=off` keeps a*b+c as two roundings, as in JavaScript, so the C and TypeScript
 * steps compute the same numbers (it does not change speed on the default x86-64 target, which
 * has no FMA). `runNative()` feeds it a configuration on stdin and parses the JSON it prints.
 *
 * @module
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, statSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { createStream } from "@recede/core";

/** bench/native/ (sources). */
export const nativeSourceDir: string = fileURLToPath(new URL("../native/", import.meta.url));
/** bench/native/build/ (compiled binaries; gitignored). */
export const nativeBuildDir: string = fileURLToPath(new URL("../native/build/", import.meta.url));

/** Result of {@link buildNative}: the MPPI reference and the libm timing program. */
export type NativeBuild =
  | {
      readonly ok: true;
      /** bench/native/build/mppi */
      readonly binary: string;
      /** bench/native/build/libm */
      readonly libmBinary: string;
      readonly compiler: string;
      readonly flags: string;
    }
  | { readonly ok: false; readonly reason: string };

const FLAGS = ["-O2", "-ffp-contract=off"];

/**
 * Compile bench/native/mppi.c and bench/native/libm.c (each only if its binary is missing or older
 * than its sources). Never throws: a missing compiler or a failed build is returned as
 * `{ ok: false, reason }`.
 */
export function buildNative(): NativeBuild {
  const cc = process.env.CC ?? "gcc";
  const probe = spawnSync(cc, ["--version"], { encoding: "utf8" });
  if (probe.error || probe.status !== 0) {
    return {
      ok: false,
      reason: `no C compiler: \`${cc} --version\` failed (${probe.error?.message ?? `exit ${probe.status}`}); install gcc or set CC to run the native comparison`,
    };
  }
  const compiler = probe.stdout.split("\n")[0].trim();
  const programs: [string, string[]][] = [
    ["mppi", ["mppi.c", "rng.h"]],
    ["libm", ["libm.c"]],
  ];
  for (const [name, files] of programs) {
    const sources = files.map((f) => `${nativeSourceDir}${f}`);
    for (const s of sources) {
      if (!existsSync(s)) return { ok: false, reason: `native source missing: ${s}` };
    }
    const binary = `${nativeBuildDir}${name}`;
    const newest = Math.max(...sources.map((s) => statSync(s).mtimeMs));
    if (existsSync(binary) && statSync(binary).mtimeMs >= newest) continue;
    mkdirSync(nativeBuildDir, { recursive: true });
    const r = spawnSync(cc, [...FLAGS, "-o", binary, sources[0], "-lm"], { encoding: "utf8" });
    if (r.error || r.status !== 0) {
      return {
        ok: false,
        reason: `${cc} failed to build bench/native/${files[0]}: ${r.error?.message ?? r.stderr.trim()}`,
      };
    }
  }
  return {
    ok: true,
    binary: `${nativeBuildDir}mppi`,
    libmBinary: `${nativeBuildDir}libm`,
    compiler,
    flags: FLAGS.join(" "),
  };
}

/** Nanoseconds per call of sin, cos, tan, atan, exp, log in the C library (best of `reps`). */
export function runLibm(binary: string, calls: number, reps: number): Record<string, number> {
  const r = spawnSync(binary, [String(calls), String(reps)], { encoding: "utf8" });
  if (r.error || r.status !== 0) {
    throw new Error(`native libm timing failed: ${r.error?.message ?? r.stderr.trim()}`);
  }
  return JSON.parse(r.stdout) as Record<string, number>;
}

/** Model ids understood by mppi.c. */
export type NativeModel = "cart-pole" | "bicycle";

/** One native run: an MPPI controller in closed loop on its own model. */
export interface NativeRunConfig {
  readonly model: NativeModel;
  /** K. */
  readonly samples: number;
  /** H. */
  readonly horizon: number;
  /** Samples per random-stream slice (the library's `sliceSize`). */
  readonly sliceSize: number;
  /** Untimed steps before the timed ones. */
  readonly warmup: number;
  /** Timed steps. */
  readonly steps: number;
  /** Time each phase of the step in CPU time (a few clock reads per slice); default false. */
  readonly phases?: boolean;
  /** Model parameters in mppi.c's order (see the comments there). */
  readonly params: readonly number[];
  /** Start state (n). */
  readonly state: ArrayLike<number>;
  /** Initial (and nominal) plan, H·m. */
  readonly mean: ArrayLike<number>;
  /** Noise standard deviation, H·m. */
  readonly std: ArrayLike<number>;
  readonly lower: ArrayLike<number>;
  readonly upper: ArrayLike<number>;
  /** λ. */
  readonly temperature: number;
  /** Root seed: slice s draws from `createStream(seed).fork(s)`, as in @recede/mpc. */
  readonly seed: number | string;
}

/** What mppi.c prints. */
export interface NativeRunResult {
  readonly steps: number;
  readonly seconds: number;
  /** Timed steps per wall-clock second. */
  readonly steps_per_s: number;
  /** Timed steps per second of process CPU time. */
  readonly steps_per_cpu_s: number;
  /** State after warmup + steps closed-loop steps. */
  readonly state: number[];
  /** Plan after the last step (after the shift). */
  readonly plan: number[];
  /**
   * With `phases`: thread CPU seconds of the timed steps spent in normals, μ + σz, clip, rollout,
   * and weights + mean update + shift.
   */
  readonly phase_seconds?: number[];
}

/**
 * The ziggurat tables of @recede/core's streams, recomputed with the same formulas and constants
 * as packages/core/src/rng.ts (so V8 gives the same bits); mppi.c reads them from its input.
 */
export function zigguratTables(): { r: number; k: Int32Array; w: Float64Array; f: Float64Array } {
  const layers = 256;
  const r = 3.654152885361009;
  const v = 0.004928673233974658;
  const two31 = 2147483648;
  const k = new Int32Array(layers);
  const w = new Float64Array(layers);
  const f = new Float64Array(layers);
  const q = v / Math.exp(-0.5 * r * r);
  k[0] = Math.floor((r / q) * two31);
  k[1] = 0;
  w[0] = q / two31;
  w[layers - 1] = r / two31;
  f[0] = 1;
  f[layers - 1] = Math.exp(-0.5 * r * r);
  let upper = r;
  for (let i = layers - 2; i >= 1; i--) {
    const x = Math.sqrt(-2 * Math.log(v / upper + Math.exp(-0.5 * upper * upper)));
    k[i + 1] = Math.floor((x / upper) * two31);
    w[i] = x / two31;
    f[i] = Math.exp(-0.5 * x * x);
    upper = x;
  }
  return { r, k, w, f };
}

const num = (x: number): string => x.toPrecision(17);

/** The stdin text mppi.c expects for `cfg`. */
export function nativeInput(cfg: NativeRunConfig): string {
  const slices = Math.ceil(cfg.samples / cfg.sliceSize);
  const root = createStream(cfg.seed);
  const words: number[] = [];
  for (let s = 0; s < slices; s++) {
    const st = root.fork(s).getState().prng as {
      s: number[];
      aux: number[];
      bits: number;
      nbits: number;
    };
    words.push(...st.s, st.bits, st.nbits, ...st.aux);
  }
  const z = zigguratTables();
  const lines = [
    [
      cfg.model === "cart-pole" ? 0 : 1,
      cfg.samples,
      cfg.horizon,
      cfg.sliceSize,
      cfg.warmup,
      cfg.steps,
      cfg.phases ? 1 : 0,
    ].join(" "),
    [cfg.params.length, ...cfg.params.map(num)].join(" "),
    Array.from(cfg.state, num).join(" "),
    Array.from(cfg.mean, num).join(" "),
    Array.from(cfg.std, num).join(" "),
    Array.from(cfg.lower, num).join(" "),
    Array.from(cfg.upper, num).join(" "),
    num(cfg.temperature),
    [slices, ...words].join(" "),
    num(z.r),
    Array.from(z.k).join(" "),
    Array.from(z.w, num).join(" "),
    Array.from(z.f, num).join(" "),
  ];
  return `${lines.join("\n")}\n`;
}

/** Run the compiled reference once; throws with mppi.c's message if it fails. */
export function runNative(binary: string, cfg: NativeRunConfig): NativeRunResult {
  const r = spawnSync(binary, [], { input: nativeInput(cfg), encoding: "utf8" });
  if (r.error || r.status !== 0) {
    throw new Error(`native mppi failed: ${r.error?.message ?? r.stderr.trim()}`);
  }
  return JSON.parse(r.stdout) as NativeRunResult;
}
