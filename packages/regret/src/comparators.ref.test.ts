// Reference: best fixed decisions in hindsight against SciPy solvers.
// Source: scripts/reference/regret_comparators.py → fixtures/comparators.json. Each case names the
// solver it used (scipy.optimize.linprog(method="highs") and brute force over vertices for the
// simplex; linprog for the box; scipy.optimize.minimize(method="SLSQP") for the ball;
// scipy.optimize.minimize(method="L-BFGS-B") + numpy.linalg.solve for unconstrained summed
// quadratics; scipy.optimize.lsq_linear(method="bvls") + L-BFGS-B for box-constrained ones).
// P. Virtanen et al., "SciPy 1.0: Fundamental Algorithms for Scientific Computing in Python",
// Nature Methods 17, 2020.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { ballDomain, boxDomain, type Domain, simplexDomain } from "./domain.js";
import { linearLoss, quadraticLoss } from "./losses.js";
import { minimizeQuadratic } from "./quadraticMinimum.js";
import { createRegretTracker } from "./tracker.js";

interface DomainSpec {
  kind: "simplex" | "box" | "ball" | "unconstrained";
  lower?: number[];
  upper?: number[];
  center?: number[];
  radius?: number;
}
interface Case {
  name: string;
  loss: "linear" | "quadratic";
  domain: DomainSpec;
  dimension: number;
  rounds: number;
  gradients?: number[][];
  hessians?: number[][];
  linear?: number[][];
  constants: number[];
  decisions: number[][];
  bestValue: number;
  argmin: number[];
  regret: number;
  solver: string;
}

const fixture = JSON.parse(
  readFileSync(new URL("../fixtures/comparators.json", import.meta.url), "utf8"),
) as { cases: Case[] };

function toDomain(s: DomainSpec, d: number): Domain | undefined {
  switch (s.kind) {
    case "simplex":
      return simplexDomain(d);
    case "box":
      return boxDomain(Float64Array.from(s.lower ?? []), Float64Array.from(s.upper ?? []));
    case "ball":
      return ballDomain(Float64Array.from(s.center ?? []), s.radius ?? 0);
    default:
      return undefined;
  }
}

function scale(c: Case): number {
  return 1 + Math.abs(c.bestValue);
}

describe("best fixed decision in hindsight vs SciPy (fixtures/comparators.json)", () => {
  const linear = fixture.cases.filter((c) => c.loss === "linear");
  const quadratic = fixture.cases.filter((c) => c.loss === "quadratic");
  it("has the cases the script writes", () => {
    expect(linear.length).toBe(9);
    expect(quadratic.length).toBe(8);
  });

  for (const c of linear) {
    it(`${c.name}: linear losses over the ${c.domain.kind} (${c.solver})`, () => {
      const d = c.dimension;
      const tracker = createRegretTracker({ dimension: d, domain: toDomain(c.domain, d) });
      for (let t = 0; t < c.rounds; t++) {
        const lo = linearLoss(Float64Array.from(c.gradients?.[t] ?? []), c.constants[t]);
        tracker.record({ decision: Float64Array.from(c.decisions[t]), lossObject: lo });
      }
      const s = tracker.summary();
      const lin = s.linear;
      expect(lin).toBeDefined();
      if (!lin) return;
      const C = c.constants.reduce((a, b) => a + b, 0);
      // The tracker reports min ⟨Γ, u⟩; the fixture adds Σ c_t.
      const tol = c.domain.kind === "ball" ? 1e-8 : 1e-10;
      expect(Math.abs(lin.bestValue + C - c.bestValue)).toBeLessThan(tol * scale(c));
      expect(Math.abs(lin.regret - c.regret)).toBeLessThan(tol * (1 + Math.abs(c.regret)));
      expect(Math.abs(s.cumulativeLoss - lin.playedValue - C)).toBeLessThan(1e-10 * scale(c));
      for (let i = 0; i < d; i++) {
        expect(Math.abs(lin.argmin[i] - c.argmin[i])).toBeLessThan(
          c.domain.kind === "ball" ? 1e-6 : 1e-9,
        );
      }
    });
  }

  for (const c of quadratic) {
    it(`${c.name}: summed quadratics, ${c.domain.kind} (${c.solver})`, () => {
      const d = c.dimension;
      const tracker = createRegretTracker({
        dimension: d,
        domain: toDomain(c.domain, d),
        linear: false,
        quadratic: true,
      });
      for (let t = 0; t < c.rounds; t++) {
        const lo = quadraticLoss(Float64Array.from(c.hessians?.[t] ?? []), {
          linear: Float64Array.from(c.linear?.[t] ?? []),
          constant: c.constants[t],
        });
        tracker.record({ decision: Float64Array.from(c.decisions[t]), lossObject: lo });
      }
      const q = tracker.summary().quadratic;
      expect(q).toBeDefined();
      if (!q) return;
      expect(q.status).toBe("converged");
      expect(Math.abs(q.bestValue - c.bestValue)).toBeLessThan(1e-9 * scale(c));
      expect(Math.abs(q.regret - c.regret)).toBeLessThan(1e-9 * (1 + Math.abs(c.regret)));
      for (let i = 0; i < d; i++) expect(Math.abs(q.argmin[i] - c.argmin[i])).toBeLessThan(1e-7);
    });
  }

  it("minimizeQuadratic on the summed box cases matches lsq_linear(method='bvls')", () => {
    for (const c of quadratic.filter((q) => q.domain.kind === "box")) {
      const d = c.dimension;
      const A = new Float64Array(d * d);
      const b = new Float64Array(d);
      for (let t = 0; t < c.rounds; t++) {
        const h = c.hessians?.[t] ?? [];
        const l = c.linear?.[t] ?? [];
        for (let i = 0; i < d * d; i++) A[i] += h[i];
        for (let i = 0; i < d; i++) b[i] += l[i];
      }
      const C = c.constants.reduce((x, y) => x + y, 0);
      const r = minimizeQuadratic(A, b, {
        lower: Float64Array.from(c.domain.lower ?? []),
        upper: Float64Array.from(c.domain.upper ?? []),
        constant: C,
      });
      expect(r.status).toBe("converged");
      expect(r.residual).toBeLessThanOrEqual(1e-12 * (1 + Math.max(...b.map(Math.abs))));
      expect(Math.abs(r.value - c.bestValue)).toBeLessThan(1e-9 * scale(c));
    }
  });
});
