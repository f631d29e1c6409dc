/**
 * Sum of batched costs.
 *
 * @module
 */
import { type CostModel, RecedeError } from "@recede/core";
import { QuadraticCostImpl } from "./quadraticCost.js";
import { StateLimitTerm } from "./stateLimitPenalty.js";

/**
 * The cost c(x, u, t) = Σ_i c_i(x, u, t), c_H(x) = Σ_i c_{H,i}(x) of one or more batched costs of the
 * same sizes. Each term accumulates into the same output, so the sum allocates nothing.
 * A {@link quadraticCost} with diagonal weights directly followed by a {@link stateLimitPenalty}
 * is evaluated in one pass over the states (bit-identical to the two passes: each sample's output
 * still receives the quadratic part first and then the penalty).
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
  // Fuse each quadratic cost that is directly followed by a soft-limit term into one pass over
  // the states (same terms, same order, bit-identical sums; measured in bench/RESULTS.md §4).
  const list: CostModel[] = [];
  for (let i = 0; i < terms.length; i++) {
    const a = terms[i];
    const b = terms[i + 1];
    if (a instanceof QuadraticCostImpl && b instanceof StateLimitTerm) {
      list.push(new QuadraticWithLimits(a, b));
      i++;
    } else list.push(a);
  }
  if (list.length === 1) return new SingleTerm(list[0]);
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

/** A quadratic cost and the soft limits after it, evaluated in one pass (internal). */
class QuadraticWithLimits implements CostModel {
  readonly stateSize: number;
  readonly controlSize: number;
  constructor(
    private readonly quad: QuadraticCostImpl,
    private readonly lim: StateLimitTerm,
  ) {
    this.stateSize = quad.stateSize;
    this.controlSize = quad.controlSize;
  }

  running(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    t: number,
    out: Float64Array,
    oo: number,
  ): void {
    this.quad.runningWithLimits(x, xo, u, uo, count, t, out, oo, this.lim);
  }

  terminal(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void {
    this.quad.terminal(x, xo, count, out, oo);
    this.lim.terminal(x, xo, count, out, oo);
  }
}

/** The sum of one (possibly fused) term: a fresh object, so callers never alias the term. */
class SingleTerm implements CostModel {
  readonly stateSize: number;
  readonly controlSize: number;
  constructor(private readonly term: CostModel) {
    this.stateSize = term.stateSize;
    this.controlSize = term.controlSize;
  }

  running(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    count: number,
    t: number,
    out: Float64Array,
    oo: number,
  ): void {
    this.term.running(x, xo, u, uo, count, t, out, oo);
  }

  terminal(x: Float64Array, xo: number, count: number, out: Float64Array, oo: number): void {
    this.term.terminal(x, xo, count, out, oo);
  }
}
