/**
 * The "within tolerance for the last N states" success test shared by the problems (internal).
 *
 * @module
 */
import type { SuccessReport } from "../problem.js";
import { trajectoryCount } from "./options.js";

/**
 * Count how many consecutive final states satisfy `check` (which returns "" when the state at
 * offset `o` is within tolerance, else a reason), and compare with `required`.
 */
export function holdTest(
  fn: string,
  states: Float64Array,
  n: number,
  count: number | undefined,
  required: number,
  criterion: string,
  check: (x: Float64Array, o: number) => string,
): SuccessReport {
  const c = trajectoryCount(fn, states, n, count);
  let held = 0;
  let reason = "ok";
  for (let s = c - 1; s >= 0; s--) {
    const r = check(states, s * n);
    if (r !== "") {
      if (held < required) reason = `state ${s} of ${c}: ${r}`;
      break;
    }
    held++;
  }
  if (held < required && reason === "ok") {
    reason = `only ${c} states given, ${required} required`;
  }
  return { success: held >= required, heldSteps: held, requiredSteps: required, criterion, reason };
}

/** Format a number briefly for reasons. */
export function fmt(v: number): string {
  return Number.isFinite(v) ? v.toPrecision(4) : String(v);
}
