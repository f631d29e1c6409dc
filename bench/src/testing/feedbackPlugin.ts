/**
 * A sweep plugin used by the tests and shown in bench/README.md: it registers the optimizer kind
 * `linear-feedback`, u = ū − G (x − x̄) with a user-given gain matrix G (m×n, row-major), clipped to
 * the bounds by the harness.
 *
 * @module
 */

import { SpecError } from "../params.js";
import type { BenchController, BenchProblem, Registry } from "../registry.js";

/** Register `linear-feedback` in `registry`. */
export function register(registry: Registry): void {
  registry.registerOptimizer({
    kind: "linear-feedback",
    description: "u = ū − G (x − x̄) with a fixed gain matrix G (test plugin).",
    params: {
      gains: { type: "numbers", description: "G, m×n row-major" },
    },
    create(params, problem: BenchProblem): BenchController {
      const n = problem.stateSize;
      const m = problem.controlSize;
      const g = (params.gains as readonly number[] | undefined) ?? new Array<number>(m * n).fill(0);
      if (g.length !== m * n)
        throw new SpecError(
          "gains",
          `must have m·n = ${m * n} entries for ${problem.id} (got ${g.length})`,
        );
      const xs = problem.equilibrium?.state ?? new Float64Array(n);
      const us = problem.equilibrium?.control ?? new Float64Array(m);
      const u = new Float64Array(m);
      return {
        act(x): { control: Float64Array; samples: number } {
          for (let j = 0; j < m; j++) {
            let s = us[j];
            for (let i = 0; i < n; i++) s -= g[j * n + i] * (x[i] - xs[i]);
            u[j] = s;
          }
          return { control: u, samples: 0 };
        },
      };
    },
  });
}
