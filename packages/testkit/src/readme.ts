/**
 * Run the code samples of a README as tests, so the documentation cannot rot.
 *
 * A sample is a fenced block opened with three backticks and `ts`. Its `import { … } from "…"`
 * statements are removed and the imported names are bound to the module records the test passes
 * in (so a sample may only use the packages the test provides, and every name it imports must
 * exist there); the rest runs as the body of an async function. Samples must therefore be plain
 * JavaScript apart from their imports (no type annotations). What the sample declares at top
 * level with `const` or `let` is returned, so a test can assert on it. See {@link prepareSnippet}.
 *
 * @module
 */

/** One code sample of a README. */
export interface ReadmeSnippet {
  /** 1-based line of the opening fence, for messages. */
  readonly line: number;
  /** The sample without its import statements. */
  readonly body: string;
  /** Imported bindings: [module specifier, exported name, local name]. */
  readonly imports: readonly (readonly [string, string, string])[];
  /** Names declared at top level with `const` / `let` (returned by the compiled sample). */
  readonly declared: readonly string[];
}

const FENCE = /^```ts[ \t]*\n([\s\S]*?)^```[ \t]*$/gm;
const IMPORT = /^import\s*\{([^}]*)\}\s*from\s*"([^"]+)";[ \t]*\n?/gm;
const DECLARED = /^(?:const|let)\s+(?:([A-Za-z_$][\w$]*)|\{([^}]*)\})/gm;

/** The `ts` code samples of a Markdown text, in order. */
export function readmeSnippets(markdown: string): ReadmeSnippet[] {
  const out: ReadmeSnippet[] = [];
  for (let m = FENCE.exec(markdown); m !== null; m = FENCE.exec(markdown)) {
    const line = markdown.slice(0, m.index).split("\n").length;
    const imports: [string, string, string][] = [];
    const body = m[1].replace(IMPORT, (_all, names: string, from: string) => {
      for (const raw of names.split(",")) {
        const name = raw.trim();
        if (name === "" || name.startsWith("type ")) continue;
        const [exported, local] = name.split(/\s+as\s+/);
        imports.push([from, exported, local ?? exported]);
      }
      return "";
    });
    const declared: string[] = [];
    for (let d = DECLARED.exec(body); d !== null; d = DECLARED.exec(body)) {
      if (d[1] !== undefined) declared.push(d[1]);
      else for (const part of d[2].split(",")) declared.push(part.split(":").pop()?.trim() ?? "");
    }
    out.push({ line, body, imports, declared: declared.filter((n) => n !== "") });
  }
  return out;
}

/** A sample ready to compile: parameter names, their values, and the function body. */
export interface PreparedSnippet {
  readonly params: readonly string[];
  readonly values: readonly unknown[];
  readonly source: string;
}

/**
 * Bind a sample's imports to `modules[specifier][name]` and put `context` names (for samples that
 * continue an earlier one) in scope. The test compiles `source` as the body of an async function
 * of `params` and calls it with `values`; it resolves to the sample's top-level declarations.
 * {@link runSnippet} does both steps. Throws if the sample imports a module or a name that is not
 * provided.
 */
export function prepareSnippet(
  snippet: ReadmeSnippet,
  modules: Readonly<Record<string, Readonly<Record<string, unknown>>>>,
  context: Readonly<Record<string, unknown>> = {},
): PreparedSnippet {
  const params: string[] = [];
  const values: unknown[] = [];
  for (const [from, exported, local] of snippet.imports) {
    const mod = modules[from];
    if (mod === undefined) {
      throw new Error(`README sample at line ${snippet.line} imports "${from}", not provided`);
    }
    if (!(exported in mod)) {
      throw new Error(`README sample at line ${snippet.line}: "${from}" has no export ${exported}`);
    }
    params.push(local);
    values.push(mod[exported]);
  }
  for (const [k, v] of Object.entries(context)) {
    params.push(k);
    values.push(v);
  }
  return { params, values, source: `${snippet.body}\nreturn { ${snippet.declared.join(", ")} };` };
}

const AsyncFunction = Object.getPrototypeOf(async () => {}).constructor as new (
  ...params: string[]
) => (...values: unknown[]) => Promise<Record<string, unknown>>;

/**
 * Compile and run a sample (see {@link prepareSnippet}); resolves to its top-level declarations.
 * This compiles code at run time, which is why it lives here, in the private test kit that no
 * published package imports, and never in library code.
 */
export function runSnippet(
  snippet: ReadmeSnippet,
  modules: Readonly<Record<string, Readonly<Record<string, unknown>>>>,
  context: Readonly<Record<string, unknown>> = {},
): Promise<Record<string, unknown>> {
  const p = prepareSnippet(snippet, modules, context);
  return new AsyncFunction(...p.params, p.source)(...p.values);
}
