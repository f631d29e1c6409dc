import { euclidean } from "@recede/core";
import { catchRecedeError, finiteVector } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

describe("euclidean", () => {
  it("unconstrained step is the gradient step x − ηg, bit for bit (Zinkevich 2003)", () => {
    fc.assert(
      fc.property(
        finiteVector(5),
        finiteVector(5),
        fc.double({ min: 0, max: 3, noNaN: true }),
        (x, g, eta) => {
          const out = euclidean({ dimension: 5 }).step(x, g, eta, new Float64Array(5));
          for (let i = 0; i < 5; i++) expect(out[i]).toBe(x[i] - eta * g[i]);
        },
      ),
      { numRuns: 100 },
    );
  });

  it("projects onto a ball: outside points land on the sphere along the ray from the center", () => {
    const geo = euclidean({ dimension: 2, feasible: { kind: "ball", radius: 2, center: [1, 1] } });
    const out = geo.project(new Float64Array([4, 5]), new Float64Array(2)); // x − c = (3, 4), ‖·‖ = 5
    expect(out[0]).toBeCloseTo(1 + 3 * (2 / 5), 15);
    expect(out[1]).toBeCloseTo(1 + 4 * (2 / 5), 15);
    const inside = new Float64Array([1.5, 0.2]);
    expect(Array.from(geo.project(inside, new Float64Array(2)))).toEqual([1.5, 0.2]);
    expect(geo.contains(out)).toBe(true);
    expect(geo.contains(new Float64Array([4, 5]))).toBe(false);
    expect(geo.feasibleKind).toBe("ball");
  });

  it("projects huge steps onto the ball without overflow", () => {
    const geo = euclidean({ dimension: 2, feasible: { kind: "ball", radius: 1 } });
    const out = geo.step(
      new Float64Array([0, 0]),
      new Float64Array([-1e300, -1e300]),
      1e7,
      new Float64Array(2),
    );
    expect(out[0]).toBeCloseTo(Math.SQRT1_2, 15);
    expect(out[1]).toBeCloseTo(Math.SQRT1_2, 15);
  });

  it("projects onto a box by clamping (half-open sides allowed)", () => {
    const geo = euclidean({
      dimension: 3,
      feasible: { kind: "box", lower: [0, -1, -Infinity], upper: Infinity },
    });
    const out = geo.step(
      new Float64Array([0.5, 0, 0]),
      new Float64Array([1, 2, 1e6]),
      1,
      new Float64Array(3),
    );
    expect(Array.from(out)).toEqual([0, -1, -1e6]);
    expect(geo.contains(out)).toBe(true);
    expect(geo.contains(new Float64Array([-0.1, 0, 0]))).toBe(false);
  });

  it("projects onto the simplex (Duchi, Shalev-Shwartz, Singer & Chandra 2008, worked by hand)", () => {
    const geo = euclidean({ dimension: 3, feasible: { kind: "simplex" } });
    const p = (v: number[]) => Array.from(geo.project(Float64Array.from(v), new Float64Array(3)));
    // sorted (0.6, 0.3, −0.5): τ = (0.6 + 0.3 − 1)/2 = −0.05, so x = (0.65, 0.35, 0).
    const a = p([0.6, 0.3, -0.5]);
    expect(a[0]).toBeCloseTo(0.65, 15);
    expect(a[1]).toBeCloseTo(0.35, 15);
    expect(a[2]).toBe(0);
    expect(p([0.5, 0.5, 0.5]).map((v) => v * 3)).toEqual(
      [1, 1, 1].map((v) => expect.closeTo(v, 14)),
    );
    expect(p([5, 0, 0])).toEqual([1, 0, 0]);
    expect(p([0.2, 0.3, 0.5])).toEqual([0.2, 0.3, 0.5].map((v) => expect.closeTo(v, 15)));
    const big = euclidean({ dimension: 1000, feasible: { kind: "simplex", total: 3 } });
    const v = Float64Array.from({ length: 1000 }, (_, i) => Math.sin(i) * 10);
    const out = big.step(v, new Float64Array(1000), 1, new Float64Array(1000));
    expect(big.contains(out)).toBe(true);
    expect(big.feasibleKind).toBe("simplex");
    catchRecedeError(() => euclidean({ dimension: 2, feasible: { kind: "simplex", total: 0 } }), {
      code: "range",
      arg: "feasible.total",
    });
  });

  it("D is half the squared distance and the mirror maps are the identity", () => {
    const geo = euclidean({ dimension: 2 });
    expect(geo.divergence(new Float64Array([1, 2]), new Float64Array([4, 6]))).toBe(12.5);
    expect(geo.potential(new Float64Array([3, 4]))).toBe(12.5);
    expect(Array.from(geo.mirrorMap(new Float64Array([3, 4]), new Float64Array(2)))).toEqual([
      3, 4,
    ]);
    expect(geo.contains(new Float64Array([Number.NaN, 0]))).toBe(false);
    expect(geo.contains(new Float64Array(3))).toBe(false);
  });

  it("rejects bad options with typed errors naming function, option, expected and given", () => {
    const fn = "euclidean";
    catchRecedeError(() => euclidean({ dimension: 0 }), {
      code: "range",
      fn,
      arg: "dimension",
      message: "(got 0)",
    });
    catchRecedeError(() => euclidean({ dimension: 1.5 }), { code: "range", fn, arg: "dimension" });
    catchRecedeError(() => euclidean(undefined as never), { code: "type", fn, arg: "options" });
    catchRecedeError(() => euclidean({ dimension: 2, feasible: { kind: "ball", radius: -1 } }), {
      code: "range",
      fn,
      arg: "feasible.radius",
      message: "> 0 (got -1)",
    });
    catchRecedeError(
      () => euclidean({ dimension: 2, feasible: { kind: "ball", radius: Number.NaN } }),
      {
        code: "non-finite",
        arg: "feasible.radius",
      },
    );
    catchRecedeError(
      () => euclidean({ dimension: 2, feasible: { kind: "ball", radius: 1, center: [0] } }),
      {
        code: "dimension",
        arg: "feasible.center",
      },
    );
    catchRecedeError(
      () => euclidean({ dimension: 2, feasible: { kind: "box", lower: [0, 2], upper: 1 } }),
      {
        code: "range",
        arg: "feasible.lower[1]",
      },
    );
    catchRecedeError(
      () =>
        euclidean({ dimension: 2, feasible: { kind: "box", lower: Infinity, upper: Infinity } }),
      {
        code: "range",
        arg: "feasible.lower[0]",
      },
    );
    catchRecedeError(
      () => euclidean({ dimension: 2, feasible: { kind: "box", lower: Number.NaN, upper: 1 } }),
      {
        code: "non-finite",
        arg: "feasible.lower",
      },
    );
    catchRecedeError(() => euclidean({ dimension: 2, feasible: { kind: "disc" } as never }), {
      code: "type",
      arg: "feasible.kind",
      message: '"disc"',
    });
    catchRecedeError(() => euclidean({ dimension: 2, tolerance: -1 }), {
      code: "range",
      arg: "tolerance",
    });
  });
});
