/**
 * The benchmark-suite contract. Each suite lives in `bench/src/suites/<name>.ts` and exports
 * `suite: Suite`. `pnpm bench <name>` loads it, runs it, writes the returned `result` object to
 * `bench/results/<name>.json` and prints one line per entry of `lines`.
 *
 * Suites measure; they never assert. Speed and memory targets live here, not in unit tests.
 *
 * @module
 */

/** What the CLI passes to a suite. */
export interface SuiteContext {
  /** `--quick`: a reduced setting (fewer repetitions / seeds) for smoke runs in CI. */
  readonly quick: boolean;
  /** Print a progress line (to stderr). */
  log(message: string): void;
}

/** What a suite returns. */
export interface SuiteOutput {
  /** Written verbatim as JSON to bench/results/<name>.json (plus a `meta` block the CLI adds). */
  readonly result: Record<string, unknown>;
  /** One line per figure, printed to the terminal. */
  readonly lines: readonly string[];
}

/** A benchmark suite. */
export interface Suite {
  readonly name: string;
  readonly description: string;
  run(ctx: SuiteContext): Promise<SuiteOutput>;
}
