import { diagonalGaussian, entropy, euclidean, mahalanobis, positiveEntropy } from "@recede/core";
import {
  ballPoint,
  boundedGradient,
  finiteVector,
  type GeometryLawRow,
  geometryLaws,
  positiveVector,
  simplexPoint,
  spdMatrix,
  stepSize,
} from "@recede/testkit";
import fc from "fast-check";
import { describe, it } from "vitest";

// Laws of Bregman divergences (Chen & Teboulle, SIAM J. Optim., 1993; Beck & Teboulle,
// Oper. Res. Lett., 2003): every geometry passes the same table.

const metric3 = fc.sample(spdMatrix(3), { seed: 11, numRuns: 1 })[0];
const center3 = new Float64Array([0.5, -1, 2]);

const rows: GeometryLawRow[] = [
  {
    name: "euclidean (ℝ⁴)",
    geometry: euclidean({ dimension: 4 }),
    point: finiteVector(4),
    gradient: finiteVector(4),
    firstOrder: "exact",
  },
  {
    name: "euclidean (ball r=2, off-center)",
    geometry: euclidean({ dimension: 3, feasible: { kind: "ball", radius: 2, center: center3 } }),
    point: ballPoint(3, 2, center3),
    gradient: finiteVector(3, { min: -20, max: 20 }),
    firstOrder: "none",
  },
  {
    name: "euclidean (box)",
    geometry: euclidean({
      dimension: 3,
      feasible: { kind: "box", lower: [-1, 0, -Infinity], upper: [1, 5, 0] },
    }),
    point: fc
      .tuple(
        fc.double({ min: -1, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 5, noNaN: true }),
        fc.double({ min: -50, max: 0, noNaN: true }),
      )
      .map((a) => Float64Array.from(a)),
    gradient: finiteVector(3, { min: -20, max: 20 }),
    firstOrder: "none",
  },
  {
    name: "euclidean (simplex, total 2)",
    geometry: euclidean({ dimension: 4, feasible: { kind: "simplex", total: 2 } }),
    point: simplexPoint(4).map((p) => p.map((v) => 2 * v)),
    gradient: finiteVector(4, { min: -20, max: 20 }),
    firstOrder: "none",
  },
  {
    name: "mahalanobis (random SPD, ℝ³)",
    geometry: mahalanobis({ metric: { data: metric3, rows: 3, cols: 3 } }),
    point: finiteVector(3),
    gradient: finiteVector(3),
    firstOrder: "exact",
  },
  {
    name: "mahalanobis (M-norm ball)",
    geometry: mahalanobis({
      metric: [
        [4, 1],
        [1, 2],
      ],
      feasible: { kind: "ball", radius: 1.5, center: [1, -1] },
    }),
    // Points of the M-ball: c + L⁻ᵀv with ‖v‖ ≤ r, M = LLᵀ; here drawn from the Euclidean ball of
    // radius r/√λ_max(M) ⊂ M-ball (λ_max < 4.5).
    point: ballPoint(2, 1.5 / Math.sqrt(4.5), new Float64Array([1, -1])),
    gradient: finiteVector(2, { min: -20, max: 20 }),
    firstOrder: "none",
  },
  {
    name: "entropy (simplex, N=5)",
    geometry: entropy({ dimension: 5 }),
    point: simplexPoint(5),
    gradient: boundedGradient(5, 5, "linf"),
    firstOrder: "up-to-constant",
    simplex: true,
  },
  {
    name: "entropy (simplex, N=1)",
    geometry: entropy({ dimension: 1 }),
    point: simplexPoint(1),
    gradient: finiteVector(1),
    firstOrder: "up-to-constant",
    simplex: true,
  },
  {
    name: "positive entropy (orthant, N=4)",
    geometry: positiveEntropy({ dimension: 4 }),
    point: positiveVector(4, 1e-3, 100),
    gradient: boundedGradient(4, 3, "linf"),
    firstOrder: "exact",
  },
  {
    name: "diagonal Gaussian (k=3, expectation parameters)",
    geometry: diagonalGaussian({ dimension: 3 }),
    point: fc
      .tuple(finiteVector(3, { min: -3, max: 3 }), positiveVector(3, 0.05, 10))
      .map(([m, v]) => Float64Array.from([...m, ...m.map((mi, i) => mi * mi + v[i])])),
    // g on the second moments ≥ −0.02 keeps the precision positive for η ≤ 2 and σ² ≤ 10.
    gradient: fc
      .tuple(finiteVector(3, { min: -2, max: 2 }), finiteVector(3, { min: -0.02, max: 2 }))
      .map(([a, b]) => Float64Array.from([...a, ...b])),
    firstOrder: "exact",
    tolerance: 1e-8,
  },
  {
    name: "diagonal Gaussian (k=2, natural parameters)",
    geometry: diagonalGaussian({ dimension: 2, parameters: "natural" }),
    point: fc
      .tuple(finiteVector(2, { min: -3, max: 3 }), positiveVector(2, 0.5, 10))
      .map(([m, v]) => Float64Array.from([m[0] / v[0], m[1] / v[1], -0.5 / v[0], -0.5 / v[1]])),
    // |g| ≤ 0.02 and η ≤ 1 keep the new variance v − ηg₂ + 2ημg₁ − η²g₁² > 0 for v ≥ 0.5, |μ| ≤ 3.
    gradient: finiteVector(4, { min: -0.02, max: 0.02 }),
    stepSize: stepSize(1e-3, 1),
    firstOrder: "exact",
    tolerance: 1e-8,
  },
];

describe("geometry laws", () => {
  for (const law of geometryLaws(rows, { numRuns: 150 })) it(law.name, law.check);
});
