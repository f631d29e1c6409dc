/**
 * Helper for typed-error tests: run `f`, require that it throws a RecedeError, and check the
 * fields and message (function, argument, expected, given) when asked.
 *
 * @module
 */
import { RecedeError, type RecedeErrorCode } from "@recede/core";

/** What a typed error must say. Each field is optional; the message must contain fn and arg. */
export interface ExpectedError {
  readonly code?: RecedeErrorCode;
  readonly fn?: string;
  readonly arg?: string;
  /** A fragment the message must contain (e.g. the given value). */
  readonly message?: string | RegExp;
}

/** Run `f`, require a {@link RecedeError} matching `expected`, and return it. */
export function catchRecedeError(f: () => unknown, expected: ExpectedError = {}): RecedeError {
  let err: unknown;
  try {
    f();
  } catch (e) {
    err = e;
  }
  if (err === undefined) throw new Error("expected a RecedeError, but nothing was thrown");
  if (!(err instanceof RecedeError)) {
    throw new Error(`expected a RecedeError, got ${String(err)}`);
  }
  const fail = (what: string) => {
    throw new Error(`RecedeError "${err instanceof Error ? err.message : ""}": ${what}`);
  };
  if (expected.code !== undefined && err.code !== expected.code)
    fail(`code ${err.code} ≠ ${expected.code}`);
  if (expected.fn !== undefined && err.fn !== expected.fn) fail(`fn ${err.fn} ≠ ${expected.fn}`);
  if (expected.arg !== undefined && err.arg !== expected.arg)
    fail(`arg ${err.arg} ≠ ${expected.arg}`);
  if (!err.message.startsWith(`${err.fn}: ${err.arg} must be ${err.expected} (got `)) {
    fail("message does not follow `fn: arg must be expected (got given)`");
  }
  const m = expected.message;
  if (m !== undefined && !(typeof m === "string" ? err.message.includes(m) : m.test(err.message))) {
    fail(`message does not contain ${String(m)}`);
  }
  return err;
}
