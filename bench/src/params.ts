/**
 * Parameter schemas: how a problem or optimizer kind declares the fields a sweep file may set, and
 * the validator that checks a JSON object against one, with errors that point at the bad field by
 * its path in the file (for example `optimizers[2].samples`).
 *
 * @module
 */

/** One parameter a sweep entry may set. */
export type ParamSchema =
  | {
      readonly type: "number" | "integer";
      readonly description: string;
      /** Inclusive lower bound. */
      readonly min?: number;
      /** Exclusive lower bound. */
      readonly above?: number;
      /** Inclusive upper bound. */
      readonly max?: number;
      readonly default?: number;
    }
  | {
      readonly type: "boolean";
      readonly description: string;
      readonly default?: boolean;
    }
  | {
      readonly type: "string";
      readonly description: string;
      /** The allowed values, when the set is closed. */
      readonly values?: readonly string[];
      readonly default?: string;
    }
  | {
      /** The label of another optimizer entry of the same sweep (checked when the sweep is parsed). */
      readonly type: "optimizer";
      readonly description: string;
      readonly default?: string;
    }
  | {
      readonly type: "numbers";
      readonly description: string;
      /** Required length, when fixed. */
      readonly length?: number;
      /** Exclusive lower bound on every entry. */
      readonly above?: number;
      readonly default?: readonly number[];
    };

/** The parameters of one problem or optimizer kind, by name. */
export type ParamSchemaMap = Readonly<Record<string, ParamSchema>>;

/** Validated parameter values (defaults filled in). */
export type ParamValues = Readonly<Record<string, number | boolean | string | readonly number[]>>;

/** A sweep file that does not follow the format; `path` names the bad field. */
export class SpecError extends Error {
  /** Where in the file, e.g. `optimizers[2].samples`. */
  readonly path: string;
  constructor(path: string, message: string) {
    super(`${path}: ${message}`);
    this.name = "SpecError";
    this.path = path;
  }
}

/** Render a JSON value briefly for an error message. */
export function show(v: unknown): string {
  if (typeof v === "string") return JSON.stringify(v);
  if (Array.isArray(v)) return `an array of length ${v.length}`;
  if (v === null) return "null";
  if (typeof v === "object") return "an object";
  return String(v);
}

/** Closest name by edit distance, for "did you mean" hints (Levenshtein 1966). */
export function closest(name: string, options: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestD = Number.POSITIVE_INFINITY;
  for (const o of options) {
    const d = editDistance(name.toLowerCase(), o.toLowerCase());
    if (d < bestD) {
      bestD = d;
      best = o;
    }
  }
  return bestD <= Math.max(2, Math.floor(name.length / 3)) ? best : undefined;
}

function editDistance(a: string, b: string): number {
  const prev = new Array<number>(b.length + 1);
  for (let j = 0; j <= b.length; j++) prev[j] = j;
  for (let i = 1; i <= a.length; i++) {
    let diag = prev[0];
    prev[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const tmp = prev[j];
      prev[j] = Math.min(prev[j] + 1, prev[j - 1] + 1, diag + (a[i - 1] === b[j - 1] ? 0 : 1));
      diag = tmp;
    }
  }
  return prev[b.length];
}

/**
 * Check `obj`'s fields against `schema` (ignoring the names in `reserved`), fill defaults and
 * return the values. Throws {@link SpecError} naming `path.field` on the first bad field; unknown
 * fields are errors too (with a "did you mean" hint), so a typo never passes silently.
 */
export function validateParams(
  obj: Record<string, unknown>,
  schema: ParamSchemaMap,
  path: string,
  reserved: readonly string[],
): ParamValues {
  const out: Record<string, number | boolean | string | readonly number[]> = {};
  for (const key of Object.keys(obj)) {
    if (reserved.includes(key) || key in schema) continue;
    const hint = closest(key, [...Object.keys(schema), ...reserved]);
    const known = Object.keys(schema).join(", ") || "(none)";
    throw new SpecError(
      `${path}.${key}`,
      `unknown field${hint ? ` (did you mean "${hint}"?)` : ""}; this kind takes: ${known}`,
    );
  }
  for (const [key, s] of Object.entries(schema)) {
    const p = `${path}.${key}`;
    const v = obj[key];
    if (v === undefined) {
      if (s.default !== undefined) out[key] = s.default;
      continue;
    }
    switch (s.type) {
      case "number":
      case "integer": {
        if (typeof v !== "number" || !Number.isFinite(v))
          throw new SpecError(p, `must be a finite number (got ${show(v)})`);
        if (s.type === "integer" && !Number.isInteger(v))
          throw new SpecError(p, `must be an integer (got ${show(v)})`);
        if (s.min !== undefined && v < s.min)
          throw new SpecError(p, `must be ≥ ${s.min} (got ${show(v)})`);
        if (s.above !== undefined && v <= s.above)
          throw new SpecError(p, `must be > ${s.above} (got ${show(v)})`);
        if (s.max !== undefined && v > s.max)
          throw new SpecError(p, `must be ≤ ${s.max} (got ${show(v)})`);
        out[key] = v;
        break;
      }
      case "boolean":
        if (typeof v !== "boolean")
          throw new SpecError(p, `must be true or false (got ${show(v)})`);
        out[key] = v;
        break;
      case "string":
        if (typeof v !== "string") throw new SpecError(p, `must be a string (got ${show(v)})`);
        if (s.values && !s.values.includes(v))
          throw new SpecError(
            p,
            `must be one of ${s.values.map((x) => `"${x}"`).join(", ")} (got ${show(v)})`,
          );
        out[key] = v;
        break;
      case "optimizer":
        if (typeof v !== "string")
          throw new SpecError(p, `must be the label of another optimizer entry (got ${show(v)})`);
        out[key] = v;
        break;
      case "numbers": {
        if (!Array.isArray(v))
          throw new SpecError(p, `must be an array of numbers (got ${show(v)})`);
        if (s.length !== undefined && v.length !== s.length)
          throw new SpecError(p, `must have ${s.length} entries (got ${v.length})`);
        v.forEach((e, i) => {
          if (typeof e !== "number" || !Number.isFinite(e))
            throw new SpecError(`${p}[${i}]`, `must be a finite number (got ${show(e)})`);
          if (s.above !== undefined && e <= s.above)
            throw new SpecError(`${p}[${i}]`, `must be > ${s.above} (got ${show(e)})`);
        });
        out[key] = v as number[];
        break;
      }
    }
  }
  return out;
}
