/**
 * Test fixture (not part of the public API): a scalar model x⁺ = x + u with cost x² + u² whose copy
 * in a worker thread hangs when a rollout starts at x = 7, to exercise the pool's failure path.
 *
 * @module
 */
import { isMainThread } from "node:worker_threads";
import type { CostModel, Dynamics } from "@recede/core";

/** Build the fixture model. */
export function faulty(): { dynamics: Dynamics; cost: CostModel } {
  const dynamics: Dynamics = {
    stateSize: 1,
    controlSize: 1,
    step(x, xo, u, uo, count): void {
      for (let k = 0; k < count; k++) x[xo + k] += u[uo + k];
    },
  };
  const cost: CostModel = {
    stateSize: 1,
    controlSize: 1,
    running(x, xo, u, uo, count, t, out, oo): void {
      for (let k = 0; k < count; k++) {
        if (!isMainThread && t === 0 && x[xo + k] === 7) for (;;);
        out[oo + k] += x[xo + k] * x[xo + k] + u[uo + k] * u[uo + k];
      }
    },
    terminal(x, xo, count, out, oo): void {
      for (let k = 0; k < count; k++) out[oo + k] += x[xo + k] * x[xo + k];
    },
  };
  return { dynamics, cost };
}
