import { mahalanobis } from "@recede/core";
import { catchRecedeError, finiteVector } from "@recede/testkit";
import fc from "fast-check";
import ndarray from "ndarray";
import { describe, expect, it } from "vitest";

// M = [[4, 1], [1, 3]], det 11, M⁻¹ = [[3, −1], [−1, 4]]/11 (2×2 inverse by the adjugate).
const M = [
  [4, 1],
  [1, 3],
];
const Minv = [
  [3 / 11, -1 / 11],
  [-1 / 11, 4 / 11],
];

describe("mahalanobis", () => {
  it("step is the M⁻¹-preconditioned gradient step x − η M⁻¹g", () => {
    const geo = mahalanobis({ metric: M });
    fc.assert(
      fc.property(
        finiteVector(2),
        finiteVector(2),
        fc.double({ min: 0, max: 3, noNaN: true }),
        (x, g, eta) => {
          const out = geo.step(x, g, eta, new Float64Array(2));
          for (let i = 0; i < 2; i++) {
            const pg = Minv[i][0] * g[0] + Minv[i][1] * g[1];
            expect(out[i]).toBeCloseTo(x[i] - eta * pg, 12);
          }
        },
      ),
      { numRuns: 100 },
    );
  });

  it("with M = ∇²f and η = 1 the step is Newton's: it lands on the minimizer of a quadratic", () => {
    // f(x) = ½xᵀMx − bᵀx, ∇f = Mx − b, minimizer M⁻¹b.
    const geo = mahalanobis({ metric: M });
    const b = [1, -2];
    const x = new Float64Array([10, -7]);
    const grad = new Float64Array([4 * 10 + 1 * -7 - b[0], 1 * 10 + 3 * -7 - b[1]]);
    geo.step(x, grad, 1, x);
    expect(x[0]).toBeCloseTo(Minv[0][0] * b[0] + Minv[0][1] * b[1], 14);
    expect(x[1]).toBeCloseTo(Minv[1][0] * b[0] + Minv[1][1] * b[1], 14);
  });

  it("D(x‖y) = ½(x−y)ᵀM(x−y), ∇ψ = Mx, ∇ψ* = M⁻¹θ", () => {
    const geo = mahalanobis({ metric: M });
    // x − y = (1, −1): ½(4 − 1 − 1 + 3) = 2.5
    expect(geo.divergence(new Float64Array([2, 0]), new Float64Array([1, 1]))).toBeCloseTo(2.5, 15);
    expect(Array.from(geo.mirrorMap(new Float64Array([1, 2]), new Float64Array(2)))).toEqual([
      6, 7,
    ]);
    const back = geo.inverseMirrorMap(new Float64Array([6, 7]), new Float64Array(2));
    expect(back[0]).toBeCloseTo(1, 14);
    expect(back[1]).toBeCloseTo(2, 14);
    expect(geo.name).toBe("mahalanobis");
    expect(geo.dimension).toBe(2);
  });

  it("projects onto an M-norm ball in closed form", () => {
    const geo = mahalanobis({ metric: M, feasible: { kind: "ball", radius: 1, center: [1, 0] } });
    const x = new Float64Array([3, 2]); // x − c = (2, 2), ‖·‖_M² = 4·4 + 2·4 + 3·4 = 36 → 6
    const p = geo.project(x, new Float64Array(2));
    expect(p[0]).toBeCloseTo(1 + 2 / 6, 15);
    expect(p[1]).toBeCloseTo(2 / 6, 15);
    expect(geo.contains(p)).toBe(true);
    expect(geo.contains(x)).toBe(false);
    const inside = new Float64Array([1.1, 0.1]);
    expect(Array.from(geo.project(inside, new Float64Array(2)))).toEqual([1.1, 0.1]);
  });

  it("accepts the metric as ndarray views: plain, transposed, strided and offset", () => {
    const ref = mahalanobis({ metric: M });
    const g = new Float64Array([0.3, -1.7]);
    const x = new Float64Array([2, 5]);
    const expected = ref.step(x, g, 0.7, new Float64Array(2));
    // A 4×4 buffer whose even rows/cols hold M (strided), and an offset 2×2 window.
    const big = new Float64Array(16).fill(99);
    big[0] = 4;
    big[2] = 1;
    big[8] = 1;
    big[10] = 3;
    const window = new Float64Array([7, 7, 7, 7, 4, 1, 7, 1, 3]);
    const views = [
      ndarray(new Float64Array([4, 1, 1, 3]), [2, 2]),
      ndarray(new Float64Array([4, 1, 1, 3]), [2, 2]).transpose(1, 0),
      ndarray(big, [4, 4]).step(2, 2),
      ndarray(window, [3, 3]).lo(1, 1),
      { data: new Float64Array([4, 1, 1, 3]), rows: 2, cols: 2 },
      new Float64Array([4, 1, 1, 3]),
    ];
    for (const v of views) {
      const geo = mahalanobis({ metric: v });
      expect(Array.from(geo.step(x, g, 0.7, new Float64Array(2)))).toEqual(Array.from(expected));
    }
    // Non-symmetric data read through a transposed view is checked like any other input.
    catchRecedeError(
      () =>
        mahalanobis({ metric: ndarray(new Float64Array([4, 1, 2, 3]), [2, 2]).transpose(1, 0) }),
      {
        code: "not-spd",
      },
    );
  });

  it("copies the metric: later changes to the input have no effect", () => {
    const data = new Float64Array([4, 1, 1, 3]);
    const geo = mahalanobis({ metric: { data, rows: 2, cols: 2 } });
    data[0] = 1000;
    expect(geo.metric[0]).toBe(4);
  });

  it("symmetrizes a metric that is symmetric up to rounding", () => {
    const geo = mahalanobis({
      metric: [
        [4, 1 + 1e-14],
        [1, 3],
      ],
    });
    expect(geo.metric[1]).toBe(geo.metric[2]);
  });

  it("rejects non-SPD and malformed metrics with typed errors", () => {
    const fn = "mahalanobis";
    catchRecedeError(
      () =>
        mahalanobis({
          metric: [
            [1, 2],
            [2, 1],
          ],
        }),
      {
        code: "not-spd",
        fn,
        arg: "metric",
        message: "positive definite",
      },
    );
    catchRecedeError(
      () =>
        mahalanobis({
          metric: [
            [0, 0],
            [0, 0],
          ],
        }),
      { code: "not-spd", fn, arg: "metric" },
    );
    catchRecedeError(() => mahalanobis({ metric: [[-1]] }), { code: "not-spd", fn, arg: "metric" });
    catchRecedeError(
      () =>
        mahalanobis({
          metric: [
            [1, 0.5],
            [0, 1],
          ],
        }),
      {
        code: "not-spd",
        fn,
        arg: "metric",
        message: "symmetric",
      },
    );
    catchRecedeError(
      () =>
        mahalanobis({
          metric: [
            [1, 0, 0],
            [0, 1, 0],
          ],
        }),
      { code: "dimension", fn, arg: "metric" },
    );
    catchRecedeError(
      () =>
        mahalanobis({
          metric: [
            [1, Number.NaN],
            [Number.NaN, 1],
          ],
        }),
      {
        code: "non-finite",
        fn,
        arg: "metric[0][1]",
      },
    );
    catchRecedeError(() => mahalanobis({ metric: [] }), { code: "dimension", fn, arg: "metric" });
    catchRecedeError(() => mahalanobis({} as never), { code: "type", fn, arg: "metric" });
    catchRecedeError(
      () => mahalanobis({ metric: { data: new Float64Array(3), rows: 2, cols: 2 } }),
      {
        code: "dimension",
        arg: "metric",
      },
    );
    catchRecedeError(
      () => mahalanobis({ metric: M, feasible: { kind: "box", lower: 0, upper: 1 } as never }),
      {
        code: "type",
        arg: "feasible",
        message: '"box"',
      },
    );
    catchRecedeError(() => mahalanobis({ metric: M, feasible: { kind: "ball", radius: 0 } }), {
      code: "range",
      arg: "feasible.radius",
    });
    catchRecedeError(() => mahalanobis({ metric: new Float64Array(3) }), {
      code: "dimension",
      arg: "metric",
    });
    catchRecedeError(() => mahalanobis({ metric: M, symmetryTolerance: -1 }), {
      code: "range",
      arg: "symmetryTolerance",
    });
  });
});
