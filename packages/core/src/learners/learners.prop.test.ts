import {
  adaGradStep,
  diagonalGaussian,
  dynamicMirrorDescent,
  entropy,
  euclidean,
  inverseSqrtStep,
  mahalanobis,
  mirrorDescent,
  positiveEntropy,
  scheduledStep,
} from "@recede/core";
import {
  bitEqual,
  boundedGradient,
  finiteVector,
  type LearnerLawRow,
  learnerLaws,
  simplexPoint,
  stepSize,
} from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

const rows: LearnerLawRow[] = [
  {
    name: "mirrorDescent / euclidean, constant η",
    create: () =>
      mirrorDescent({
        geometry: euclidean({ dimension: 3 }),
        initial: [1, -2, 0.5],
        stepSize: 0.3,
      }),
    gradient: boundedGradient(3, 10),
    quadratic: { target: new Float64Array([0.3, -0.7, 2]), rounds: 80, tolerance: 1e-9 },
  },
  {
    name: "mirrorDescent / euclidean ball, 1/√t",
    create: () =>
      mirrorDescent({
        geometry: euclidean({ dimension: 2, feasible: { kind: "ball", radius: 1 } }),
        initial: [0, 0],
        stepSize: inverseSqrtStep(1),
      }),
    gradient: boundedGradient(2, 5),
    quadratic: { target: new Float64Array([0.5, -0.25]), rounds: 200, tolerance: 1e-6 },
  },
  {
    name: "mirrorDescent / euclidean box, AdaGrad",
    create: () =>
      mirrorDescent({
        geometry: euclidean({ dimension: 2, feasible: { kind: "box", lower: -1, upper: 1 } }),
        initial: [1, 1],
        stepSize: adaGradStep(1),
      }),
    gradient: boundedGradient(2, 5),
    quadratic: { target: new Float64Array([0.2, -0.9]), rounds: 400, tolerance: 1e-3 },
  },
  {
    name: "mirrorDescent / euclidean simplex (projected OGD)",
    create: () =>
      mirrorDescent({
        geometry: euclidean({ dimension: 3, feasible: { kind: "simplex" } }),
        initial: [1, 0, 0],
        stepSize: 0.2,
      }),
    gradient: boundedGradient(3, 10),
    quadratic: { target: new Float64Array([0.5, 0.2, 0.3]), rounds: 200, tolerance: 1e-10 },
  },
  {
    name: "mirrorDescent / diagonal Gaussian (natural parameters)",
    create: () =>
      mirrorDescent({
        geometry: diagonalGaussian({ dimension: 1, parameters: "natural" }),
        initial: [0, -0.5],
        stepSize: 0.5,
      }),
    // From μ = 0, σ² = 1, twelve steps of η|g| ≤ 0.025 keep σ² = s − μ² ≥ 0.7 − 0.09 > 0.
    gradient: finiteVector(2, { min: -0.05, max: 0.05 }),
  },
  {
    name: "mirrorDescent / mahalanobis (Newton, η=1)",
    create: () =>
      mirrorDescent({
        geometry: mahalanobis({
          metric: [
            [2, 0],
            [0, 0.5],
          ],
        }),
        initial: [3, 3],
        stepSize: 1,
      }),
    gradient: boundedGradient(2, 5),
    quadratic: {
      target: new Float64Array([1, -1]),
      weights: new Float64Array([2, 0.5]),
      rounds: 1,
      tolerance: 1e-14,
    },
  },
  {
    name: "mirrorDescent / entropy, user schedule",
    create: () =>
      mirrorDescent({
        geometry: entropy({ dimension: 3 }),
        initial: [0.2, 0.3, 0.5],
        stepSize: scheduledStep((t) => 2 / Math.sqrt(t)),
      }),
    gradient: boundedGradient(3, 1e6, "linf"),
    quadratic: { target: new Float64Array([0.6, 0.3, 0.1]), rounds: 2000, tolerance: 1e-3 },
  },
  {
    name: "mirrorDescent / positive entropy",
    create: () =>
      mirrorDescent({
        geometry: positiveEntropy({ dimension: 2 }),
        initial: [1, 1],
        stepSize: 0.5,
      }),
    gradient: boundedGradient(2, 3, "linf"),
    quadratic: { target: new Float64Array([2, 0.5]), rounds: 200, tolerance: 1e-8 },
  },
  {
    name: "dynamicMirrorDescent / euclidean, damped Φ",
    create: () =>
      dynamicMirrorDescent({
        geometry: euclidean({ dimension: 2 }),
        initial: [0, 0],
        stepSize: 0.5,
        dynamic: (x, _t, out) => {
          out[0] = 0.9 * x[0];
          out[1] = x[1];
        },
      }),
    gradient: boundedGradient(2, 5),
  },
];

describe("learner laws", () => {
  for (const law of learnerLaws(rows, { numRuns: 60 })) it(law.name, law.check);
});

describe("dynamicMirrorDescent with Φ = identity", () => {
  const geometries = [
    () => euclidean({ dimension: 4, feasible: { kind: "ball", radius: 2 } }),
    () => entropy({ dimension: 4 }),
  ];
  it("equals mirrorDescent bit for bit (Hall & Willett 2015: DMD with Φ = id is OMD)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 1 }),
        simplexPoint(4),
        fc.array(boundedGradient(4, 50), { minLength: 1, maxLength: 30 }),
        stepSize(),
        (gi, x0, seq, eta) => {
          const md = mirrorDescent({
            geometry: geometries[gi](),
            initial: x0,
            stepSize: inverseSqrtStep(eta),
          });
          const dmd = dynamicMirrorDescent({
            geometry: geometries[gi](),
            initial: x0,
            stepSize: inverseSqrtStep(eta),
            dynamic: (x, _t, out) => out.set(x),
          });
          for (const g of seq) {
            md.update({ gradient: g });
            dmd.update({ gradient: g });
            expect(bitEqual(md.decision(), dmd.decision())).toBe(true);
          }
        },
      ),
      { numRuns: 100 },
    );
  });
});
