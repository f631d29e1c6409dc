/**
 * Sum of batched costs.
 *
 * @module
 */
import { type CostModel, RecedeError } from "@recede/core";

/**
 * The cost c(x, u, t) = Σ_i c_i(x, u, t), c_H(x) = Σ_i c_{H,i}(x) of one or more batched costs of the
 * same sizes. Each term accumulates into the same output, so the sum allocates nothing.
 *
 * @example
 * ```ts
 * const a = quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: 0 });
 * const b = quadraticCost({ stateSize: 2, controlSize: 1, q: 0, r: 1 });
 * const both = sumCosts(a, b); // same as q: 1, r: 1
 * ```
 */
export function sumCosts(...terms: readonly CostModel[]): CostModel {
  const fn = "sumCosts";
  if (terms.length === 0) throw new RecedeError("range", fn, "terms", "at least one cost", 0);
  const n = terms[0].stateSize;
  const m = terms[0].controlSize;
  terms.forEach((c, i) => {
    if (typeof c !== "object" || c === null || typeof c.running !== "function") {
      throw new RecedeError("type", fn, `terms[${i}]`, "a CostModel", c);
    }
    if (c.stateSize !== n || c.controlSize !== m) {
      throw new RecedeError(
        "dimension",
        fn,
        `terms[${i}]`,
        `a cost with stateSize ${n} and controlSize ${m}`,
        `stateSize ${c.stateSize}, controlSize ${c.controlSize}`,
      );
    }
  });
  const list = terms.slice();
  return {
    stateSize: n,
    controlSize: m,
    running(x, xo, u, uo, count, t, out, oo): void {
      for (let i = 0; i < list.length; i++) list[i].running(x, xo, u, uo, count, t, out, oo);
    },
    terminal(x, xo, count, out, oo): void {
      for (let i = 0; i < list.length; i++) list[i].terminal(x, xo, count, out, oo);
    },
  };
}
