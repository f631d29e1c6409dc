/**
 * The sweep file ("sweep spec"): problems × optimizer configurations × seeds × episodes, as JSON.
 *
 * ```json
 * {
 *   "name": "swing-up",
 *   "problems": [{ "problem": "pendulum", "steps": 100 }],
 *   "optimizers": [
 *     { "label": "mppi-256", "kind": "mppi", "samples": 256, "horizon": 30 },
 *     { "label": "cem-256", "kind": "cem", "samples": 256, "horizon": 30 }
 *   ],
 *   "seeds": { "first": 1, "count": 8 },
 *   "episodes": 1
 * }
 * ```
 *
 * {@link parseSweepSpec} validates it against the registry and throws a {@link SpecError} whose
 * `path` names the bad field, e.g. `optimizers[2].samples: must be an integer ≥ 1 (got 0.5)`.
 *
 * @module
 */
import { closest, type ParamValues, SpecError, show, validateParams } from "./params.js";
import type { Registry } from "./registry.js";

/** One validated problem entry. */
export interface ProblemEntry {
  /** Label used in results and charts (defaults to the problem id). */
  readonly label: string;
  /** Registry id. */
  readonly problem: string;
  /** Validated parameters (defaults filled in). */
  readonly params: ParamValues;
}

/** One validated optimizer entry. */
export interface OptimizerEntry {
  /** Label used in results and charts; unique within the sweep. */
  readonly label: string;
  /** Registry kind. */
  readonly kind: string;
  /** Validated parameters (defaults filled in). */
  readonly params: ParamValues;
  /** Problem labels this optimizer runs on (all when the file gives none). */
  readonly only: readonly string[] | undefined;
}

/** A validated sweep. */
export interface SweepSpec {
  /** Sweep name, used in reports. */
  readonly name: string;
  readonly problems: readonly ProblemEntry[];
  readonly optimizers: readonly OptimizerEntry[];
  /** Seeds, in file order. */
  readonly seeds: readonly number[];
  /** Episodes per (problem, optimizer, seed). */
  readonly episodes: number;
  /** Plugin modules (paths resolved against the sweep file's folder) that register more kinds. */
  readonly plugins: readonly string[];
}

const TOP = ["name", "problems", "optimizers", "seeds", "episodes", "plugins", "$comment"];

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

function requireLabel(v: unknown, path: string): string {
  if (
    typeof v !== "string" ||
    v.length === 0 ||
    v.length > 60 ||
    v !== v.trim() ||
    v.includes("/") ||
    // biome-ignore lint/suspicious/noControlCharactersInRegex: rejecting control characters is the point
    /[\u0000-\u001f]/.test(v)
  )
    throw new SpecError(
      path,
      `must be a label of 1–60 characters without "/", control characters or surrounding spaces (got ${show(v)})`,
    );
  return v;
}

/**
 * Read the plugin list of a raw sweep object without validating the rest, so plugins can be loaded
 * (and register their kinds) before {@link parseSweepSpec} checks the entries.
 */
export function pluginPaths(raw: unknown): string[] {
  if (!isObject(raw) || raw.plugins === undefined) return [];
  if (!Array.isArray(raw.plugins) || raw.plugins.some((p) => typeof p !== "string"))
    throw new SpecError("plugins", `must be an array of module paths (got ${show(raw.plugins)})`);
  return raw.plugins as string[];
}

/** Validate a parsed JSON sweep file against `registry`. */
export function parseSweepSpec(raw: unknown, registry: Registry): SweepSpec {
  if (!isObject(raw))
    throw new SpecError("(top level)", `must be a JSON object (got ${show(raw)})`);
  for (const key of Object.keys(raw)) {
    if (!TOP.includes(key)) {
      const hint = closest(key, TOP);
      throw new SpecError(key, `unknown field${hint ? ` (did you mean "${hint}"?)` : ""}`);
    }
  }
  const name = raw.name === undefined ? "sweep" : requireLabel(raw.name, "name");
  const plugins = pluginPaths(raw);

  if (!Array.isArray(raw.problems) || raw.problems.length === 0)
    throw new SpecError("problems", `must be a non-empty array (got ${show(raw.problems)})`);
  const problems: ProblemEntry[] = raw.problems.map((p, i) => {
    const path = `problems[${i}]`;
    if (!isObject(p)) throw new SpecError(path, `must be an object (got ${show(p)})`);
    if (typeof p.problem !== "string")
      throw new SpecError(`${path}.problem`, `must be a problem id (got ${show(p.problem)})`);
    const def = registry.problem(p.problem);
    if (!def) {
      const hint = closest(p.problem, registry.problemIds());
      throw new SpecError(
        `${path}.problem`,
        `unknown problem ${show(p.problem)}${hint ? ` (did you mean "${hint}"?)` : ""}; known: ${registry.problemIds().join(", ")}`,
      );
    }
    const label = p.label === undefined ? p.problem : requireLabel(p.label, `${path}.label`);
    const params = validateParams(p, def.params, path, ["problem", "label"]);
    return { label, problem: p.problem, params };
  });
  uniqueLabels(problems, "problems");

  if (!Array.isArray(raw.optimizers) || raw.optimizers.length === 0)
    throw new SpecError("optimizers", `must be a non-empty array (got ${show(raw.optimizers)})`);
  const problemLabels = problems.map((p) => p.label);
  const optimizers: OptimizerEntry[] = raw.optimizers.map((o, i) => {
    const path = `optimizers[${i}]`;
    if (!isObject(o)) throw new SpecError(path, `must be an object (got ${show(o)})`);
    if (typeof o.kind !== "string")
      throw new SpecError(`${path}.kind`, `must be an optimizer kind (got ${show(o.kind)})`);
    const def = registry.optimizer(o.kind);
    if (!def) {
      const hint = closest(o.kind, registry.optimizerKinds());
      throw new SpecError(
        `${path}.kind`,
        `unknown optimizer kind ${show(o.kind)}${hint ? ` (did you mean "${hint}"?)` : ""}; known: ${registry.optimizerKinds().join(", ")}`,
      );
    }
    const label = o.label === undefined ? o.kind : requireLabel(o.label, `${path}.label`);
    let only: string[] | undefined;
    if (o.only !== undefined) {
      if (!Array.isArray(o.only) || o.only.length === 0)
        throw new SpecError(
          `${path}.only`,
          `must be a non-empty array of problem labels (got ${show(o.only)})`,
        );
      only = o.only.map((l, j) => {
        if (typeof l !== "string" || !problemLabels.includes(l))
          throw new SpecError(
            `${path}.only[${j}]`,
            `must be one of the problem labels ${problemLabels.map((x) => `"${x}"`).join(", ")} (got ${show(l)})`,
          );
        return l;
      });
    }
    const params = validateParams(o, def.params, path, ["kind", "label", "only"]);
    return { label, kind: o.kind, params, only };
  });
  uniqueLabels(optimizers, "optimizers");
  // Cross references (e.g. the expert of a distilled policy) must name another entry.
  optimizers.forEach((o, i) => {
    const schema = registry.optimizer(o.kind)!.params;
    for (const [key, s] of Object.entries(schema)) {
      if (s.type !== "optimizer" || o.params[key] === undefined) continue;
      const ref = o.params[key] as string;
      const labels = optimizers.map((x) => x.label).filter((l) => l !== o.label);
      if (!labels.includes(ref))
        throw new SpecError(
          `optimizers[${i}].${key}`,
          `must be the label of another optimizer entry: one of ${labels.map((l) => `"${l}"`).join(", ") || "(none)"} (got ${show(ref)})`,
        );
    }
  });

  let seeds: number[];
  if (Array.isArray(raw.seeds)) {
    if (raw.seeds.length === 0) throw new SpecError("seeds", "must not be empty");
    seeds = raw.seeds.map((s, i) => {
      if (typeof s !== "number" || !Number.isSafeInteger(s) || s < 0)
        throw new SpecError(`seeds[${i}]`, `must be an integer ≥ 0 (got ${show(s)})`);
      return s;
    });
    const dup = seeds.find((s, i) => seeds.indexOf(s) !== i);
    if (dup !== undefined)
      throw new SpecError("seeds", `must not repeat a seed (${dup} appears twice)`);
  } else if (isObject(raw.seeds)) {
    for (const key of Object.keys(raw.seeds))
      if (key !== "first" && key !== "count")
        throw new SpecError(`seeds.${key}`, 'unknown field; seeds takes "first" and "count"');
    const first = raw.seeds.first ?? 1;
    const count = raw.seeds.count;
    if (typeof first !== "number" || !Number.isSafeInteger(first) || first < 0)
      throw new SpecError("seeds.first", `must be an integer ≥ 0 (got ${show(first)})`);
    if (typeof count !== "number" || !Number.isSafeInteger(count) || count < 1)
      throw new SpecError("seeds.count", `must be an integer ≥ 1 (got ${show(count)})`);
    seeds = Array.from({ length: count }, (_, i) => first + i);
  } else {
    throw new SpecError(
      "seeds",
      `must be an array of integers or { "first": …, "count": … } (got ${show(raw.seeds)})`,
    );
  }

  const episodes = raw.episodes ?? 1;
  if (typeof episodes !== "number" || !Number.isSafeInteger(episodes) || episodes < 1)
    throw new SpecError("episodes", `must be an integer ≥ 1 (got ${show(episodes)})`);

  return { name, problems, optimizers, seeds, episodes, plugins };
}

function uniqueLabels(entries: readonly { label: string }[], field: string): void {
  const seen = new Map<string, number>();
  entries.forEach((e, i) => {
    const j = seen.get(e.label);
    if (j !== undefined)
      throw new SpecError(
        `${field}[${i}].label`,
        `must be unique: ${show(e.label)} is already used by ${field}[${j}] (set "label" to tell them apart)`,
      );
    seen.set(e.label, i);
  });
}

/** One run of a sweep: a (problem, optimizer, seed, episode) cell. */
export interface RunCell {
  /** Stable key `problem/optimizer/seed/episode`, the identity used for resume and shards. */
  readonly key: string;
  readonly problem: string;
  readonly optimizer: string;
  readonly seed: number;
  readonly episode: number;
  /**
   * Hash of everything that decides the run's result (entries' kinds and parameters), so a resume
   * after the sweep file changed re-runs the affected cells instead of mixing old and new results.
   */
  readonly config: string;
}

/** FNV-1a 32-bit hash of a string, as 8 hex digits (Fowler, Noll & Vo; common practice). */
export function fnv1a(text: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0).toString(16).padStart(8, "0");
}

/** JSON with object keys sorted, so equal values give equal text. */
export function canonicalJson(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonicalJson).join(",")}]`;
  if (isObject(v))
    return `{${Object.keys(v)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonicalJson(v[k])}`)
      .join(",")}}`;
  return JSON.stringify(v);
}

/**
 * All runs of the sweep in canonical order: problems (file order) × optimizers × seeds × episodes.
 */
export function enumerateRuns(spec: SweepSpec): RunCell[] {
  const runs: RunCell[] = [];
  for (const p of spec.problems) {
    for (const o of spec.optimizers) {
      if (o.only && !o.only.includes(p.label)) continue;
      const config = fnv1a(canonicalJson({ p: p.problem, pp: p.params, o: o.kind, op: o.params }));
      for (const seed of spec.seeds) {
        for (let e = 0; e < spec.episodes; e++) {
          runs.push({
            key: `${p.label}/${o.label}/${seed}/${e}`,
            problem: p.label,
            optimizer: o.label,
            seed,
            episode: e,
            config,
          });
        }
      }
    }
  }
  return runs;
}

/** A shard `index` of `count` (0-based), from `--shard i/n`. */
export interface Shard {
  readonly index: number;
  readonly count: number;
}

/** Parse `"i/n"` with 0 ≤ i < n. */
export function parseShard(text: string): Shard {
  const m = /^(\d+)\/(\d+)$/.exec(text.trim());
  if (!m) throw new SpecError("--shard", `must look like i/n, e.g. 0/4 (got ${show(text)})`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || index >= count)
    throw new SpecError(
      "--shard",
      `needs 0 ≤ i < n (got ${index}/${count}); shards are numbered from 0`,
    );
  return { index, count };
}

/**
 * The runs of one shard: every n-th run of the canonical order starting at i. A run's result does
 * not depend on which shard runs it (each run derives its randomness from its own seed and key).
 */
export function shardRuns(runs: readonly RunCell[], shard: Shard | undefined): RunCell[] {
  if (!shard) return [...runs];
  return runs.filter((_, i) => i % shard.count === shard.index);
}
