/**
 * Test fixture (not part of the public API): a scalar model that jumps to +∞ when u > 5 and maps a
 * non-finite state back to 0, with a cost that reads only u. The non-finite state is visible only
 * to a per-step check (`checkEveryStep`), never to the final state or the summed cost.
 *
 * @module
 */
import type { CostModel, Dynamics } from "@recede/core";

/** Build the fixture model. */
export function laundering(): { dynamics: Dynamics; cost: CostModel } {
  const dynamics: Dynamics = {
    stateSize: 1,
    controlSize: 1,
    step(x, xo, u, uo, count): void {
      for (let k = 0; k < count; k++) {
        const v = x[xo + k];
        x[xo + k] =
          u[uo + k] > 5 ? Number.POSITIVE_INFINITY : Number.isFinite(v) ? v + u[uo + k] : 0;
      }
    },
  };
  const cost: CostModel = {
    stateSize: 1,
    controlSize: 1,
    running(_x, _xo, u, uo, count, _t, out, oo): void {
      for (let k = 0; k < count; k++) out[oo + k] += u[uo + k] * u[uo + k];
    },
    terminal(): void {},
  };
  return { dynamics, cost };
}
